"""Perturbation tests on real texts from outside the project.

Source of every text here: the licence texts shipped in the PyPI package
``licensedcode-data`` (``licensedcode/data/licenses/apache-2.0.LICENSE``,
``gpl-3.0.LICENSE``, ``mpl-2.0.LICENSE``: the Apache License 2.0, the GNU General Public
License version 3 and the Mozilla Public License 2.0).  Each test plants known edits in a
licence (the "draft") and reviews it against the unchanged licence (the "precedent"):

* a defined term renamed everywhere, a section moved, cosmetic noise (curly quotes, double
  spaces, a dash style, a heading's letter case): no substantive deviation;
* a number changed, "shall" weakened to "may", "not" inserted, a sentence inserted, a
  section deleted, a section added: each found, with the expected reasons.
"""

from __future__ import annotations

import re
from collections.abc import Callable
from dataclasses import dataclass

import pytest

from core.model import Review
from core.review import run_review

from .helpers import doc, licence_text, replace_once, substantive


@dataclass(frozen=True)
class Plan:
    """The edits planted in one licence (exact strings of its text)."""

    key: str
    rename: tuple[str, str]  # defined term, new name
    move: tuple[str, str, str]  # section start, next section start, insert before
    number: tuple[str, str, tuple[str, ...]]  # old words, new words, values in the reason
    weaken: tuple[str, str]  # phrase with "shall", the same with "may"
    negate: tuple[str, str]  # phrase, the same with "not"
    sentence: tuple[str, str]  # after this text, insert this sentence
    delete: tuple[str, str, str]  # section start, next section start, a phrase of it
    add: tuple[str, str]  # insert before, new section
    heading: tuple[str, str]  # a heading, the same in other letter case
    dash: tuple[str, str]  # a word with a hyphen, the same with another dash


PLANS = {
    "apache-2.0": Plan(
        key="apache-2.0",
        rename=("Licensor", "Grantor"),
        move=("6. Trademarks.", "7. Disclaimer of Warranty.", "9. Accepting Warranty"),
        number=("fifty percent (50%)", "twenty-five percent (25%)", ("50%", "25%")),
        weaken=("for that Work shall terminate", "for that Work may terminate"),
        negate=("You may reproduce and distribute", "You may not reproduce and distribute"),
        sentence=("reproducing the content of the NOTICE file.",
                  "Each Contributor shall publish a list of its trade names every year."),
        delete=("9. Accepting Warranty or Additional Liability.", "END OF TERMS AND CONDITIONS",
                "choose to offer"),
        add=("END OF TERMS AND CONDITIONS",
             "10. Governing Law. This License is governed by the laws of Ardence and the "
             "courts of Wexmoor have exclusive jurisdiction over every dispute under it.\n\n"),
        heading=("Limitation of Liability.", "LIMITATION OF LIABILITY."),
        dash=("non-exclusive", "non\u2011exclusive"),
    ),
    "gpl-3.0": Plan(
        key="gpl-3.0",
        rename=("Program", "Licensed Work"),
        move=("12. No Surrender of Others' Freedom.", "13. Use with the GNU Affero",
              "15. Disclaimer of Warranty."),
        number=("for at least three years", "for at least five years", ("3", "5", "years")),
        weaken=("No covered work shall be deemed", "No covered work may be deemed"),
        negate=("You may convey verbatim copies", "You may not convey verbatim copies"),
        sentence=("receive or run a copy of the Program.",
                  "Each recipient shall keep a written record of every copy that it conveys."),
        delete=("13. Use with the GNU Affero General Public License.", "14. Revised Versions",
                "Affero General Public License into a single"),
        add=("END OF TERMS AND CONDITIONS",
             "18. Governing Law.\n\n  This License is governed by the laws of Ardence and the "
             "courts of Wexmoor have exclusive jurisdiction over every dispute under it.\n\n"),
        heading=("Basic Permissions.", "BASIC PERMISSIONS."),
        dash=("machine-readable", "machine\u2013readable"),
    ),
    "mpl-2.0": Plan(
        key="mpl-2.0",
        rename=("Executable Form", "Binary Form"),
        move=("4. Inability to Comply", "5. Termination", "8. Litigation"),
        number=("prior to 60 days after You have", "prior to 90 days after You have",
                ("60", "90", "days")),
        weaken=("2.1 of this License shall terminate", "2.1 of this License may terminate"),
        negate=("You may create and distribute a Larger Work",
                "You may not create and distribute a Larger Work"),
        sentence=("to be able to understand it.", "You shall keep that description up to date."),
        delete=("9. Miscellaneous", "10. Versions of the License", "reformed only to the extent"),
        add=("Exhibit A - Source Code Form License Notice",
             "11. Governing Law\n-----------------\n\nThis License is governed by the laws of "
             "Ardence and the courts of Wexmoor have exclusive jurisdiction over every dispute "
             "under it.\n\n"),
        heading=("Termination\n--------------", "TERMINATION\n--------------"),
        dash=("non-compliance", "non\u2013compliance"),
    ),
}


