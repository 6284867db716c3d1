"""The terms view: how the draft's defined terms map onto the precedent's.

Confirming, rejecting, changing or adding a mapping emits ``overrideRequested(kind, draft,
precedent)``; the window turns it into the engine's term override and re-runs the review.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from typing import TYPE_CHECKING

from PySide6.QtCore import QSortFilterProxyModel, Qt, Signal
from PySide6.QtWidgets import (
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QLineEdit,
    QPushButton,
    QTableView,
    QVBoxLayout,
    QWidget,
)

from core.model import TermMapping

from .models import SORT_ROLE, TermTableModel
from .state import Change, Workspace
from .widgets import BarDelegate, muted_label, read_only_rows

if TYPE_CHECKING:
    from core.review.termmap import TermOverride

__all__ = ["TermsPanel"]


class TermsPanel(QWidget):
    overrideRequested = Signal(str, str, str)  # kind ("confirm"|"reject"|"add"), draft, precedent

    def __init__(
        self,
        workspace: Workspace,
        status_of: Callable[[Sequence[TermOverride]], tuple[Callable[[TermMapping], str], list[tuple[str, str]]]],
        parent: QWidget | None = None,
    ) -> None:
        super().__init__(parent)
        self._ws = workspace
        self._status_of = status_of  # overrides -> (status function, rejected pairs)
        self.model = TermTableModel(self)
        self.proxy = QSortFilterProxyModel(self)
        self.proxy.setSourceModel(self.model)
        self.proxy.setSortRole(SORT_ROLE)

        intro = muted_label(
            "Defined terms the draft names differently from the precedent. The review reads each "
            "draft term as its precedent counterpart, so a renamed term is one informational "
            "change instead of hundreds of edits. Confirm, reject or change a mapping and the "
            "review runs again.", self)
        self._build_table()
        lay = QVBoxLayout(self)
        lay.setContentsMargins(4, 4, 4, 4)
        lay.addWidget(intro)
        lay.addWidget(self.table, 1)
        lay.addLayout(self._build_call_buttons())
        lay.addLayout(self._build_typed_mapping())
        self._selection_changed()

    def _build_table(self) -> None:
        self.table = read_only_rows(QTableView(self), name="termTable")
        self.table.setModel(self.proxy)
        self.table.setSortingEnabled(True)
        self.table.sortByColumn(TermTableModel.CONFIDENCE, Qt.SortOrder.DescendingOrder)
        self.table.setItemDelegateForColumn(TermTableModel.CONFIDENCE, BarDelegate(self.table))
        hh = self.table.horizontalHeader()
        for col, w in ((0, 150), (1, 150), (2, 92), (3, 46), (4, 200)):
            self.table.setColumnWidth(col, w)
        hh.setSectionResizeMode(TermTableModel.EVIDENCE, QHeaderView.ResizeMode.Stretch)
        self.table.setWordWrap(True)
        self.table.verticalHeader().setSectionResizeMode(QHeaderView.ResizeMode.ResizeToContents)
        self.table.selectionModel().currentRowChanged.connect(lambda *_: self._selection_changed())

    def _build_call_buttons(self) -> QHBoxLayout:
        """Confirm, reject or restore the selected mapping."""
        self.confirm_btn = QPushButton("Confirm mapping", self)
        self.reject_btn = QPushButton("Not the same term", self)
        self.restore_btn = QPushButton("Undo rejection", self)
        self.confirm_btn.clicked.connect(lambda: self._emit_selected("confirm"))
        self.reject_btn.clicked.connect(lambda: self._emit_selected("reject"))
        self.restore_btn.clicked.connect(lambda: self._emit_selected("confirm"))
        row1 = QHBoxLayout()
        for b in (self.confirm_btn, self.reject_btn, self.restore_btn):
            row1.addWidget(b)
        row1.addStretch(1)
        return row1

    def _build_typed_mapping(self) -> QHBoxLayout:
        """Map a draft term to a precedent term the review did not pair."""
        self.draft_edit = QLineEdit(self)
        self.draft_edit.setObjectName("termDraft")
        self.draft_edit.setPlaceholderText("Draft term, e.g. Client")
        self.precedent_edit = QLineEdit(self)
        self.precedent_edit.setObjectName("termPrecedent")
        self.precedent_edit.setPlaceholderText("Precedent term, e.g. Customer")
        self.map_btn = QPushButton("Map these terms", self)
        self.map_btn.clicked.connect(self._emit_typed)
        row2 = QHBoxLayout()
        row2.addWidget(QLabel("Map", self))
        row2.addWidget(self.draft_edit, 1)
        row2.addWidget(QLabel("\u2192", self))
        row2.addWidget(self.precedent_edit, 1)
        row2.addWidget(self.map_btn)
        return row2

    def on_change(self, change: Change) -> None:
        if change & Change.REVIEW:
            review = self._ws.review
            status, rejected = self._status_of(self._ws.overrides)
            self.model.set_terms(review.term_map if review else (), status=status, rejected=rejected)
        if change & (Change.REVIEW | Change.BUSY):
            self.map_btn.setEnabled(self._ws.busy is None and self._ws.review is not None)
            self._selection_changed()

    def select_row(self, source_row: int) -> None:
        ix = self.proxy.mapFromSource(self.model.index(source_row, 0))
        self.table.setCurrentIndex(ix)

    def _selected_row(self) -> int | None:
        ix = self.table.currentIndex()
        if not ix.isValid():
            return None
        return self.proxy.mapToSource(ix).row()

    def _selection_changed(self) -> None:
        row = self._selected_row()
        busy = self._ws.busy is not None
        st = self.model.status(row) if row is not None else None
        self.confirm_btn.setEnabled(row is not None and st not in ("rejected", "confirmed") and not busy)
        self.reject_btn.setEnabled(row is not None and st != "rejected" and not busy)
        self.restore_btn.setEnabled(row is not None and st == "rejected" and not busy)
        if row is not None:
            m = self.model.mapping(row)
            self.draft_edit.setText(m.draft)
            self.precedent_edit.setText(m.precedent)

    def _emit_selected(self, kind: str) -> None:
        row = self._selected_row()
        if row is None:
            return
        m = self.model.mapping(row)
        self.overrideRequested.emit(kind, m.draft, m.precedent)

    def _emit_typed(self) -> None:
        draft = self.draft_edit.text().strip()
        precedent = self.precedent_edit.text().strip()
        if draft and precedent:
            self.overrideRequested.emit("add", draft, precedent)
