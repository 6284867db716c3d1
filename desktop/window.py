"""The main window: opening files, the views, decisions, saving and exporting.

Layout (left to right, top to bottom)::

    caution band
    +-- Deviations | Terms | Patterns --+-- side by side: precedent | status | draft --+
    |  ranked list, filter              |                                              |
    |                                   +-- Selected deviation | Variants ------------+
    +-----------------------------------+----------------------------------------------+
    status: message, progress, Cancel

Every long operation (reading and reviewing, re-running after a term decision, building the
precedent set's index, patterns, exports) runs through :func:`desktop.tasks.start` with a
work function from :mod:`desktop.engine`.  When an operation ends the window updates the
:class:`~desktop.state.Workspace` and broadcasts one :class:`~desktop.state.Change`; each view
decides whether to refresh.
"""

from __future__ import annotations

import enum
import functools
import os
from collections.abc import Callable
from pathlib import Path
from typing import TYPE_CHECKING, Any

from PySide6.QtCore import QObject, QSettings, Qt, QThreadPool, QTimer, Signal
from PySide6.QtGui import QAction, QCloseEvent, QDragEnterEvent, QDropEvent, QKeySequence
from PySide6.QtWidgets import (
    QFileDialog,
    QInputDialog,
    QLabel,
    QMainWindow,
    QMessageBox,
    QProgressBar,
    QPushButton,
    QTabWidget,
    QToolBar,
    QVBoxLayout,
    QWidget,
)

import core
from core.readers import accepts_name

from . import engine, tasks
from .checks import ChecksPanel, checks_tab_title
from .decision import KEYS, DecisionPanel
from .deviations import DeviationsPanel
from .dialogs import REVIEW_FILTER, OpenDialog, show_about, show_keys
from .patterns import PatternsPanel
from .settings import Recent, WindowSettings, default_settings
from .sidebyside import SideBySideView
from .state import Change, DisplayOptions, Inputs, Workspace
from .terms import TermsPanel
from .variants import VariantsView
from .widgets import CautionBand, one_line, show_message, splitter

if TYPE_CHECKING:
    from core.library.index import Library
    from core.library.patterns import PatternGroup
    from core.model import Deviation, Review
    from core.session import ExportKind


class _Party(enum.Enum):
    REMEMBERED = "the party last chosen with the precedent"


#: ``open_comparison``'s default party: the one last chosen with the precedent.
REMEMBERED_PARTY = _Party.REMEMBERED

__all__ = ["DEFAULT_SIZE", "FIT_SCREEN", "FRAME_PX", "TITLE_BAR_PX", "Hub", "MainWindow", "first_run_size"]

#: The smallest common laptop screen we design for, in pixels (common practice, no source).
FIT_SCREEN = (1366, 768)
#: First-run window size: the screen above less a 40-pixel task bar and a 30-pixel title bar
#: (1366 x 698), with a margin; later runs restore the user's size.  A smaller screen gets
#: :func:`first_run_size`.
DEFAULT_SIZE = (1320, 680)
#: What the window manager adds round the window: a title bar above, a frame at the sides
#: (pixels; common practice, no source).
TITLE_BAR_PX, FRAME_PX = 30, 8
#: First-run share of the width for the deviation list: enough for its columns with about
#: 180 pixels of "What changed" at the default size.
LIST_SHARE = 0.46
#: First-run share of the right-hand height for the aligned text; the rest (the selected
#: deviation, or the wordings chart) needs about 300 pixels to show its decision buttons,
#: note and at least four lines of detail at the default size.
ALIGNED_SHARE = 0.5


class Hub(QObject):
    """Carries the one "what changed" value to every view."""

    changed = Signal(object)  # Change


def _sort_dropped(paths: list[str]) -> tuple[list[str], list[str], list[str], list[str]]:
    """Dropped paths by kind: (folders, review files, documents, anything else), each in drop order."""
    folders = [p for p in paths if os.path.isdir(p)]
    reviews = [p for p in paths if p.lower().endswith(".json")]
    docs = [p for p in paths if accepts_name(p)]
    others = [p for p in paths if p not in folders and p not in reviews and p not in docs]
    return folders, reviews, docs, others


