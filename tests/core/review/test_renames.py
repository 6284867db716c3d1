"""Renames found from the text itself (core.review.termmap.scan_slots and map_terms).

Real texts: the licence texts of the PyPI package ``licensedcode-data``
(``licensedcode/data/licenses/<key>.LICENSE``), keys named beside each check.  The property
test renames a noun phrase of a licence consistently (every use, its plural and its form in
capitals), reviews the renamed text (the draft) against the original (the precedent) with
``core.review.run_review`` on ``core.reader.read_text`` documents, and expects one mapping
and no substantive deviation.  The phrases are picked from the text by this file's own
rules, independent of the engine: capitalised names of one to three words, or two ordinary
words that are not stop words (scikit-learn's ``ENGLISH_STOP_WORDS``, plus the drafting
words "shall", "unless", "hereof", "thereof", "hereunder": common practice, no source).
The invented agreements are marked as such; their parties and places are invented.
"""

from __future__ import annotations

import re
from collections import Counter
from functools import cache

import pytest
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st
from sklearn.feature_extraction.text import ENGLISH_STOP_WORDS

from core.model import Review
from core.review import run_review
from core.review.termmap import RENAME_MIN_SHARE
from tests.support.legal_texts import license_text

from .helpers import doc, substantive
from .test_licences import PLANS, delete, move, negate, noise, number, sentence, weaken

#: Licences the property test draws from (plain texts of different drafting styles).
PROPERTY_LICENCES = ("apache-2.0", "mpl-2.0", "gpl-3.0", "cddl-1.0", "eupl-1.2", "osl-3.0",
                     "cecill-2.1", "artistic-2.0")
STOP = ENGLISH_STOP_WORDS | {"shall", "unless", "hereof", "thereof", "hereunder"}
#: Words that introduce a cross-reference: renaming them changes the references, not a name.
XREF_WORDS = {"section", "sections", "clause", "article", "exhibit", "schedule", "appendix",
              "paragraph", "part", "annex"}
_CAP_RUN_RE = re.compile(r"(?<![\w-])[A-Z][a-z]+(?:[ \t]+[A-Z][a-z]+)*(?![\w-])")
_LOWER_PAIR_RE = re.compile(r"(?<![\w-])([a-z]{4,}) ([a-z]{4,})(?![\w-])")


def _phrase_re(phrase: str) -> re.Pattern[str]:
    """Uses of *phrase* as written, across line ends, plural "s" and possessives left on."""
    words = phrase.split()
    return re.compile(r"(?<![\w-])" + r"\s+".join(re.escape(w) for w in words) + r"(?=s?(?![\w-]))")


@cache
def phrases(key: str) -> tuple[str, ...]:
    """Noun phrases of licence *key* worth renaming: used at least three times, at least once
    after a lower-case word (so not only at sentence starts), and never as part of a longer
    capitalised name (so "Work" inside "Derivative Works" is not picked)."""
    text = license_text(key)
    out: list[str] = []
    caps = Counter(" ".join(m.group(0).split()) for m in _CAP_RUN_RE.finditer(text))
    for phrase, n in caps.items():
        words = phrase.split()
        if n < 3 or len(words) > 3 or words[0].lower() in STOP or any(w.lower() in XREF_WORDS for w in words):
            continue
        if phrase.endswith("s") or len(_phrase_re(phrase).findall(text)) != n:
            continue  # plurals, and names that are part of longer names somewhere
        if not re.search(r"[a-z,] +" + r"\s+".join(words), text):
            continue
        out.append(phrase)
    pairs = Counter(f"{a} {b}" for a, b in _LOWER_PAIR_RE.findall(" ".join(text.split())))
    for phrase, n in pairs.items():
        if n >= 3 and not any(w in STOP or w.endswith("s") for w in phrase.split()):
            out.append(phrase)
    # A use after a hyphen at a line end ("CC-" / "licensed material") is half of a
    # compound once the reader joins the lines: not a use of the phrase on its own.
    return tuple(sorted(p for p in out if not re.search(
        r"-[ \t]*\n\s*" + r"\s+".join(map(re.escape, p.split())), text)))


def rename_everywhere(text: str, old: str, new: str) -> str:
    """*old* renamed *new* at every use; a capitalised name in capitals too ("LICENSOR" in a
    disclaimer set in capitals is the same name)."""
    text = _phrase_re(old).sub(new, text)
    return _phrase_re(old.upper()).sub(new.upper(), text) if old[:1].isupper() else text


