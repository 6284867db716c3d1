"""Our structural check of revision and comment markup (core.docx.validate).

Each rule comes from ECMA-376 Part 1 §17.13 (annotations); the clause is named beside each
case.  LibreOffice (Debian, headless, via UNO) opens every one of these malformed files
without a complaint -- one test shows it -- which is why the project needs its own check.
"""

from __future__ import annotations

import pytest

from core.docx.revisions import W_NS, RevisionStamp
from core.docx.validate import check_revisions, validate_docx
from core.docx.writer import Para, Run, build_docx
from tests.support.docx_fixtures import body_element, docx_bytes
from tests.support.lo_session import libreoffice

A = 'w:author="A" w:date="2024-01-01T00:00:00Z"'


def _problems(body: str) -> list[str]:
    return check_revisions(body_element(body))


def test_well_formed_markup_passes():
    body = (
        f'<w:p><w:del w:id="1" {A}><w:r><w:delText>old</w:delText></w:r></w:del>'
        f'<w:ins w:id="2" {A}><w:r><w:t>new</w:t></w:r></w:ins></w:p>'
        f'<w:p><w:pPr><w:rPr><w:del w:id="3" {A}/></w:rPr></w:pPr>'
        f'<w:del w:id="4" {A}><w:r><w:delInstrText> PAGE </w:delInstrText></w:r></w:del></w:p>'
    )
    assert _problems(body) == []


@pytest.mark.parametrize(
    ("body", "expected"),
    [
        # §17.13.5.14 / §17.13.5.18: w:id is required ...
        (f'<w:p><w:ins {A}><w:r><w:t>x</w:t></w:r></w:ins></w:p>', "has no w:id"),
        # ... and is an ST_DecimalNumber
        (f'<w:p><w:ins w:id="a1" {A}><w:r><w:t>x</w:t></w:r></w:ins></w:p>', "non-numeric w:id"),
        # unique among the revisions of the document
        (f'<w:p><w:ins w:id="7" {A}><w:r><w:t>x</w:t></w:r></w:ins>'
         f'<w:del w:id="7" {A}><w:r><w:delText>y</w:delText></w:r></w:del></w:p>', "repeats w:id 7"),
        # w:author is required (§17.13.5.14 attribute table)
        ('<w:p><w:ins w:id="1" w:date="2024-01-01T00:00:00Z"><w:r><w:t>x</w:t></w:r></w:ins></w:p>',
         "has no w:author"),
        # we always write w:date (ST_DateTime, §17.18.9)
        ('<w:p><w:ins w:id="1" w:author="A"><w:r><w:t>x</w:t></w:r></w:ins></w:p>', "has no w:date"),
        ('<w:p><w:ins w:id="1" w:author="A" w:date="May 1st"><w:r><w:t>x</w:t></w:r></w:ins></w:p>',
         "malformed w:date"),
        # §17.3.3.7: deleted text is w:delText, never w:t inside w:del
        (f'<w:p><w:del w:id="1" {A}><w:r><w:t>x</w:t></w:r></w:del></w:p>', "must be w:delText"),
        # ... and w:delText only inside w:del or w:moveFrom
        ('<w:p><w:r><w:delText>x</w:delText></w:r></w:p>', "outside any w:del"),
        # §17.13.5.13: a deleted field code is w:delInstrText
        (f'<w:p><w:del w:id="1" {A}><w:r><w:instrText>PAGE</w:instrText></w:r></w:del></w:p>',
         "must be w:delText"),
        # no deletion inside a deletion
        (f'<w:p><w:del w:id="1" {A}><w:del w:id="2" {A}><w:r><w:delText>x</w:delText></w:r></w:del></w:del></w:p>',
         "nested inside"),
        # §17.13.5.23/.24: a move range needs its end ...
        (f'<w:p><w:moveFromRangeStart w:id="1" w:name="m" {A}/><w:moveFrom w:id="2" {A}>'
         f'<w:r><w:delText>x</w:delText></w:r></w:moveFrom></w:p>'
         f'<w:p><w:moveToRangeStart w:id="3" w:name="m" {A}/><w:moveTo w:id="4" {A}><w:r><w:t>x</w:t></w:r>'
         '</w:moveTo><w:moveToRangeEnd w:id="3"/></w:p>', "no matching w:moveFromRangeEnd"),
        # §17.13.5.27/.28: ... and its other side, paired by w:name
        (f'<w:p><w:moveFromRangeStart w:id="1" w:name="m" {A}/><w:moveFrom w:id="2" {A}>'
         f'<w:r><w:delText>x</w:delText></w:r></w:moveFrom><w:moveFromRangeEnd w:id="1"/></w:p>',
         "has only one side"),
        # moved content inside a range of its kind
        (f'<w:p><w:moveTo w:id="2" {A}><w:r><w:t>x</w:t></w:r></w:moveTo></w:p>',
         "outside every w:moveToRangeStart"),
        # §17.13.4.4: a comment reference without a comments part
        ('<w:p><w:r><w:commentReference w:id="5"/></w:r></w:p>', "no comments part"),
    ],
)
def test_each_rule_is_reported(body, expected):
    problems = _problems(body)
    assert any(expected in p for p in problems), problems


