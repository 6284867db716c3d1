"""The variants view: how the past agreements word the selected provision.

It shows the engine's :class:`core.library.slots.SlotVariants` as they come: one row per
wording of the provision's slot with its tally strip (:mod:`desktop.tally`: one square per
past agreement, filled for each that words it that way), the firm's stance on it beside
it, a marker on the draft's and the precedent's wording, and a row for the agreements with
no such provision (hatched squares).  Which agreement belongs to which wording, the counts
and the order are the engine's; this module only paints them (with :class:`QPainter`; there
is no chart library).  Beside the chart: the wording of the row the reviewer clicks, and
the closest precedent-set texts.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from PySide6.QtCore import QRectF, QSize, Qt, Signal
from PySide6.QtGui import QColor, QFont, QFontMetrics, QMouseEvent, QPainter, QPaintEvent
from PySide6.QtWidgets import (
    QFrame,
    QLabel,
    QScrollArea,
    QSizePolicy,
    QTextBrowser,
    QVBoxLayout,
    QWidget,
)

from .palette import INK, MUTED_INK, ROW, TALLY
from .tally import tally, tally_glyphs, tally_words
from .widgets import paint_tally, splitter

if TYPE_CHECKING:  # the window opens without loading the engine
    from core.library.slots import SlotVariant, SlotVariants

__all__ = ["ABSENT_ROW", "POSITION_MARKS", "VariantChart", "VariantsView"]


#: A mark for each of the firm's stances (core.library.index.POSITIONS), so the stance
#: reads without colour: a house for the house wording, "almost equal" for a wording the
#: firm can live with, a dashed arrow down for ground given only as a last concession, a
#: slashed circle for a refusal (all in DejaVu Sans, the font the window falls back on).
POSITION_MARKS = {
    "house wording": "\u2302",
    "can live with": "\u2248",
    "last concession": "\u21e3",
    "refuse": "\u2298",
}
#: The name of the row of agreements that have no such provision.
ABSENT_ROW = "No such provision"

#: Height of one row (two lines: name and gist, then the tally strip), in pixels.
ROW_PX = 46
#: Height of the title line above the rows, in pixels.
TITLE_PX = 30
#: Side of a tally square in the chart, in pixels: twice a table cell's, the chart's own
#: scale (twelve squares take about 200 pixels).
SQUARE_PX = 11
_LEFT = int(Qt.AlignmentFlag.AlignLeft | Qt.AlignmentFlag.AlignVCenter)
#: The agreements' names listed under a clicked row before "and n more" (display only).
DOCUMENTS_LISTED = 12


def _marker(draft: bool, precedent: bool) -> str:
    if draft and precedent:
        return "\u25c0 draft and precedent"
    return "\u25c0 draft" if draft else "\u25c0 precedent" if precedent else ""


class VariantChart(QWidget):
    """The wordings of one provision, each with its tally strip; click a row to read it.

    Row *i* < ``len(variants)`` is the engine's variant *i*; one more row, when shown, is
    the agreements without such a provision (:data:`ABSENT_ROW`)."""

    variantClicked = Signal(int)

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._slot: SlotVariants | None = None
        self._title = ""
        self._current = -1
        self.setMinimumHeight(80)
        self.setSizePolicy(QSizePolicy.Policy.Expanding, QSizePolicy.Policy.Preferred)

    # -- content ------------------------------------------------------------------------------
    def set_slot(self, slot: SlotVariants | None, *, title: str = "") -> None:
        self._slot = slot
        self._title = title
        self._current = self.marked_row()
        self.updateGeometry()
        self.update()

    @property
    def slot(self) -> SlotVariants | None:
        return self._slot

    @property
    def variants(self) -> tuple[SlotVariant, ...]:
        return self._slot.variants if self._slot is not None else ()

    def shows_absent_row(self) -> bool:
        s = self._slot
        return s is not None and (s.absent > 0 or s.draft_absent or s.precedent_absent)

    @property
    def row_count(self) -> int:
        return len(self.variants) + (1 if self.shows_absent_row() else 0)

    def marked_row(self) -> int:
        """The row holding the draft's wording (the precedent's when the draft has no such
        provision; the "no such provision" row when that is the draft's), or -1."""
        s = self._slot
        if s is None:
            return -1
        for i, v in enumerate(s.variants):
            if v.draft:
                return i
        if s.draft_absent and self.shows_absent_row():
            return len(s.variants)
        return next((i for i, v in enumerate(s.variants) if v.precedent), -1)

    @property
    def current(self) -> int:
        return self._current

    # -- geometry -----------------------------------------------------------------------------
    def sizeHint(self) -> QSize:
        return QSize(440, TITLE_PX + 6 + ROW_PX * max(1, self.row_count) + 10)

    def minimumSizeHint(self) -> QSize:
        return QSize(360, TITLE_PX + 6 + ROW_PX * max(1, self.row_count) + 10)

    def row_rect(self, i: int) -> QRectF:
        return QRectF(8, TITLE_PX + 6 + i * ROW_PX, self.width() - 16, ROW_PX - 6)

    def mousePressEvent(self, event: QMouseEvent) -> None:
        for i in range(self.row_count):
            if self.row_rect(i).contains(event.position()):
                self._current = i
                self.update()
                self.variantClicked.emit(i)
                return
        super().mousePressEvent(event)

    # -- painting -----------------------------------------------------------------------------
    def paintEvent(self, event: QPaintEvent) -> None:
        p = QPainter(self)
        p.setRenderHint(QPainter.RenderHint.Antialiasing)
        p.fillRect(self.rect(), QColor("#ffffff"))
        bold = QFont(self.font())
        bold.setBold(True)
        p.setFont(bold)
        p.setPen(QColor(INK))
        p.drawText(QRectF(8, 4, self.width() - 16, TITLE_PX - 4), _LEFT,
                   QFontMetrics(bold).elidedText(self._title, Qt.TextElideMode.ElideRight, self.width() - 16))
        s = self._slot
        if s is None or self.row_count == 0:
            p.setFont(self.font())
            p.setPen(QColor(MUTED_INK))
            p.drawText(QRectF(8, TITLE_PX + 6, self.width() - 16, 40),
                       int(Qt.AlignmentFlag.AlignLeft | Qt.TextFlag.TextWordWrap),
                       "No wording to show for this provision.")
            p.end()
            return
        for i in range(self.row_count):
            self._paint_row(p, i, s)
        p.end()

    def row_facts(self, i: int) -> tuple[str, int, str, str | None, str, bool, str]:
        """(name, count, gist, position, marker, emphasised, fill) of row *i*: what the row
        shows, read from the engine's variant (or the "no such provision" row)."""
        s = self._slot
        assert s is not None
        if i >= len(s.variants):
            return (ABSENT_ROW, s.absent, "", None, _marker(s.draft_absent, s.precedent_absent),
                    s.draft_absent, ROW.hatch)
        v = s.variants[i]
        # The draft's wording in the draft column's colour, the precedent's in the precedent
        # column's (as in the side-by-side view), other wordings in the neutral ink.
        fill = TALLY.draft if v.draft else TALLY.precedent if v.precedent else TALLY.filled
        return v.name, v.count, v.gist, v.position, _marker(v.draft, v.precedent), v.draft, fill

    def _paint_row(self, p: QPainter, i: int, s: SlotVariants) -> None:
        """Line 1: the wording's name, its marker and what sets it apart; line 2: its tally
        strip (one square per past agreement, filled for those that word it this way), the
        count and the firm's position."""
        r = self.row_rect(i)
        name, count, gist, position, marker, emphasised, fill = self.row_facts(i)
        absent = i >= len(s.variants)
        if i == self._current:
            p.fillRect(r.adjusted(-4, -2, 4, 2), QColor("#eef1f6"))
        half = r.height() / 2
        head = name + (f"  {marker}" if marker else "")
        font = QFont(self.font())
        font.setBold(bool(emphasised or marker))
        fm = QFontMetrics(font)
        p.setFont(font)
        p.setPen(QColor(INK))
        head_w = min(fm.horizontalAdvance(head), int(r.width()))
        p.drawText(QRectF(r.left(), r.top(), head_w + 2, half), _LEFT,
                   fm.elidedText(head, Qt.TextElideMode.ElideRight, int(r.width())))
        if gist and head_w + 24 < r.width():
            italic = QFont(self.font())
            italic.setItalic(True)
            p.setFont(italic)
            p.setPen(QColor(MUTED_INK))
            room = int(r.width() - head_w - 14)
            p.drawText(QRectF(r.left() + head_w + 12, r.top(), room, half), _LEFT,
                       QFontMetrics(italic).elidedText(gist, Qt.TextElideMode.ElideRight, room))
        t = tally(count, s.total)
        middle = r.top() + half + half / 2
        right = r.left()
        if t is not None:
            right = paint_tally(p, r.left(), middle, t, side=SQUARE_PX, fill=fill, hatched=absent)
        label = f"{count} agreement{'s' * (count != 1)}"
        if position and not absent:
            label += f"   {POSITION_MARKS.get(position, '')} {position}"
        p.setFont(self.font())
        p.setPen(QColor(INK))
        room = int(r.right() - right - 12)
        p.drawText(QRectF(right + 12, middle - half / 2, room, half), _LEFT,
                   QFontMetrics(self.font()).elidedText(label, Qt.TextElideMode.ElideRight, room))


