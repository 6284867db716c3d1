"""The selected deviation in detail, with the reviewer's decision and note.

The decision buttons only *record* what the reviewer chose; what a decision does to the
counter-draft is the engine's business (:mod:`core.decisions`, :mod:`core.export`).
"""

from __future__ import annotations

from collections.abc import Callable
from typing import TYPE_CHECKING

from PySide6.QtCore import Qt, Signal
from PySide6.QtWidgets import (
    QButtonGroup,
    QHBoxLayout,
    QLabel,
    QPlainTextEdit,
    QPushButton,
    QTextBrowser,
    QVBoxLayout,
    QWidget,
)

from core.model import Deviation, Review

from .engine import can_change
from .labels import CATEGORY_NAMES, CHANGE_NAMES, PAST_USE, clause_label, frequency_sentence
from .palette import DELETED, INSERTED, MUTED_INK, TALLY
from .state import Change, Workspace
from .tally import tally, tally_glyphs

if TYPE_CHECKING:
    from core.decisions import Decision

__all__ = ["DecisionPanel", "KEYS"]

#: The single keys of the review workflow (our own choice; listed in the help screen).
KEYS = {
    "next": "N",
    "previous": "P",
    "accept": "A",
    "revert": "R",
    "amend": "M",
    "note": "E",
    "clear": "U",
    "help": "F1",
}


#: Height of the note box, in pixels: two lines of text (a longer note scrolls), so the
#: detail above keeps its room in a 768-pixel-high screen.
NOTE_PX = 44

_REVERT_TIP = "Put the precedent's words back (a tracked change in the counter-draft)."
_AMEND_TIP = "Write your own words (a tracked change in the counter-draft)."


