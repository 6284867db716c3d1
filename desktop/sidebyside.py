"""The side-by-side view: precedent and draft provision by provision, in aligned rows.

One :class:`QTableView` holds both documents: column 0 the precedent's provision, column 1 a
narrow gutter with the pair's status, column 2 the draft's provision.  Corresponding
provisions therefore always sit level and one scroll bar moves both sides in step.  Each
cell is a small rich-text document painted by :class:`ProvisionDelegate`:

* words only the draft has: teal on mint, **underlined**; words only the precedent has:
  violet on lavender, **struck through**; a renamed defined term: grey, dotted underline (see
  :mod:`desktop.palette`);
* the selected deviation's words in a darker shade and bold, and a frame round its row;
* an added or removed provision: a coloured side stripe, a caption, and a hatched empty side;
  a moved provision: a grey stripe and the caption "Moved: precedent 18 -> draft 12".

The marks come from the engine (word-diff hunks, deviation spans, the term map) through
:mod:`desktop.marks`; the display toggles only hide classes of change the engine classified.
"""

from __future__ import annotations

from collections.abc import Callable, Iterable, Sequence
from typing import Any

from PySide6.QtCore import QModelIndex, QPersistentModelIndex, QRect, QRectF, QSize, Qt, QTimer, Signal
from PySide6.QtGui import (
    QAbstractTextDocumentLayout,
    QBrush,
    QColor,
    QFont,
    QPainter,
    QPalette,
    QPen,
    QTextCharFormat,
    QTextCursor,
    QTextDocument,
    QTextFrameFormat,
)
from PySide6.QtWidgets import (
    QAbstractItemView,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QStyle,
    QStyledItemDelegate,
    QStyleOptionViewItem,
    QTableView,
    QVBoxLayout,
    QWidget,
)

from core.labels import find_provision
from core.model import Deviation, Edit, Pair, Provision, Review

from . import marks as mk
from .labels import STATUS_NAMES, provision_caption
from .models import ITEM_ROLE, PairRowsModel
from .palette import DELETED, INK, INSERTED, MUTED_INK, ROW, TERM
from .state import DisplayOptions

__all__ = ["EditsProvider", "ProvisionDelegate", "SideBySideView", "cell_document"]

#: Gives the word-diff hunks of one aligned pair (the engine's, ``Pair.edits``; see
#: :func:`desktop.engine.pair_edits`).  Without a provider the view reads ``Pair.edits``.
EditsProvider = Callable[[Review, Pair], Sequence[Edit]]

#: Indent per numbering level below the top, in pixels: sub-clauses read as sub-clauses.
LEVEL_INDENT_PX = 14
#: Deepest level that still adds indent (very deep nesting would squeeze the text).
MAX_INDENT_LEVELS = 4
#: Width of the status gutter between the two columns, in pixels.
GUTTER_PX = 78
#: Width of the side stripe that marks added, removed and moved provisions.
STRIPE_PX = 4
#: Padding inside a cell, in pixels.
CELL_PAD_PX = 8

_GLYPHS = {
    "same": "=",
    "changed": "\u2260",
    "moved": "\u21c5",
    "added": "+",
    "removed": "\u2212",
    "split": "\u2442",
    "merged": "\u2441",
}

Index = QModelIndex | QPersistentModelIndex


def _char_format(kinds: frozenset[str], base: QTextCharFormat) -> QTextCharFormat:
    fmt = QTextCharFormat(base)
    focus = mk.FOCUS in kinds
    style = None
    if mk.INSERTED in kinds:
        style = INSERTED
        fmt.setFontUnderline(True)
        fmt.setUnderlineStyle(QTextCharFormat.UnderlineStyle.SingleUnderline)
    elif mk.DELETED in kinds:
        style = DELETED
        fmt.setFontStrikeOut(True)
    if mk.TERM in kinds:
        if style is None:
            style = TERM
        fmt.setUnderlineStyle(QTextCharFormat.UnderlineStyle.DotLine)
        fmt.setUnderlineColor(QColor(TERM.ink))
    if style is not None:
        fmt.setForeground(QColor(style.ink))
        fmt.setBackground(QColor(style.strong_background if focus else style.background))
    if focus:
        fmt.setFontWeight(QFont.Weight.Bold)
    return fmt