#: Syllables of invented names.  None ends in "s", so that "s" added to a name makes its
#: plural, as it does for the phrases renamed.
SYLLABLES = ("ka", "lo", "mir", "ren", "tav", "vo", "quel", "dor", "zan", "bri", "ost", "wen")
invented_word = st.lists(st.sampled_from(SYLLABLES), min_size=2, max_size=4).map("".join)


def review_of(draft_text: str, precedent_text: str) -> Review:
    return run_review(doc(draft_text, "draft.txt"), doc(precedent_text, "precedent.txt"))


@settings(max_examples=30, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(key=st.sampled_from(PROPERTY_LICENCES), pick=st.integers(min_value=0), data=st.data())
def test_any_consistent_rename_of_a_noun_phrase_is_one_mapping_and_nothing_substantive(key, pick, data):
    candidates = phrases(key)
    phrase = candidates[pick % len(candidates)]
    text = license_text(key)
    n_words = len(phrase.split())
    new_words = data.draw(st.lists(invented_word, min_size=1, max_size=n_words), label="new name")
    new = " ".join(w.capitalize() if phrase[0].isupper() else w for w in new_words)
    if not phrase[0].isupper() and len(new_words) == 1:
        new = new + " " + data.draw(invented_word, label="second word")  # an ordinary phrase
    assume(new.lower() not in text.lower())
    review = review_of(rename_everywhere(text, phrase, new), text)
    assert [(m.draft, m.precedent) for m in review.term_map] == [(new, phrase)], phrase
    assert substantive(review) == [], phrase


def test_phrases_are_picked_from_every_licence():
    # The property test has something to draw from in each licence; the phrases are real
    # ("Licensor" and "Legal Entity" are names of apache-2.0.LICENSE, read by hand).
    for key in PROPERTY_LICENCES:
        assert len(phrases(key)) >= 3, key
    assert {"Licensor", "Legal Entity"} <= set(phrases("apache-2.0"))


# --------------------------------------------------------------------------------------
# Precision: no spurious mapping on lightly edited real texts
# --------------------------------------------------------------------------------------

@pytest.mark.parametrize("key", sorted(PLANS))
def test_light_edits_of_a_real_text_give_no_mapping(key):
    """The edits of test_licences.py (moved section, changed figure, "shall" -> "may",
    "not" inserted, sentence inserted, section deleted, cosmetic noise), no rename."""
    base = license_text(key)
    text = base
    for edit in (move, number, weaken, negate, sentence, delete, noise):
        text = edit(text, PLANS[key])
    review = review_of(text, base)
    assert review.term_map == ()


@pytest.mark.parametrize("key", PROPERTY_LICENCES)
def test_an_unchanged_real_text_gives_no_mapping(key):
    text = license_text(key)
    review = review_of(text, text)
    assert review.term_map == () and review.deviations == ()


@pytest.mark.parametrize(("older", "newer", "expected"), [
    # Successive versions outside the measured families (an independent check); the
    # renames were read in the two files by hand.
    ("mpl-1.1", "mpl-2.0", [("Covered Software", "Covered Code")]),
    ("sugarcrm-1.1.3", "mpl-1.1", [("Netscape", "SugarCRM")]),
    ("mpl-1.0", "mpl-1.1", []),
    ("cddl-1.0", "cddl-1.1", []),
    ("epl-1.0", "epl-2.0", []),
    ("cpl-1.0", "epl-1.0", []),
    ("cern-ohl-p-2.0", "cern-ohl-w-2.0", []),  # "-P" -> "-W": a variant letter, no name
])
def test_versions_of_other_licences(older, newer, expected):
    review = review_of(license_text(newer), license_text(older))
    assert [(m.draft, m.precedent) for m in review.term_map] == expected


# --------------------------------------------------------------------------------------
# Consistency, stale uses, party labels
# --------------------------------------------------------------------------------------

def _replace_nth(text: str, old: str, new: str, keep: set[int]) -> str:
    """*old* replaced by *new* at every whole-word use except the uses numbered in *keep*."""
    count = -1

    def sub(m: re.Match[str]) -> str:
        nonlocal count
        count += 1
        return m.group(0) if count in keep else new

    return re.sub(rf"(?<![\w-]){re.escape(old)}(?![\w-])", sub, text)


def test_stale_uses_of_the_precedent_name_are_counted_and_named():
    # apache-2.0.LICENSE: "Licensor" occurs 10 times (counted by hand: the definition and 9
    # uses).  The draft renames it "Grantor" except at the last two uses.
    text = license_text("apache-2.0")
    total = len(re.findall(r"(?<![\w-])Licensor(?![\w-])", text))
    assert total == 10
    draft = _replace_nth(text, "Licensor", "Grantor", keep={total - 2, total - 1})
    review = review_of(draft, text)
    [m] = review.term_map
    assert (m.draft, m.precedent, m.stale) == ("Grantor", "Licensor", 2)
    [dev] = [v for v in review.deviations if v.category == "term"]
    assert '2 stale uses of "Licensor" left in it' in dev.reasons[0]
    # the stale uses read as the same term: nothing substantive
    assert substantive(review) == []


INVENTED = """
    SERVICES AGREEMENT

    1. Services

    1.1 Quillon Ashby shall provide the maintenance services to the Customer from the start date.

    1.2 Quillon Ashby shall keep the service records at its premises in Wexmoor.

    1.3 The Customer shall give Quillon Ashby access to the site on reasonable notice.

    2. Payment

    2.1 The Customer shall pay Quillon Ashby the fees within thirty (30) days of invoice.

    2.2 Quillon Ashby may suspend the services if the fees are unpaid for sixty (60) days.

    3. Records

    3.1 Each service record shall name the engineer who made the visit.

    3.2 The service records are confidential to the Customer and Quillon Ashby.
"""


def test_an_undefined_name_renamed_throughout_is_one_mapping():
    # Invented agreement: the supplier's undefined name "Quillon Ashby" is "Marsh Tollard"
    # in the draft, everywhere.
    review = run_review(doc(INVENTED.replace("Quillon Ashby", "Marsh Tollard")), doc(INVENTED))
    # "Quillon Ashby" is used six times (1.1, 1.2, 1.3, 2.1, 2.2, 3.2; counted by hand), all
    # in aligned clauses, all replaced.
    [m] = review.term_map
    assert (m.draft, m.precedent, m.evidence, m.occurrences, m.stale) == (
        "Marsh Tollard", "Quillon Ashby", ("substitution",), 6, 0)
    assert (m.substitutions, m.aligned) == (6, 6)
    [dev] = [v for v in review.deviations if v.category == "term"]
    assert dev.reasons[0].startswith('renamed throughout: the draft writes "Marsh Tollard"')
    assert "replaced in 6 of 6 aligned places" in dev.reasons[0]
    assert substantive(review) == []


def test_an_ordinary_phrase_renamed_throughout_is_one_mapping():
    # Invented agreement: "service records" is "visit logs" in the draft, everywhere.
    review = run_review(doc(INVENTED.replace("service records", "visit logs")
                            .replace("service record", "visit log")), doc(INVENTED))
    assert [(m.draft, m.precedent) for m in review.term_map] == [("visit log", "service record")]
    assert substantive(review) == []


def test_a_name_replaced_in_a_few_places_only_is_no_rename():
    # Invented agreement: "Quillon Ashby" becomes "Marsh Tollard" in two of its six uses
    # (a third): below RENAME_MIN_SHARE, so those two are substantive changes.
    assert RENAME_MIN_SHARE > 2 / 6
    draft = _replace_nth(INVENTED, "Quillon Ashby", "Marsh Tollard", keep={0, 1, 3, 5})
    review = run_review(doc(draft), doc(INVENTED))
    assert review.term_map == ()
    assert sorted(v.draft_text for v in substantive(review)) == ["Marsh Tollard"] * 2


def test_confidence_follows_consistency():
    # The same rename with one stale use has a lower confidence than the complete one.
    full = run_review(doc(INVENTED.replace("Quillon Ashby", "Marsh Tollard")), doc(INVENTED))
    partial = run_review(doc(_replace_nth(INVENTED, "Quillon Ashby", "Marsh Tollard", keep={5})),
                         doc(INVENTED))
    [a], [b] = full.term_map, partial.term_map
    assert (a.stale, b.stale) == (0, 1)
    assert (b.substitutions, b.aligned) == (5, 6)
    assert b.confidence < a.confidence


def test_a_party_word_is_never_mapped_onto_the_other_side_from_the_text():
    # Invented agreement: the draft writes "Customer" where the precedent writes "Supplier"
    # and "Supplier" where it writes "Customer" (the roles swapped), undefined on both
    # sides: consistent replacements, but onto the other side of the deal.
    swapped = (INVENTED.replace("Quillon Ashby", "the Supplier").replace("Customer", "\x00")
               .replace("Supplier", "Customer").replace("\x00", "Supplier"))
    precedent = INVENTED.replace("Quillon Ashby", "the Supplier")
    review = run_review(doc(swapped), doc(precedent))
    assert review.term_map == ()
    assert len(substantive(review)) >= 6
