"""The counter-draft on real agreements drafted by others: every revert and every amend is exact.

Outside references, named at each check:

* the words: license and EULA texts of the PyPI package ``licensedcode-data`` (the ScanCode
  license database), files ``mpl-2.0.LICENSE``, ``gpl-3.0.LICENSE``, ``apache-2.0.LICENSE``
  and ``altova-eula.LICENSE``, written to .docx with real Word auto-numbering and roughened
  as edited files are -- words split across runs with differing run properties, hyperlinks,
  field results, other reviewers' comments and tracked insertions, typographic quotes
  (``tests/support/licence_docx.py``, each feature as ECMA-376 Part 1 defines it);
* LibreOffice headless (Debian's libreoffice-writer, over UNO: ``tests/support/lo_uno.py``)
  opens every file we write and accepts or rejects all tracked changes.

The drafts are the texts with substantive edits planted by hand (the ``PLANTS`` below: each
an exact phrase of the file and its replacement) and, for one text, a defined term renamed
throughout.  Two laws, checked on the whole document, paragraph by paragraph:

* reverting every substantive deviation the review finds gives back the precedent's text
  exactly (with the draft's name for the renamed term), and rejecting all gives the draft
  exactly (as LibreOffice reads the draft itself);
* amending every substantive deviation gives the draft with exactly the words the review
  showed (``draft_text``, at ``draft_text_span``) replaced by the reviewer's words.
"""

from __future__ import annotations

import dataclasses
import re
from dataclasses import dataclass, field
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from core.decisions import Decision
from core.docx.validate import validate_docx
from core.export import counter_draft_bytes, write_counter_draft
from core.model import Review
from core.reader import read_document
from core.review import run_review
from tests.support.legal_texts import license_text
from tests.support.licence_docx import licence_docx, smart_quotes
from tests.support.lo_session import libreoffice

AUTHOR = "Counterdraft Test"


@dataclass(frozen=True)
class Case:
    #: (exact phrase of the licence text, the draft's wording) -- each phrase occurs once.
    plants: tuple[tuple[str, str], ...]
    #: A defined term the draft renames throughout: (precedent's name, draft's name).
    rename: tuple[str, str] | None = None
    seed: int = 1
    extra: dict = field(default_factory=dict)


# Planted by hand after reading each file: figures, negations, qualifiers, a word inserted,
# words deleted.
CASES = {
    "mpl-2.0": Case(plants=(
        ("prior to 60 days after You have come back", "prior to 90 days after You have come back"),
        ("prior to 30 days after Your receipt", "prior to 10 days after Your receipt"),
        ("limitation of liability shall not apply", "limitation of liability shall apply"),
        ("royalty-free, non-exclusive license", "royalty-free, exclusive license"),
        ("by reasonable means in a timely manner", "by reasonable means in a timely manner and free of charge"),
    ), rename=("Larger Work", "Combined Product"), seed=11),
    "gpl-3.0": Case(plants=(
        ("prior to 60 days after the cessation", "prior to 120 days after the cessation"),
        ("prior to 30 days after your receipt", "prior to 15 days after your receipt"),
        ("can get it with reasonable efforts", "can get it with commercially reasonable efforts"),
        ("You may not impose any further restrictions", "You may impose any further restrictions"),
    ), seed=12),
    "apache-2.0": Case(plants=(
        ("irrevocable copyright license to reproduce", "revocable copyright license to reproduce"),
        ("Derivative Works shall not include works", "Derivative Works shall include works"),
        ("except as required for reasonable and customary use", "except as required for customary use"),
    ), seed=13),
    "altova-eula": Case(plants=(
        ("for a period of ninety (90) days from the date of receipt",
         "for a period of thirty (30) days from the date of receipt"),
        ("are limited to ninety (90) days", "are limited to sixty (60) days"),
        ("such invalidity or unenforceability shall not affect",
         "such invalidity or unenforceability shall affect"),
        ("free technical support to you for thirty (30) days",
         "free technical support to you for ten (10) days"),
        ("install one (1) copy of the Software", "install two (2) copies of the Software"),
    ), seed=14),
}


def _renamed(text: str, rename: tuple[str, str] | None) -> str:
    if rename is None:
        return text
    return re.sub(rf"(?<!\w){re.escape(rename[0])}(?!\w)", rename[1], text)


def _draft_text(name: str, case: Case) -> str:
    text = license_text(name)
    for old, new in case.plants:
        # the files are hard-wrapped: a phrase may run across a line end
        pattern = re.compile(r"\s+".join(re.escape(w) for w in old.split()))
        assert len(pattern.findall(text)) == 1, f"{name}.LICENSE: the planted phrase {old!r} must occur once"
        text = pattern.sub(new, text)
    return smart_quotes(_renamed(text, case.rename))