def _line_start(text: str, marker: str) -> int:
    i = text.index(marker)
    return text.rfind("\n", 0, i) + 1


def rename(t: str, plan: Plan) -> str:
    old, new = plan.rename
    assert new not in t
    return re.sub(rf"(?<![\w-]){re.escape(old)}(?![\w])", new, t)


def move(t: str, plan: Plan) -> str:
    start, nxt, before = plan.move
    a, b = _line_start(t, start), _line_start(t, nxt)
    block, rest = t[a:b], t[:a] + t[b:]
    at = _line_start(rest, before)
    return rest[:at] + block + rest[at:]


def number(t: str, plan: Plan) -> str:
    return replace_once(t, plan.number[0], plan.number[1])


def weaken(t: str, plan: Plan) -> str:
    return replace_once(t, *plan.weaken)


def negate(t: str, plan: Plan) -> str:
    return replace_once(t, *plan.negate)


def sentence(t: str, plan: Plan) -> str:
    after, new = plan.sentence
    return replace_once(t, after, f"{after} {new}")


def delete(t: str, plan: Plan) -> str:
    start, nxt, _phrase = plan.delete
    a, b = _line_start(t, start), _line_start(t, nxt)
    return t[:a] + t[b:]


def add(t: str, plan: Plan) -> str:
    before, new = plan.add
    at = _line_start(t, before)
    return t[:at] + new + t[at:]


def noise(t: str, plan: Plan) -> str:
    """Curly quotation marks for straight ones, one space for two (or two for one) after
    some full stops, another dash in one word, a heading in capitals."""
    t = re.sub(r'"([^"\n]{1,60})"', "\u201c\\1\u201d", t)
    t = re.sub(r"(?<=[a-z])\.( {1,2})(?=[A-Z])", lambda m: ".  " if m.group(1) == " " else ". ",
               t, count=8)
    t = t.replace(plan.dash[0], plan.dash[1])
    return replace_once(t, *plan.heading)


def review_of(plan: Plan, *edits: Callable[[str, Plan], str]) -> Review:
    base = licence_text(plan.key)
    text = base
    for edit in edits:
        text = edit(text, plan)
    assert text != base
    return run_review(doc(text, f"{plan.key}-draft.txt"), doc(base, f"{plan.key}.txt"))


def reasons(review: Review) -> list[str]:
    return [" ".join(v.reasons).lower() for v in substantive(review)]


# -- checks of each planted edit -----------------------------------------------------------

def found_number(r: Review, plan: Plan) -> bool:
    return any(all(x in rs for x in plan.number[2]) and "changed from" in rs for rs in reasons(r))


def found_weaken(r: Review, plan: Plan) -> bool:
    return any("obligation weakened from 'shall' to 'may'" in rs for rs in reasons(r))


def found_negate(r: Review, plan: Plan) -> bool:
    return any("negation added: 'not'" in rs for rs in reasons(r))


