"""The ranked deviation list: a sortable, filterable table over the review's deviations."""

from __future__ import annotations

from collections.abc import Callable
from typing import TYPE_CHECKING

from PySide6.QtCore import QItemSelectionModel, QModelIndex, Qt, Signal
from PySide6.QtWidgets import (
    QCheckBox,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QLineEdit,
    QTableView,
    QVBoxLayout,
    QWidget,
)

from .models import DeviationFilterProxy, DeviationTableModel
from .state import Change, DeviationFilter, Workspace
from .widgets import BarDelegate, TallyDelegate, read_only_rows

if TYPE_CHECKING:
    from core.decisions import Decision

__all__ = ["COLUMN_WIDTHS", "DeviationsPanel"]

#: First widths of the list's columns, in pixels (the reviewer can drag them; "What changed"
#: takes what is left, about 180 pixels in a 1366-pixel-wide window).  "Past use" holds a
#: strip of twelve squares at five pixels and "12/12" -- the demo's precedent set -- and
#: shrinks its squares in a narrower column.  "Direction" (shown when the review acts for a
#: party) holds "▲ favourable", and sits after the severity.
COLUMN_WIDTHS = ((0, 40), (1, 58), (2, 124), (3, 92), (4, 180), (5, 124), (6, 66), (7, 84))


