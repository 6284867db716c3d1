"""Severity rules (core.review.severity, resources/severity.toml).

The TOML is read with the standard library's tomllib (TOML 1.0.0); the figures of the rule
file are the authors' judgement (common practice, no source).  The words-and-figures form
"thirty (30) days" is the usual drafting convention in English-language contracts (common
practice, no source).
"""

from __future__ import annotations

import tomllib

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from core.errors import CounterdraftError
from core.review import run_review
from core.review.severity import (
    DEFAULT_RULES_PATH,
    clause_types_for,
    default_rules,
    find_quantities,
    guess_clause_type,
    load_rules,
    provision_change_severity,
    text_change_severity,
)

from .helpers import doc, substantive

CLAUSE_TYPES = (
    "definitions interpretation term supply ordering delivery acceptance title_and_risk price "
    "payment taxes service_levels warranties limitation_of_liability indemnity insurance "
    "intellectual_property confidentiality data_protection audit compliance termination "
    "consequences_of_termination force_majeure assignment subcontracting non_solicitation "
    "governing_law dispute_resolution notices entire_agreement variation waiver severance "
    "counterparts third_party_rights relationship further_assurance costs publicity").split()


def score(p: str, d: str, *, ctype: str | None = "payment") -> tuple[int, tuple[str, ...]]:
    """Severity of the change between two one-sentence texts (the whole text as the span)."""
    return text_change_severity(p_text=p, p_span=(0, len(p)), d_text=d, d_span=(0, len(d)),
                                clause_type=ctype, kind="clause")


def test_rule_file_is_valid_toml_with_the_agreed_clause_types():
    data = tomllib.loads(DEFAULT_RULES_PATH.read_text(encoding="utf-8"))
    assert data["schema"] == "counterdraft.severity-rules/1"
    assert set(data["weights"]) - {"default"} <= set(CLAUSE_TYPES)
    assert set(data["clause_type_keywords"]) == set(CLAUSE_TYPES)
    rules = default_rules()
    heavy = ("limitation_of_liability", "indemnity", "termination", "payment", "governing_law",
             "confidentiality", "intellectual_property", "assignment", "warranties",
             "data_protection")
    assert min(rules.weights[t] for t in heavy) > max(rules.weights[t] for t in ("notices", "counterparts"))


@pytest.mark.parametrize(("text", "kind", "value", "unit"), [
    ("within thirty (30) days", "duration", 30, "days"),
    ("twenty-five (25) Business Days", "duration", 25, "business days"),
    ("ten per cent (10%) of the Fees", "percentage", 10, "%"),
    ("one hundred and twenty per cent", "percentage", 120, "%"),
    ("a cap of £1,000,000", "amount", 1_000_000, "GBP"),
    ("USD 2.5 million", "amount", 2_500_000, "USD"),
    ("EUR 5,000,000 (five million euros)", "amount", 5_000_000, "EUR"),
    ("three (3) months", "duration", 3, "months"),
])
def test_figures(text, kind, value, unit):
    (q,) = find_quantities(text)
    assert (q.kind, q.value, q.unit) == (kind, value, unit)


def test_number_words_alone_are_no_figure():
    assert find_quantities("one of the parties may give notice") == []
    assert find_quantities("under Clause 7.2 and clauses 3 and 4") == []


def test_changed_figures_give_old_and_new_values():
    sev, reasons = score("pay within thirty (30) days", "pay within sixty (60) days")
    assert reasons[0] == "period changed from 30 to 60 days (longer)"
    assert sev >= 60
    _sev, reasons = score("a cap of £1,000,000", "a cap of £500,000", ctype="limitation_of_liability")
    assert reasons[0] == "amount changed from £1,000,000 to £500,000 (lower)"
    _sev, reasons = score("interest at four per cent (4%)", "interest at two per cent (2%)")
    assert reasons[0] == "interest rate changed from 4% to 2% (lower)"  # an interest rate: its own signal
    _sev, reasons = score("a discount of four per cent (4%)", "a discount of two per cent (2%)")
    assert reasons[0] == "percentage changed from 4% to 2% (lower)"
    _sev, reasons = score("within 30 days", "within 30 Business Days")
    assert reasons[0] == "period changed from 30 days to 30 business days"


