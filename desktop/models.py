"""Qt item models over the engine's dataclasses.

Each model adapts a tuple of :mod:`core.model` objects to Qt roles and does nothing else:
no computation about the agreement happens here.  Sorting and filtering of the deviation
list is a :class:`QSortFilterProxyModel` driven by small view-state objects
(:class:`desktop.state.DeviationFilter`, :class:`desktop.state.DisplayOptions`).
"""

from __future__ import annotations

from collections.abc import Callable, Mapping, Sequence
from typing import Any

from PySide6.QtCore import (
    QAbstractTableModel,
    QModelIndex,
    QPersistentModelIndex,
    QSortFilterProxyModel,
    Qt,
)

from core.labels import find_provision
from core.model import Deviation, Pair, Review, TermMapping

from .labels import (
    CATEGORY_NAMES,
    DIRECTION_ORDER,
    PAST_USE,
    SHORT_DECISION_NAMES,
    STATUS_NAMES,
    clause_label,
    direction_sentence,
    direction_text,
    frequency_sentence,
    frequency_text,
    provision_caption,
    summary,
)
from .state import DeviationFilter, DisplayOptions

__all__ = [
    "BAR_ROLE",
    "NO_BAR",
    "NO_TALLY",
    "DeviationFilterProxy",
    "DeviationTableModel",
    "ITEM_ROLE",
    "PairRowsModel",
    "SORT_ROLE",
    "TALLY_ROLE",
    "TermTableModel",
    "source_data",
]

Index = QModelIndex | QPersistentModelIndex

#: The core object behind a row (a Deviation, TermMapping or Pair).
ITEM_ROLE = Qt.ItemDataRole.UserRole + 1
#: The value to sort a column by (numbers sort as numbers).
SORT_ROLE = Qt.ItemDataRole.UserRole + 2
#: A fraction 0..1 drawn as a small inline bar; NO_BAR (negative) for no bar.
BAR_ROLE = Qt.ItemDataRole.UserRole + 3
#: (matching, total) drawn as a tally strip (desktop.tally); NO_TALLY for none.
TALLY_ROLE = Qt.ItemDataRole.UserRole + 4
#: TALLY_ROLE value of a cell without a strip (never None: see NO_BAR).
NO_TALLY = (0, 0)
#: BAR_ROLE value of a cell without a bar.  A number, not None: with PySide6 6.12 on
#: Python 3.11, every C++ ``data()`` call that answers an invalid QVariant to Python drops
#: one reference to ``None`` (measured on this machine; Python 3.12 makes None immortal), and
#: a painter asking once per cell per frame soon frees None and aborts the interpreter.
NO_BAR = -1.0


def source_data(index: QModelIndex | QPersistentModelIndex, role: int) -> Any:
    """``index.data(role)`` answered by our own Python model: through any proxy models to the
    source, then a direct Python call, so no QVariant conversion happens on the way back
    (see :data:`NO_BAR` for why that matters on a hot path)."""
    from PySide6.QtCore import QAbstractProxyModel

    model = index.model()
    ix = (QModelIndex(index)  # type: ignore[call-overload]  # stub gap: PySide6 takes a persistent index here
          if isinstance(index, QPersistentModelIndex) else index)
    while isinstance(model, QAbstractProxyModel):
        ix = model.mapToSource(ix)
        model = model.sourceModel()
    return model.data(ix, role)