class MainWindow(QMainWindow):
    #: A review (new, re-run or reopened) is on screen.
    reviewShown = Signal()
    #: An operation failed; the argument is the one line shown in the dialog.
    operationFailed = Signal(str)
    #: A background operation was cancelled.
    operationCancelled = Signal()
    #: A file was written (review file or export); the argument is its path.
    fileWritten = Signal(str)
    #: A background operation finished and its result is on screen; the argument names it.
    operationFinished = Signal(str)

    def __init__(self, *, settings: QSettings | None = None, pool: QThreadPool | None = None) -> None:
        super().__init__()
        self.setObjectName("mainWindow")
        self.setAcceptDrops(True)
        self.settings = WindowSettings(settings if settings is not None else default_settings())
        self.pool = pool if pool is not None else QThreadPool.globalInstance()
        self.ws = Workspace()
        self.hub = Hub(self)
        self._task: tasks.Task | None = None
        self._tasks: set[tasks.Task] = set()
        self._retired_libraries: list[Library] = []
        self._pending_library: str | None = None
        #: Documents dropped on one half of the window, waiting for the other one.
        self._pending_docs = {"draft": "", "precedent": ""}
        self.ask_before_closing = True
        self.last_message: str | None = None

        self._build_views()
        self._build_central()
        self._build_status_bar()
        self._build_actions()
        self._wire()
        self._restore_state()
        self.broadcast(Change.EVERYTHING)

    def _build_views(self) -> None:
        self.deviations = DeviationsPanel(self.ws, lambda d: engine.decision_view(d)[:2], self)
        self.terms = TermsPanel(self.ws, engine.term_status, self)
        self.patterns = PatternsPanel(self.ws, engine.pattern_groups, self)
        self.checks = ChecksPanel(self.ws, self)
        self.side = SideBySideView(self)
        self.decision = DecisionPanel(self.ws, engine.decision_view, self)
        self.variants = VariantsView(self)
        self.variants.clear("Open a precedent set to see how its agreements word the selected provision.")
        self.left_tabs = self._tabs("leftTabs", ((self.deviations, "Deviations"), (self.terms, "Defined terms"),
                                                 (self.checks, checks_tab_title(None)), (self.patterns, "Patterns")))
        self.inspector = self._tabs("inspectorTabs", ((self.decision, "Selected deviation"),
                                                      (self.variants, "Wording in the precedent set")))
        self.right_split = splitter(self, Qt.Orientation.Vertical, "rightSplit", (self.side, self.inspector), (3, 2))
        self.main_split = splitter(self, Qt.Orientation.Horizontal, "mainSplit", (self.left_tabs, self.right_split),
                                   (2, 3))
        self._splits_restored = False

    def _tabs(self, name: str, pages: tuple[tuple[QWidget, str], ...]) -> QTabWidget:
        tabs = QTabWidget(self)
        tabs.setObjectName(name)
        for page, title in pages:
            tabs.addTab(page, title)
        return tabs

    def _build_central(self) -> None:
        """The caution band above either the welcome text (no review yet) or the views."""
        self.caution = CautionBand(self)
        self.welcome = QLabel(self)
        self.welcome.setObjectName("welcome")
        self.welcome.setWordWrap(True)
        self.welcome.setAlignment(Qt.AlignmentFlag.AlignCenter)
        self.welcome.setText(
            "<h2>Compare a counterparty's draft with your precedent</h2>"
            "<p>File \u2192 Compare\u2026 (Ctrl+O), or drop the two documents here: the precedent on the "
            "left half, the draft on the right half, a folder of past agreements anywhere.</p>"
            "<p>Recent comparisons are under File \u2192 Recent.</p>")
        central = QWidget(self)
        lay = QVBoxLayout(central)
        lay.setContentsMargins(0, 0, 0, 0)
        lay.setSpacing(0)
        lay.addWidget(self.caution)
        lay.addWidget(self.welcome, 1)
        lay.addWidget(self.main_split, 1)
        self.setCentralWidget(central)

    def _build_status_bar(self) -> None:
        self.status_text = QLabel(self)
        self.progress = QProgressBar(self)
        self.progress.setObjectName("progress")
        self.progress.setMaximumWidth(260)
        self.progress.setTextVisible(False)
        self.cancel_btn = QPushButton("Cancel", self)
        self.cancel_btn.setObjectName("cancelButton")
        self.cancel_btn.clicked.connect(self.cancel_operation)
        self.statusBar().addWidget(self.status_text, 1)
        self.statusBar().addPermanentWidget(self.progress)
        self.statusBar().addPermanentWidget(self.cancel_btn)

    def _wire(self) -> None:
        for view in (self.deviations, self.terms, self.patterns, self.decision, self.checks):
            self.hub.changed.connect(view.on_change)
        self.checks.provisionRequested.connect(self.show_provision)
        self.hub.changed.connect(self._on_change)
        self.deviations.deviationSelected.connect(self.select_deviation)
        self.side.rowActivated.connect(self._row_clicked)
        self.terms.overrideRequested.connect(self.change_term_mapping)
        self.patterns.computeRequested.connect(self.compute_patterns)
        self.decision.decided.connect(self.record_decision)
        self.decision.cleared.connect(self.clear_decision)

    # ======================================================================================
    # actions, menus, keys
    # ======================================================================================
    def _action(self, text: str, slot: Callable[[], object], *,
                key: str | QKeySequence | QKeySequence.StandardKey | None = None,
                tip: str = "", checkable: bool = False) -> QAction:
        a = QAction(text, self)
        if key is not None:
            a.setShortcut(QKeySequence(key))
            a.setShortcutContext(Qt.ShortcutContext.WindowShortcut)
        if tip:
            a.setToolTip(tip)
            a.setStatusTip(tip)
        a.setCheckable(checkable)
        if checkable:
            a.toggled.connect(lambda _on: slot())
        else:
            a.triggered.connect(lambda _=False: slot())
        self.addAction(a)
        return a

    def _build_actions(self) -> None:
        self._build_file_actions()
        self._build_review_actions()
        self._build_display_actions()
        self.act_keys = self._action("Keys", lambda: show_keys(self), key=KEYS["help"])
        self.act_about = self._action("About Counterdraft", lambda: show_about(self))
        self._build_menus()
        self._build_toolbar()
        self._refresh_recent_menu()

    def _build_file_actions(self) -> None:
        A = self._action
        self.act_open = A("Compare\u2026", self.show_open_dialog, key=QKeySequence.StandardKey.Open,
                          tip="Choose the counterparty's draft and the house precedent")
        self.act_library = A("Open precedent set\u2026", self._ask_library,
                             tip="A folder of the firm's past agreements")
        self.act_open_review = A("Open review file\u2026", self._ask_review_file)
        self.act_save = A("Save review", self._save, key=QKeySequence.StandardKey.Save)
        self.act_save_as = A("Save review as\u2026", self._save_as, key=QKeySequence.StandardKey.SaveAs)
        self.act_export_cd = A("Counter-draft (.docx, tracked changes)\u2026",
                               lambda: self._ask_export("counter-draft"), key="Ctrl+Shift+E")
        self.act_export_rl = A("Comparison redline (.docx)\u2026", lambda: self._ask_export("redline"))
        self.act_export_il = A("Issues list in clause order (.docx, .html or .csv)\u2026",
                               lambda: self._ask_export("issues-list"))
        self.act_export_il_rank = A("Issues list by rank (.docx, .html or .csv)\u2026",
                                    lambda: self._ask_export("issues-list", order="rank"))
        self.act_quit = A("Quit", self.close, key=QKeySequence.StandardKey.Quit)

    def _build_review_actions(self) -> None:
        A = self._action
        self.act_next = A("Next deviation", lambda: self._step(+1), key=KEYS["next"])
        self.act_prev = A("Previous deviation", lambda: self._step(-1), key=KEYS["previous"])
        self.act_accept = A("Accept the draft's words", lambda: self._decide_key("accept"), key=KEYS["accept"])
        self.act_revert = A("Restore the precedent's words", lambda: self._decide_key("revert"), key=KEYS["revert"])
        self.act_amend = A("Amend\u2026", self.decision.start_amend, key=KEYS["amend"])
        self.act_note = A("Note\u2026", self.decision.focus_note, key=KEYS["note"])
        self.act_clear = A("Clear decision", self.decision.clear, key=KEYS["clear"])
        self.act_acting_for = A("Acting for\u2026", self._ask_acting_for,
                                tip="The party you act for: each deviation is marked adverse, "
                                    "favourable, neutral or unclear for it")
        self.act_filter = A("Filter the list", self._focus_filter, key=QKeySequence.StandardKey.Find)
        self.act_cancel = A("Cancel operation", self.cancel_operation, key=QKeySequence(Qt.Key.Key_Escape))

    def _build_display_actions(self) -> None:
        A = self._action
        self.act_terms = A("Term changes", self._display_changed, checkable=True,
                           tip="Mark renamed defined terms and list term deviations")
        self.act_numbering = A("Numbering", self._display_changed, checkable=True,
                               tip="Mark renumbered clauses and cross-references")
        self.act_formatting = A("Formatting and punctuation", self._display_changed, checkable=True,
                                tip="Mark quote, dash, case, white-space and punctuation changes")
        d = DisplayOptions()
        for act, on in ((self.act_terms, d.terms), (self.act_numbering, d.numbering),
                        (self.act_formatting, d.formatting)):
            act.blockSignals(True)
            act.setChecked(on)
            act.blockSignals(False)

    def _build_menus(self) -> None:
        mb = self.menuBar()
        m = mb.addMenu("&File")
        m.addActions([self.act_open, self.act_library, self.act_open_review])
        self.recent_menu = m.addMenu("Recent")
        m.addSeparator()
        m.addActions([self.act_save, self.act_save_as])
        m.addMenu("Export").addActions(
            [self.act_export_cd, self.act_export_rl, self.act_export_il, self.act_export_il_rank])
        m.addSeparator()
        m.addAction(self.act_quit)
        m = mb.addMenu("&Review")
        m.addActions([self.act_next, self.act_prev])
        m.addSeparator()
        m.addActions([self.act_accept, self.act_revert, self.act_amend, self.act_note, self.act_clear])
        m.addSeparator()
        m.addActions([self.act_acting_for, self.act_filter, self.act_cancel])
        mb.addMenu("&Show").addActions([self.act_terms, self.act_numbering, self.act_formatting])
        mb.addMenu("&Help").addActions([self.act_keys, self.act_about])

    def _build_toolbar(self) -> None:
        tb = QToolBar("Main", self)
        tb.setObjectName("mainToolbar")
        tb.setMovable(False)
        tb.setToolButtonStyle(Qt.ToolButtonStyle.ToolButtonTextOnly)
        tb.addActions([self.act_open, self.act_library, self.act_save])
        self.export_button_action = tb.addAction("Export counter-draft\u2026")
        self.export_button_action.triggered.connect(lambda: self._ask_export("counter-draft"))
        tb.addSeparator()
        tb.addWidget(QLabel("  Show:  ", tb))
        tb.addActions([self.act_terms, self.act_numbering, self.act_formatting])
        tb.addSeparator()
        tb.addAction(self.act_keys)
        self.addToolBar(tb)

    # ======================================================================================
    # broadcast
    # ======================================================================================
    def broadcast(self, change: Change) -> None:
        self.hub.changed.emit(change)

    def _on_change(self, change: Change) -> None:
        ws = self.ws
        has_review = ws.review is not None
        if change & (Change.REVIEW | Change.FILES | Change.BUSY):
            self.welcome.setVisible(not has_review and ws.busy is None)
            self.main_split.setVisible(has_review or ws.busy is not None)
            if self.main_split.isVisible() and not self._splits_restored:
                self._default_splits()
        if change & (Change.REVIEW | Change.LIBRARY):
            inputs = ws.inputs
            self.side.set_review(
                ws.review,
                edits=engine.pair_edits,
                draft_name=Path(inputs.draft).name if inputs else "",
                precedent_name=Path(inputs.precedent).name if inputs else "",
            )
        if change & Change.DISPLAY:
            self.side.set_display(ws.display)
        if change & (Change.SELECTION | Change.REVIEW | Change.DISPLAY):
            self.side.show_deviation(ws.deviation(ws.selected))
        if change & (Change.SELECTION | Change.REVIEW | Change.LIBRARY | Change.BUSY):
            self._refresh_variants()
        if change & (Change.REVIEW | Change.FILES | Change.DECISIONS):
            self._refresh_title()
        if change & Change.REVIEW:
            self.left_tabs.setTabText(self.left_tabs.indexOf(self.checks), checks_tab_title(ws.review))
        if change & Change.BUSY:
            busy = ws.busy is not None
            self.progress.setVisible(busy)
            self.cancel_btn.setVisible(busy)
            self.act_cancel.setEnabled(busy)
        if change & (Change.BUSY | Change.REVIEW):
            busy = ws.busy is not None
            for a in (self.act_open, self.act_library, self.act_open_review):
                a.setEnabled(not busy)
            for a in (self.act_save, self.act_save_as, self.act_export_cd, self.act_export_rl,
                      self.act_export_il, self.act_export_il_rank, self.export_button_action,
                      self.act_acting_for):
                a.setEnabled(has_review and not busy)

    def show_provision(self, document: str, pid: str) -> None:
        """Bring a provision of the draft (or the precedent) into view in the aligned rows."""
        if document == "draft":
            self.side.show_provision(draft=pid)
        else:
            self.side.show_provision(precedent=pid)

    def _refresh_title(self) -> None:
        ws = self.ws
        title = "Counterdraft"
        if ws.inputs is not None:
            party = ws.review.acting_for if ws.review is not None else None
            acting = f", acting for the {party}" if party else ""
            title = (f"{Path(ws.inputs.draft).name} against {Path(ws.inputs.precedent).name}{acting}"
                     " \u2014 Counterdraft")
        if ws.unsaved:
            title = "\u2022 " + title
        self.setWindowTitle(title)

    def _refresh_variants(self) -> None:
        ws = self.ws
        d = ws.deviation(ws.selected)
        if ws.library is None:
            self.variants.clear("Open a precedent set (File \u2192 Open precedent set\u2026) to see how its "
                                "agreements word the selected provision.")
            return
        if d is None:
            self.variants.clear("Select a deviation to see how the precedent set words that provision.")
            return
        if self._workers_running():
            # The index is used by one thread at a time; the view refreshes when the work ends.
            self.variants.clear("Waiting for the current operation to finish\u2026")
            return
        try:
            content = engine.variants_content(ws.library, ws.review, d)
        except Exception as exc:
            self.variants.clear(one_line(exc))
            return
        if isinstance(content, str):
            self.variants.clear(content)
        else:
            self.variants.set_content(slot=content.slot, provision=content.provision,
                                      deviation=content.deviation)

    # ======================================================================================
    # opening
    # ======================================================================================
    def show_open_dialog(self, *, draft: str = "", precedent: str = "", library: str = "") -> OpenDialog:
        ws = self.ws
        dlg = OpenDialog(
            self,
            draft=draft or (ws.inputs.draft if ws.inputs else ""),
            precedent=precedent or (ws.inputs.precedent if ws.inputs else ""),
            library=library or (ws.inputs.library or "" if ws.inputs else "") or (self._pending_library or "")
            or self.settings.last_library(),
            parties=engine.party_terms, remembered=self.settings.acting_for,
        )
        dlg.setAttribute(Qt.WidgetAttribute.WA_DeleteOnClose)

        def chosen(d: str, p: str, lib: str) -> None:
            self.settings.set_acting_for(p, dlg.party() or None)  # asked once, kept per precedent
            self.open_comparison(d, p, library=lib or None)

        dlg.chosen.connect(chosen)
        dlg.open()
        return dlg

    def open_comparison(self, draft: str, precedent: str, *, library: str | None = None,
                        acting_for: str | None | _Party = REMEMBERED_PARTY) -> None:
        """Read both files, review them (with the precedent set when given) off the GUI thread,
        acting for *acting_for* (by default the party last chosen with this precedent)."""
        party = self.settings.acting_for(str(precedent)) if acting_for is REMEMBERED_PARTY else acting_for
        inputs = Inputs(draft=str(draft), precedent=str(precedent), library=str(library) if library else None,
                        acting_for=party or None)
        work = functools.partial(engine.load_and_review, inputs, overrides=())
        self._run("Reading and comparing", work, lambda out: self._review_loaded(inputs, out, fresh=True))

    def open_library(self, folder: str) -> None:
        """Use *folder* as the precedent set: re-run the current review with it, or keep it for
        the next comparison."""
        if self.ws.inputs is None or self.ws.record is None:
            self._pending_library = folder
            self._status(f"Precedent set {folder} will be used for the next comparison.")
            return
        inputs = Inputs(self.ws.inputs.draft, self.ws.inputs.precedent, folder, self.ws.inputs.acting_for)
        work = functools.partial(engine.rerun_review, self.ws.record, overrides=self.ws.overrides,
                                 library_folder=folder)
        self._run("Indexing the precedent set and comparing", work,
                  lambda out: self._review_loaded(inputs, out, fresh=False))

    def open_review_file(self, path: str) -> None:
        """Reopen a saved review: the engine re-reads both documents, re-runs the review and
        keeps the decisions that still apply."""
        work = functools.partial(engine.open_review_file, str(path), library=self.ws.library)
        self._run("Opening the review file", work, lambda out: self._review_file_opened(str(path), out))

    def _review_loaded(self, inputs: Inputs, out: engine.Outcome, *, fresh: bool) -> None:
        ws = self.ws
        old_selected = ws.deviation(ws.selected)
        ws.inputs = inputs
        ws.record = out.record
        self._set_library(out.library)
        ws.patterns = None
        if fresh:
            ws.review_path = None
            ws.unsaved = False
            ws.selected = None
        else:
            ws.selected = _same_deviation(old_selected, out.review)
        self.settings.add_recent(Recent(inputs.draft, inputs.precedent, inputs.library or ""))
        if inputs.library:
            self.settings.set_last_library(inputs.library)
        self._refresh_recent_menu()
        self.broadcast(Change.REVIEW | Change.LIBRARY | Change.DECISIONS | Change.SELECTION
                       | Change.PATTERNS | Change.FILES)
        if fresh:
            self._start_at_top()
        self._report_review(out)
        self.reviewShown.emit()

    def _start_at_top(self) -> None:
        """Select the most severe listed deviation and put the keyboard in the list, so the
        single keys work at once."""
        ids = self.deviations.visible_ids()
        self.select_deviation(ids[0] if ids else None)
        self.left_tabs.setCurrentWidget(self.deviations)
        self.deviations.table.setFocus(Qt.FocusReason.OtherFocusReason)

    def _review_file_opened(self, path: str, out: engine.Outcome) -> None:
        ws = self.ws
        rec = out.record
        ws.inputs = Inputs(rec.draft.path, rec.precedent.path, ws.inputs.library if ws.inputs else None,
                           rec.review.acting_for)
        ws.record = rec
        ws.saved_decisions = tuple(rec.decisions)
        self._set_library(out.library)
        ws.patterns = None
        ws.review_path = path
        ws.unsaved = False
        ws.selected = None
        self.settings.add_recent(Recent(review_file=path))
        self._refresh_recent_menu()
        self.broadcast(Change.EVERYTHING)
        self._start_at_top()
        self._report_review(out)
        if rec.notes:
            show_message(self, "Review file", "\n".join(rec.notes), icon=QMessageBox.Icon.Information)
        self.reviewShown.emit()

    def _set_library(self, library: Library | None) -> None:
        old = self.ws.library
        self.ws.library = library
        if old is not None and old is not library:
            self._retired_libraries.append(old)
        self._close_retired_libraries()

    def _workers_running(self) -> bool:
        """Whether a work function (perhaps an abandoned one) is still running."""
        return any(not t.done for t in self._tasks)

    def _close_retired_libraries(self) -> None:
        """Close the indexes no longer shown, once no worker can be using them."""
        if self._workers_running():
            return
        while self._retired_libraries:
            engine.close_library(self._retired_libraries.pop())

    def _task_ended(self, task: tasks.Task | None) -> None:
        if task is not None:
            self._tasks.discard(task)
        if task is not self._task:  # an abandoned task: what waited for it can go on now
            self._close_retired_libraries()
            self._refresh_variants()

    def _report_review(self, out: engine.Outcome) -> None:
        r = out.review
        n = len(r.deviations)
        subst = sum(1 for d in r.deviations if d.category == "substantive")
        msg = f"{n} deviations ({subst} substantive), {len(r.term_map)} renamed defined terms"
        if out.library is not None and out.library_total is not None:
            msg += f"; precedent set of {out.library_total} agreements"
        if out.notes:
            msg += " \u2014 " + "; ".join(out.notes)
        self._status(msg)

    # ======================================================================================
    # term mappings, decisions, selection
    # ======================================================================================
    def change_term_mapping(self, kind: str, draft: str, precedent: str) -> None:
        """Confirm, reject or add a term mapping, then re-run the review with it."""
        ws = self.ws
        if ws.record is None or ws.inputs is None:
            return
        try:
            overrides = engine.add_override(ws.overrides, kind, draft, precedent)
        except Exception as exc:
            self._fail(exc)
            return
        inputs = ws.inputs
        work = functools.partial(engine.rerun_review, ws.record, overrides=overrides, library=ws.library)

        def done(out: engine.Outcome) -> None:
            ws.unsaved = True
            self._review_loaded(inputs, out, fresh=False)

        self._run("Re-running the review with your term decision", work, done)

    def change_acting_for(self, party: str | None) -> None:
        """Judge the review again for *party* (a precedent party term; None: no one), and
        remember the choice for this precedent."""
        ws = self.ws
        if ws.record is None or ws.inputs is None:
            return
        self.settings.set_acting_for(ws.inputs.precedent, party)
        inputs = Inputs(ws.inputs.draft, ws.inputs.precedent, ws.inputs.library, party)
        work = functools.partial(engine.rerun_review, ws.record, overrides=ws.overrides,
                                 library=ws.library, acting_for=party)

        def done(out: engine.Outcome) -> None:
            ws.unsaved = True
            self._review_loaded(inputs, out, fresh=False)

        self._run("Judging each deviation for the party you act for", work, done)

    def _ask_acting_for(self) -> QInputDialog | None:
        """Choose the party acted for among the precedent's party terms (non-blocking)."""
        ws = self.ws
        if ws.review is None:
            return None
        from core.review.direction import party_terms

        from .dialogs import NO_PARTY

        names = [NO_PARTY, *party_terms(ws.review.precedent)]
        dlg = QInputDialog(self)
        dlg.setObjectName("actingForDialog")
        dlg.setWindowTitle("Acting for")
        dlg.setLabelText("The party you act for (the precedent's name for it):")
        dlg.setComboBoxItems(names)
        dlg.setComboBoxEditable(False)
        current = ws.review.acting_for
        dlg.setTextValue(current if current in names else NO_PARTY)
        dlg.setAttribute(Qt.WidgetAttribute.WA_DeleteOnClose)
        dlg.textValueSelected.connect(lambda t: self.change_acting_for(None if t == NO_PARTY else t))
        dlg.open()
        return dlg

    def select_deviation(self, did: str | None) -> None:
        if did == self.ws.selected:
            return
        self.ws.selected = did
        self.broadcast(Change.SELECTION)

    def record_decision(self, did: str, action: str, text: str = "", note: str = "") -> None:
        d = self.ws.deviation(did)
        if d is None or self.ws.record is None:
            return
        try:
            self.ws.record = engine.decide(self.ws.record, did, action, text=text, note=note)
        except Exception as exc:
            self._fail(exc)
            return
        self.ws.unsaved = True
        self.broadcast(Change.DECISIONS | Change.FILES)

    def clear_decision(self, did: str) -> None:
        if self.ws.record is not None and did in self.ws.decisions:
            self.ws.record = engine.undecide(self.ws.record, did)
            self.ws.unsaved = True
            self.broadcast(Change.DECISIONS | Change.FILES)

    def _decide_key(self, action: str) -> None:
        if self.ws.selected is not None:
            self.decision.record(action)

    def _step(self, delta: int) -> None:
        did = self.deviations.step(delta)
        if did is not None:
            self.select_deviation(did)

    def _row_clicked(self, row: int) -> None:
        shown = self.ws.display.shown_categories()
        cands = sorted((d for d in self.side.deviations_in_row(row) if d.category in shown), key=lambda d: d.rank)
        if cands:
            self.select_deviation(cands[0].id)

    def _display_changed(self) -> None:
        self.ws.display = DisplayOptions(
            terms=self.act_terms.isChecked(),
            numbering=self.act_numbering.isChecked(),
            formatting=self.act_formatting.isChecked(),
        )
        self.broadcast(Change.DISPLAY)

    def set_display(self, display: DisplayOptions) -> None:
        for act, on in ((self.act_terms, display.terms), (self.act_numbering, display.numbering),
                        (self.act_formatting, display.formatting)):
            act.blockSignals(True)
            act.setChecked(on)
            act.blockSignals(False)
        self._display_changed()

    def _focus_filter(self) -> None:
        self.left_tabs.setCurrentWidget(self.deviations)
        self.deviations.search.setFocus()
        self.deviations.search.selectAll()

    # ======================================================================================
    # patterns, saving, exporting
    # ======================================================================================
    def compute_patterns(self) -> None:
        ws = self.ws
        if ws.library is None or ws.inputs is None or ws.review is None:
            return
        work = functools.partial(engine.compute_patterns, ws.library, precedent=ws.review.precedent,
                                 precedent_path=ws.inputs.precedent)

        def done(patterns: tuple[PatternGroup, ...]) -> None:
            ws.patterns = patterns
            self.broadcast(Change.PATTERNS)
            self._status("Negotiation patterns ready.")

        self._run("Comparing every past agreement with the precedent", work, done)

    def save_review(self, path: str) -> None:
        ws = self.ws
        if ws.record is None or ws.inputs is None:
            return
        same_file = ws.review_path is not None and str(path) == ws.review_path
        try:
            # saving over the file this review came from keeps what others recorded in it
            ws.record = engine.save_review_file(str(path), ws.record,
                                                base=ws.saved_decisions if same_file else None)
        except Exception as exc:
            self._fail(exc)
            return
        ws.saved_decisions = tuple(ws.record.decisions)
        ws.review_path = str(path)
        ws.unsaved = False
        self.settings.add_recent(Recent(review_file=str(path)))
        self._refresh_recent_menu()
        self.broadcast(Change.FILES)
        self._status(f"Saved {path}")
        self.fileWritten.emit(str(path))

    def export(self, kind: ExportKind, path: str, *, order: str = "clause") -> None:
        """Write the counter-draft, the comparison redline or the issues list to *path* (the
        issues list's rows in *order*: ``"clause"``, the draft's order, or ``"rank"``)."""
        ws = self.ws
        if ws.record is None or ws.inputs is None:
            return
        work = functools.partial(engine.export, kind, str(path), record=ws.record, order=order)

        def done(result: tuple[str, tuple[str, ...]]) -> None:
            written, notes = result
            self._status(f"Wrote {written}")
            text = f"Wrote {written}."
            if notes:
                text += "\n\n" + "\n".join(notes)
            text += "\n\n" + core.CAUTION
            show_message(self, "Export", text, icon=QMessageBox.Icon.Information)
            self.fileWritten.emit(written)

        self._run(f"Writing the {kind.replace('-', ' ')}", work, done)

    def _save(self) -> None:
        if self.ws.review_path:
            self.save_review(self.ws.review_path)
        else:
            self._save_as()

    def _save_as(self) -> None:
        if self.ws.review is None:
            return
        start = self.ws.review_path or (str(Path(self.ws.inputs.draft).with_suffix(".review.json"))
                                        if self.ws.inputs else "")
        path, _ = QFileDialog.getSaveFileName(self, "Save review file", start, REVIEW_FILTER)
        if path:
            self.save_review(path)

    def _ask_export(self, kind: ExportKind, *, order: str = "clause") -> None:
        if self.ws.inputs is None:
            return
        stem = Path(self.ws.inputs.draft)
        suggestions = {
            "counter-draft": (stem.with_name(stem.stem + " - counter-draft.docx"), "Word documents (*.docx)"),
            "redline": (stem.with_name(stem.stem + " - comparison.docx"), "Word documents (*.docx)"),
            "issues-list": (stem.with_name(stem.stem + " - issues list.docx"),
                            "Word table (*.docx);;Web page (*.html);;Spreadsheet (*.csv)"),
        }
        start, filt = suggestions[kind]
        path, _ = QFileDialog.getSaveFileName(self, "Export", str(start), filt)
        if path:
            self.export(kind, path, order=order)

    def _ask_library(self) -> None:
        path = QFileDialog.getExistingDirectory(self, "Folder of past agreements (precedent set)")
        if path:
            self.open_library(path)

    def _ask_review_file(self) -> None:
        path, _ = QFileDialog.getOpenFileName(self, "Open review file", "", REVIEW_FILTER)
        if path:
            self.open_review_file(path)

    def _refresh_recent_menu(self) -> None:
        self.recent_menu.clear()
        entries = self.settings.recent()
        if not entries:
            a = self.recent_menu.addAction("(none yet)")
            a.setEnabled(False)
            return
        for r in entries:
            if r.review_file:
                label = f"Review file: {Path(r.review_file).name}"
                act = self.recent_menu.addAction(label)
                act.triggered.connect(functools.partial(lambda path, _=False: self.open_review_file(path),
                                                        r.review_file))
            else:
                label = f"{Path(r.draft).name} against {Path(r.precedent).name}"
                if r.library:
                    label += f" (set: {_library_name(r.library)})"
                act = self.recent_menu.addAction(label)
                act.triggered.connect(functools.partial(
                    lambda d, p, lib, _=False: self.open_comparison(d, p, library=lib or None),
                    r.draft, r.precedent, r.library))
            act.setToolTip(" | ".join(x for x in r.key() if x))

    # ======================================================================================
    # background work
    # ======================================================================================
    def _run(self, label: str, work: Callable[..., Any], on_done: Callable[[Any], None]) -> tasks.Task | None:
        if self._task is not None:
            self._status("Another operation is running; wait for it or press Cancel.")
            return None
        self.ws.busy = label

        def finished(result: Any, task_ref: list[tasks.Task | None]) -> None:
            task = task_ref[0]
            self._task_ended(task)
            if task is not self._task:
                return  # abandoned (cancelled) task: its result is stale
            self._task = None
            self.ws.busy = None
            self.broadcast(Change.BUSY)
            try:
                on_done(result)
            except Exception as exc:
                self._fail(exc)
                return
            self.operationFinished.emit(label)

        def failed(exc: BaseException, task_ref: list[tasks.Task | None]) -> None:
            task = task_ref[0]
            self._task_ended(task)
            if task is not self._task:
                return
            self._task = None
            self.ws.busy = None
            self.broadcast(Change.BUSY)
            if isinstance(exc, tasks.Cancelled):
                self._status("Cancelled.")
                self.operationCancelled.emit()
            else:
                self._fail(exc)

        ref: list[tasks.Task | None] = [None]
        self.progress.setRange(0, 0)
        self._status(label + "\u2026")
        task = tasks.start(
            work,
            name=label,
            on_finished=lambda r: finished(r, ref),
            on_failed=lambda e: failed(e, ref),
            on_progress=self._progress,
            pool=self.pool,
        )
        ref[0] = task
        self._task = task
        self._tasks.add(task)
        self.broadcast(Change.BUSY)
        return task

    def _progress(self, p: tasks.Progress) -> None:
        if self._task is None:
            return
        if p.total:
            self.progress.setRange(0, p.total)
            self.progress.setValue(min(p.done, p.total))
        else:
            self.progress.setRange(0, 0)
        self._status(p.message)

    def cancel_operation(self) -> None:
        """Stop the running operation; the window is usable again at once."""
        task = self._task
        if task is None:
            return
        task.cancel()
        self._task = None
        self.ws.busy = None
        self.broadcast(Change.BUSY)
        self._status("Cancelled.")
        self.operationCancelled.emit()

    @property
    def busy(self) -> bool:
        return self._task is not None

    def wait_for_background(self, timeout_ms: int = 30000) -> bool:
        """Wait for every started work function to return (shutdown and tests)."""
        return self.pool.waitForDone(timeout_ms)

    # ======================================================================================
    # messages
    # ======================================================================================
    def _status(self, text: str) -> None:
        self.status_text.setText(text)

    def report_problem(self, exc: BaseException) -> None:
        """Show *exc* as one line in a dialog (the engine's message for a CounterdraftError)."""
        self._fail(exc)

    def _fail(self, exc: BaseException) -> None:
        line = one_line(exc)
        self.last_message = line
        self._status(line)
        show_message(self, "Counterdraft", line)
        self.operationFailed.emit(line)

    # ======================================================================================
    # drag and drop
    # ======================================================================================
    def dragEnterEvent(self, event: QDragEnterEvent) -> None:
        if event.mimeData().hasUrls() and all(u.isLocalFile() for u in event.mimeData().urls()):
            event.acceptProposedAction()
        else:
            event.ignore()

    def dropEvent(self, event: QDropEvent) -> None:
        paths = [u.toLocalFile() for u in event.mimeData().urls() if u.isLocalFile()]
        x = event.position().toPoint()
        side_pos = self.side.mapFrom(self, x)
        on_left = self.side.isVisible() and self.side.rect().contains(side_pos) and side_pos.x() < self.side.width() / 2
        on_right = self.side.isVisible() and self.side.rect().contains(side_pos) and not on_left
        if not self.side.isVisible():
            on_left = x.x() < self.width() / 2
            on_right = not on_left
        self.handle_dropped(paths, side="precedent" if on_left else "draft" if on_right else None)
        event.acceptProposedAction()

    def handle_dropped(self, paths: list[str], *, side: str | None) -> None:
        """Route dropped paths: a folder is a precedent set, a .json a review file, a document
        goes to the side it was dropped on (left half: precedent, right half: draft) and the
        comparison starts once both sides are known; two documents at once open the chooser."""
        folders, reviews, docs, others = _sort_dropped(paths)
        if others:
            self._fail(engine.unsupported_file(others[0]))
            return
        if reviews:
            self.open_review_file(reviews[0])
            return
        library = folders[0] if folders else None
        if library and not docs:
            self.open_library(library)
            return
        cur = self.ws.inputs
        lib = library or (cur.library if cur else None) or self._pending_library
        if len(docs) >= 2:
            self.show_open_dialog(draft=docs[0], precedent=docs[1], library=lib or "")
            return
        if docs:
            self._take_dropped_document(docs[0], side=side, library=lib)

    def _take_dropped_document(self, doc: str, *, side: str | None, library: str | None) -> None:
        """One dropped document: remember it for its side, and start the comparison once the
        other side is known too (pending or already open); else say what to drop next."""
        cur = self.ws.inputs
        which = side or ("precedent" if self._pending_docs["draft"] and not self._pending_docs["precedent"]
                         else "draft")
        self._pending_docs[which] = doc
        draft = self._pending_docs["draft"] or (cur.draft if cur else "")
        precedent = self._pending_docs["precedent"] or (cur.precedent if cur else "")
        if draft and precedent:
            self._pending_docs = {"draft": "", "precedent": ""}
            self.open_comparison(draft, precedent, library=library)
            return
        other = "draft" if which == "precedent" else "precedent"
        half = "right" if other == "draft" else "left"
        self._status(f"{which.capitalize()}: {Path(doc).name}. Now drop the {other} on the {half} half "
                     "of the window, or use Compare\u2026")

    # ======================================================================================
    # window state
    # ======================================================================================
    def _restore_state(self) -> None:
        geo = self.settings.geometry()
        if geo is None or not self.restoreGeometry(geo):
            screen = self.screen()
            free = screen.availableGeometry() if screen is not None else None
            self.resize(*first_run_size((free.width(), free.height()) if free is not None else None))
        for split in (self.main_split, self.right_split):
            data = self.settings.splitter(split.objectName())
            if data is not None and split.restoreState(data):
                self._splits_restored = True

    def _default_splits(self) -> None:
        """First-run proportions: the list takes :data:`LIST_SHARE` of the width, the aligned
        text the rest; the aligned text takes :data:`ALIGNED_SHARE` of the height above the
        selected deviation."""
        self._splits_restored = True
        w = max(self.main_split.width(), self.width())
        h = max(self.right_split.height(), self.height() - 120)
        self.main_split.setSizes([int(w * LIST_SHARE), w - int(w * LIST_SHARE)])
        self.right_split.setSizes([int(h * ALIGNED_SHARE), h - int(h * ALIGNED_SHARE)])

    def save_state(self) -> None:
        self.settings.set_geometry(self.saveGeometry())
        for split in (self.main_split, self.right_split):
            self.settings.set_splitter(split.objectName(), split.saveState())
        self.settings.sync()

    def closeEvent(self, event: QCloseEvent) -> None:
        if self.ws.unsaved and self.ask_before_closing:
            event.ignore()
            box = QMessageBox(QMessageBox.Icon.Question, "Unsaved decisions",
                              "Your decisions are not saved in a review file. Close anyway?",
                              QMessageBox.StandardButton.Save | QMessageBox.StandardButton.Discard
                              | QMessageBox.StandardButton.Cancel, self)
            box.setAttribute(Qt.WidgetAttribute.WA_DeleteOnClose)

            def answered(_result: int) -> None:
                button = box.standardButton(box.clickedButton())
                if button == QMessageBox.StandardButton.Discard:
                    self.ask_before_closing = False
                    QTimer.singleShot(0, self.close)
                elif button == QMessageBox.StandardButton.Save:
                    self._save()
                    if not self.ws.unsaved:
                        QTimer.singleShot(0, self.close)

            box.finished.connect(answered)
            box.open()
            return
        self.save_state()
        if self._task is not None:
            self._task.cancel()
        for t in list(self._tasks):
            t.cancel()
        self.pool.waitForDone(10000)
        self._tasks = {t for t in self._tasks if not t.done}
        self._set_library(None)
        super().closeEvent(event)


def first_run_size(free: tuple[int, int] | None) -> tuple[int, int]:
    """:data:`DEFAULT_SIZE`, or less on a screen whose *free* area (width, height: the screen
    less its task bars, Qt's ``availableGeometry``) cannot hold it with the window's frame
    and title bar."""
    if free is None:
        return DEFAULT_SIZE
    w, h = DEFAULT_SIZE
    return min(w, free[0] - FRAME_PX), min(h, free[1] - TITLE_BAR_PX)


def _same_deviation(old: Deviation | None, review: Review | None) -> str | None:
    """The id, in *review*, of the deviation that matches *old* (same change, same provisions,
    same words), so the selection survives a re-run that renumbered the ids."""
    if old is None or review is None:
        return None
    for d in review.deviations:
        if (d.change, d.draft_provision, d.precedent_provision, d.draft_text, d.precedent_text) == (
                old.change, old.draft_provision, old.precedent_provision, old.draft_text, old.precedent_text):
            return d.id
    return None


def _library_name(library: str) -> str:
    """How a recent entry names its precedent set: a folder's name, a store's address."""
    from core.library.store import is_server_address, shown_address

    return shown_address(library) if is_server_address(library) else Path(library).name
