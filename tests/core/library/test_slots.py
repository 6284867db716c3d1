"""The wording variants of one provision's slot (core.library.slots): what the desktop app's
variants chart shows.

Outside references:
* the demo generator's record (demo_agreements/scenario.json): per planted departure its
  ``precedent_set_matching``, and in ``precedent_set.variants`` which past agreement words each
  slot of the demo how ("<slot>/<wording>", with an empty text where an agreement has no such
  provision), as the generator that wrote those agreements chose;
* difflib.SequenceMatcher (Python standard library), to find the record's slot of a departure:
  the slot whose recorded texts read most like the provision;
* plain-text agreements written by the test, with payment periods it chose.
"""

from __future__ import annotations

import re
from difflib import SequenceMatcher

import pytest

from core.library.commands import review_options
from core.library.frequency import apply_frequency, provision_slot, review_types
from core.library.slots import (
    DRAFT_WORDING,
    OTHER_WORDING,
    PRECEDENT_WORDING,
    slot_variants,
)
from core.reader import read_document
from core.review import run_review

from .conftest import DEMO, find_departure
from .test_index import agreement


@pytest.fixture(scope="module")
def reviewed(demo_set, backend):
    draft = read_document(str(DEMO / "draft.docx"))
    precedent = read_document(str(DEMO / "precedent.docx"))
    lib = backend.open(demo_set)
    review = apply_frequency(run_review(draft, precedent, **review_options(lib)), lib)
    yield lib, review, review_types(review, lib)
    lib.close()


def _recorded_slot(scenario: dict, dep: dict, review) -> list[dict]:
    """The record's variants of the slot of departure *dep*: among the slots of its clause type,
    the one whose recorded texts are most like the provision (difflib's ratio over words)."""
    if dep["change"] == "remove-provision":
        reference = dep["precedent_words"]
    elif dep["change"] == "add-provision":
        reference = dep["draft_words"]
    else:
        reference = next(p.text for p in review.precedent.provisions if p.number == dep["precedent_number"])
    slots: dict[str, list[dict]] = {}
    for v in scenario["precedent_set"]["variants"]:
        if v["clause_type"] == dep["clause_type"]:
            slots.setdefault(v["variant"].split("/")[0], []).append(v)

    def likeness(variants: list[dict]) -> float:
        return max((SequenceMatcher(None, reference.split(), v["text"].split(), autojunk=False).ratio()
                    for v in variants if v["text"]), default=0.0)

    return max(slots.values(), key=likeness)


def _words(text: str) -> set[str]:
    return set(re.findall(r"[\w,\-]+", text.lower()))


def test_every_planted_departure_charts_the_recorded_wordings_and_frequency(reviewed, scenario):
    lib, review, types = reviewed
    assert len(scenario["departures"]) == 18
    for dep in scenario["departures"]:
        v = find_departure(review, dep)
        chart = slot_variants(lib, review, v, types=types)
        recorded = _recorded_slot(scenario, dep, review)
        having = {d for r in recorded if r["text"] for d in r["documents"]}
        counts = [b.count for b in chart.variants]
        # The counts add up to the past agreements that have this provision, as recorded
        # (e.g. 5 for the IP indemnity, although all 12 have an indemnity clause; 12 for the
        # forum clause, although one agreement words it as an arbitration clause).
        assert sum(counts) == chart.present == len(having), dep["id"]
        assert chart.total == scenario["precedent_set"]["total"] == 12
        assert chart.absent == chart.total - chart.present
        # Each bar is one recorded wording of the slot: same agreements.
        assert ({frozenset(b.documents) for b in chart.variants if b.count}
                == {frozenset(r["documents"]) for r in recorded if r["text"]}), dep["id"]
        assert all(b.count == len(b.documents) for b in chart.variants)
        if dep["change"] == "remove-provision":
            # The draft's "wording" is no such provision: as many as the record says.
            assert chart.draft_absent and not any(b.draft for b in chart.variants)
            assert chart.absent == dep["precedent_set_matching"] == v.frequency.matching
        else:
            mine = [b for b in chart.variants if b.draft]
            assert len(mine) == 1 and mine[0].name == DRAFT_WORDING, dep["id"]
            # Reference: the generator's record of how many past agreements carry the draft's wording.
            assert mine[0].count == dep["precedent_set_matching"] == v.frequency.matching, dep["id"]
            assert chart.variants[0] is mine[0]
        if dep["change"] == "add-provision":
            assert chart.precedent_absent and not any(b.precedent for b in chart.variants)
        if dep["change"] in ("insert", "delete", "replace"):
            assert chart.by_change
            theirs = [b for b in chart.variants if b.precedent]
            assert len(theirs) == 1 and theirs[0].name == PRECEDENT_WORDING and chart.variants[1] is theirs[0]