class VariantsView(QWidget):
    """The chart, the clicked wording, and the closest precedent-set texts."""

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.heading = QLabel("Select a deviation to see how the precedent set words that provision.", self)
        self.heading.setWordWrap(True)
        self.chart = VariantChart(self)
        self.chart.variantClicked.connect(self._show_row)
        self.chart_scroll = QScrollArea(self)
        self.chart_scroll.setWidget(self.chart)
        self.chart_scroll.setWidgetResizable(True)
        self.chart_scroll.setFrameShape(QFrame.Shape.NoFrame)
        self.wording = QTextBrowser(self)
        self.wording.setObjectName("variantWording")
        self.wording.setOpenLinks(False)
        split = splitter(self, Qt.Orientation.Horizontal, "variantsSplit", (self.chart_scroll, self.wording), (3, 2))
        split.setSizes([600, 400])  # until the window restores the reviewer's own sizes
        lay = QVBoxLayout(self)
        lay.setContentsMargins(4, 4, 4, 4)
        lay.addWidget(self.heading)
        lay.addWidget(split, 1)

    def clear(self, message: str) -> None:
        self.heading.setText(message)
        self.chart.set_slot(None)
        self.wording.clear()

    def set_content(self, *, slot: SlotVariants, provision: str, deviation: Any = None) -> None:
        """Show *slot* (the engine's variants of the selected provision's slot); *provision*
        names it ("Section 11.2 Payment"); *deviation* is the selected deviation, if any."""
        self.chart.set_slot(slot, title=f"How the {slot.total} past agreements word this provision")
        self.heading.setText(_heading(slot, provision, deviation))
        self._show_row(self.chart.current)
        if self.chart.current >= 0:  # keep the marked wording in sight
            r = self.chart.row_rect(self.chart.current).toRect()
            self.chart_scroll.ensureVisible(r.center().x(), r.center().y(), 0, ROW_PX * 2)

    def _show_row(self, i: int) -> None:
        s = self.chart.slot
        parts: list[str] = []
        if s is not None and 0 <= i < len(s.variants):
            v = s.variants[i]
            marker = _marker(v.draft, v.precedent)
            parts.append(f"<h4 style='margin:0'>{_esc(v.name)}{(' ' + _esc(marker)) if marker else ''}</h4>")
            parts.append(_facts_html(v.count, s.total, v.position))
            if v.gist:
                parts.append(f"<p style='margin:2px 0;color:{MUTED_INK}'><i>{_esc(v.gist)}</i></p>")
            if v.documents:
                names = list(v.documents[:DOCUMENTS_LISTED])
                more = len(v.documents) - len(names)
                listed = ", ".join(names) + (f" and {more} more" if more > 0 else "")
                parts.append(f"<p style='margin:2px 0;color:{MUTED_INK}'>In: {_esc(listed)}</p>")
            if v.text:
                source = " \u00b7 ".join(x for x in (v.sample_document, v.sample_provision) if x)
                parts.append(f"<p style='font-family:serif;margin:6px 0 0 0'>{_esc(v.text)}</p>"
                             + (f"<p style='margin:0;color:{MUTED_INK}'>\u2014 {_esc(source)}</p>" if source else ""))
            elif v.count == 0:
                parts.append(f"<p style='color:{MUTED_INK}'>No past agreement words it this way.</p>")
        elif s is not None and i == len(s.variants) and self.chart.shows_absent_row():
            marker = _marker(s.draft_absent, s.precedent_absent)
            t = tally(s.absent, s.total)
            words = tally_words(t, verb=("has", "have"), rest="no provision corresponding to this one") if t else ""
            parts.append(f"<h4 style='margin:0'>{ABSENT_ROW}{(' ' + _esc(marker)) if marker else ''}</h4>"
                         f"<p style='margin:2px 0;color:{MUTED_INK}'>{_esc(words[:1].upper() + words[1:])}.</p>")
        if s is not None and s.closest:
            parts.append("<h4 style='margin:10px 0 0 0'>Closest texts in the precedent set</h4>")
            for c in s.closest:
                parts.append(
                    f"<p style='margin:6px 0 0 0;color:{MUTED_INK}'>{_esc(c.document)} \u00b7 "
                    f"{_esc(c.provision)} \u00b7 similarity {c.similarity:.2f}</p>"
                    f"<p style='margin:0;font-family:serif'>{_esc(c.text)}</p>"
                )
        self.wording.setHtml("".join(parts))


