"""The variants view: how the past agreements word the selected provision.

It shows the engine's :class:`core.library.slots.SlotVariants` as they come: one horizontal
bar per wording of the provision's slot (the agreements that word it that way), the
reviewer's position label beside it, a marker on the draft's and the precedent's wording,
and a row for the agreements with no such provision.  Which agreement belongs to which bar,
the counts and the order are the engine's; this module only paints them (with
:class:`QPainter`; there is no chart library).  Beside the chart: the wording of the bar the
reviewer clicks, and the closest precedent-set texts.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from PySide6.QtCore import QPointF, QRectF, QSize, Qt, Signal
from PySide6.QtGui import QBrush, QColor, QFont, QFontMetrics, QMouseEvent, QPainter, QPaintEvent, QPen, QPolygonF
from PySide6.QtWidgets import (
    QFrame,
    QLabel,
    QScrollArea,
    QSizePolicy,
    QSplitter,
    QTextBrowser,
    QVBoxLayout,
    QWidget,
)

from .palette import BAR, DELETED, INK, MUTED_INK, ROW

if TYPE_CHECKING:  # the window opens without loading the engine
    from core.library.slots import SlotVariant, SlotVariants

__all__ = ["ABSENT_ROW", "POSITION_MARKS", "VariantChart", "VariantsView"]


#: A symbol for each position label, so the label reads without colour.
POSITION_MARKS = {
    "preferred": "\u2605",
    "acceptable": "\u2713",
    "fallback": "\u21ba",
    "not acceptable": "\u2715",
}
#: The name of the row of agreements that have no such provision.
ABSENT_ROW = "No such provision"

#: Height of one row (two lines: name and gist, then the bar), in pixels.
ROW_PX = 46
#: Height of the title line above the rows, in pixels.
TITLE_PX = 30
#: Room right of the bars for the count and the position, in pixels.
COUNT_PX = 230
#: The agreements' names listed under a clicked bar before "and n more" (display only).
DOCUMENTS_LISTED = 12


def _marker(draft: bool, precedent: bool) -> str:
    if draft and precedent:
        return "\u25c0 draft and precedent"
    return "\u25c0 draft" if draft else "\u25c0 precedent" if precedent else ""


class VariantChart(QWidget):
    """Horizontal bars of the wordings of one provision; click a bar to read that wording.

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
        italic = QFont(self.font())
        italic.setItalic(True)
        left = int(Qt.AlignmentFlag.AlignLeft | Qt.AlignmentFlag.AlignVCenter)
        p.setFont(bold)
        p.setPen(QColor(INK))
        p.drawText(QRectF(8, 4, self.width() - 16, TITLE_PX - 4), left,
                   QFontMetrics(bold).elidedText(self._title, Qt.TextElideMode.ElideRight, self.width() - 16))
        s = self._slot
        if s is None or self.row_count == 0:
            p.setFont(self.font())
            p.setPen(QColor(MUTED_INK))
            p.drawText(QRectF(8, TITLE_PX + 6, self.width() - 16, 40), int(Qt.AlignmentFlag.AlignLeft | Qt.TextFlag.TextWordWrap),
                       "No wording to show for this provision.")
            p.end()
            return
        total = max(s.total, 1)
        bar_left = 8.0
        bar_span = max(40.0, self.width() - 16 - COUNT_PX)
        for i in range(self.row_count):
            r = self.row_rect(i)
            absent = i >= len(s.variants)
            if absent:
                name, count, gist, position = ABSENT_ROW, s.absent, "", None
                marker = _marker(s.draft_absent, s.precedent_absent)
                emphasised = s.draft_absent
            else:
                v = s.variants[i]
                name, count, gist, position = v.name, v.count, v.gist, v.position
                marker = _marker(v.draft, v.precedent)
                emphasised = v.draft
            if i == self._current:
                p.fillRect(r.adjusted(-4, -2, 4, 2), QColor("#eef1f6"))
            half = r.height() / 2
            # Line 1: the wording's name, its marker, and what sets it apart.
            head = name + (f"  {marker}" if marker else "")
            font = bold if emphasised or marker else self.font()
            fm = QFontMetrics(font)
            p.setFont(font)
            p.setPen(QColor(INK))
            head_w = min(fm.horizontalAdvance(head), int(r.width()))
            p.drawText(QRectF(r.left(), r.top(), head_w + 2, half), left,
                       fm.elidedText(head, Qt.TextElideMode.ElideRight, int(r.width())))
            if gist and head_w + 24 < r.width():
                p.setFont(italic)
                p.setPen(QColor(MUTED_INK))
                room = int(r.width() - head_w - 14)
                p.drawText(QRectF(r.left() + head_w + 12, r.top(), room, half), left,
                           QFontMetrics(italic).elidedText(gist, Qt.TextElideMode.ElideRight, room))
            # Line 2: the bar, then "n of N agreements" and the position.
            track = QRectF(bar_left, r.top() + half + 3, bar_span, half - 7)
            p.fillRect(track, QColor(BAR.track))
            w = bar_span * (count / total)
            if absent:  # no wording: an outlined, hatched bar
                p.fillRect(QRectF(track.left(), track.top(), w, track.height()),
                           QBrush(QColor(ROW.hatch).darker(130), Qt.BrushStyle.BDiagPattern))
            else:
                # The draft's wording in the draft's blue, the precedent's in the precedent's
                # orange (as in the side-by-side columns), other wordings grey.
                fill = QColor(BAR.draft_variant if emphasised
                              else DELETED.strong_background if not absent and s.variants[i].precedent
                              else BAR.other_variant)
                p.fillRect(QRectF(track.left(), track.top(), w, track.height()), fill)
            if marker:  # a non-colour cue: a triangle at the bar's end
                tip = QPointF(track.left() + w + 1, track.center().y())
                p.setBrush(QColor(INK))
                p.setPen(Qt.PenStyle.NoPen)
                p.drawPolygon(QPolygonF([tip, QPointF(tip.x() + 8, tip.y() - 6), QPointF(tip.x() + 8, tip.y() + 6)]))
            p.setFont(self.font())
            p.setPen(QPen(QColor(INK)))
            text_left = track.left() + bar_span + 12
            count_text = f"{count} of {s.total}"
            p.drawText(QRectF(text_left, track.top() - 4, COUNT_PX, track.height() + 8), left, count_text)
            if not absent:
                shift = QFontMetrics(self.font()).horizontalAdvance(count_text + "   ")
                if position:
                    p.setPen(QColor(INK))
                    label = f"{POSITION_MARKS.get(position, '')} {position}"
                else:
                    p.setPen(QColor(MUTED_INK))
                    label = "no position recorded"
                p.drawText(QRectF(text_left + shift, track.top() - 4, COUNT_PX - shift, track.height() + 8), left,
                           QFontMetrics(self.font()).elidedText(label, Qt.TextElideMode.ElideRight, int(COUNT_PX - shift)))
        p.end()


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
        split = QSplitter(Qt.Orientation.Horizontal, self)
        split.setObjectName("variantsSplit")
        split.addWidget(self.chart_scroll)
        split.addWidget(self.wording)
        split.setStretchFactor(0, 3)
        split.setStretchFactor(1, 2)
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
            facts = [f"{v.count} of {s.total} agreements",
                     f"{POSITION_MARKS.get(v.position, '')} {v.position}" if v.position else "no position recorded"]
            line = " \u00b7 ".join(facts)
            parts.append(f"<p style='margin:2px 0;color:{MUTED_INK}'>{_esc(line)}</p>")
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
            parts.append(f"<h4 style='margin:0'>{ABSENT_ROW}{(' ' + _esc(marker)) if marker else ''}</h4>"
                         f"<p style='margin:2px 0;color:{MUTED_INK}'>{s.absent} of {s.total} agreements "
                         "have no provision corresponding to this one.</p>")
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
    """One paragraph above the chart: what the bars count."""
    agreements = f"agreement{'s' * (s.total != 1)}"
    if s.draft_absent:
        text = (f"{provision} (clause type \u201c{s.label}\u201d) is not in the draft. {s.present} of the "
                f"{s.total} past {agreements} have a provision like it; {s.absent} have none.")
    elif s.present == 0:
        text = (f"None of the {s.total} past {agreements} has a provision like {provision} "
                f"(clause type \u201c{s.label}\u201d).")
    else:
        what = ("how they word this change" if s.by_change
                else "how they word the provision (near-identical wordings count as one)")
        text = (f"{provision} (clause type \u201c{s.label}\u201d): {s.present} of the {s.total} past "
                f"{agreements} have a provision like it. The bars count them by {what}; "
                "\u25c0 marks the draft's and the precedent's wording.")
    f = getattr(deviation, "frequency", None)
    if f is not None and getattr(deviation, "category", None) == "term":
        text += (f" This change renames a defined term: {f.matching} of the {f.same_type} past agreements "
                 "that define either name use the draft's.")
    return text


def _esc(s: str) -> str:
    return s.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")