def cell_document(
    provision: Provision | None,
    *,
    text_marks: Sequence[mk.Mark],
    caption_note: str,
    number_changed: bool,
    side: str,
    font: QFont,
    width: int,
) -> QTextDocument:
    """A rich-text document for one side of one row: a caption line (number and heading, plus
    an optional note such as "Moved"), then the provision's text with its marks."""
    doc = QTextDocument()
    doc.setDefaultFont(font)
    doc.setDocumentMargin(CELL_PAD_PX)
    if provision is not None:
        level = max(0, min(provision.level - 1, MAX_INDENT_LEVELS))
        frame = QTextFrameFormat(doc.rootFrame().frameFormat())
        frame.setLeftMargin(level * LEVEL_INDENT_PX)
        doc.rootFrame().setFrameFormat(frame)
    cur = QTextCursor(doc)
    base = QTextCharFormat()
    base.setForeground(QColor(INK))
    head = QTextCharFormat(base)
    head.setFontWeight(QFont.Weight.Bold)
    note = QTextCharFormat(base)
    note.setForeground(QColor(MUTED_INK))
    note.setFontItalic(True)
    if provision is not None:
        if provision.number:
            nfmt = QTextCharFormat(head)
            if number_changed:
                nfmt = _char_format(frozenset({mk.INSERTED if side == "draft" else mk.DELETED}), head)
            cur.insertText(provision.number, nfmt)
            cur.insertText(" ", head)
        title = provision.heading or ""
        if title:
            cur.insertText(title, head)
        if caption_note:
            cur.insertText(("  " if (provision.number or title) else "") + caption_note, note)
        if provision.number or title or caption_note:
            cur.insertBlock()
        text = provision.text
        for a, b, kinds in mk.runs(len(text), text_marks):
            cur.insertText(text[a:b], _char_format(kinds, base) if kinds else base)
    doc.setTextWidth(max(40, width))
    return doc