_RIGHT = int(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
_LEFT = int(Qt.AlignmentFlag.AlignLeft | Qt.AlignmentFlag.AlignVCenter)


class _RowsModel(QAbstractTableModel):
    """A flat table: one row per item of ``_rows``, one column per entry of ``HEADERS``
    (horizontal header texts).  The Qt counting and header overrides the models share."""

    HEADERS: tuple[str, ...] = ()
    _rows: Sequence[Any]

    def rowCount(self, parent: Index = QModelIndex()) -> int:  # noqa: B008 (Qt signature)
        return 0 if parent.isValid() else len(self._rows)

    def columnCount(self, parent: Index = QModelIndex()) -> int:  # noqa: B008
        return 0 if parent.isValid() else len(self.HEADERS)

    def headerData(self, section: int, orientation: Qt.Orientation, role: int = Qt.ItemDataRole.DisplayRole) -> Any:
        if orientation == Qt.Orientation.Horizontal and role == Qt.ItemDataRole.DisplayRole:
            return self.HEADERS[section]
        return None


class DeviationTableModel(_RowsModel):
    """The ranked deviations of a review, one row each, in the engine's rank order.  The
    first column is each deviation's number -- its rank, the number every output shows."""

    RANK, SEVERITY, CLAUSE, KIND, SUMMARY, COMMON, DECISION, DIRECTION = range(8)
    HEADERS = ("No.", "Severity", "Clause", "Kind", "What changed", PAST_USE, "Decision", "Direction")

    def __init__(self, parent: Any = None) -> None:
        super().__init__(parent)
        self._review: Review | None = None
        self._rows: tuple[Deviation, ...] = ()
        self._clauses: list[str] = []
        self._clauses_full: list[str] = []
        self._decisions: Mapping[str, tuple[str, str]] = {}
        self._library = False
        self._acting_for: str | None = None

    # -- data in ------------------------------------------------------------------------
    def set_review(self, review: Review | None, *, library_loaded: bool) -> None:
        self.beginResetModel()
        self._review = review
        self._rows = tuple(sorted(review.deviations, key=lambda d: d.rank)) if review else ()
        self._clauses = [clause_label(review, d, compact=True) for d in self._rows] if review else []
        self._clauses_full = [clause_label(review, d) for d in self._rows] if review else []
        self._library = library_loaded
        self._acting_for = review.acting_for if review else None
        self.endResetModel()

    def set_decisions(self, decisions: Mapping[str, tuple[str, str]]) -> None:
        """*decisions*: deviation id -> (action, note); only the decision column changes."""
        self._decisions = dict(decisions)
        if self._rows:
            self.dataChanged.emit(
                self.index(0, self.DECISION), self.index(len(self._rows) - 1, self.DECISION)
            )

    # -- lookups ------------------------------------------------------------------------
    def deviation(self, row: int) -> Deviation:
        return self._rows[row]

    def row_of(self, did: str) -> int | None:
        for i, d in enumerate(self._rows):
            if d.id == did:
                return i
        return None

    def decision_of(self, did: str) -> tuple[str, str] | None:
        return self._decisions.get(did)

    # -- Qt API -------------------------------------------------------------------------
    def headerData(self, section: int, orientation: Qt.Orientation, role: int = Qt.ItemDataRole.DisplayRole) -> Any:
        if orientation == Qt.Orientation.Horizontal and role == Qt.ItemDataRole.ToolTipRole:
            return _HEADER_TIPS[section]
        return super().headerData(section, orientation, role)

    def data(self, index: Index, role: int = Qt.ItemDataRole.DisplayRole) -> Any:
        if not index.isValid():
            return None
        d = self._rows[index.row()]
        row, col = index.row(), index.column()
        if role == ITEM_ROLE:
            return d
        if role == Qt.ItemDataRole.DisplayRole:
            return self._display(d, row, col)
        if role == SORT_ROLE:
            return self._sort_key(d, row, col)
        if role == BAR_ROLE:
            return d.severity / 100.0 if col == self.SEVERITY else NO_BAR
        if role == TALLY_ROLE:
            f = d.frequency
            if col == self.COMMON and self._library and f is not None and f.total:
                return (f.matching, f.total)
            return NO_TALLY
        if role == Qt.ItemDataRole.TextAlignmentRole:
            return _RIGHT if col in (self.RANK, self.SEVERITY) else _LEFT
        if role == Qt.ItemDataRole.ToolTipRole:
            return self._tooltip(d, row, col)
        return None

    def _display(self, d: Deviation, row: int, col: int) -> str | None:
        """The text of cell (*row*, *col*), deviation *d*."""
        if col == self.RANK:
            return str(d.rank)
        if col == self.SEVERITY:
            return str(d.severity)
        if col == self.CLAUSE:
            return self._clauses[row]
        if col == self.KIND:
            return CATEGORY_NAMES.get(d.category, d.category)
        if col == self.SUMMARY:
            return summary(d)
        if col == self.COMMON:
            return (frequency_text(d.frequency) or "\u2014") if self._library else ""
        if col == self.DECISION:
            decision = self._decisions.get(d.id)
            if decision is None:
                return ""
            return SHORT_DECISION_NAMES.get(decision[0], decision[0]) + (" \u270e" if decision[1] else "")
        if col == self.DIRECTION:
            return direction_text(d) if self._acting_for else ""
        return None

    def _sort_key(self, d: Deviation, row: int, col: int) -> str | int | float:
        """What column *col* sorts by: the figure behind the text where there is one."""
        if col == self.DIRECTION:
            return DIRECTION_ORDER.get(d.direction, len(DIRECTION_ORDER))
        if col == self.RANK:
            return d.rank
        if col == self.SEVERITY:
            return d.severity
        if col == self.CLAUSE:
            return self._clauses[row].casefold()
        if col == self.COMMON:
            f = d.frequency
            return -1.0 if f is None or not f.total else f.matching / f.total
        if col == self.DECISION:
            decision = self._decisions.get(d.id)
            return "" if decision is None else decision[0]
        return str(self._display(d, row, col)).casefold()

    def _tooltip(self, d: Deviation, row: int, col: int) -> str | None:
        decision = self._decisions.get(d.id)
        if col == self.CLAUSE:
            return self._clauses_full[row]
        if col == self.SUMMARY:
            return "\n".join(d.reasons) or summary(d)
        if col == self.COMMON:
            if not self._library:
                return "Open a precedent set to see how common this wording is."
            return "No figure for this deviation." if d.frequency is None else frequency_sentence(d)
        if col == self.DECISION and decision is not None and decision[1]:
            return decision[1]
        if col == self.DIRECTION and self._acting_for:
            return direction_sentence(d, self._acting_for)
        return None


_HEADER_TIPS = (
    "The deviation's number: its rank by severity, most severe first (ties in draft order), "
    "as the issues list and the command line show it",
    "0\u2013100, from the firm's severity rules",
    "Clause by the draft's numbering",
    "Substantive, blank filled in, defined term, numbering, formatting or punctuation",
    "The engine's first reason, or the changed words",
    "Past use: one square per agreement of the precedent set, filled for each that carries "
    "the draft's wording (in groups of five), and the figure",
    "Your decision: accept the draft, restore the precedent, or amend",
    "For the party you act for: adverse (against it), favourable (for it), neutral (no change "
    "of meaning, or a clause binding each party alike), unclear (the wording does not tell)",
)


class DeviationFilterProxy(QSortFilterProxyModel):
    """Sorting and filtering of :class:`DeviationTableModel` from the view-state objects."""

    def __init__(self, parent: Any = None) -> None:
        super().__init__(parent)
        self.setSortRole(SORT_ROLE)
        self._filter = DeviationFilter()
        self._display = DisplayOptions()

    def set_view_state(self, filt: DeviationFilter, display: DisplayOptions) -> None:
        self._filter = filt
        self._display = display
        self.invalidate()
        order = Qt.SortOrder.DescendingOrder if filt.descending else Qt.SortOrder.AscendingOrder
        self.sort(filt.sort_column, order)

    def filterAcceptsRow(self, source_row: int, source_parent: Index) -> bool:
        model = self.sourceModel()
        assert isinstance(model, DeviationTableModel)
        d = model.deviation(source_row)
        if d.category not in self._display.shown_categories():
            return False
        if self._filter.undecided_only and model.decision_of(d.id) is not None:
            return False
        needle = self._filter.text.strip().casefold()
        if needle:
            hay = " ".join(
                str(model.data(model.index(source_row, c), Qt.ItemDataRole.DisplayRole) or "")
                for c in range(model.columnCount())
            ) + " " + d.precedent_text + " " + d.draft_text + " " + " ".join(d.reasons)
            if needle not in hay.casefold():
                return False
        return True


class TermTableModel(_RowsModel):
    """The draft <-> precedent term map, plus the mappings the reviewer rejected (greyed),
    so that a rejection can be undone."""

    DRAFT, PRECEDENT, CONFIDENCE, USES, EVIDENCE = range(5)
    HEADERS = ("Draft calls it", "Precedent calls it", "Confidence", "Uses", "Evidence")

    def __init__(self, parent: Any = None) -> None:
        super().__init__(parent)
        self._rows: list[TermMapping] = []
        self._status: list[str] = []

    def set_terms(
        self,
        term_map: Sequence[TermMapping],
        *,
        status: Callable[[TermMapping], str],
        rejected: Sequence[tuple[str, str]] = (),
    ) -> None:
        """*status(mapping)* names the reviewer's call on it ("" for none); *rejected* lists
        (draft, precedent) pairs the reviewer rejected, which the engine no longer maps."""
        self.beginResetModel()
        self._rows = list(term_map)
        self._status = [status(m) for m in self._rows]
        shown = {(m.draft, m.precedent) for m in self._rows}
        for draft, precedent in rejected:
            if (draft, precedent) not in shown:
                self._rows.append(TermMapping(draft, precedent, 0.0, ("user",), 0))
                self._status.append("rejected")
        self.endResetModel()

    def mapping(self, row: int) -> TermMapping:
        return self._rows[row]

    def status(self, row: int) -> str:
        return self._status[row]

    def evidence_text(self, row: int) -> str:
        m, st = self._rows[row], self._status[row]
        if st == "rejected":
            return "you rejected it: read as different terms"
        bits = [_EVIDENCE_NAMES.get(e, e) for e in m.evidence if e != "user"]
        if st:
            bits.append({"confirmed": "confirmed by you", "added": "added by you"}[st])
        return ", ".join(bits)

    def _display(self, row: int, col: int) -> str | None:
        """The shown text of cell (*row*, *col*); None for a column the table does not have."""
        m, st = self._rows[row], self._status[row]
        if col == self.DRAFT:
            return ("\u2713 " if st in ("confirmed", "added") else "") + m.draft
        if col == self.PRECEDENT:
            return m.precedent
        if col == self.CONFIDENCE:
            return "" if st == "rejected" else f"{round(m.confidence * 100)}%"
        if col == self.EVIDENCE:
            return self.evidence_text(row)
        if col == self.USES:
            return "" if st == "rejected" else str(m.occurrences)
        return None

    def data(self, index: Index, role: int = Qt.ItemDataRole.DisplayRole) -> Any:
        if not index.isValid():
            return None
        m = self._rows[index.row()]
        st = self._status[index.row()]
        col = index.column()
        if role == ITEM_ROLE:
            return m
        if role == Qt.ItemDataRole.DisplayRole:
            return self._display(index.row(), col)
        if role == SORT_ROLE:
            if col == self.CONFIDENCE:
                return m.confidence
            if col == self.USES:
                return m.occurrences
            return str(self._display(index.row(), col)).casefold()
        if role == BAR_ROLE:
            return m.confidence if col == self.CONFIDENCE and st != "rejected" else NO_BAR
        if role == Qt.ItemDataRole.ForegroundRole and st == "rejected":
            from PySide6.QtGui import QColor

            from .palette import MUTED_INK

            return QColor(MUTED_INK)
        if role == Qt.ItemDataRole.FontRole and st == "rejected" and col in (self.DRAFT, self.PRECEDENT):
            from PySide6.QtGui import QFont

            f = QFont()
            f.setStrikeOut(True)
            return f
        if role == Qt.ItemDataRole.TextAlignmentRole:
            return _RIGHT if col == self.USES else _LEFT
        if role == Qt.ItemDataRole.ToolTipRole and col == self.EVIDENCE:
            return "\n".join(_EVIDENCE_TIPS.get(e, e) for e in m.evidence)
        return None


_EVIDENCE_NAMES = {
    "definition": "definitions alike",
    "substitution": "used in the same places",
    "embedding": "precedent-set vocabulary",
    "user": "your decision",
}
_EVIDENCE_TIPS = {
    "definition": "The two definitions read alike.",
    "substitution": "Aligned provisions use one term where the other document uses the other.",
    "embedding": "The precedent set's vocabulary model puts the two terms close together.",
    "user": "You confirmed or added this mapping.",
}


class PairRowsModel(_RowsModel):
    """The aligned provisions: one row per :class:`core.model.Pair`, in the engine's order.

    Column 0 is the precedent's provision, column 1 a narrow gutter with the pair's status,
    column 2 the draft's provision.  The side-by-side delegate paints the cells from
    ``ITEM_ROLE`` (the Pair) and the marks the view supplies.
    """

    PRECEDENT, GUTTER, DRAFT = range(3)
    HEADERS = ("Precedent", "", "Draft")

    def __init__(self, parent: Any = None) -> None:
        super().__init__(parent)
        self._review: Review | None = None
        self._rows: tuple[Pair, ...] = ()
        self._by_draft: dict[str, int] = {}
        self._by_precedent: dict[str, int] = {}

    def set_review(self, review: Review | None) -> None:
        self.beginResetModel()
        self._review = review
        self._rows = review.pairs if review else ()
        self._by_draft = {}
        self._by_precedent = {}
        for i, p in enumerate(self._rows):
            if p.draft is not None:
                self._by_draft.setdefault(p.draft, i)
            if p.precedent is not None:
                self._by_precedent.setdefault(p.precedent, i)
        self.endResetModel()

    @property
    def review(self) -> Review | None:
        return self._review

    def pair(self, row: int) -> Pair:
        return self._rows[row]

    def row_for(self, *, draft: str | None, precedent: str | None) -> int | None:
        """The row showing the draft provision *draft*, else the precedent provision."""
        if draft is not None and draft in self._by_draft:
            return self._by_draft[draft]
        if precedent is not None and precedent in self._by_precedent:
            return self._by_precedent[precedent]
        return None

    def rows_changed(self, rows: Sequence[int]) -> None:
        for r in sorted(set(rows)):
            self.dataChanged.emit(self.index(r, 0), self.index(r, 2))

    def data(self, index: Index, role: int = Qt.ItemDataRole.DisplayRole) -> Any:
        if not index.isValid() or self._review is None:
            return None
        p = self._rows[index.row()]
        col = index.column()
        if role == ITEM_ROLE:
            return p
        if role == Qt.ItemDataRole.DisplayRole:
            if col == self.GUTTER:
                return STATUS_NAMES.get(p.status, p.status)
            doc = self._review.precedent if col == self.PRECEDENT else self._review.draft
            pid = p.precedent if col == self.PRECEDENT else p.draft
            if pid is None:
                return ""
            prov = find_provision(doc, pid)  # an index, not a search of the document per cell
            if prov is None:
                return ""
            return provision_caption(prov) + "\n" + prov.text
        if role == Qt.ItemDataRole.ToolTipRole and col == self.GUTTER:
            return STATUS_NAMES.get(p.status, p.status) + f" \u2014 similarity {p.similarity:.2f}"
        return None