@pytest.mark.parametrize(("old", "new", "signal"), [
    ("The Supplier shall deliver", "The Supplier may deliver", "obligation weakened from 'shall' to 'may'"),
    ("The Supplier must deliver", "The Supplier will use reasonable efforts to deliver",
     "obligation weakened from 'must' to 'will use reasonable efforts to'"),
    ("The Supplier agrees to deliver", "The Supplier endeavours to deliver",
     "obligation weakened from 'agrees to' to 'endeavours to'"),
    ("The Supplier should deliver", "The Supplier shall deliver",
     "obligation strengthened from 'should' to 'shall'"),
])
def test_obligation_strength(old, new, signal):
    _sev, reasons = score(old, new)
    assert signal in reasons


def test_negation_and_qualifiers():
    p = "The Supplier shall be liable for losses caused by its negligence."
    d = "The Supplier shall not be liable for losses caused by its negligence."
    at = p.index("be")
    sev, reasons = text_change_severity(p_text=p, p_span=(at, at), d_text=d,
                                        d_span=(at, at + 3), clause_type=None, kind="clause")
    assert reasons == ("negation added: 'not'",) and sev == 70
    _s, reasons = score("liable for losses", "liable for material losses")
    assert "qualifier added: 'material'" in reasons
    _s, reasons = score("in its sole discretion", "acting reasonably")
    assert "qualifier changed from 'sole discretion' to 'reasonably'" in reasons
    _s, reasons = score("notify promptly", "notify")
    assert "qualifier removed: 'promptly'" in reasons


def test_weight_by_clause_type_orders_equal_changes():
    heavy, _ = score("shall", "may", ctype="limitation_of_liability")
    light, _ = score("shall", "may", ctype="notices")
    assert heavy > light
    removed_cap, r1 = provision_change_severity(added=False, label="Clause 12", text="cap",
                                                clause_type="limitation_of_liability", kind="clause")
    removed_cp, _ = provision_change_severity(added=False, label="Clause 30", text="counterparts",
                                              clause_type="counterparts", kind="clause")
    assert removed_cap > removed_cp
    assert r1[0].startswith("Clause 12 removed")


def test_the_weight_reason_is_told_apart_from_the_findings():
    """is_weight_reason picks out exactly the reason that states the rule file's weight (the
    issues list leaves it out), never a finding."""
    from core.review.severity import is_weight_reason

    rules = default_rules()
    _, reasons = text_change_severity(p_text="within thirty (30) days", p_span=(7, 18),
                                      d_text="within sixty (60) days", d_span=(7, 17),
                                      clause_type="payment", kind="clause", rules=rules)
    _, added = provision_change_severity(added=True, label="Parties", text="the parties are",
                                         clause_type=None, kind="parties", rules=rules)
    for found in (reasons, added):
        assert [is_weight_reason(r) for r in found] == [False] * (len(found) - 1) + [True]
    assert reasons[-1] == f"clause type: payment (weight {rules.weights['payment']:g})"
    assert added[-1] == f"parties provision (weight {rules.kind_weights['parties']:g})"


def test_clause_types_from_headings_and_parents():
    rules = default_rules()
    assert guess_clause_type("Limitation of Liability", rules=rules) == "limitation_of_liability"
    assert guess_clause_type("Consequences of Termination", rules=rules) == "consequences_of_termination"
    assert guess_clause_type("Term and Termination", rules=rules) == "termination"
    assert guess_clause_type("Governing Law & Jurisdiction", rules=rules) == "governing_law"
    assert guess_clause_type("Miscellaneous", rules=rules) is None
    d = doc("""
        1. Limitation of Liability

        1.1 Nothing limits liability for fraud.

        2. Notices

        2.1 Notices shall be in writing.
    """)
    types = clause_types_for(d, rules=rules)
    assert types == ("limitation_of_liability", "limitation_of_liability", "notices", "notices")
    better = clause_types_for(d, rules=rules, classifier=lambda p, _doc: "costs" if p.number == "2.1" else None)
    assert better[3] == "costs"


def test_a_firm_can_edit_the_rule_file(tmp_path):
    text = DEFAULT_RULES_PATH.read_text(encoding="utf-8").replace(
        "obligation_weakened = 60", "obligation_weakened = 10")
    path = tmp_path / "house.toml"
    path.write_text(text, encoding="utf-8")
    rules = load_rules(path)
    precedent = doc("1. Orders\n\n1.1 The Supplier shall accept each order.")
    draft = doc("1. Orders\n\n1.1 The Supplier may accept each order.")
    (v,) = substantive(run_review(draft, precedent, rules=rules))
    (w,) = substantive(run_review(draft, precedent))
    assert v.severity == 10 and w.severity == 60