def test_comment_markup_is_checked_against_the_comments_part():
    from lxml import etree

    doc = body_element(
        '<w:p><w:commentRangeStart w:id="5"/><w:r><w:t>x</w:t></w:r><w:commentRangeEnd w:id="5"/>'
        '<w:r><w:commentReference w:id="5"/></w:r></w:p>'
        '<w:p><w:commentRangeEnd w:id="6"/><w:commentRangeStart w:id="6"/>'
        '<w:r><w:commentReference w:id="6"/></w:r></w:p>'
    )
    comments = etree.fromstring(
        f'<w:comments xmlns:w="{W_NS}"><w:comment w:id="5" {A}><w:p/></w:comment>'
        f'<w:comment w:id="9" w:author="A"><w:p/></w:comment></w:comments>'
    )
    problems = check_revisions(doc, comments=comments)
    # §17.13.4.2: every referenced comment exists; §17.13.4.4: start before end
    assert any("comment id 6 is used in the document but not in the comments part" in p for p in problems)
    assert any("comment id 6: range end before range start" in p for p in problems)
    assert any("comment id 9 is never referenced" in p for p in problems)
    assert any("has no w:date" in p for p in problems)
    assert not any("comment id 5" in p for p in problems)


def test_our_writer_output_passes_including_moves():
    stamp = RevisionStamp("A", "2024-01-01T00:00:00Z")
    data = build_docx([
        Para((Run("kept "), Run("old", "del"), Run("new", "ins"))),
        Para((Run("moved away", "moveFrom"),), mark="moveFrom", move="m1"),
        Para((Run("middle"),)),
        Para((Run("moved away", "moveTo"), Run(" and more", "ins")), mark="moveTo", move="m1"),
    ], stamp=stamp, title="t")
    assert validate_docx(data) == []


def test_libreoffice_is_no_validator(tmp_path):
    """LibreOffice loads duplicate ids, a missing author and w:t inside w:del without a word
    -- so passing through it proves nothing about the markup."""
    bad = (
        '<w:p><w:ins w:id="1" w:date="2024-01-01T00:00:00Z"><w:r><w:t>x</w:t></w:r></w:ins>'
        f'<w:del w:id="1" {A}><w:r><w:t>y</w:t></w:r></w:del></w:p>'
    )
    path = tmp_path / "bad.docx"
    path.write_bytes(docx_bytes(bad))
    view = libreoffice().inspect(path)
    assert view.redlines_before >= 1  # loaded, with its revisions, no error
    problems = validate_docx(path)
    assert any("repeats w:id 1" in p for p in problems)
    assert any("has no w:author" in p for p in problems)
    assert any("must be w:delText" in p for p in problems)