class ProvisionDelegate(QStyledItemDelegate):
    """Paints one side of an aligned row (or the status gutter) and reports its height."""

    def __init__(self, view: SideBySideView) -> None:
        super().__init__(view)
        self._view = view
        self._cache: dict[tuple[int, int, int], QTextDocument] = {}

    def clear(self) -> None:
        self._cache.clear()

    def forget_rows(self, rows: Sequence[int]) -> None:
        drop = set(rows)
        for key in [k for k in self._cache if k[0] in drop]:
            del self._cache[key]

    def document(self, row: int, column: int, width: int) -> QTextDocument:
        key = (row, column, width)
        doc = self._cache.get(key)
        if doc is None:
            doc = self._view.build_cell(row, column, width)
            self._cache[key] = doc
        return doc

    def sizeHint(self, option: QStyleOptionViewItem, index: Index) -> QSize:
        if index.column() == PairRowsModel.GUTTER:
            return QSize(GUTTER_PX, 44)
        width = self._view.table.columnWidth(index.column()) - STRIPE_PX
        doc = self.document(index.row(), index.column(), width)
        return QSize(width, int(doc.size().height()) + 2)

    def paint(self, painter: QPainter, option: QStyleOptionViewItem, index: Index) -> None:
        pair: Pair = index.data(ITEM_ROLE)
        rect: QRect = option.rect
        col = index.column()
        painter.save()
        selected = bool(option.state & QStyle.StateFlag.State_Selected)
        focus_row = self._view.focus_row() == index.row()
        bg = QColor("#ffffff") if col != PairRowsModel.GUTTER else QColor(ROW.gutter)
        if selected and not focus_row:
            bg = option.palette.color(QPalette.ColorGroup.Active, QPalette.ColorRole.AlternateBase)
        painter.fillRect(rect, bg)
        if col == PairRowsModel.GUTTER:
            self._paint_gutter(painter, rect, pair)
        else:
            side_empty = (pair.precedent if col == PairRowsModel.PRECEDENT else pair.draft) is None
            if side_empty:
                painter.fillRect(rect, QBrush(QColor(ROW.hatch), Qt.BrushStyle.BDiagPattern))
                painter.setPen(QColor(MUTED_INK))
                text = "Not in the precedent" if col == PairRowsModel.PRECEDENT else "Not in the draft"
                f = QFont(self._view.text_font)
                f.setItalic(True)
                painter.setFont(f)
                painter.drawText(rect.adjusted(STRIPE_PX + CELL_PAD_PX, CELL_PAD_PX, -CELL_PAD_PX, 0),
                                 int(Qt.AlignmentFlag.AlignLeft | Qt.AlignmentFlag.AlignTop), text)
            else:
                stripe = _stripe_colour(pair.status)
                if stripe is not None:
                    x = rect.left() if col == PairRowsModel.PRECEDENT else rect.right() - STRIPE_PX + 1
                    painter.fillRect(QRect(x, rect.top(), STRIPE_PX, rect.height()), QColor(stripe))
                width = self._view.table.columnWidth(col) - STRIPE_PX
                doc = self.document(index.row(), col, width)
                painter.translate(rect.left() + (STRIPE_PX if col == PairRowsModel.PRECEDENT else 0), rect.top())
                ctx = QAbstractTextDocumentLayout.PaintContext()
                ctx.clip = QRectF(0, 0, rect.width(), rect.height())
                painter.setClipRect(ctx.clip)
                doc.documentLayout().draw(painter, ctx)
                painter.setClipping(False)
                painter.translate(-(rect.left() + (STRIPE_PX if col == PairRowsModel.PRECEDENT else 0)), -rect.top())
        # Row separator, and a frame round the row of the selected deviation.
        painter.setPen(QPen(QColor("#d9dade"), 1))
        painter.drawLine(rect.bottomLeft(), rect.bottomRight())
        if focus_row:
            pen = QPen(QColor(ROW.focus_frame), 2)
            painter.setPen(pen)
            r = rect.adjusted(1, 1, -1, -1)
            painter.drawLine(r.topLeft(), r.topRight())
            painter.drawLine(r.bottomLeft(), r.bottomRight())
            if col == PairRowsModel.PRECEDENT:
                painter.drawLine(r.topLeft(), r.bottomLeft())
            if col == PairRowsModel.DRAFT:
                painter.drawLine(r.topRight(), r.bottomRight())
        painter.restore()

    def _paint_gutter(self, painter: QPainter, rect: QRect, pair: Pair) -> None:
        glyph = _GLYPHS.get(pair.status, "?")
        f = QFont(self._view.font())
        f.setPointSizeF(f.pointSizeF() * 1.5)
        f.setBold(True)
        painter.setFont(f)
        painter.setPen(QColor(_stripe_colour(pair.status) or MUTED_INK))
        top = QRect(rect.left(), rect.top() + 4, rect.width(), 26)
        painter.drawText(top, int(Qt.AlignmentFlag.AlignHCenter | Qt.AlignmentFlag.AlignVCenter), glyph)
        f2 = QFont(self._view.font())
        f2.setPointSizeF(max(6.5, f2.pointSizeF() * 0.8))
        painter.setFont(f2)
        painter.setPen(QColor(MUTED_INK))
        below = QRect(rect.left() + 2, rect.top() + 28, rect.width() - 4, 30)
        flags = Qt.AlignmentFlag.AlignHCenter | Qt.AlignmentFlag.AlignTop | Qt.TextFlag.TextWordWrap
        painter.drawText(below, int(flags), STATUS_NAMES.get(pair.status, pair.status))


def _stripe_colour(status: str) -> str | None:
    return {
        "added": ROW.added_stripe,
        "removed": ROW.removed_stripe,
        "moved": ROW.moved_stripe,
    }.get(status)