@dataclass
class Built:
    name: str
    case: Case
    precedent: Path
    draft: Path
    review: Review
    #: Body paragraphs as LibreOffice reads each input (tracked changes as they are shown,
    #: then accepted or rejected).
    precedent_paragraphs: list[str]
    draft_accepted: list[str]
    draft_rejected: list[str]


@pytest.fixture(scope="module", params=sorted(CASES))
def built(request, tmp_path_factory) -> Built:
    name = request.param
    case = CASES[name]
    folder = tmp_path_factory.mktemp(name)
    precedent = folder / "precedent.docx"
    draft = folder / "draft.docx"
    precedent.write_bytes(licence_docx(name, text=smart_quotes(license_text(name))))
    draft.write_bytes(licence_docx(name, text=_draft_text(name, case), seed=case.seed))
    review = run_review(read_document(str(draft)), read_document(str(precedent)))
    office = libreoffice()
    return Built(name, case, precedent, draft, review,
                 office.inspect(precedent, action="none", pdf=None).paragraphs,
                 office.inspect(draft, action="accept", pdf=None).paragraphs,
                 office.inspect(draft, action="reject", pdf=None).paragraphs)


def _substantive(review: Review):
    return [d for d in review.deviations if d.category == "substantive"]


def _write(built: Built, decisions, out: Path) -> tuple[str, ...]:
    notes = write_counter_draft(built.review, decisions, out, draft_path=str(built.draft), author=AUTHOR)
    assert validate_docx(out) == []  # our structural check of ECMA-376 Part 1 §17.13 markup
    # The roughened drafts hold another reviewer's tracked insertions: the export says so.
    return tuple(n for n in notes if "tracked changes of its own" not in n)


def test_the_planted_edits_are_all_found_as_substantive(built):
    """Each planted phrase is inside the words of a substantive deviation."""
    devs = _substantive(built.review)
    for old, new in built.case.plants:
        hits = [d for d in devs if d.draft_text and d.draft_text in smart_quotes(_renamed(new, built.case.rename))]
        hits += [d for d in devs if d.precedent_text and d.precedent_text in smart_quotes(old)
                 and not d.draft_text]
        assert hits, f"{built.name}: planted {old!r} -> {new!r} not found"


def test_reverting_every_substantive_deviation_gives_back_the_precedent(built, tmp_path):
    devs = _substantive(built.review)
    out = tmp_path / "counter.docx"
    notes = _write(built, [Decision(d.id, "revert") for d in devs], out)
    assert notes == ()
    office = libreoffice()
    accepted = office.inspect(out, action="accept", pdf=None)  # LibreOffice accepts all
    assert accepted.redlines_after == 0
    expected = [_renamed(p, built.case.rename) for p in built.precedent_paragraphs]
    assert accepted.paragraphs == expected
    rejected = office.inspect(out, action="reject", pdf=None)  # LibreOffice rejects all
    assert rejected.paragraphs == built.draft_rejected


def _block_places(review: Review, dev) -> tuple[int, int, int]:
    """(block, start, end) of the deviation's draft span in the draft's paragraphs, through
    the provision's segments (core.model's invariant)."""
    prov = review.draft.provision(dev.draft_provision)
    a, b = dev.draft_text_span
    assert prov.text[a:b] == dev.draft_text  # the span holds exactly the words shown
    pos = 0
    for seg in prov.segments:
        length = seg.end - seg.start
        if pos <= a and b <= pos + length:
            return seg.block, seg.start + a - pos, seg.start + b - pos
        pos += length + 1
    raise AssertionError(f"{dev.id}: its span crosses paragraphs")


def _put(text: str, start: int, end: int, words: str) -> str:
    """*words* in place of ``text[start:end]``; at a bare insertion point one space separates
    them from the words on each side, none before closing punctuation (common practice, no
    source)."""
    if start < end:
        return text[:start] + words + text[end:]
    left, right = text[:start].rstrip(), text[start:].lstrip()
    return (left + " " if left else "") + words + (" " + right if right and right[0] not in ",.;:)" else right)


def test_amending_every_substantive_deviation_replaces_exactly_the_words_shown(built, tmp_path):
    review = built.review
    devs = [d for d in _substantive(review) if d.part == "text" and d.change in ("insert", "delete", "replace")]
    assert devs
    decisions = [Decision(d.id, "amend", text=f"amended wording {d.rank}") for d in devs]
    expected = [b.text for b in review.draft.blocks]
    places = sorted(((*_block_places(review, d), f"amended wording {d.rank}") for d in devs),
                    key=lambda x: (x[0], -x[1]))
    for block, start, end, words in places:
        expected[block] = _put(expected[block], start, end, words)
    out = tmp_path / "counter.docx"
    assert _write(built, decisions, out) == ()
    office = libreoffice()
    body = [i for i, b in enumerate(review.draft.blocks) if not b.in_table]
    assert office.inspect(out, action="accept", pdf=None).paragraphs == [expected[i] for i in body]
    assert office.inspect(out, action="reject", pdf=None).paragraphs == built.draft_rejected