def test_payment_period_chart_names_the_recorded_wordings(reviewed, scenario):
    lib, review, types = reviewed
    dep = next(d for d in scenario["departures"] if d["id"] == "d1")  # 30 -> 60 days
    chart = slot_variants(lib, review, find_departure(review, dep), types=types)
    recorded = {r["variant"]: r for r in scenario["precedent_set"]["variants"]}
    draft, precedent, other = chart.variants
    assert (draft.name, precedent.name, other.name) == (DRAFT_WORDING, PRECEDENT_WORDING, f"{OTHER_WORDING} A")
    assert draft.documents == tuple(recorded["payment-days/60-days"]["documents"])
    assert precedent.documents == tuple(recorded["payment-days/30-days"]["documents"])
    assert other.documents == tuple(recorded["payment-days/45-days"]["documents"])
    assert "sixty (60) days" in draft.gist and "thirty (30) days" in precedent.gist
    assert "forty-five (45) days" in other.gist
    assert "sixty (60) days" in draft.text and draft.sample_document in draft.documents
    assert chart.clause_type == "payment" and chart.label == "Payment" and chart.same_type == 12
    assert chart.closest[0].document in draft.documents and chart.closest[0].similarity > 0.9


def test_gists_quote_the_words_of_the_change(reviewed, scenario):
    lib, review, types = reviewed
    for dep in scenario["departures"]:
        if dep["change"] not in ("insert", "delete", "replace"):
            continue
        chart = slot_variants(lib, review, find_departure(review, dep), types=types)
        draft = next(b for b in chart.variants if b.draft)
        precedent = next(b for b in chart.variants if b.precedent)
        d_words, p_words = _words(dep["draft_words"]), _words(dep["precedent_words"])
        if dep["change"] == "replace":
            assert d_words - p_words <= _words(draft.gist), (dep["id"], draft.gist)
            assert p_words - d_words <= _words(precedent.gist), (dep["id"], precedent.gist)
        elif dep["change"] == "insert":
            first = re.findall(r"\w+", dep["draft_words"])[0]
            assert first in draft.gist and precedent.gist.startswith(f"without \u201c{first}"), dep["id"]
        else:
            assert draft.gist == f"without \u201c{dep['precedent_words']}\u201d", dep["id"]


def test_the_chart_agrees_with_every_frequency_of_the_review(reviewed):
    """The bar holding a provision's own wording counts what its frequency's ``matching``
    counts, for every pair and every deviation (the ranking and the chart say the same)."""
    lib, review, types = reviewed
    for pair in review.pairs:
        chart = slot_variants(lib, review, pair, types=types)
        own = [b for b in chart.variants if (b.draft if pair.draft is not None else b.precedent)]
        assert len(own) == 1 and own[0].count == pair.frequency.matching, pair
        assert sum(b.count for b in chart.variants) == chart.present
    for v in review.deviations:
        if v.category == "term":
            continue
        chart = slot_variants(lib, review, v, types=types)
        if v.draft_provision is None:
            assert chart.absent == v.frequency.matching, v
        else:
            assert next(b for b in chart.variants if b.draft).count == v.frequency.matching, v
        slot = provision_slot(lib, review, v, types=types)
        assert slot.present == chart.present and int(slot.own.sum()) == chart.variants[0].count