@pytest.mark.parametrize(("content", "problem"), [
    ("not = [valid", "not valid TOML"),
    ('schema = "other/1"', "schema must be"),
    (None, "file not found"),
])
def test_bad_rule_files_are_one_line_errors(tmp_path, content, problem):
    path = tmp_path / "rules.toml"
    if content is not None:
        path.write_text(content, encoding="utf-8")
    with pytest.raises(CounterdraftError) as err:
        load_rules(path)
    assert problem in str(err.value) and str(path) in str(err.value)
    assert "\n" not in str(err.value)


def test_out_of_range_figure_names_the_key(tmp_path):
    text = DEFAULT_RULES_PATH.read_text(encoding="utf-8").replace(
        "negation_added = 70", "negation_added = 170")
    path = tmp_path / "rules.toml"
    path.write_text(text, encoding="utf-8")
    with pytest.raises(CounterdraftError, match="signals.negation_added must be a number"):
        load_rules(path)


def test_the_heading_rule_is_optional_and_checked(tmp_path):
    """[headings] added_or_removed: "formatting" by default (a firm's older rule file without
    the table still loads); any other value than the two choices is a one-line error."""
    text = DEFAULT_RULES_PATH.read_text(encoding="utf-8")
    assert load_rules().heading_added_or_removed == "formatting"
    old = tmp_path / "old.toml"
    old.write_text(text.replace("[headings]", "[former_headings]"), encoding="utf-8")
    assert load_rules(old).heading_added_or_removed == "formatting"
    bad = tmp_path / "bad.toml"
    bad.write_text(text.replace('added_or_removed = "formatting"', 'added_or_removed = "ignore"'),
                   encoding="utf-8")
    with pytest.raises(CounterdraftError, match='headings.added_or_removed must be "formatting" or "substantive"'):
        load_rules(bad)


def test_recalibrated_ranking_on_a_real_licence_agreement():
    """Planted edits in a real software licence agreement (licensedcode-data:
    lsi-proprietary-eula.LICENSE): a change of governing law and one of the courts rank
    high, "and" -> "or" inside an obligation next (it can change who must do what), a tweak
    of the late-payment interest rate below them (statute supplies interest anyway; the
    weights' reasons are in resources/severity.toml)."""
    from core.reader import read_text

    from .helpers import licence_text, replace_once

    base = licence_text("lsi-proprietary-eula")
    plants = {
        "law": ("accordance with the law of the State of California", "accordance with the law of the State of Nevada"),
        "forum": ("California state courts of Santa Clara County", "California state courts of Alameda County"),
        "and/or": ("Licensee shall follow all export control laws and\n    regulations",
                   "Licensee shall follow all export control laws or regulations"),
        "interest": ("at a rate of 1.5% per month", "at a rate of 2% per month"),
    }
    draft = base
    for old, new in plants.values():
        draft = replace_once(draft, old, new)
    review = run_review(read_text(draft, source="draft.txt"), read_text(base, source="precedent.txt"))
    found = {}
    for key, shows in {"law": "Nevada", "forum": "Alameda", "and/or": "or", "interest": "2%"}.items():
        (v,) = [v for v in substantive(review) if v.draft_text.split() and shows in v.draft_text.split()
                or v.draft_text == shows]
        found[key] = v
    assert found["law"].reasons[0] == "governing law changed from 'California' to 'Nevada'"
    assert found["forum"].reasons[0] == "forum for disputes changed from 'Santa Clara' to 'Alameda'"
    assert found["and/or"].reasons[0].startswith(
        "conjunction changed from 'and' to 'or' inside an obligation ('shall')")
    assert found["interest"].reasons[0] == "late-payment interest rate changed from 1.5% to 2% (higher)"
    sev = {k: v.severity for k, v in found.items()}
    assert sev["law"] >= 80 and sev["forum"] >= 80
    assert sev["law"] > sev["and/or"] > sev["interest"]
    assert found["law"].rank < found["and/or"].rank < found["interest"].rank