class DecisionPanel(QWidget):
    """Details of the selected deviation; emits ``decided(id, action, text, note)`` and
    ``cleared(id)`` when the reviewer records or clears a decision."""

    decided = Signal(str, str, str, str)
    cleared = Signal(str)

    def __init__(self, workspace: Workspace, decision_view: Callable[[Decision], tuple[str, str, str]],
                 parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._ws = workspace
        self._decision_view = decision_view  # engine decision -> (action, note, text)
        self._current: Deviation | None = None

        self.details = QTextBrowser(self)
        self.details.setObjectName("deviationDetails")
        self.details.setOpenLinks(False)
        buttons = self._build_buttons()
        self._build_amend()
        note_row = self._build_note()

        lay = QVBoxLayout(self)
        lay.setContentsMargins(6, 4, 6, 4)
        lay.addWidget(self.details, 1)
        lay.addLayout(buttons)
        lay.addWidget(self.amend_label)
        lay.addWidget(self.amend_text)
        lay.addWidget(self.amend_ok, 0, Qt.AlignmentFlag.AlignLeft)
        lay.addWidget(self.note_label)
        lay.addLayout(note_row)
        self._show(None)

    def _build_buttons(self) -> QHBoxLayout:
        """Accept, restore, amend (one checked: the decision recorded) and clear."""
        self.accept_btn = QPushButton(f"Accept draft  [{KEYS['accept']}]", self)
        self.revert_btn = QPushButton(f"Restore precedent  [{KEYS['revert']}]", self)
        self.amend_btn = QPushButton(f"Amend\u2026  [{KEYS['amend']}]", self)
        self.clear_btn = QPushButton(f"Clear  [{KEYS['clear']}]", self)
        self.accept_btn.setToolTip("Keep the counterparty's words.")
        self.revert_btn.setToolTip(_REVERT_TIP)
        self.amend_btn.setToolTip(_AMEND_TIP)
        self.group = QButtonGroup(self)
        for b in (self.accept_btn, self.revert_btn, self.amend_btn):
            b.setCheckable(True)
            self.group.addButton(b)
        self.accept_btn.clicked.connect(lambda: self.record("accept"))
        self.revert_btn.clicked.connect(lambda: self.record("revert"))
        self.amend_btn.clicked.connect(self.start_amend)
        self.clear_btn.clicked.connect(self.clear)
        buttons = QHBoxLayout()
        for b in (self.accept_btn, self.revert_btn, self.amend_btn, self.clear_btn):
            buttons.addWidget(b)
        buttons.addStretch(1)
        return buttons

    def _build_amend(self) -> None:
        """The amend box, hidden until the reviewer amends."""
        self.amend_label = QLabel("Your wording (replaces the draft's words shown above):", self)
        self.amend_text = QPlainTextEdit(self)
        self.amend_text.setObjectName("amendText")
        self.amend_text.setFixedHeight(64)
        self.amend_ok = QPushButton("Record amendment", self)
        self.amend_ok.clicked.connect(lambda: self.record("amend"))
        for w in (self.amend_label, self.amend_text, self.amend_ok):
            w.hide()

    def _build_note(self) -> QHBoxLayout:
        self.note_label = QLabel(f"Note for the issues list and the counter-draft comment  [{KEYS['note']}]:", self)
        self.note = QPlainTextEdit(self)
        self.note.setObjectName("decisionNote")
        self.note.setPlaceholderText("Optional note\u2026")
        self.note.setFixedHeight(NOTE_PX)
        self.note_save = QPushButton("Save note", self)
        self.note_save.clicked.connect(self.save_note)
        note_row = QHBoxLayout()
        note_row.addWidget(self.note, 1)
        note_row.addWidget(self.note_save, 0, Qt.AlignmentFlag.AlignBottom)
        return note_row

    # -- broadcast ------------------------------------------------------------------------
    def on_change(self, change: Change) -> None:
        if change & (Change.SELECTION | Change.REVIEW | Change.DECISIONS | Change.LIBRARY):
            self._show(self._ws.deviation(self._ws.selected))

    # -- actions ----------------------------------------------------------------------------
    def record(self, action: str) -> None:
        d = self._current
        if d is None:
            return
        text = self.amend_text.toPlainText() if action == "amend" else ""
        self.decided.emit(d.id, action, text, self.note.toPlainText().strip())
        for w in (self.amend_label, self.amend_text, self.amend_ok):
            w.hide()

    def start_amend(self) -> None:
        d = self._current
        if d is None:
            return
        existing = self._existing()
        if existing is not None and existing[0] == "amend" and existing[2]:
            self.amend_text.setPlainText(existing[2])
        else:
            self.amend_text.setPlainText(d.draft_text or d.precedent_text)
        for w in (self.amend_label, self.amend_text, self.amend_ok):
            w.show()
        self.amend_text.setFocus()
        self.amend_text.selectAll()

    def focus_note(self) -> None:
        if self._current is not None:
            self.note.setFocus()

    def save_note(self) -> None:
        d = self._current
        if d is None:
            return
        existing = self._existing()
        note = self.note.toPlainText().strip()
        if existing is None:
            # A note without a decision is kept with "accept" withheld: record nothing yet but
            # tell the reviewer; a note needs a decision to travel with.
            self.details.append(f"<p style='color:{MUTED_INK}'>Choose a decision to keep this note with it.</p>")
            return
        self.decided.emit(d.id, existing[0], existing[2], note)

    def clear(self) -> None:
        if self._current is not None:
            self.cleared.emit(self._current.id)

    # -- display ------------------------------------------------------------------------------
    def _existing(self) -> tuple[str, str, str] | None:
        if self._current is None:
            return None
        dec = self._ws.decisions.get(self._current.id)
        return None if dec is None else self._decision_view(dec)

    def _show(self, d: Deviation | None) -> None:
        changed_deviation = d is None or self._current is None or d.id != self._current.id
        self._current = d
        enabled = d is not None
        for w in (self.accept_btn, self.revert_btn, self.amend_btn, self.clear_btn, self.note, self.note_save):
            w.setEnabled(enabled)
        only_accept = d is not None and not can_change(d)
        for button, tip in ((self.revert_btn, _REVERT_TIP), (self.amend_btn, _AMEND_TIP)):
            # the engine refuses these too (core.decisions): the draft's own stays
            button.setEnabled(enabled and not only_accept)
            button.setToolTip(f"A {d.category} difference can only be accepted."
                              if d is not None and only_accept else tip)
        if changed_deviation:
            for part in (self.amend_label, self.amend_text, self.amend_ok):
                part.hide()
        if d is None or self._ws.review is None:
            self.details.setHtml(
                f"<p style='color:{MUTED_INK}'>Select a deviation in the list (or press "
                f"<b>{KEYS['next']}</b>) to see it here and record a decision.</p>")
            self.group.setExclusive(False)
            for b in self.group.buttons():
                b.setChecked(False)
            self.group.setExclusive(True)
            self.note.setPlainText("")
            return
        self.details.setHtml(deviation_html(self._ws.review, d))
        existing = self._existing()
        self.group.setExclusive(False)
        self.accept_btn.setChecked(existing is not None and existing[0] == "accept")
        self.revert_btn.setChecked(existing is not None and existing[0] == "revert")
        self.amend_btn.setChecked(existing is not None and existing[0] == "amend")
        self.group.setExclusive(True)
        if changed_deviation or existing is not None:
            self.note.setPlainText(existing[1] if existing else "")


def _esc(s: str) -> str:
    return s.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;").replace("\n", "<br>")


def deviation_html(review: Review, d: Deviation) -> str:
    """The selected deviation as a short HTML page (all facts from the engine): the clause,
    the changed words of each side, their past use, then why it matters."""
    kind = CATEGORY_NAMES.get(d.category, d.category)
    change = CHANGE_NAMES.get(d.change, d.change)
    parts = [
        f"<p style='margin:0'><b style='font-size:large'>{_esc(clause_label(review, d))}</b></p>",
        f"<p style='margin:2px 0 6px 0;color:{MUTED_INK}'>No. {d.rank} \u00b7 severity {d.severity} of 100 \u00b7 "
        f"{_esc(kind)} \u00b7 {_esc(change)}</p>",
    ]
    if d.precedent_text or d.draft_text:
        parts.append("<table cellspacing='0' cellpadding='4' width='100%'>")
        if d.precedent_text:
            parts.append(
                f"<tr><td width='90' style='color:{MUTED_INK}'>Precedent</td>"
                f"<td style='background:{DELETED.background};color:{DELETED.ink};font-family:serif'>"
                f"<s>{_esc(d.precedent_text)}</s></td></tr>")
        if d.draft_text:
            parts.append(
                f"<tr><td width='90' style='color:{MUTED_INK}'>Draft</td>"
                f"<td style='background:{INSERTED.background};color:{INSERTED.ink};font-family:serif'>"
                f"<u>{_esc(d.draft_text)}</u></td></tr>")
        parts.append("</table>")
    parts.append(_past_use_html(d))
    if d.reasons:
        parts.append("<p style='margin:6px 0 0 0'><b>Why it matters</b></p><ul style='margin-top:0'>"
                     + "".join(f"<li>{_esc(r)}</li>" for r in d.reasons) + "</ul>")
    return "".join(parts)


def _past_use_html(d: Deviation) -> str:
    """The "Past use" paragraph: the tally strip as glyphs, the figure, and the sentence
    (:func:`desktop.labels.frequency_sentence`); empty without a precedent set."""
    f = d.frequency
    t = tally(f.matching, f.total) if f is not None else None
    if f is None or t is None:
        return ""
    extra = ""
    if f.containing is not None and d.category != "term":
        extra = f" {f.containing} provisions of this type contain the changed words."
    return (f"<p style='margin-top:6px'><b>{PAST_USE}</b> &nbsp;"
            f"<span style='color:{TALLY.filled};font-family:DejaVu Sans,sans-serif'>{tally_glyphs(t)}</span>"
            f" &nbsp;{f.matching}/{f.total}<br>{_esc(frequency_sentence(d))}{_esc(extra)}</p>")