def test_positions_of_the_bars(tmp_path, scenario, demo_set, backend):
    folder = backend.copy(demo_set, tmp_path / "set")  # with its index: labelling writes to it
    draft = read_document(str(DEMO / "draft.docx"))
    precedent = read_document(str(DEMO / "precedent.docx"))
    dep = next(d for d in scenario["departures"] if d["id"] == "d1")
    with backend.open(folder) as lib:
        lib.label_variant(lib.variant_of("04-pellbrook-analytical.docx", "9.2"), "refuse")  # 60 days
        lib.label_variant(lib.variant_of("01-quenby-astrel-diagnostics.docx", "9.2"), "house wording")  # 30 days
    with backend.open(folder) as lib:
        review = apply_frequency(run_review(draft, precedent, **review_options(lib)), lib)
        v = find_departure(review, dep)
        chart = slot_variants(lib, review, v)
    positions = {b.name: b.position for b in chart.variants}
    assert positions == {DRAFT_WORDING: "refuse", PRECEDENT_WORDING: "house wording", f"{OTHER_WORDING} A": None}
    assert v.frequency.position == "refuse"


@pytest.fixture(scope="module")
def periods_library(tmp_path_factory, backend):
    """Seven agreements whose payment periods the test chose: 30 (twice), 60, 45, 75, 90, 120."""
    root = tmp_path_factory.mktemp("periods")
    folder = root / "set"
    folder.mkdir()
    for name, days in (("a", 30), ("b", 30), ("c", 60), ("d", 45), ("e", 75), ("f", 90), ("g", 120)):
        (folder / f"{name}.txt").write_text(agreement(1, days=days), encoding="utf-8")
    (root / "draft.txt").write_text(agreement(1, days=60), encoding="utf-8")
    (root / "precedent.txt").write_text(agreement(1, days=30), encoding="utf-8")
    report = backend.build(folder, vocabulary=False)
    assert report.documents == 7 and not report.failures
    lib = backend.open(folder)
    draft, precedent = read_document(str(root / "draft.txt")), read_document(str(root / "precedent.txt"))
    review = apply_frequency(run_review(draft, precedent, **review_options(lib)), lib)
    yield lib, review
    lib.close()


def test_the_rarest_wordings_are_put_together(periods_library):
    lib, review = periods_library
    v = next(v for v in review.deviations if v.category == "substantive" and "60" in v.draft_text)
    full = slot_variants(lib, review, v)
    assert [(b.name, b.documents) for b in full.variants] == [
        (DRAFT_WORDING, ("c.txt",)), (PRECEDENT_WORDING, ("a.txt", "b.txt")),
        (f"{OTHER_WORDING} A", ("d.txt",)), (f"{OTHER_WORDING} B", ("e.txt",)),
        (f"{OTHER_WORDING} C", ("f.txt",)), (f"{OTHER_WORDING} D", ("g.txt",))]
    assert [b.gist for b in full.variants[2:]] == ["\u2026within 45 days\u2026", "\u2026within 75 days\u2026",
                                                   "\u2026within 90 days\u2026", "\u2026within 120 days\u2026"]
    short = slot_variants(lib, review, v, max_variants=4)
    assert [(b.name, b.count) for b in short.variants] == [
        (DRAFT_WORDING, 1), (PRECEDENT_WORDING, 2), (f"{OTHER_WORDING} A", 1), ("3 rarer wordings", 3)]
    assert short.variants[-1].documents == ("e.txt", "f.txt", "g.txt")
    assert sum(b.count for b in short.variants) == short.present == 7
    with pytest.raises(ValueError):
        slot_variants(lib, review, v, max_variants=2)


def test_a_selection_without_provisions_has_an_empty_chart(periods_library):
    import dataclasses

    lib, review = periods_library
    v = dataclasses.replace(review.deviations[0], draft_provision=None, precedent_provision=None)
    chart = slot_variants(lib, review, v)
    assert chart.variants == () and chart.present == 0 and chart.absent == 7 and chart.closest == ()