def found_sentence(r: Review, plan: Plan) -> bool:
    return any(v.change == "insert" and plan.sentence[1] in v.draft_text for v in substantive(r))


def found_delete(r: Review, plan: Plan) -> bool:
    return any(v.change == "remove-provision" and plan.delete[2] in v.precedent_text.replace("\n", " ")
               for v in substantive(r))


def found_add(r: Review, plan: Plan) -> bool:
    return any(v.change == "add-provision" and "Wexmoor" in v.draft_text for v in substantive(r))


PLANTED = {"number": (number, found_number), "weaken": (weaken, found_weaken),
           "negate": (negate, found_negate), "sentence": (sentence, found_sentence),
           "delete": (delete, found_delete), "add": (add, found_add)}


@pytest.mark.parametrize("key", sorted(PLANS))
@pytest.mark.parametrize("kind", sorted(PLANTED))
def test_planted_substantive_edit_is_found(key, kind):
    """Source: licensedcode-data licence text ``<key>.LICENSE``."""
    plan = PLANS[key]
    edit, found = PLANTED[kind]
    r = review_of(plan, edit)
    assert found(r, plan), [(v.change, v.precedent_text[:40], v.draft_text[:40], v.reasons)
                            for v in substantive(r)]
    # and it is the only substantive deviation, at the top of the ranking
    assert len(substantive(r)) == 1, [(v.change, v.precedent_text[:40], v.draft_text[:40])
                                      for v in substantive(r)]
    assert r.deviations[0].category == "substantive"


@pytest.mark.parametrize("key", sorted(PLANS))
def test_rename_of_a_defined_term_is_one_term_mapping_and_nothing_substantive(key):
    """Source: licensedcode-data licence text ``<key>.LICENSE``."""
    plan = PLANS[key]
    r = review_of(plan, rename)
    old, new = plan.rename
    assert [(m.draft, m.precedent) for m in r.term_map] == [(new, old)]
    assert [(v.draft_text, v.precedent_text) for v in r.deviations if v.category == "term"] == [(new, old)]
    assert substantive(r) == []


@pytest.mark.parametrize("key", sorted(PLANS))
def test_moved_section_is_moved_and_nothing_substantive(key):
    """Source: licensedcode-data licence text ``<key>.LICENSE``."""
    plan = PLANS[key]
    r = review_of(plan, move)
    moved = [p for p in r.pairs if p.status == "moved"]
    assert moved
    heading = plan.move[0].split(". ", 1)[1].rstrip(".")
    assert any((r.draft.provision(p.draft).heading or "").startswith(heading) for p in moved)
    assert substantive(r) == []
    assert len([v for v in r.deviations if v.change == "move"]) == 1


@pytest.mark.parametrize("key", sorted(PLANS))
def test_cosmetic_noise_is_never_substantive(key):
    """Source: licensedcode-data licence text ``<key>.LICENSE``."""
    plan = PLANS[key]
    r = review_of(plan, noise)
    assert substantive(r) == []
    kinds = {v.category for v in r.deviations}
    assert "formatting" in kinds
    details = " ".join(x for v in r.deviations for x in v.reasons)
    assert "quote style" in details and "whitespace" in details and "case" in details
    assert "dash style" in details


@pytest.mark.parametrize("key", sorted(PLANS))
def test_all_edits_together(key):
    """Every edit at once (rename last, over the planted words too).  Source:
    licensedcode-data licence text ``<key>.LICENSE``."""
    plan = PLANS[key]
    edits = [move, *(edit for edit, _ in PLANTED.values()), noise, rename]
    r = review_of(plan, *edits)
    for kind, (_edit, found) in PLANTED.items():
        assert found(r, plan), kind
    assert len(substantive(r)) == len(PLANTED)
    old, new = plan.rename
    assert (new, old) in [(m.draft, m.precedent) for m in r.term_map]
    assert any(p.status == "moved" for p in r.pairs)
