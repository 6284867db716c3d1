"""Negotiation patterns over the demo precedent set.

Outside reference: the demo generator's record (demo_agreements/scenario.json,
``precedent_set.variants``): which past agreement carries which wording of each negotiated
clause.  The house wording of each group of variants is the precedent's; every agreement with
another variant of the group made that move.
"""

from __future__ import annotations

import pytest

from core.library.patterns import (
    PatternGroup,
    PatternMove,
    _moves_of,
    format_patterns,
    negotiation_patterns,
    patterns_to_dict,
)
from core.model import Deviation
from core.reader import read_document

from .conftest import DEMO

#: variant group of the record -> (clause type, move the patterns must name for the
#: agreements that do not use the house variant).
EXPECTED_MOVES = {
    "payment-days": ("payment", "period longer"),
    "liability-cap": ("limitation_of_liability", "percentage raised"),
    "confidentiality-carve-out": ("limitation_of_liability", "provision added"),
    "supplier-ip-indemnity": ("indemnity", "provision added"),
    "insurance-cover": ("insurance", "amount lowered"),
    "termination-breach": ("termination", "qualifier added"),
    "governing-law": ("governing_law", "wording changed"),
    "forum": ("dispute_resolution", "wording changed"),
    "assignment": ("assignment", "words added"),
    "warranty-period": ("warranties", "period longer"),
    "non-solicitation": ("non_solicitation", "provision removed"),
}
#: Groups whose variants move in both directions, counted per direction from the record.
SPLIT = {
    "confidentiality-period": ("confidentiality", {"3-years": "period shorter", "7-years": "period longer"}),
    "termination-convenience": ("termination", {"60-days": "period shorter", "30-days": "period shorter"}),
}
HOUSE = {"payment-days": "30-days", "liability-cap": "100-per-cent", "confidentiality-carve-out": "none",
         "supplier-ip-indemnity": "none", "insurance-cover": "eur-5m", "termination-breach": "any-breach",
         "governing-law": "ardence", "forum": "wexmoor-courts", "assignment": "mutual-consent",
         "warranty-period": "12-months", "non-solicitation": "present", "confidentiality-period": "5-years",
         "termination-convenience": "90-days"}


@pytest.fixture(scope="module")
def groups(demo_set, backend):
    prec = read_document(str(DEMO / "precedent.docx"))
    with backend.open(demo_set) as lib:
        calls = []
        out = negotiation_patterns(lib, prec, progress=lambda d, t: calls.append((d, t)))
    assert calls[-1] == (12, 12)
    return out


def _count(groups, ctype: str, move: str) -> int:
    for g in groups:
        if g.clause_type == ctype:
            for m in g.moves:
                if m.description == move:
                    return m.count
    return 0


def test_moves_and_counts_equal_the_generator_record(groups, scenario):
    variants = scenario["precedent_set"]["variants"]
    expected: dict[tuple[str, str], set[str]] = {}
    for v in variants:
        group, name = v["variant"].split("/")
        if group not in HOUSE or name == HOUSE[group]:
            continue
        if group in SPLIT:
            ctype, moves = SPLIT[group]
            key = (ctype, moves[name])
        else:
            key = EXPECTED_MOVES[group]
        expected.setdefault(key, set()).update(v["documents"])
    assert len(expected) >= 12
    for (ctype, move), docs in expected.items():
        # Reference: the number of past agreements the generator gave a non-house variant.
        assert _count(groups, ctype, move) == len(docs), (ctype, move)
    for g in groups:
        for m in g.moves:
            assert m.total == 12 and 0 < m.count <= 12
    assert {g.clause_type for g in groups} >= {c for c, _m in expected}


def test_numeric_examples_and_output(groups):
    pay = next(g for g in groups if g.clause_type == "payment")
    move = next(m for m in pay.moves if m.description == "period longer")
    assert set(move.examples) == {"30 days \u2192 45 days", "30 days \u2192 60 days"}
    text = format_patterns(groups, total=12)
    assert all(len(line) <= 100 for line in text.splitlines())
    assert "  period longer: 5 of 12" in text
    d = patterns_to_dict(groups, total=12)
    assert d["schema"] == "counterdraft.patterns/1" and d["clause_types"][0]["moves"]


def _dev(change: str, ptext: str, dtext: str, reasons: tuple[str, ...] = ()) -> Deviation:
    return Deviation("v1", 1, 50, "substantive", change, "p1", "p1", ptext, dtext, reasons)


@pytest.mark.parametrize(("ptext", "dtext", "move"), [
    ("twelve (12) months", "six (6) months", "period shorter"),
    ("EUR 1,000,000", "EUR 2,000,000", "amount raised"),
    ("four per cent (4%)", "two per cent (2%)", "percentage lowered"),
    ("a maximum of 3 visits", "a maximum of 5 visits", "figure raised"),
    ("clause 3", "clause 5", "wording changed"),  # a cross-reference is no figure
])
def test_direction_of_figures(ptext, dtext, move):
    assert _moves_of(_dev("replace", ptext, dtext))[0][0] == move


def test_moves_from_reasons_and_kinds():
    assert _moves_of(_dev("replace", "shall", "may", ("obligation weakened from 'shall' to 'may'",)))[0][0] == \
        "obligation weakened"
    assert _moves_of(_dev("insert", "", "not", ("negation added: 'not'",)))[0][0] == "negation added"
    assert _moves_of(_dev("add-provision", "", "A new clause."))[0] == ("provision added", "A new clause.")
    assert _moves_of(_dev("delete", "promptly", ""))[0][0] == "words removed"


def test_no_departures_text():
    assert "No substantive departures" in format_patterns([], total=3)
    g = PatternGroup("payment", "Payment", 3, (PatternMove("period longer", 1, 3, ("x" * 300,)),))
    assert all(len(line) <= 60 for line in format_patterns([g], total=3, width=60).splitlines())


def test_filled_in_blanks_are_no_negotiation_move(groups, scenario):
    # Every signed copy fills the precedent's "[ADDRESS OF CUSTOMER'S PREMISES]" blank, and the
    # demo generator's record has only the house wording for delivery (all 12 agreements); a
    # filled blank is no move (common practice, no source), so no delivery pattern may appear.
    delivery = [v for v in scenario["precedent_set"]["variants"] if v["clause_type"] == "delivery"]
    assert [v["count"] for v in delivery] == [12] and delivery[0]["variant"].endswith("/house")
    assert all(g.clause_type != "delivery" for g in groups)