# --------------------------------------------------------------------------------------
# Any span, any words: a property test on one roughened real text
# --------------------------------------------------------------------------------------

_WORDS = st.text(alphabet=st.sampled_from("abcdefghij KLM 0123456789,.;()%\u201c\u201d\u2019-"),
                 min_size=1, max_size=24)


@pytest.fixture(scope="module")
def rough_mpl(tmp_path_factory) -> tuple[Path, Review, list[str]]:
    """mpl-2.0.LICENSE (licensedcode-data), roughened, reviewed against itself."""
    folder = tmp_path_factory.mktemp("rough")
    draft = folder / "draft.docx"
    draft.write_bytes(licence_docx("mpl-2.0", seed=5))
    review = run_review(read_document(str(draft)), read_document(str(draft)))
    rejected = libreoffice().inspect(draft, action="reject", pdf=None).paragraphs
    return draft, review, rejected


@settings(max_examples=25, deadline=None, database=None,
          suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(where=st.tuples(st.integers(0, 10**6), st.integers(0, 10**6), st.integers(0, 10**6)), words=_WORDS)
def test_any_span_amended_with_any_words_is_written_exactly(rough_mpl, tmp_path, where, words):
    # Three plain integers pick the paragraph and the span (the same draws every time, so
    # hypothesis can replay and shrink an example exactly).
    draft, review, rejected = rough_mpl
    segments = [(p, k, s) for p in review.draft.provisions for k, s in enumerate(p.segments) if s.end > s.start]
    prov, k, seg = segments[where[0] % len(segments)]
    offset = sum(s.end - s.start + 1 for s in prov.segments[:k])
    length = seg.end - seg.start
    a = where[1] % length
    b = a + 1 + where[2] % (length - a)
    span = (offset + a, offset + b)
    dev = dataclasses.replace(_blank(), draft_provision=prov.id, precedent_provision=prov.id,
                              draft_text=prov.text[span[0]:span[1]], draft_text_span=span,
                              precedent_text_span=span)
    one = dataclasses.replace(review, deviations=(dev,))
    data_bytes, notes = counter_draft_bytes(one, [Decision("v1", "amend", text=words)],
                                            draft_path=str(draft), author=AUTHOR)
    assert not [n for n in notes if "skipped" in n]
    out = tmp_path / f"amended-{abs(hash((span, words)))}.docx"
    out.write_bytes(data_bytes)
    expected = [b.text for b in review.draft.blocks]
    expected[seg.block] = (expected[seg.block][:seg.start + a] + words
                           + expected[seg.block][seg.start + b:])
    office = libreoffice()
    assert office.inspect(out, action="accept", pdf=None).paragraphs == expected
    assert office.inspect(out, action="reject", pdf=None).paragraphs == rejected


def _blank():
    from core.model import Deviation

    return Deviation("v1", 1, 50, "substantive", "replace", None, None, "", "", ("planted",))


def test_amend_wording_of_several_paragraphs_starts_new_paragraphs(rough_mpl, tmp_path):
    """A line break the reviewer asked for (``decide --paragraphs``) cuts the paragraph as a
    reviewer pressing Enter would: accepting gives the new paragraphs, rejecting joins them
    again (LibreOffice over UNO, on mpl-2.0.LICENSE from licensedcode-data)."""
    draft, review, rejected = rough_mpl
    prov = next(p for p in review.draft.provisions if len(p.segments) == 1 and len(p.text) > 80)
    seg = prov.segments[0]
    span = (20, 40)
    dev = dataclasses.replace(_blank(), draft_provision=prov.id, precedent_provision=prov.id,
                              draft_text=prov.text[20:40], draft_text_span=span, precedent_text_span=span)
    one = dataclasses.replace(review, deviations=(dev,))
    words = "first new words\nA second paragraph.\nA third one, then"
    data_bytes, _ = counter_draft_bytes(one, [Decision("v1", "amend", text=words, note="Split.")],
                                        draft_path=str(draft), author=AUTHOR)
    out = tmp_path / "paragraphs.docx"
    out.write_bytes(data_bytes)
    assert validate_docx(out) == []  # ECMA-376 Part 1 §17.13 markup
    text = review.draft.blocks[seg.block].text
    lines = words.split("\n")
    expected = [b.text for b in review.draft.blocks]
    expected[seg.block:seg.block + 1] = [text[:seg.start + 20] + lines[0], lines[1],
                                         lines[2] + text[seg.start + 40:]]
    office = libreoffice()
    accepted = office.inspect(out, action="accept", pdf=None)
    assert accepted.paragraphs == expected
    # the note joins the other reviewer's comments already in the file
    assert [c["content"] for c in accepted.comments].count("Split.") == 1
    assert office.inspect(out, action="reject", pdf=None).paragraphs == rejected