class DeviationsPanel(QWidget):
    """Filter bar, count, and the table.  Emits ``deviationSelected(id)`` on user selection."""

    deviationSelected = Signal(str)

    def __init__(self, workspace: Workspace, decision_view: Callable[[Decision], tuple[str, str]],
                 parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._ws = workspace
        self._decision_view = decision_view  # engine decision -> (action, note)
        self.view_state = DeviationFilter()
        self._quiet = False

        self.model = DeviationTableModel(self)
        self.proxy = DeviationFilterProxy(self)
        self.proxy.setSourceModel(self.model)
        top = self._build_filter_row()
        self._build_table()
        lay = QVBoxLayout(self)
        lay.setContentsMargins(4, 4, 4, 4)
        lay.addLayout(top)
        lay.addWidget(self.table, 1)
        self._update_count()

    def _build_filter_row(self) -> QHBoxLayout:
        self.search = QLineEdit(self)
        self.search.setObjectName("deviationSearch")
        self.search.setPlaceholderText("Filter: clause, words, reason\u2026")
        self.search.setClearButtonEnabled(True)
        self.search.textChanged.connect(lambda t: self._set_state(self.view_state.with_(text=t)))
        self.undecided = QCheckBox("Undecided only", self)
        self.undecided.toggled.connect(lambda on: self._set_state(self.view_state.with_(undecided_only=on)))
        self.count = QLabel(self)
        self.count.setObjectName("deviationCount")
        top = QHBoxLayout()
        top.setContentsMargins(0, 0, 0, 0)
        top.addWidget(self.search, 1)
        top.addWidget(self.undecided)
        top.addWidget(self.count)
        return top

    def _build_table(self) -> None:
        self.table = read_only_rows(QTableView(self), name="deviationTable")
        self.table.setModel(self.proxy)
        self.table.setSortingEnabled(True)
        self.table.sortByColumn(DeviationTableModel.RANK, Qt.SortOrder.AscendingOrder)
        self.table.setAlternatingRowColors(True)
        self.table.setWordWrap(False)
        self.table.verticalHeader().setDefaultSectionSize(26)
        bar = BarDelegate(self.table)
        self.table.setItemDelegateForColumn(DeviationTableModel.SEVERITY, bar)
        self.table.setItemDelegateForColumn(DeviationTableModel.COMMON, TallyDelegate(self.table))
        hh = self.table.horizontalHeader()
        hh.setSectionResizeMode(QHeaderView.ResizeMode.Interactive)
        hh.setStretchLastSection(False)
        for col, w in COLUMN_WIDTHS:
            self.table.setColumnWidth(col, w)
        hh.setSectionResizeMode(DeviationTableModel.SUMMARY, QHeaderView.ResizeMode.Stretch)
        hh.sortIndicatorChanged.connect(self._sort_changed)
        self.table.setColumnHidden(DeviationTableModel.KIND, True)
        self.table.setColumnHidden(DeviationTableModel.DIRECTION, True)
        hh.moveSection(hh.visualIndex(DeviationTableModel.DIRECTION), hh.visualIndex(DeviationTableModel.CLAUSE))
        self.table.setHorizontalScrollBarPolicy(Qt.ScrollBarPolicy.ScrollBarAlwaysOff)
        self.table.setTextElideMode(Qt.TextElideMode.ElideRight)
        self.table.selectionModel().currentRowChanged.connect(self._current_changed)
        self.table.clicked.connect(lambda ix: self._current_changed(ix, None))

    # -- broadcast ------------------------------------------------------------------------
    def on_change(self, change: Change) -> None:
        if change & (Change.REVIEW | Change.LIBRARY):
            review = self._ws.review
            self.model.set_review(review, library_loaded=self._ws.library is not None)
            self.table.setColumnHidden(DeviationTableModel.COMMON, self._ws.library is None)
            self.table.setColumnHidden(DeviationTableModel.DIRECTION,
                                       review is None or review.acting_for is None)
        if change & (Change.REVIEW | Change.DECISIONS | Change.LIBRARY):
            self.model.set_decisions({k: self._decision_view(v) for k, v in self._ws.decisions.items()})
        if change & (Change.REVIEW | Change.DECISIONS | Change.DISPLAY | Change.LIBRARY):
            self.proxy.set_view_state(self.view_state, self._ws.display)
            self._update_count()
        if change & (Change.SELECTION | Change.REVIEW | Change.DISPLAY):
            self._select(self._ws.selected)

    # -- navigation -----------------------------------------------------------------------
    def visible_ids(self) -> list[str]:
        """Ids of the listed deviations, in the table's current order."""
        out = []
        for r in range(self.proxy.rowCount()):
            src = self.proxy.mapToSource(self.proxy.index(r, 0))
            out.append(self.model.deviation(src.row()).id)
        return out

    def step(self, delta: int) -> str | None:
        """The id *delta* rows from the selected one in the listed order (wrapping at neither end)."""
        ids = self.visible_ids()
        if not ids:
            return None
        cur = self._ws.selected
        if cur not in ids:
            return ids[0] if delta > 0 else ids[-1]
        i = max(0, min(len(ids) - 1, ids.index(cur) + delta))
        return ids[i]

    # -- internals ------------------------------------------------------------------------
    def _set_state(self, state: DeviationFilter) -> None:
        self.view_state = state
        self.proxy.set_view_state(state, self._ws.display)
        self._update_count()
        self._select(self._ws.selected)

    def _sort_changed(self, column: int, order: Qt.SortOrder) -> None:
        self.view_state = self.view_state.with_(sort_column=column,
                                                descending=order == Qt.SortOrder.DescendingOrder)

    def _update_count(self) -> None:
        total = self.model.rowCount()
        shown = self.proxy.rowCount()
        if self._ws.review is None:
            self.count.setText("")
        elif shown == total:
            self.count.setText(f"{total} deviations")
        else:
            self.count.setText(f"{shown} of {total} shown")
            self.count.setToolTip("Numbering, formatting and punctuation changes are hidden unless "
                                  "switched on under Show; the filter and \u201cUndecided only\u201d hide others.")

    def _current_changed(self, current: QModelIndex, _previous: QModelIndex | None) -> None:
        if self._quiet or not current.isValid():
            return
        src = self.proxy.mapToSource(current)
        did = self.model.deviation(src.row()).id
        if did != self._ws.selected:
            self.deviationSelected.emit(did)

    def _select(self, did: str | None) -> None:
        self._quiet = True
        try:
            sm = self.table.selectionModel()
            row = self.model.row_of(did) if did else None
            pix = self.proxy.mapFromSource(self.model.index(row, 0)) if row is not None else None
            if pix is None or not pix.isValid():
                sm.clearSelection()
                sm.clearCurrentIndex()
                return
            sm.setCurrentIndex(pix, QItemSelectionModel.SelectionFlag.ClearAndSelect
                               | QItemSelectionModel.SelectionFlag.Rows)
            self.table.scrollTo(pix)
        finally:
            self._quiet = False
