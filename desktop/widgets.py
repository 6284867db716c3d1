"""Small shared widgets: the inline bar and tally-strip delegates, the caution band, one-line
message boxes."""

from __future__ import annotations

from PySide6.QtCore import QModelIndex, QPersistentModelIndex, QRect, Qt
from PySide6.QtGui import QBrush, QColor, QPainter, QPen
from PySide6.QtWidgets import (
    QAbstractItemView,
    QLabel,
    QMessageBox,
    QSplitter,
    QStyle,
    QStyledItemDelegate,
    QStyleOptionViewItem,
    QTableView,
    QWidget,
)

import core

from .models import BAR_ROLE, TALLY_ROLE, source_data
from .palette import BAR, CAUTION_BAND, MUTED_INK, TALLY
from .tally import Tally, tally

__all__ = ["BarDelegate", "CautionBand", "TallyDelegate", "muted_label", "one_line", "paint_tally", "read_only_rows",
           "show_message", "splitter", "tally_width"]

#: Width of an inline bar, in pixels; the figure is written right of it.
BAR_PX = 46
#: Height of an inline bar, in pixels.
BAR_H_PX = 8


def _draw_cell_ground(delegate: QStyledItemDelegate, painter: QPainter, option: QStyleOptionViewItem,
                      index: QModelIndex | QPersistentModelIndex) -> str:
    """Draw the cell of *index* as the style does (selection, focus, alternate rows) but
    without its text, which the delegate then draws beside its figure; returns that text."""
    delegate.initStyleOption(option, index)
    text: str = option.text
    option.text = ""
    style = option.widget.style() if option.widget else None
    if style is not None:
        style.drawControl(QStyle.ControlElement.CE_ItemViewItem, option, painter, option.widget)
    return text