def _heading(s: SlotVariants, provision: str, deviation: Any) -> str:
    """One paragraph above the chart: what the squares count."""
    agreements = f"agreement{'s' * (s.total != 1)}"
    if s.draft_absent:
        text = (f"{provision} (clause type \u201c{s.label}\u201d) is not in the draft. {s.present} of the "
                f"{s.total} past {agreements} have a provision like it; {s.absent} have none.")
    elif s.present == 0:
        text = (f"None of the {s.total} past {agreements} has a provision like {provision} "
                f"(clause type \u201c{s.label}\u201d).")
    else:
        what = ("this change" if s.by_change
                else "the provision (near-identical wordings count as one)")
        text = (f"{provision} (clause type \u201c{s.label}\u201d): {s.present} of the {s.total} past "
                f"{agreements} have a provision like it. One row per way they word {what}; "
                "each square is one past agreement, filled where it words it that way. "
                "\u25c0 marks the draft's and the precedent's wording.")
    f = getattr(deviation, "frequency", None)
    if f is not None and getattr(deviation, "category", None) == "term":
        text += (f" This change renames a defined term: {f.matching} of the {f.same_type} past agreements "
                 "that define either name use the draft's.")
    return text


def _facts_html(count: int, total: int, position: str | None) -> str:
    """The count as a tally strip and in words, then the firm's position on the wording."""
    t = tally(count, total)
    if t is None:
        return ""
    words = tally_words(t, verb=("words", "word"), rest="it this way")
    pos = f"{POSITION_MARKS.get(position, '')} {position}" if position else "no position recorded"
    return (f"<p style='margin:2px 0'><span style='color:{TALLY.filled}'>{tally_glyphs(t)}</span>"
            f"<span style='color:{MUTED_INK}'> &nbsp;{_esc(words[:1].upper() + words[1:])} \u00b7 "
            f"{_esc(pos)}</span></p>")


def _esc(s: str) -> str:
    return s.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")
