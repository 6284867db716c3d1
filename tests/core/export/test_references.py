"""Cross-references kept true in the counter-draft (core.export.references).

Outside references, named at each check:

* the words: ``mpl-2.0.LICENSE`` of the PyPI package ``licensedcode-data`` (the ScanCode
  license database), whose clauses cite each other ("Section 3.3", "Sections 3.1, 3.2, 3.3,
  and 3.4", "Sections 5.1 or 5.2"), written to .docx with real Word auto-numbering
  (``tests/support/licence_docx.py``); the draft and the expected counter-draft are edited
  copies of that text, written by hand below;
* LibreOffice headless (Debian's libreoffice-writer, over UNO) accepts or rejects every
  tracked change and renders every list label (ECMA-376 Part 1 §17.9): the numbers a
  reader of the counter-draft sees.
"""

from __future__ import annotations

import difflib
import re
from pathlib import Path

import pytest

from core.decisions import Decision
from core.docx.validate import validate_docx
from core.export import write_counter_draft
from core.reader import read_document
from core.review import run_review
from tests.support.legal_texts import license_text
from tests.support.licence_docx import licence_docx
from tests.support.lo_session import libreoffice

AUTHOR = "Counterdraft Test"
DEMO = Path(__file__).resolve().parents[3] / "demo_agreements"

# The draft of MPL 2.0: section 2.7 "Conditions" left out, a new section 3.1 put at the head
# of section 3 (the old 3.1-3.5 become 3.2-3.6) and a new 5.2 in section 5 (the old 5.2 and
# 5.3 become 5.3 and 5.4); its own references follow its own numbering.
_CONDITIONS = ("2.7. Conditions\n\nSections 3.1, 3.2, 3.3, and 3.4 are conditions of the licenses granted\n"
               "in Section 2.1.\n\n")
_NEW_3_1 = ("3.1. Distribution Records\n\nYou must keep a record of each distribution of Covered "
            "Software for three years.\n\n")
_NEW_5_2 = ("5.2. If You breach this License twice within twelve months, each Contributor may end "
            "Your grants by notice.\n\n")


def _edit(text: str, old: str, new: str) -> str:
    assert text.count(old) == 1, old
    return text.replace(old, new)


def _shift_section_3(text: str) -> str:
    """The references to section 3's clauses, one number up (hand-listed from the file:
    2.3(c) cites 3.4, 2.4 cites 3.3, 3.2(a) cites 3.1)."""
    text = _edit(text, "Section 3.4", "Section 3.5")
    text = _edit(text, "Section 3.3", "Section 3.4")
    return _edit(text, "as described in Section 3.1,", "as described in Section 3.2,")


def _draft_text() -> str:
    text = _edit(license_text("mpl-2.0"), _CONDITIONS, "")
    text = _shift_section_3(text)
    text = _edit(text, "3.1. Distribution of Source Form", _NEW_3_1 + "3.1. Distribution of Source Form")
    text = _edit(text, "5.2. If You initiate", _NEW_5_2 + "5.2. If You initiate")
    return _edit(text, "Sections 5.1 or 5.2", "Sections 5.1 or 5.3")


def _expected_text() -> str:
    """Restore 2.7 and strike the new 5.2, keeping the new 3.1: the draft's numbering of
    section 3, the restored 2.7 citing section 3 in that numbering, 5.3 citing 5.2 again."""
    text = _shift_section_3(license_text("mpl-2.0"))
    text = _edit(text, "Sections 3.1, 3.2, 3.3, and 3.4 are", "Sections 3.2, 3.3, 3.4, and 3.5 are")
    return _edit(text, "3.1. Distribution of Source Form", _NEW_3_1 + "3.1. Distribution of Source Form")


@pytest.fixture(scope="module")
def mpl(tmp_path_factory):
    folder = tmp_path_factory.mktemp("mpl-xrefs")
    precedent, draft, expected = (folder / n for n in ("precedent.docx", "draft.docx", "expected.docx"))
    precedent.write_bytes(licence_docx("mpl-2.0"))
    draft.write_bytes(licence_docx("mpl-2.0", text=_draft_text(), seed=21))
    expected.write_bytes(licence_docx("mpl-2.0", text=_expected_text()))
    review = run_review(read_document(str(draft)), read_document(str(precedent)))
    return precedent, draft, expected, review