class BarDelegate(QStyledItemDelegate):
    """Draws the cell's text after a small horizontal bar of length ``BAR_ROLE`` (0..1).

    Works over our own Python models (through proxies) and over item widgets whose every
    item has a ``BAR_ROLE`` number."""

    def paint(self, painter: QPainter, option: QStyleOptionViewItem,
              index: QModelIndex | QPersistentModelIndex) -> None:
        frac = source_data(index, BAR_ROLE)
        if not isinstance(frac, float) or frac < 0:
            super().paint(painter, option, index)
            return
        text = _draw_cell_ground(self, painter, option, index)
        r: QRect = option.rect
        painter.save()
        bar_px = max(12, min(BAR_PX, r.width() // 2 - 10))
        track = QRect(r.left() + 6, r.center().y() - BAR_H_PX // 2, bar_px, BAR_H_PX)
        painter.fillRect(track, QColor(BAR.track))
        painter.fillRect(QRect(track.left(), track.top(), round(bar_px * max(0.0, min(1.0, float(frac)))), BAR_H_PX),
                         QColor(BAR.fill))
        selected = bool(option.state & QStyle.StateFlag.State_Selected)
        painter.setPen(option.palette.highlightedText().color() if selected else option.palette.text().color())
        painter.drawText(r.adjusted(bar_px + 12, 0, -4, 0),
                         int(Qt.AlignmentFlag.AlignLeft | Qt.AlignmentFlag.AlignVCenter), text)
        painter.restore()


#: Gap between two squares of a tally strip, and the extra gap between groups of five, as
#: fractions of a square's side (our own proportions: the groups must read as groups).
TALLY_GAP, TALLY_GROUP_GAP = 0.4, 1.0
#: Smallest and largest square side in a table cell, in pixels (below four a square reads
#: as a dot, above seven a strip of twenty overflows the column).
TALLY_MIN_PX, TALLY_MAX_PX = 4, 7


def _gaps(side: int) -> tuple[int, int]:
    """(gap between squares, extra gap between groups) in whole pixels for squares of *side*."""
    return max(1, round(side * TALLY_GAP)), max(2, round(side * TALLY_GROUP_GAP))


def tally_width(t: Tally, side: int) -> int:
    """Width in pixels of strip *t* drawn with squares of *side* pixels."""
    gap, group_gap = _gaps(side)
    return t.cells * side + (t.cells - 1) * gap + (len(t.groups()) - 1) * group_gap


def paint_tally(painter: QPainter, left: float, middle: float, t: Tally, *, side: int,
                fill: str = TALLY.filled, hatched: bool = False) -> float:
    """Draw strip *t* with its left edge at *left*, centred on the line *middle*: filled
    squares in *fill* (hatched and outlined when *hatched*: agreements without the
    provision), empty ones outlined.  Squares sit on whole pixels.  Returns the x just right
    of the strip."""
    painter.save()
    painter.setRenderHint(QPainter.RenderHint.Antialiasing, False)
    gap, group_gap = _gaps(side)
    x, drawn = int(left), 0
    top = int(middle - side / 2)
    for g, size in enumerate(t.groups()):
        if g:
            x += group_gap
        for _ in range(size):
            square = QRect(x, top, side, side)
            if drawn < t.filled and hatched:
                painter.fillRect(square, QColor(TALLY.hatch_ground))
                painter.fillRect(square, QBrush(QColor(TALLY.outline), Qt.BrushStyle.BDiagPattern))
                painter.setPen(QPen(QColor(TALLY.outline), 1))
                painter.drawRect(square.adjusted(0, 0, -1, -1))
            elif drawn < t.filled:
                painter.fillRect(square, QColor(fill))
            else:
                painter.fillRect(square, QColor(TALLY.empty))
                painter.setPen(QPen(QColor(TALLY.outline), 1))
                painter.drawRect(square.adjusted(0, 0, -1, -1))
            drawn += 1
            x += side + gap
    painter.restore()
    return x - gap


class TallyDelegate(QStyledItemDelegate):
    """Draws a tally strip (:mod:`desktop.tally`) from ``TALLY_ROLE`` = (matching, total),
    then the cell's text (the exact figure).  Squares shrink to fit the column, down to
    :data:`TALLY_MIN_PX`; a cell without a figure is drawn as plain text."""

    def paint(self, painter: QPainter, option: QStyleOptionViewItem,
              index: QModelIndex | QPersistentModelIndex) -> None:
        value = source_data(index, TALLY_ROLE)
        t = tally(*value) if isinstance(value, (tuple, list)) and len(value) == 2 else None
        if t is None:
            super().paint(painter, option, index)
            return
        text = _draw_cell_ground(self, painter, option, index)
        r: QRect = option.rect
        room = r.width() - 12 - option.fontMetrics.horizontalAdvance(text + " ")
        side = TALLY_MAX_PX
        while side > TALLY_MIN_PX and tally_width(t, side) > room:
            side -= 1
        right = paint_tally(painter, r.left() + 6, r.center().y() + 0.5, t, side=side)
        painter.save()
        selected = bool(option.state & QStyle.StateFlag.State_Selected)
        painter.setPen(option.palette.highlightedText().color() if selected else option.palette.text().color())
        painter.drawText(QRect(int(right) + 5, r.top(), max(0, r.right() - int(right) - 8), r.height()),
                         int(Qt.AlignmentFlag.AlignLeft | Qt.AlignmentFlag.AlignVCenter), text)
        painter.restore()


class CautionBand(QLabel):
    """The caution across the top of the window; it cannot be dismissed."""

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.setObjectName("cautionBand")
        self.setText("\u26a0 " + core.CAUTION)
        self.setWordWrap(True)
        ink, bg = CAUTION_BAND
        self.setStyleSheet(f"QLabel#cautionBand {{ color: {ink}; background: {bg}; padding: 4px 10px;"
                           " border-bottom: 1px solid #cfd3dc; }")


def one_line(exc: BaseException) -> str:
    """The message a dialog shows for *exc*: the engine's own line for a CounterdraftError,
    else the exception's first line prefixed with its type."""
    from core.errors import CounterdraftError

    text = str(exc).strip().splitlines()[0] if str(exc).strip() else ""
    if isinstance(exc, CounterdraftError):
        return text
    kind = f"Unexpected problem ({type(exc).__name__})"
    return f"{kind}: {text}" if text else kind


def show_message(parent: QWidget, title: str, text: str, *,
                 icon: QMessageBox.Icon = QMessageBox.Icon.Warning) -> QMessageBox:
    """A window-modal message box that does not block the caller (``open()``, not ``exec()``)."""
    box = QMessageBox(icon, title, text, QMessageBox.StandardButton.Ok, parent)
    box.setObjectName("messageBox")
    box.setAttribute(Qt.WidgetAttribute.WA_DeleteOnClose)
    box.setWindowModality(Qt.WindowModality.WindowModal)
    box.open()
    return box


def muted_label(text: str, parent: QWidget) -> QLabel:
    """A wrapped label in the muted ink: what a view shows, explained beside it."""
    label = QLabel(text, parent)
    label.setWordWrap(True)
    label.setStyleSheet(f"color: {MUTED_INK}")
    return label


def splitter(parent: QWidget, orientation: Qt.Orientation, name: str, parts: tuple[QWidget, ...],
             stretch: tuple[int, ...]) -> QSplitter:
    """A splitter named *name* holding *parts*, each growing by its *stretch* factor."""
    split = QSplitter(orientation, parent)
    split.setObjectName(name)
    for i, (part, factor) in enumerate(zip(parts, stretch, strict=True)):
        split.addWidget(part)
        split.setStretchFactor(i, factor)
    return split


def read_only_rows(table: QTableView, *, name: str) -> QTableView:
    """*table* as a list of whole rows: one row selected at a time, nothing edited in place,
    no row numbers (the model's own columns number what needs it)."""
    table.setObjectName(name)
    table.setSelectionBehavior(QAbstractItemView.SelectionBehavior.SelectRows)
    table.setSelectionMode(QAbstractItemView.SelectionMode.SingleSelection)
    table.setEditTriggers(QAbstractItemView.EditTrigger.NoEditTriggers)
    table.verticalHeader().hide()
    return table
