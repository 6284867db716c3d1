"""Successive versions of published licences, the older as precedent and the newer as draft.

Texts: the PyPI package ``licensedcode-data`` (the ScanCode licence database), read with
``core.reader.read_text``.  Reference: the standard library's ``difflib.SequenceMatcher`` on
the normalised words of the two texts (case-folded, quotation marks and dashes unified,
white space collapsed, list labels removed): every change "whose words differ after
normalisation".  The reference, the pairs and why each pair is in the set, and the
counting rules live in ``tests/support/version_pairs.py``;
``benchmarks/accuracy_version_pairs.py`` prints the same figures for every pair.

For every pair:

* every change of the reference is covered by a deviation (or is a reordering the review
  describes another way: its words are unchanged in the review's own diff and a deviation
  lies next to them);
* at most one substantive deviation is false (its words equal after the normalisation, equal
  but for a renamed defined term, or unchanged in the reference);
* no substantive deviation is a change of letter case, quote style or list label only;
* every change of a figure (outside references to the licence's own sections, which the
  review follows to the section they name) is covered by a substantive deviation.

Pairs whose newer version is a rewrite (``VersionPair.rewrite``) are held to the same
checks: they are the hardest case for the last two.
"""

from __future__ import annotations

from functools import cache

import pytest

from core.model import CATEGORIES

from ...support.version_pairs import (
    PAIRS,
    PairFigures,
    VersionPair,
    measure,
    review_pair,
)

#: At most this many false substantive deviations per pair (the issue's bound).
MAX_FALSE_PER_PAIR = 1
#: The licence families the pairs may come from; the others are kept for an independent
#: check (the issue's list).
FAMILIES = ("cc-by", "eclipse-sua", "google-tos", "hippocratic", "gfdl", "gpl", "lgpl", "agpl",
            "tanuki-community-sla", "zpl", "openldap", "apache", "artistic", "psf")


def _name(pair: VersionPair) -> str:
    return f"{pair.precedent}->{pair.draft}"


@cache
def figures(pair: VersionPair) -> PairFigures:
    return measure(review_pair(pair), name=_name(pair))


def _listed(changes) -> str:
    return "; ".join(rc.shown()[:120] for rc in changes)


def test_the_pairs_come_from_the_chosen_families_and_are_successive_versions():
    for pair in PAIRS:
        family = next((f for f in FAMILIES if pair.precedent.startswith(f + "-")), None)
        assert family is not None, pair
        assert pair.draft.startswith(family + "-") and pair.draft != pair.precedent
        assert pair.why.strip()
    assert len({_name(p) for p in PAIRS}) == len(PAIRS) >= 20


@pytest.mark.parametrize("pair", PAIRS, ids=_name)
def test_every_change_of_the_reference_is_covered(pair: VersionPair):
    fig = figures(pair)
    assert fig.changes > 0
    covered = dict(fig.covered_by)
    assert set(covered) <= set(CATEGORIES)
    assert not fig.missed, (f"{len(fig.missed)} of {fig.changes} changes not covered "
                            f"(covered by category: {covered}): {_listed(fig.missed)}")


@pytest.mark.parametrize("pair", PAIRS, ids=_name)
def test_at_most_one_false_substantive_deviation(pair: VersionPair):
    fig = figures(pair)
    false = [(why, v.precedent_text[:60], v.draft_text[:60]) for why, v in fig.false_substantive]
    assert len(false) <= MAX_FALSE_PER_PAIR, false


@pytest.mark.parametrize("pair", PAIRS, ids=_name)
def test_no_case_quote_or_label_change_is_substantive(pair: VersionPair):
    noise = [(v.precedent_text, v.draft_text) for why, v in figures(pair).false_substantive
             if why == "noise"]
    assert noise == []


@pytest.mark.parametrize("pair", PAIRS, ids=_name)
def test_every_change_of_a_figure_is_substantive(pair: VersionPair):
    fig = figures(pair)
    assert not fig.figures_not_substantive, _listed(fig.figures_not_substantive)


# ----------------------------------------------------------------------------------------
# What the review says about particular changes of these versions
# ----------------------------------------------------------------------------------------

def _pair(precedent: str) -> VersionPair:
    return next(p for p in PAIRS if p.precedent == precedent)


def test_capitals_turned_into_title_case_are_formatting():
    """google-tos-2013 writes its disclaimer in capitals ("NEITHER GOOGLE NOR ITS SUPPLIERS
    ... ABOUT THE SERVICES"); google-tos-2014 keeps the words and uses the defined terms
    "Google" and "Services" in places.  Every such difference is formatting."""
    review = review_pair(_pair("google-tos-2013"))
    case = [v for v in review.deviations if v.category == "formatting"
            and v.precedent_text.casefold() == v.draft_text.casefold()
            and v.precedent_text != v.draft_text]
    assert any("GOOGLE" in v.precedent_text and "Google" in v.draft_text for v in case)
    assert not [v for v in review.deviations if v.category == "substantive"
                and v.precedent_text.casefold() == v.draft_text.casefold()]


def test_list_labels_the_newer_version_adds_are_numbering():
    """cc-by-3.0 labels the items of its attribution clause "(ii)", "(iii)" where cc-by-2.5
    lists them without labels; its section 8 gives unlabelled paragraphs the labels "b.",
    "c."."""
    review = review_pair(_pair("cc-by-2.5"))
    labels = {v.draft_text for v in review.deviations if v.category == "numbering"
              and any(r.startswith("list label") for r in v.reasons)}
    assert {"(ii)", "(iii)"} <= {t.strip() for t in labels}


def test_version_numbers_in_titles_and_headings_are_substantive():
    """cc-by-3.0 adds the heading "Attribution 3.0 Unported" that cc-by-2.5 lacks (a heading
    only added is formatting -- unless it carries a figure); psf-3.7.2 puts its version
    number into the title and clauses."""
    review = review_pair(_pair("cc-by-2.5"))
    heading = [v for v in review.deviations if v.part == "heading" and "3.0" in v.draft_text]
    assert [(v.category, v.reasons[0]) for v in heading] == [("substantive", "figure added: 3.0")]
    review = review_pair(_pair("psf-2.0"))
    versions = [v for v in review.deviations if "3.7.2" in v.draft_text]
    assert versions and all(v.category == "substantive" for v in versions)
    assert all(any("3.7" in r for r in v.reasons) for v in versions)


def test_a_provision_spread_over_several_is_gathered_whole():
    """cc-by-2.5's section 8 is one provision of unlabelled paragraphs; cc-by-3.0 labels
    them a. to e. and adds a heading for the Creative Commons notice.  Its waiver paragraph
    ("No term or provision of this License shall be deemed waived") is the same text in
    both: it must not be reported as added."""
    review = review_pair(_pair("cc-by-2.5"))
    added = [v.draft_text for v in review.deviations if v.change == "add-provision"]
    assert not any(t.startswith("No term or provision of this License") for t in added)
