"""Small shared widgets: the inline bar delegate, the caution band, one-line message boxes."""

from __future__ import annotations

from PySide6.QtCore import QModelIndex, QPersistentModelIndex, QRect, Qt
from PySide6.QtGui import QColor, QPainter
from PySide6.QtWidgets import QLabel, QMessageBox, QStyle, QStyledItemDelegate, QStyleOptionViewItem, QWidget

import core

from .models import BAR_ROLE, source_data
from .palette import BAR, CAUTION_BAND

__all__ = ["BarDelegate", "CautionBand", "one_line", "show_message"]

#: Width of an inline bar, in pixels; the figure is written right of it.
BAR_PX = 46
#: Height of an inline bar, in pixels.
BAR_H_PX = 8


class BarDelegate(QStyledItemDelegate):
    """Draws the cell's text after a small horizontal bar of length ``BAR_ROLE`` (0..1).

    Works over our own Python models (through proxies) and over item widgets whose every
    item has a ``BAR_ROLE`` number."""

    def paint(self, painter: QPainter, option: QStyleOptionViewItem, index: QModelIndex | QPersistentModelIndex) -> None:
        frac = source_data(index, BAR_ROLE)
        if not isinstance(frac, float) or frac < 0:
            super().paint(painter, option, index)
            return
        self.initStyleOption(option, index)
        text = option.text
        option.text = ""
        style = option.widget.style() if option.widget else None
        if style is not None:
            style.drawControl(QStyle.ControlElement.CE_ItemViewItem, option, painter, option.widget)
        r: QRect = option.rect
        painter.save()
        bar_px = max(12, min(BAR_PX, r.width() // 2 - 10))
        track = QRect(r.left() + 6, r.center().y() - BAR_H_PX // 2, bar_px, BAR_H_PX)
        painter.fillRect(track, QColor(BAR.track))
        painter.fillRect(QRect(track.left(), track.top(), round(bar_px * max(0.0, min(1.0, float(frac)))), BAR_H_PX),
                         QColor(BAR.fill))
        selected = bool(option.state & QStyle.StateFlag.State_Selected)
        painter.setPen(option.palette.highlightedText().color() if selected else option.palette.text().color())
        painter.drawText(r.adjusted(bar_px + 12, 0, -4, 0), int(Qt.AlignmentFlag.AlignLeft | Qt.AlignmentFlag.AlignVCenter), text)
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
    return f"Unexpected problem ({type(exc).__name__}): {text}" if text else f"Unexpected problem ({type(exc).__name__})"


def show_message(parent: QWidget, title: str, text: str, *, icon: QMessageBox.Icon = QMessageBox.Icon.Warning) -> QMessageBox:
    """A window-modal message box that does not block the caller (``open()``, not ``exec()``)."""
    box = QMessageBox(icon, title, text, QMessageBox.StandardButton.Ok, parent)
    box.setObjectName("messageBox")
    box.setAttribute(Qt.WidgetAttribute.WA_DeleteOnClose)
    box.setWindowModality(Qt.WindowModality.WindowModal)
    box.open()
    return box