def test_commercially_before_reasonable_efforts_is_a_weaker_standard_not_words_removed():
    """A real EULA (licensedcode-data: appfire-eula.LICENSE): "Licensor will use reasonable
    efforts to notify you" becomes "commercially reasonable efforts"."""
    from core.reader import read_text

    from .helpers import licence_text, replace_once

    base = licence_text("appfire-eula")
    draft = replace_once(base, "Licensor will use reasonable efforts to notify you",
                         "Licensor will use commercially reasonable efforts to notify you")
    review = run_review(read_text(draft, source="draft.txt"), read_text(base, source="precedent.txt"))
    (v,) = substantive(review)
    assert v.draft_text == "commercially"
    assert v.reasons[0] == ("efforts standard lowered from 'reasonable efforts' to 'commercially "
                            "reasonable efforts': a qualifier that weakens the obligation")
    assert not any("obligation words" in r or "qualifier added" in r for r in v.reasons)
    # the same in the English form and from an unqualified duty
    _s, reasons = score("The Supplier shall use reasonable endeavours to deliver",
                        "The Supplier shall use commercially reasonable endeavours to deliver")
    assert reasons[0].startswith("efforts standard lowered from 'reasonable endeavours'")
    _s, reasons = score("The Supplier shall use best endeavours to deliver",
                        "The Supplier shall use reasonable endeavours to deliver")
    assert reasons[0].startswith("efforts standard lowered from 'best endeavours' to 'reasonable endeavours'")


# --------------------------------------------------------------------------------------
# Figures near a change: found once per text, picked by window
# --------------------------------------------------------------------------------------

_FRAGMENTS = ["the Supplier shall pay", "thirty (30) days", "EUR 12,500", "ten per cent (10%)",
              "within 5 Business Days", "Clause 4.2", "(b)", "one of the parties", "2.", "and",
              "GBP 1.5 million", "twenty-one (21) days", "version 3.7.2", "of", "15%"]


@settings(max_examples=300, deadline=None)
@given(st.lists(st.sampled_from(_FRAGMENTS), min_size=1, max_size=40), st.data())
def test_figures_near_a_span_equal_a_scan_of_its_window(parts, data) -> None:
    """Reference: the slow way, scanning the window around the span again
    (``_find_quantities(text, lo, hi)``).  The figures picked from the whole text's equal it
    wherever no figure of the text straddles the window's ends (a scan from inside a figure
    would see only part of it)."""
    from core.review.severity import _find_quantities, _window

    text = " ".join(parts)
    a = data.draw(st.integers(0, len(text)))
    b = data.draw(st.integers(a, len(text)))
    lo, hi = _window(text, (a, b))
    whole = _find_quantities(text)
    ours = find_quantities(text, around=(a, b))
    assert all(q in whole for q in ours)
    if not any(q.start < x < q.end for q in whole for x in (lo, hi)):
        assert ours == _find_quantities(text, lo, hi)


_HEADING_WORDS = ["Term", "and", "Termination", "Governing", "Law", "&", "Jurisdiction",
                  "Non-Disclosure", "third-party", "Rights", "IP", "Data", "data_x", "Lawful",
                  "  ", "\t", "Limitation", "of", "Liability", "2.", "Sub-contracting", "Fees"]


@settings(max_examples=400, deadline=None)
@given(st.lists(st.sampled_from(_HEADING_WORDS), max_size=8))
def test_clause_type_from_heading_equals_the_keyword_patterns(words) -> None:
    """Reference: one regular expression per keyword, ``(?<![\\w])`` + the keyword's words
    joined by ``\\s+`` + ``(?![\\w])``, searched longest keyword first (the rule file's
    definition of a keyword match)."""
    import re

    rules = default_rules()
    heading = " ".join(words)
    keywords = sorted(((w, t) for t, ws in rules.clause_type_keywords.items() for w in ws),
                      key=lambda wt: -len(wt[0]))
    h = heading.casefold().replace("&", "and")
    want = next((t for w, t in keywords
                 if re.search(r"(?<![\w])" + r"\s+".join(map(re.escape, w.split())) + r"(?![\w])", h)),
                None)
    assert guess_clause_type(heading, rules=rules) == want


@settings(max_examples=300, deadline=None)
@given(st.lists(st.sampled_from(_FRAGMENTS + ["£5", "$1,000", "€ 20", "x10", "v.2", ".5", "ſixty (60) days",
                                              "ten%", "USD5", "-"]), max_size=30),
       st.sampled_from(["", " ", "a", "."]))
def test_the_figure_pattern_matches_as_its_body_alone(parts, glue) -> None:
    """Reference: the figure pattern without its leading look-ahead (which only says where a
    figure can start): the same matches, with the same groups."""
    import re

    from core.review.severity import _QUANTITY_BODY, _QUANTITY_RE

    text = glue.join(parts)
    body = re.compile(_QUANTITY_BODY, re.IGNORECASE)
    assert ([(m.span(), m.groupdict()) for m in _QUANTITY_RE.finditer(text)]
            == [(m.span(), m.groupdict()) for m in body.finditer(text)])
