"""The patterns view: what counterparties usually change in each clause type, and how often.

The figures come from the engine's negotiation patterns (``counterdraft library patterns``,
:class:`core.library.patterns.PatternGroup`): every past agreement of the precedent set
reviewed against the house precedent, the departures counted per clause type.  This view only
lays them out as a tree, in the engine's order.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from typing import TYPE_CHECKING

from PySide6.QtCore import Qt, Signal
from PySide6.QtWidgets import (
    QHBoxLayout,
    QHeaderView,
    QPushButton,
    QTextBrowser,
    QTreeWidget,
    QTreeWidgetItem,
    QVBoxLayout,
    QWidget,
)

from .models import NO_TALLY, TALLY_ROLE
from .palette import MUTED_INK
from .state import Change, Workspace
from .tally import tally, tally_glyphs, tally_words
from .widgets import TallyDelegate, muted_label, splitter

if TYPE_CHECKING:  # the window opens without loading the engine
    from core.library.patterns import PatternGroup

__all__ = ["PatternsPanel"]

#: Item data role holding a move (the engine's ``PatternMove``) on the tree's move rows.
MOVE_ROLE = int(Qt.ItemDataRole.UserRole) + 1


class PatternsPanel(QWidget):
    computeRequested = Signal()

    def __init__(self, workspace: Workspace,
                 adapt: Callable[[Sequence[PatternGroup]], Sequence[PatternGroup]],
                 parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._ws = workspace
        self._adapt = adapt  # the workspace's patterns -> Sequence[PatternGroup]
        self.intro = muted_label("", self)
        self.compute_btn = QPushButton("Work out the patterns", self)
        self.compute_btn.clicked.connect(self.computeRequested.emit)
        top = QHBoxLayout()
        top.addWidget(self.intro, 1)
        top.addWidget(self.compute_btn, 0, Qt.AlignmentFlag.AlignTop)
        self.tree = QTreeWidget(self)
        self.tree.setObjectName("patternTree")
        self.tree.setColumnCount(2)
        self.tree.setHeaderLabels(["Clause type and usual change", "Agreements"])
        self.tree.setItemDelegateForColumn(1, TallyDelegate(self.tree))
        self.tree.header().setSectionResizeMode(0, QHeaderView.ResizeMode.Stretch)
        self.tree.header().setStretchLastSection(False)
        self.tree.setColumnWidth(1, 150)
        self.tree.currentItemChanged.connect(self._show_examples)
        self.examples = QTextBrowser(self)
        self.examples.setObjectName("patternExamples")
        split = splitter(self, Qt.Orientation.Vertical, "patternsSplit", (self.tree, self.examples), (3, 1))
        lay = QVBoxLayout(self)
        lay.setContentsMargins(4, 4, 4, 4)
        lay.addLayout(top)
        lay.addWidget(split, 1)
        self._groups: tuple[PatternGroup, ...] = ()
        self.on_change(Change.EVERYTHING)

    def on_change(self, change: Change) -> None:
        if not change & (Change.LIBRARY | Change.PATTERNS | Change.BUSY | Change.REVIEW):
            return
        has_lib = self._ws.library is not None
        self.compute_btn.setVisible(has_lib and self._ws.patterns is None)
        self.compute_btn.setEnabled(self._ws.busy is None and self._ws.inputs is not None)
        if not has_lib:
            self.intro.setText("Open a precedent set (File \u2192 Open precedent set\u2026) to see what "
                               "counterparties usually change in each clause, and how often.")
        elif self._ws.patterns is None:
            self.intro.setText("Every agreement of the precedent set is compared with the house precedent "
                               "and the changes are counted per clause type.")
        else:
            self.intro.setText("What counterparties changed in the precedent set's agreements, per clause "
                               "type, most frequent first. Select a line to read the wording.")
        if change & (Change.PATTERNS | Change.LIBRARY):
            self.set_groups(self._adapt(self._ws.patterns) if self._ws.patterns is not None else ())

    def set_groups(self, groups: Sequence[PatternGroup]) -> None:
        self._groups = tuple(groups)
        self.tree.clear()
        for g in self._groups:
            top = QTreeWidgetItem([g.title, f"{g.agreements} agreements"])
            top.setData(1, TALLY_ROLE, NO_TALLY)  # never None: see desktop.models.NO_BAR
            top.setData(0, Qt.ItemDataRole.UserRole, g.clause_type)
            f = top.font(0)
            f.setBold(True)
            top.setFont(0, f)
            for m in g.moves:
                child = QTreeWidgetItem([m.description, f"{m.count}/{m.total}"])
                child.setData(1, TALLY_ROLE, (m.count, m.total))
                child.setData(0, MOVE_ROLE, m)
                top.addChild(child)
            self.tree.addTopLevelItem(top)
            top.setExpanded(True)

    def _show_examples(self, item: QTreeWidgetItem | None, _prev: QTreeWidgetItem | None = None) -> None:
        m = item.data(0, MOVE_ROLE) if item is not None else None
        if m is None:
            self.examples.clear()
            return
        body = "".join(f"<p style='font-family:serif'>{_esc(x)}</p>" for x in m.examples)
        t = tally(m.count, m.total)
        count = (f"<br>{tally_glyphs(t)} &nbsp;"
                 f"{_esc(tally_words(t, verb=('makes', 'make'), rest='this change'))}" if t else "")
        self.examples.setHtml(f"<p><b>{_esc(m.description)}</b>{count}</p>"
                              + (body or f"<p style='color:{MUTED_INK}'>No wording recorded.</p>"))


def _esc(s: str) -> str:
    return s.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")