def test_restoring_and_striking_keeps_every_reference_true(mpl, tmp_path):
    precedent, draft, expected, review = mpl
    removed = [d for d in review.deviations if d.change == "remove-provision"]
    added = [d for d in review.deviations if d.change == "add-provision"]
    restore = next(d for d in removed if "Sections 3.1, 3.2, 3.3, and 3.4" in d.precedent_text)
    strike = next(d for d in added if "twice within twelve months" in d.draft_text)
    out = tmp_path / "counter.docx"
    notes = write_counter_draft(review, [Decision(restore.id, "revert"), Decision(strike.id, "revert")],
                                out, draft_path=str(draft), author=AUTHOR)
    assert not [n for n in notes if "skipped" in n]
    assert validate_docx(out) == []  # ECMA-376 Part 1 §17.13 markup
    office = libreoffice()
    accepted = office.inspect(out, action="accept", pdf=None)
    want = office.inspect(expected, action="none", pdf=None)
    # The text and the numbers LibreOffice renders are those of the hand-made expectation:
    # every typed reference names the clause it named before the decisions.
    assert accepted.paragraphs == want.paragraphs
    assert [p.get("label") for p in accepted.body] == [p.get("label") for p in want.body]
    updated = [c["content"] for c in accepted.comments if c["content"].startswith("Cross-reference updated")]
    # the strike moves 5.3 (citing 5.3, the old 5.2) back to 5.2; section 3 keeps its numbers
    assert updated == ["Cross-reference updated: Section 5.3 is now Section 5.2."]
    rejected = office.inspect(out, action="reject", pdf=None)
    assert rejected.paragraphs == office.inspect(draft, action="reject", pdf=None).paragraphs


# --------------------------------------------------------------------------------------
# The demo: no typed reference left pointing at another clause
# --------------------------------------------------------------------------------------

#: A typed reference as a reader spots it: a keyword and a plain clause number (the
#: demo's labels read "Section 9.1" and "Article 7").
_REF = re.compile(r"\b(Section|Article|Clause)s? (\d+(?:\.\d+)*)")


def _number(label: str | None) -> str | None:
    """"Section 9.1" / "9.1." -> "9.1"."""
    if not label:
        return None
    m = re.search(r"(\d+(?:\.\d+)*)\.?$", label.strip())
    return m.group(1) if m else None


def _targets(body: list[dict]) -> dict[str, str]:
    """number -> text of the paragraph LibreOffice labels with it (the first one)."""
    out: dict[str, str] = {}
    for p in body:
        n = _number(p.get("label"))
        if n and n not in out:
            out[n] = p["text"]
    return out


def _masked(text: str) -> str:
    return re.sub(r"\d+", "#", text)


def test_demo_restore_and_strike_leave_no_stale_reference(tmp_path):
    """Restore the clause the demo draft leaves out and strike the one it adds; then every
    typed reference in the counter-draft, read with LibreOffice's own labels, names the
    paragraph it named in the draft -- or carries a comment saying its clause is gone."""
    draft = DEMO / "draft.docx"
    review = run_review(read_document(str(draft)), read_document(str(DEMO / "precedent.docx")))
    restore = next(d for d in review.deviations if d.change == "remove-provision"
                   and "solicit" in d.precedent_text.lower())
    strike = next(d for d in review.deviations if d.change == "add-provision"
                  and "service credit" in d.draft_text.lower())
    out = tmp_path / "counter.docx"
    write_counter_draft(review, [Decision(restore.id, "revert"), Decision(strike.id, "revert")], out,
                        draft_path=str(draft), author=AUTHOR)
    office = libreoffice()
    before = office.inspect(draft, action="none", pdf=None).body
    after_view = office.inspect(out, action="accept", pdf=None)
    after = after_view.body
    old_at, new_at = _targets(before), _targets(after)
    b_text, a_text = [p["text"] for p in before], [p["text"] for p in after]
    checked = 0
    for tag, i1, i2, j1, j2 in difflib.SequenceMatcher(None, [_masked(t) for t in b_text],
                                                       [_masked(t) for t in a_text], autojunk=False).get_opcodes():
        if tag != "equal":
            continue
        for i, j in zip(range(i1, i2), range(j1, j2)):
            for old, new in zip(_REF.finditer(b_text[i]), _REF.finditer(a_text[j])):
                meant = old_at.get(old.group(2))
                if meant is None or new.group(2) not in new_at:
                    continue
                assert _masked(new_at[new.group(2)]) == _masked(meant), (b_text[i], old.group(), new.group())
                checked += 1
    assert checked >= 15  # the demo's typed references outside the two decided clauses
    comments = [c["content"] for c in after_view.comments]
    assert sum(c.startswith("Cross-reference updated") for c in comments) >= 15