class SideBySideView(QWidget):
    """Header with both file names and a legend, above the aligned rows."""

    #: Emitted with the row the reviewer clicked (to select a deviation of that provision).
    rowActivated = Signal(int)

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._review: Review | None = None
        self._edits: EditsProvider | None = None
        self._edit_cache: dict[int, Sequence[Edit]] = {}
        self._display = DisplayOptions()
        self._focus: Deviation | None = None
        self._focus_row: int | None = None
        self._by_row: dict[int, list[Deviation]] = {}
        self.text_font = QFont(self.font())
        self.text_font.setStyleHint(QFont.StyleHint.Serif)
        self.text_font.setFamilies(["DejaVu Serif", "Noto Serif", "Liberation Serif", "Serif"])
        self.text_font.setPointSizeF(max(9.5, self.font().pointSizeF() + 0.5))
        self._build_table()
        titles = self._build_titles()
        self.legend = QLabel(self)
        self.legend.setObjectName("legend")
        self.legend.setTextFormat(Qt.TextFormat.RichText)
        self.legend.setText(_legend_html())
        self.legend.setWordWrap(True)

        lay = QVBoxLayout(self)
        lay.setContentsMargins(0, 0, 0, 0)
        lay.setSpacing(2)
        lay.addLayout(titles)
        lay.addWidget(self.table, 1)
        lay.addWidget(self.legend)

    def _build_table(self) -> None:
        """The aligned rows: precedent, gutter, draft; each row as tall as its text."""
        self.model = PairRowsModel(self)
        self.table = QTableView(self)
        self.table.setObjectName("sideBySide")
        self.table.setModel(self.model)
        self.delegate = ProvisionDelegate(self)
        self.table.setItemDelegate(self.delegate)
        self.table.setSelectionBehavior(QAbstractItemView.SelectionBehavior.SelectRows)
        self.table.setSelectionMode(QAbstractItemView.SelectionMode.SingleSelection)
        self.table.setVerticalScrollMode(QAbstractItemView.ScrollMode.ScrollPerPixel)
        self.table.setHorizontalScrollBarPolicy(Qt.ScrollBarPolicy.ScrollBarAlwaysOff)
        self.table.setShowGrid(False)
        self.table.setWordWrap(True)
        self.table.setEditTriggers(QAbstractItemView.EditTrigger.NoEditTriggers)
        self.table.verticalHeader().hide()
        self.table.horizontalHeader().hide()
        hh = self.table.horizontalHeader()
        hh.setSectionResizeMode(PairRowsModel.PRECEDENT, QHeaderView.ResizeMode.Stretch)
        hh.setSectionResizeMode(PairRowsModel.GUTTER, QHeaderView.ResizeMode.Fixed)
        hh.setSectionResizeMode(PairRowsModel.DRAFT, QHeaderView.ResizeMode.Stretch)
        self.table.setColumnWidth(PairRowsModel.GUTTER, GUTTER_PX)
        self.table.verticalHeader().setSectionResizeMode(QHeaderView.ResizeMode.ResizeToContents)
        hh.sectionResized.connect(self._column_resized)
        self.table.clicked.connect(lambda ix: self.rowActivated.emit(ix.row()))

    def _build_titles(self) -> QHBoxLayout:
        """The two column titles, over the precedent and the draft (the gutter between)."""
        self.precedent_title = QLabel("Precedent", self)
        self.draft_title = QLabel("Draft", self)
        for lab in (self.precedent_title, self.draft_title):
            lab.setObjectName("columnTitle")
            lab.setTextFormat(Qt.TextFormat.RichText)
        titles = QHBoxLayout()
        titles.setContentsMargins(6, 2, 6, 2)
        titles.addWidget(self.precedent_title, 1)
        gap = QLabel("", self)
        gap.setFixedWidth(GUTTER_PX)
        titles.addWidget(gap)
        titles.addWidget(self.draft_title, 1)
        return titles

    # -- data in ------------------------------------------------------------------------
    def set_review(self, review: Review | None, *, edits: EditsProvider | None, draft_name: str = "",
                   precedent_name: str = "") -> None:
        self._review = review
        self._edits = edits
        self._edit_cache.clear()
        self._focus = None
        self._focus_row = None
        self.delegate.clear()
        self.model.set_review(review)
        self._by_row = {}
        if review is not None:
            for d in review.deviations:
                r = self.model.row_for(draft=d.draft_provision, precedent=d.precedent_provision)
                if r is not None:
                    self._by_row.setdefault(r, []).append(d)
        self.precedent_title.setText(_title_html("Precedent", "house form", precedent_name))
        self.draft_title.setText(_title_html("Draft", "counterparty", draft_name))

    def set_display(self, display: DisplayOptions) -> None:
        if display == self._display:
            return
        self._display = display
        self.delegate.clear()
        self._relayout()

    def show_deviation(self, d: Deviation | None) -> int | None:
        """Bring the row of deviation *d* into view, frame it and mark its words.  Returns the
        row, or None when the deviation has no provision to show (e.g. a term mapping)."""
        row = None
        if d is not None:
            row = self.model.row_for(draft=d.draft_provision, precedent=d.precedent_provision)
        return self._frame(row, d)

    def show_provision(self, *, draft: str | None = None, precedent: str | None = None) -> int | None:
        """Bring the row of a provision (of the draft or of the precedent) into view and frame
        it, without marking words (a drafting check points at a provision).  Returns the row,
        or None when no row shows it."""
        return self._frame(self.model.row_for(draft=draft, precedent=precedent), None)

    def _frame(self, row: int | None, d: Deviation | None) -> int | None:
        old = self._focus_row
        self._focus = d
        self._focus_row = row
        changed = [r for r in (old, row) if r is not None]
        self.delegate.forget_rows(changed)
        for r in changed:
            self.table.resizeRowToContents(r)
        self.model.rows_changed(changed)
        self.table.selectionModel().clearSelection()
        self.scroll_to_focus()
        # Row heights and the viewport settle only after pending layout; scroll again then.
        QTimer.singleShot(0, self.scroll_to_focus)
        self.table.viewport().update()
        return row

    def scroll_to_focus(self) -> None:
        """Put the framed row at the top of the view (both sides at once)."""
        row = self._focus_row
        if row is None or row >= self.model.rowCount():
            return
        self.table.scrollTo(self.model.index(row, PairRowsModel.DRAFT), QAbstractItemView.ScrollHint.PositionAtTop)

    def focus_row(self) -> int | None:
        return self._focus_row

    def row_visible(self, row: int) -> bool:
        """True when some of *row* is on screen in both columns."""
        vp = self.table.viewport().rect()
        return all(
            self.table.visualRect(self.model.index(row, c)).intersects(vp)
            for c in (PairRowsModel.PRECEDENT, PairRowsModel.DRAFT)
        )

    def deviations_in_row(self, row: int) -> list[Deviation]:
        return list(self._by_row.get(row, ()))

    # -- cell building (called by the delegate) -----------------------------------------
    def side_marks(self, row: int) -> tuple[list[mk.Mark], list[mk.Mark]]:
        """Marks for (precedent text, draft text) of *row* under the current display options."""
        review = self._review
        assert review is not None
        pair = self.model.pair(row)
        if pair.draft is None or pair.precedent is None:
            return [], []
        edits = self._row_edits(review, row, pair)
        devs = self._by_row.get(row, ())
        pm, dm = mk.edit_marks(edits)
        if not edits:  # no word diff available: fall back on the deviations' own spans
            ps, ds = _spans_of(devs)
            pm += [mk.Mark(*sp, mk.DELETED) for sp in ps]
            dm += [mk.Mark(*sp, mk.INSERTED) for sp in ds]
        shown = self._display.shown_categories()
        # provisions by id from an index (core.labels), not a search of the document per cell
        p_text = find_provision(review.precedent, pair.precedent).text  # type: ignore[union-attr]
        d_text = find_provision(review.draft, pair.draft).text  # type: ignore[union-attr]
        p_terms = mk.term_marks(p_text, [t.precedent for t in review.term_map])
        d_terms = mk.term_marks(d_text, [t.draft for t in review.term_map])
        # A hunk that is only a renamed defined term is shown as a term, not as an edit (the
        # engine's diff gives each such use a hunk of its own: core.model's invariants).
        p_off, d_off = _spans_of(d for d in devs if d.category not in shown)
        p_hidden = [(m.start, m.end) for m in p_terms] + p_off
        d_hidden = [(m.start, m.end) for m in d_terms] + d_off
        if "term" not in shown:
            p_terms, d_terms = [], []
        pm = mk.without(pm, p_hidden) + p_terms
        dm = mk.without(dm, d_hidden) + d_terms
        if self._focus is not None and self._focus_row == row:
            ps, ds = _spans_of([self._focus])
            pm += [mk.Mark(*sp, mk.FOCUS) for sp in ps]
            dm += [mk.Mark(*sp, mk.FOCUS) for sp in ds]
        return pm, dm

    def _row_edits(self, review: Review, row: int, pair: Pair) -> Sequence[Edit]:
        """The word edits of *row*'s pair, computed once per row and kept."""
        edits = self._edit_cache.get(row)
        if edits is None:
            edits = tuple(self._edits(review, pair)) if self._edits is not None else pair.edits
            self._edit_cache[row] = edits
        return edits

    def build_cell(self, row: int, column: int, width: int) -> QTextDocument:
        review = self._review
        assert review is not None
        pair = self.model.pair(row)
        side = "precedent" if column == PairRowsModel.PRECEDENT else "draft"
        prov, other = _side_provisions(review, pair, side=side)
        pm, dm = self.side_marks(row) if prov is not None else ([], [])
        number_changed = bool(
            self._display.numbering and prov is not None and other is not None
            and (prov.number or "") != (other.number or "")
        )
        text_marks = pm if side == "precedent" else dm
        if prov is not None:
            text_marks = text_marks + self._whole_provision_marks(
                row, side=side, status=pair.status, length=len(prov.text))
        return cell_document(
            prov,
            text_marks=text_marks,
            caption_note=_caption_note(side=side, status=pair.status, other=other),
            number_changed=number_changed,
            side=side,
            font=self.text_font,
            width=width,
        )

    def _whole_provision_marks(self, row: int, *, side: str, status: str, length: int) -> list[mk.Mark]:
        """Marks over a whole provision of *length* characters on *side*: the focus when the
        focused deviation adds or removes the provision, then the insertion of an added
        provision or the deletion of a removed one."""
        out: list[mk.Mark] = []
        f = self._focus
        if (self._focus_row == row and f is not None and not (f.precedent_span or f.draft_span)
                and f.change in ("add-provision", "remove-provision")):
            out.append(mk.Mark(0, length, mk.FOCUS))
        if status == "added" and side == "draft":
            out.append(mk.Mark(0, length, mk.INSERTED))
        if status == "removed" and side == "precedent":
            out.append(mk.Mark(0, length, mk.DELETED))
        return out

    # -- internals ------------------------------------------------------------------------
    def _column_resized(self, *_: Any) -> None:
        self.delegate.clear()

    def _relayout(self) -> None:
        self.table.resizeRowsToContents()
        self.table.viewport().update()


