"""desktop.models: Qt models over the engine's dataclasses.

Outside reference: Qt's own QAbstractItemModelTester (via pytest-qt's ``qtmodeltester``)
checks each model against the QAbstractItemModel contract."""

from __future__ import annotations

from PySide6.QtCore import Qt

from core.decisions import Decision
from core.review.termmap import TermOverride
from desktop.engine import term_status
from desktop.models import (
    BAR_ROLE,
    ITEM_ROLE,
    NO_BAR,
    NO_TALLY,
    TALLY_ROLE,
    DeviationFilterProxy,
    DeviationTableModel,
    PairRowsModel,
    TermTableModel,
)
from desktop.state import DeviationFilter, DisplayOptions

from .fixtures import make_review

D = Qt.ItemDataRole.DisplayRole


def _listed(proxy) -> list[str]:
    return [proxy.index(r, 0).data(ITEM_ROLE).id for r in range(proxy.rowCount())]


def test_deviation_model_passes_qt_model_tester_and_lists_every_deviation(qtmodeltester):
    review = make_review(with_frequency=True)
    model = DeviationTableModel()
    model.set_review(review, library_loaded=True)
    qtmodeltester.check(model)
    assert model.rowCount() == len(review.deviations)
    assert [model.index(r, 0).data(D) for r in range(model.rowCount())] == [str(d.rank) for d in review.deviations]
    top = model.index(0, DeviationTableModel.CLAUSE).data(D)
    assert top == "3 Limitation of liability"
    assert model.index(0, DeviationTableModel.SUMMARY).data(D) == "liability cap changed from 12 to 24 months"
    assert model.headerData(DeviationTableModel.COMMON, Qt.Orientation.Horizontal) == "Past use"
    assert model.index(0, DeviationTableModel.COMMON).data(D) == "1/12"
    # the past-use figure is drawn as a tally strip, never as a proportional bar
    assert model.data(model.index(0, DeviationTableModel.COMMON), TALLY_ROLE) == (1, 12)
    assert model.data(model.index(0, DeviationTableModel.COMMON), BAR_ROLE) == NO_BAR
    assert model.index(0, DeviationTableModel.SEVERITY).data(BAR_ROLE) == 0.88
    # a removed provision is labelled by the precedent's clause
    assert model.index(4, DeviationTableModel.CLAUSE).data(D) == "4 Publicity (precedent only)"


def test_without_a_library_the_how_common_column_is_empty():
    model = DeviationTableModel()
    model.set_review(make_review(), library_loaded=False)
    assert model.index(0, DeviationTableModel.COMMON).data(D) == ""
    assert model.data(model.index(0, DeviationTableModel.COMMON), BAR_ROLE) == NO_BAR
    assert model.data(model.index(0, DeviationTableModel.COMMON), TALLY_ROLE) == NO_TALLY


def test_proxy_filters_by_shown_categories_text_and_decisions_and_sorts_numbers_as_numbers(qtmodeltester):
    model = DeviationTableModel()
    model.set_review(make_review(), library_loaded=False)
    proxy = DeviationFilterProxy()
    proxy.setSourceModel(model)
    qtmodeltester.check(proxy)
    proxy.set_view_state(DeviationFilter(), DisplayOptions())
    # default: substantive and term (the numbering-only move v7 is hidden)
    assert _listed(proxy) == ["v1", "v2", "v3", "v4", "v5", "v6"]
    proxy.set_view_state(DeviationFilter(), DisplayOptions(terms=False, numbering=True))
    assert _listed(proxy) == ["v1", "v2", "v3", "v4", "v5", "v7"]
    proxy.set_view_state(DeviationFilter(text="60 days"), DisplayOptions())
    assert _listed(proxy) == ["v2"]
    model.set_decisions({"v1": ("accept", ""), "v3": ("revert", "house position")})
    assert model.index(2, DeviationTableModel.DECISION).data(D) == "Restore \u270e"
    proxy.set_view_state(DeviationFilter(undecided_only=True), DisplayOptions())
    assert _listed(proxy) == ["v2", "v4", "v5", "v6"]
    proxy.set_view_state(DeviationFilter(sort_column=DeviationTableModel.SEVERITY, descending=False), DisplayOptions())
    severities = [proxy.index(r, 0).data(ITEM_ROLE).severity for r in range(proxy.rowCount())]
    assert severities == sorted(severities)


def test_term_model_shows_mappings_and_the_rejected_ones(qtmodeltester):
    review = make_review()
    model = TermTableModel()
    status, rejected = term_status((TermOverride("Client", "Customer", "confirm"),
                                    TermOverride("Vendor", None, "reject")))
    model.set_terms(review.term_map, status=status, rejected=rejected)
    qtmodeltester.check(model)
    assert model.rowCount() == 2
    assert [model.index(0, c).data(D) for c in range(5)] == [
        "\u2713 Client", "Customer", "97%", "4", "definitions alike, used in the same places, confirmed by you"]
    assert model.status(1) == "rejected"
    assert model.index(1, TermTableModel.EVIDENCE).data(D).startswith("you rejected it")


def test_pair_rows_model_finds_rows_by_either_provision(qtmodeltester):
    review = make_review()
    model = PairRowsModel()
    model.set_review(review)
    qtmodeltester.check(model)
    assert model.rowCount() == len(review.pairs)
    assert model.row_for(draft="d4", precedent="p4") == 3
    assert model.row_for(draft=None, precedent="p5") == 4  # removed provision
    assert model.row_for(draft="d7", precedent=None) == 7  # added provision
    assert model.index(5, PairRowsModel.GUTTER).data(D) == "Moved"
    assert model.index(3, PairRowsModel.DRAFT).data(D).startswith("3 Limitation of liability\n")


def test_decision_objects_are_shown_as_recorded():
    from desktop.engine import decision_view

    assert decision_view(Decision("v2", "amend", text="within 45 days", note="meet halfway")) == (
        "amend", "meet halfway", "within 45 days")


def test_direction_column_shows_the_engines_direction_only_when_acting_for_a_party(qtmodeltester):
    import dataclasses

    review = make_review()
    model = DeviationTableModel()
    model.set_review(review, library_loaded=False)
    assert model.headerData(DeviationTableModel.DIRECTION, Qt.Orientation.Horizontal) == "Direction"
    assert model.index(0, DeviationTableModel.DIRECTION).data(D) == ""  # no party acted for
    directions = ("adverse", "favourable", "neutral", "unclear")
    acting = dataclasses.replace(review, acting_for="Supplier", deviations=tuple(
        dataclasses.replace(d, direction=directions[i % 4]) for i, d in enumerate(review.deviations)))
    model.set_review(acting, library_loaded=False)
    qtmodeltester.check(model)
    shown = [model.index(r, DeviationTableModel.DIRECTION).data(D) for r in range(4)]
    assert shown == ["\u25bc adverse", "\u25b2 favourable", "= neutral", "? unclear"]
    tip = model.index(0, DeviationTableModel.DIRECTION).data(Qt.ItemDataRole.ToolTipRole)
    assert tip.startswith("Against the Supplier, the party you act for.")
    # sorting the column puts adverse first, favourable last (the engine's order at equal severity)
    from desktop.models import SORT_ROLE

    keys = [model.index(r, DeviationTableModel.DIRECTION).data(SORT_ROLE) for r in range(4)]
    assert sorted(range(4), key=lambda r: keys[r]) == [0, 3, 2, 1]
