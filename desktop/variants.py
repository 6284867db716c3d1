"""The variants view: how the precedent set words the selected provision.

:class:`VariantChart` draws one horizontal bar per wording variant (agreements carrying it),
with the reviewer's position label beside it and a marker on the draft's own wording.  It is
painted with :class:`QPainter` directly; there is no chart library.  Below it, the closest
precedent-set texts of the selected provision.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

from PySide6.QtCore import QPointF, QRectF, QSize, Qt, Signal
from PySide6.QtGui import QColor, QFont, QFontMetrics, QMouseEvent, QPainter, QPaintEvent, QPen, QPolygonF
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

from .palette import BAR, INK, MUTED_INK

__all__ = ["ClosestText", "VariantBar", "VariantChart", "VariantsView"]


@dataclass(frozen=True, slots=True)
class VariantBar:
    """One wording variant of a clause type in the precedent set, as the chart shows it."""

    label: str  # short name, e.g. "Variant B" or the engine's variant name
    count: int  # agreements carrying this wording
    text: str  # a representative wording
    position: str | None = None  # preferred / acceptable / fallback / not acceptable
    is_draft: bool = False  # the draft's wording falls in this variant


@dataclass(frozen=True, slots=True)
class ClosestText:
    document: str
    provision: str
    similarity: float
    text: str


#: A symbol for each position label, so the label reads without colour.
POSITION_MARKS = {
    "preferred": "\u2605",
    "acceptable": "\u2713",
    "fallback": "\u21ba",
    "not acceptable": "\u2715",
}

#: Height of one bar row, in pixels.
ROW_PX = 30
#: Width of the label column left of the bars, in pixels.
LABEL_PX = 230
#: Room right of the longest bar for its count, in pixels.
COUNT_PX = 150


class VariantChart(QWidget):
    """Horizontal bars of wording variants; click a bar to read that wording."""

    variantClicked = Signal(int)

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._bars: tuple[VariantBar, ...] = ()
        self._total = 0
        self._title = ""
        self._marker = "draft"
        self._current = -1
        self.setMinimumHeight(80)
        self.setSizePolicy(QSizePolicy.Policy.Expanding, QSizePolicy.Policy.Preferred)
        self.setMouseTracking(False)

    def set_variants(self, bars: Sequence[VariantBar], *, total: int, title: str, marker: str = "draft") -> None:
        """*marker* names whose wording the marked bar holds ("draft" or "precedent")."""
        self._marker = marker
        self._bars = tuple(bars)
        self._total = total
        self._title = title
        self._current = next((i for i, b in enumerate(self._bars) if b.is_draft), -1)
        self.updateGeometry()
        self.update()

    @property
    def bars(self) -> tuple[VariantBar, ...]:
        return self._bars

    @property
    def current(self) -> int:
        return self._current

    def sizeHint(self) -> QSize:
        return QSize(520, 40 + ROW_PX * max(1, len(self._bars)) + 10)

    def minimumSizeHint(self) -> QSize:
        return QSize(320, 40 + ROW_PX * max(1, len(self._bars)) + 10)

    def row_rect(self, i: int) -> QRectF:
        return QRectF(8, 36 + i * ROW_PX, self.width() - 16, ROW_PX - 6)

    def mousePressEvent(self, event: QMouseEvent) -> None:
        for i in range(len(self._bars)):
            if self.row_rect(i).contains(event.position()):
                self._current = i
                self.update()
                self.variantClicked.emit(i)
                return
        super().mousePressEvent(event)

    def paintEvent(self, event: QPaintEvent) -> None:
        p = QPainter(self)
        p.setRenderHint(QPainter.RenderHint.Antialiasing)
        p.fillRect(self.rect(), QColor("#ffffff"))
        bold = QFont(self.font())
        bold.setBold(True)
        p.setFont(bold)
        p.setPen(QColor(INK))
        p.drawText(QRectF(8, 6, self.width() - 16, 24), int(Qt.AlignmentFlag.AlignLeft | Qt.AlignmentFlag.AlignVCenter),
                   self._title)
        if not self._bars:
            p.setFont(self.font())
            p.setPen(QColor(MUTED_INK))
            p.drawText(QRectF(8, 36, self.width() - 16, 40), int(Qt.AlignmentFlag.AlignLeft | Qt.TextFlag.TextWordWrap),
                       "No wording variants to show for this provision.")
            p.end()
            return
        biggest = max(max(b.count for b in self._bars), 1)
        scale_to = max(self._total, biggest)
        fm = QFontMetrics(self.font())
        bar_left = 8 + LABEL_PX
        bar_span = max(40.0, self.width() - bar_left - COUNT_PX - 8)
        for i, b in enumerate(self._bars):
            r = self.row_rect(i)
            if i == self._current:
                p.fillRect(r.adjusted(-4, -2, 4, 2), QColor("#f1f3f7"))
            # Label: the variant's name, and the reviewer's position (with its symbol) if any.
            p.setFont(bold if b.is_draft else self.font())
            p.setPen(QColor(INK))
            name = b.label + (f"  \u25c0 {self._marker}" if b.is_draft else "")
            if b.position:
                name += f"   {POSITION_MARKS.get(b.position, '')} {b.position}"
            p.drawText(QRectF(r.left(), r.top(), LABEL_PX - 8, r.height()),
                       int(Qt.AlignmentFlag.AlignLeft | Qt.AlignmentFlag.AlignVCenter),
                       fm.elidedText(name, Qt.TextElideMode.ElideRight, LABEL_PX - 8))
            # Track and bar.
            track = QRectF(bar_left, r.top() + 5, bar_span, r.height() - 10)
            p.fillRect(track, QColor(BAR.track))
            w = bar_span * (b.count / scale_to)
            fill = QColor(BAR.draft_variant if b.is_draft else BAR.other_variant)
            p.fillRect(QRectF(track.left(), track.top(), w, track.height()), fill)
            if b.is_draft:  # a non-colour cue: a triangle at the bar's end
                tip = QPointF(track.left() + w + 1, track.center().y())
                p.setBrush(QColor(INK))
                p.setPen(Qt.PenStyle.NoPen)
                p.drawPolygon(QPolygonF([tip, QPointF(tip.x() + 8, tip.y() - 6), QPointF(tip.x() + 8, tip.y() + 6)]))
            p.setPen(QPen(QColor(INK)))
            count = f"{b.count} of {self._total}" if self._total else str(b.count)
            p.drawText(QRectF(track.left() + bar_span + 10, r.top(), COUNT_PX, r.height()),
                       int(Qt.AlignmentFlag.AlignLeft | Qt.AlignmentFlag.AlignVCenter), count)
        p.end()


class VariantsView(QWidget):
    """The chart, the selected variant's wording, and the closest precedent-set texts."""

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.heading = QLabel("Select a deviation to see how the precedent set words that provision.", self)
        self.heading.setWordWrap(True)
        self.chart = VariantChart(self)
        self.chart.variantClicked.connect(self._show_variant)
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
        lay = QVBoxLayout(self)
        lay.setContentsMargins(4, 4, 4, 4)
        lay.addWidget(self.heading)
        lay.addWidget(split, 1)
        self._closest: tuple[ClosestText, ...] = ()
        self._marker = "draft"

    def clear(self, message: str) -> None:
        self.heading.setText(message)
        self.chart.set_variants((), total=0, title="")
        self.wording.clear()
        self._closest = ()

    def set_content(
        self,
        *,
        heading: str,
        bars: Sequence[VariantBar],
        total: int,
        title: str,
        closest: Sequence[ClosestText],
        marker: str = "draft",
    ) -> None:
        self._closest = tuple(closest)
        self._marker = marker
        self.chart.set_variants(bars, total=total, title=title, marker=marker)
        marked = any(b.is_draft for b in bars)
        if marked:
            heading += f" The bar marked \u25c0 holds the {marker}'s wording."
        elif bars:
            heading += (f" No variant holds the {marker}'s wording (it is not within the clustering "
                        "cut-off of any); the closest texts of the precedent set are on the right.")
        self.heading.setText(heading)
        self._show_variant(self.chart.current if marked else -1)
        if marked:  # keep the marked variant in sight
            r = self.chart.row_rect(self.chart.current).toRect()
            self.chart_scroll.ensureVisible(r.center().x(), r.center().y(), 0, ROW_PX * 2)

    def _show_variant(self, i: int) -> None:
        parts = []
        bars = self.chart.bars
        if 0 <= i < len(bars):
            b = bars[i]
            suffix = f" \u2014 the {self._marker}&#39;s wording" if b.is_draft else ""
            parts.append(f"<h4 style='margin:0'>{_esc(b.label)}{suffix}</h4>"
                         f"<p style='font-family:serif'>{_esc(b.text)}</p>")
        if self._closest:
            parts.append("<h4 style='margin:8px 0 0 0'>Closest texts in the precedent set</h4>")
            for c in self._closest:
                parts.append(
                    f"<p style='margin:6px 0 0 0;color:{MUTED_INK}'>{_esc(c.document)} \u00b7 "
                    f"{_esc(c.provision)} \u00b7 similarity {c.similarity:.2f}</p>"
                    f"<p style='margin:0;font-family:serif'>{_esc(c.text)}</p>"
                )
        self.wording.setHtml("".join(parts))


def _esc(s: str) -> str:
    return s.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")