def _spans_of(devs: Iterable[Deviation]) -> tuple[list[tuple[int, int]], list[tuple[int, int]]]:
    """(precedent spans, draft spans) of *devs* in their order, leaving out the absent ones."""
    ps: list[tuple[int, int]] = []
    ds: list[tuple[int, int]] = []
    for d in devs:
        if d.precedent_span:
            ps.append(d.precedent_span)
        if d.draft_span:
            ds.append(d.draft_span)
    return ps, ds


def _side_provisions(review: Review, pair: Pair, *,
                     side: str) -> tuple[Provision | None, Provision | None]:
    """(the provision of *pair* on *side*, its counterpart on the other side), each None when absent."""
    mine, theirs = (review.precedent, review.draft) if side == "precedent" else (review.draft, review.precedent)
    pid, other_pid = (pair.precedent, pair.draft) if side == "precedent" else (pair.draft, pair.precedent)
    prov = find_provision(mine, pid) if pid is not None else None
    other = find_provision(theirs, other_pid) if other_pid is not None else None
    return prov, other


def _caption_note(*, side: str, status: str, other: Provision | None) -> str:
    """The note beside a cell's caption: where a draft provision came from, or that it was
    added or taken out; empty otherwise."""
    if side == "draft":
        if status == "moved" and other is not None:
            return f"moved from precedent {other.number or provision_caption(other)}"
        if status == "added":
            return "Added in the draft"
        if status in ("split", "merged"):
            return STATUS_NAMES[status]
        return ""
    return "Taken out of the draft" if status == "removed" else ""


def _title_html(role: str, who: str, name: str) -> str:
    return (
        f"<b>{role}</b> <span style='color:{MUTED_INK}'>({who})</span>"
        + (f" &nbsp;<span style='color:{MUTED_INK}'>{_esc(name)}</span>" if name else "")
    )


def _esc(s: str) -> str:
    return s.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")


def _legend_html() -> str:
    """The marks on one line, the row glyphs of the gutter on the next."""
    return (
        f"<span style='color:{MUTED_INK}'>Marks:</span> "
        f"<span style='background:{INSERTED.background};color:{INSERTED.ink};text-decoration:underline'>"
        "&nbsp;only in the draft (underlined)&nbsp;</span> &nbsp; "
        f"<span style='background:{DELETED.background};color:{DELETED.ink};text-decoration:line-through'>"
        "&nbsp;only in the precedent (struck through)&nbsp;</span> &nbsp; "
        f"<span style='background:{TERM.background};color:{TERM.ink}'>&nbsp;renamed term "
        "(dotted)&nbsp;</span><br>"
        f"<span style='color:{MUTED_INK}'>Rows: {_GLYPHS['moved']} moved &nbsp; + added in the draft &nbsp; "
        f"{_GLYPHS['removed']} not in the draft &nbsp; {_GLYPHS['changed']} changed &nbsp; = same</span>"
    )
