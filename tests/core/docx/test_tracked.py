"""A tracked-changes copy of an existing .docx (core.docx.tracked).

References: ECMA-376 Part 1 §17.13.5 (revisions), §17.13.4 (comments: the comments part,
w:commentRangeStart/End, w:commentReference), §22.3 (custom file properties); ECMA-376 Part 2
(Open Packaging Conventions: relationships and content types); LibreOffice headless (Debian)
as the word processor that reads the result.
"""

from __future__ import annotations

import io
import random
import re
import zipfile

import pytest
from lxml import etree

from core.docx.blocks import iter_body_paragraphs, read_docx_blocks
from core.docx.revisions import RevisionStamp, w
from core.docx.tracked import BlockDeletion, BlockEdit, BlockInsertion, write_tracked_copy
from core.docx.validate import COMMENTS_CT, COMMENTS_REL, validate_docx
from core.errors import CounterdraftError
from tests.support.docx_fixtures import docx_bytes
from tests.support.lo_session import libreoffice

STAMP = RevisionStamp(author="Ines Testwright", date="2024-05-01T10:00:00Z")

_BODY = (
    '<w:p><w:pPr><w:pStyle w:val="Title"/></w:pPr><w:r><w:t>Supply Terms</w:t></w:r></w:p>'
    '<w:p><w:r><w:t xml:space="preserve">The Client shall pay within sixty (60) days.</w:t></w:r></w:p>'
    '<w:p><w:r><w:t>Goods are accepted on delivery.</w:t></w:r></w:p>'
    '<w:tbl><w:tblGrid><w:gridCol w:w="4000"/></w:tblGrid>'
    '<w:tr><w:tc><w:p><w:r><w:t>Cell text stays.</w:t></w:r></w:p></w:tc></w:tr></w:tbl>'
    '<w:p><w:r><w:t>The Vendor may assign freely.</w:t></w:r></w:p>'
    '<w:p><w:r><w:t>Closing words.</w:t></w:r></w:p>'
)


def _members(data: bytes) -> dict[str, bytes]:
    with zipfile.ZipFile(io.BytesIO(data)) as zf:
        return {i.filename: zf.read(i) for i in zf.infolist()}


def _paragraph_xml(data: bytes) -> list[bytes]:
    root = etree.fromstring(_members(data)["word/document.xml"])
    return [etree.tostring(p) for p in iter_body_paragraphs(root)]


@pytest.fixture()
def source(tmp_path):
    path = tmp_path / "draft.docx"
    path.write_bytes(docx_bytes(_BODY))
    return path


def test_only_the_changed_paragraphs_and_the_parts_we_add_to_change(source):
    blocks, _ = read_docx_blocks(str(source))
    t1 = blocks[1].text
    s = t1.index("sixty (60)")
    out = write_tracked_copy(
        str(source),
        edits=[BlockEdit(1, s, s + len("sixty (60)"), "thirty (30)", comment="House position.")],
        deletions=[BlockDeletion(4)],
        stamp=STAMP, properties={"Counterdraft caution": "careful"},
    )
    before, after = _members(source.read_bytes()), _members(out)
    changed = {"word/document.xml", "[Content_Types].xml", "word/_rels/document.xml.rels", "_rels/.rels"}
    for name, data in before.items():
        if name not in changed and not name.startswith("docProps/custom"):
            assert after[name] == data, f"{name} changed"  # byte for byte
    assert list(after)[: len(before)] == list(before)  # same member order
    # The paragraphs we did not decide keep their exact XML.
    old_p, new_p = _paragraph_xml(source.read_bytes()), _paragraph_xml(out)
    assert len(old_p) == len(new_p)
    for i, (a, b) in enumerate(zip(old_p, new_p)):
        if i in (1, 4):
            assert a != b
        else:
            assert a == b, f"paragraph {i} changed"
    # The XML prolog of the main part is the original's.
    assert _members(out)["word/document.xml"][:60] == before["word/document.xml"][:60]
    assert validate_docx(out) == []


def test_comments_part_relationship_and_content_type_are_added(source):
    blocks, _ = read_docx_blocks(str(source))
    out = write_tracked_copy(
        str(source), edits=[BlockEdit(2, 0, 5, "", comment="Why?")], stamp=STAMP,
    )
    parts = _members(out)
    rels = etree.fromstring(parts["word/_rels/document.xml.rels"])
    targets = [r.get("Target") for r in rels if r.get("Type") == COMMENTS_REL]
    assert targets == ["comments.xml"]
    types = etree.fromstring(parts["[Content_Types].xml"])
    assert any(o.get("PartName") == "/word/comments.xml" and o.get("ContentType") == COMMENTS_CT
               for o in types)
    comments = etree.fromstring(parts["word/comments.xml"])
    (c,) = comments.findall(w("comment"))
    assert c.get(w("author")) == STAMP.author and c.get(w("date")) == STAMP.date
    assert "".join(c.itertext()) == "Why?"
    assert validate_docx(out) == []


def _with_existing_comment(data: bytes) -> bytes:
    """Add a comment (id 0) the way a word processor stores it (§17.13.4)."""
    members = _members(data)
    doc = etree.fromstring(members["word/document.xml"])
    p = list(iter_body_paragraphs(doc))[5]
    start = etree.Element(w("commentRangeStart"))
    start.set(w("id"), "0")
    end = etree.Element(w("commentRangeEnd"))
    end.set(w("id"), "0")
    ref_run = etree.Element(w("r"))
    etree.SubElement(ref_run, w("commentReference")).set(w("id"), "0")
    p.find(w("r")).addprevious(start)
    p.append(end)
    p.append(ref_run)
    members["word/document.xml"] = etree.tostring(doc, xml_declaration=True, encoding="UTF-8", standalone=True)
    members["word/comments.xml"] = (
        f'<?xml version="1.0" encoding="UTF-8" standalone="yes"?><w:comments xmlns:w="{w("x")[1:].split("}")[0]}">'
        '<w:comment w:id="0" w:author="Other Side" w:date="2024-04-01T09:00:00Z"><w:p><w:r><w:t>Theirs.</w:t>'
        "</w:r></w:p></w:comment></w:comments>"
    ).encode()
    rels = etree.fromstring(members["word/_rels/document.xml.rels"])
    rel = etree.SubElement(rels, rels[0].tag)
    rel.set("Id", "rId900")
    rel.set("Type", COMMENTS_REL)
    rel.set("Target", "comments.xml")
    members["word/_rels/document.xml.rels"] = etree.tostring(rels, xml_declaration=True, encoding="UTF-8")
    types = etree.fromstring(members["[Content_Types].xml"])
    o = etree.SubElement(types, "{http://schemas.openxmlformats.org/package/2006/content-types}Override")
    o.set("PartName", "/word/comments.xml")
    o.set("ContentType", COMMENTS_CT)
    members["[Content_Types].xml"] = etree.tostring(types, xml_declaration=True, encoding="UTF-8")
    buf = io.BytesIO()
    with zipfile.ZipFile(buf, "w", zipfile.ZIP_DEFLATED) as zf:
        for name, value in members.items():
            zf.writestr(name, value)
    return buf.getvalue()


def test_existing_comments_are_kept_and_ours_get_new_ids(tmp_path, source):
    src = tmp_path / "with-comment.docx"
    src.write_bytes(_with_existing_comment(source.read_bytes()))
    assert validate_docx(src) == []
    blocks, _ = read_docx_blocks(str(src))
    s = blocks[1].text.index("sixty")
    out_path = tmp_path / "out.docx"
    out_path.write_bytes(write_tracked_copy(
        str(src), edits=[BlockEdit(1, s, s + 5, "thirty", comment="Ours.")], stamp=STAMP))
    comments = etree.fromstring(_members(out_path.read_bytes())["word/comments.xml"])
    ids = [c.get(w("id")) for c in comments.findall(w("comment"))]
    assert ids[0] == "0" and len(set(ids)) == 2
    assert validate_docx(out_path) == []
    view = libreoffice().inspect(out_path)
    assert sorted((c["author"], c["content"]) for c in view.comments) == [
        ("Ines Testwright", "Ours."), ("Other Side", "Theirs.")]


def test_libreoffice_reads_the_copy_comments_and_caution_property(tmp_path, source):
    blocks, _ = read_docx_blocks(str(source))
    texts = [b.text for b in blocks]
    s = texts[1].index("sixty (60)")
    out_path = tmp_path / "out.docx"
    out_path.write_bytes(write_tracked_copy(
        str(source),
        edits=[BlockEdit(1, s, s + len("sixty (60)"), "thirty (30)", comment="House position."),
               BlockEdit(2, 0, 5, "", comment="Only a note.", tracked=False)],
        deletions=[BlockDeletion(4, comment="Not acceptable.")],
        insertions=[BlockInsertion(2, "Title passes on payment.", like=2)],
        stamp=STAMP, properties={"Counterdraft caution": "Not legal advice."},
    ))
    assert validate_docx(out_path) == []
    office = libreoffice()
    view = office.inspect(out_path, action="accept")
    assert view.redlines_after == 0
    # Block 3 is the table cell: LibreOffice lists it in the table, not as a body paragraph.
    assert view.paragraphs == [texts[0], texts[1].replace("sixty (60)", "thirty (30)"), texts[2],
                               "Title passes on payment.", texts[5]]
    assert [el["rows"] for el in view.body if el["type"] == "table"] == [[[texts[3]]]]
    assert {c["content"]: c["anchor"] for c in view.comments}["Only a note."] == "Goods"
    assert view.user_properties.get("Counterdraft caution") == "Not legal advice."
    rejected = office.inspect(out_path, action="reject")
    assert rejected.redlines_after == 0
    assert rejected.paragraphs == [texts[0], texts[1], texts[2], texts[4], texts[5]]


def test_a_changed_source_is_refused(source):
    with pytest.raises(CounterdraftError, match="changed since it was read"):
        write_tracked_copy(str(source), stamp=STAMP, expected_blocks=99)


def test_bad_input_is_refused_with_one_line(tmp_path):
    bad = tmp_path / "bad.docx"
    bad.write_bytes(b"not a zip")
    with pytest.raises(CounterdraftError) as err:
        write_tracked_copy(str(bad), stamp=STAMP)
    assert "\n" not in str(err.value) and "bad.docx" in str(err.value)


def test_a_paragraph_whose_words_cross_a_deleted_mark_is_not_edited_blindly(tmp_path):
    """A tracked deletion of a paragraph mark (§17.13.5.15) joins two paragraphs in the
    block text; offsets into that text do not fit either paragraph alone."""
    src = tmp_path / "merged.docx"
    src.write_bytes(docx_bytes(
        '<w:p><w:pPr><w:rPr><w:del w:id="1" w:author="O" w:date="2024-01-01T00:00:00Z"/></w:rPr></w:pPr>'
        '<w:r><w:t xml:space="preserve">First part </w:t></w:r></w:p>'
        '<w:p><w:r><w:t>second part.</w:t></w:r></w:p>'))
    blocks, warnings = read_docx_blocks(str(src))
    assert blocks[1].text == "First part second part." and warnings
    with pytest.raises(CounterdraftError, match="cannot be edited safely"):
        write_tracked_copy(str(src), edits=[BlockEdit(1, 0, 5, "1st")], stamp=STAMP,
                           block_texts={1: blocks[1].text})


def test_changes_meeting_across_paragraph_marks_round_trip_in_libreoffice(tmp_path):
    """Insertions that end one paragraph and start the next, a replacement ending a
    paragraph, and a new paragraph after a paragraph ending in inserted words: the forms
    LibreOffice 7.4 is known to mishandle are written in their equivalent safe form, so
    Accept All and Reject All in LibreOffice give exactly the two texts (ECMA-376 §17.13.5)."""
    src = tmp_path / "in.docx"
    src.write_bytes(docx_bytes(
        "<w:p><w:r><w:t>Alpha beta.</w:t></w:r></w:p>"
        "<w:p><w:r><w:t>Gamma delta.</w:t></w:r></w:p>"
        "<w:p><w:r><w:t>Epsilon zeta.</w:t></w:r></w:p>"
        "<w:p><w:r><w:t>Last words.</w:t></w:r></w:p>"))
    texts = [b.text for b in read_docx_blocks(str(src))[0]]
    out = tmp_path / "out.docx"
    out.write_bytes(write_tracked_copy(
        str(src),
        edits=[BlockEdit(0, 11, 11, " Added at the end."),            # ends paragraph 0 with ins
               BlockEdit(1, 0, 0, "Now "),                            # starts paragraph 1 with ins
               BlockEdit(1, 6, 12, "omega."),                         # replacement ending paragraph 1
               BlockEdit(2, 0, 0, "Then ")],                          # starts paragraph 2 with ins
        insertions=[BlockInsertion(0, "A new paragraph.", like=0)],   # after a paragraph ending in ins
        stamp=STAMP))
    assert validate_docx(out) == []
    office = libreoffice()
    accepted = office.inspect(out, action="accept")
    assert accepted.paragraphs == ["Alpha beta. Added at the end.", "A new paragraph.", "Now Gamma omega.",
                                   "Then Epsilon zeta.", "Last words."]
    rejected = office.inspect(out, action="reject")
    assert rejected.paragraphs == texts


_WORDS = "alpha beta gamma delta epsilon zeta eta theta iota kappa".split()


def _random_draft(r: random.Random, n: int = 30) -> bytes:
    """A draft of *n* paragraphs of plain and bold runs of invented words."""
    body = ""
    for _ in range(n):
        runs = []
        for k in range(r.randint(1, 3)):
            words = (" " if k else "") + " ".join(r.choice(_WORDS) for _ in range(r.randint(1, 4)))
            bold = "<w:rPr><w:b/></w:rPr>" if r.random() < 0.3 else ""
            runs.append(f'<w:r>{bold}<w:t xml:space="preserve">{words}</w:t></w:r>')
        body += "<w:p>" + "".join(runs) + "</w:p>"
    return docx_bytes(body)


def test_random_changes_round_trip_in_libreoffice(tmp_path):
    """Accept All and Reject All in LibreOffice give exactly the decided text and the draft's
    text, for random change patterns (fixed seeds; ECMA-376 Part 1 §17.13.5): word
    insertions, deletions and replacements, also at the very start and end of paragraphs,
    deleted paragraphs and new paragraphs.  The expected texts are computed on plain strings."""
    office = libreoffice()
    for seed in (3, 17):
        r = random.Random(seed)
        edits, deletions, insertions = [], [], []
        accepted: list[str | None] = []
        groups: dict[int, list[str]] = {}
        src = tmp_path / f"in-{seed}.docx"
        src.write_bytes(_random_draft(r))
        texts = [b.text for b in read_docx_blocks(str(src))[0]]
        n = len(texts)
        for i, t in enumerate(texts):
            if r.random() < 0.12 and i < n - 1:
                deletions.append(BlockDeletion(i))
                accepted.append(None)
                continue
            bounds = sorted({0, len(t)} | {m.start() for m in re.finditer(r"\S+", t)}
                            | {m.end() for m in re.finditer(r"\S+", t)})
            points = sorted(r.sample(bounds, min(len(bounds), 2 * r.randint(0, 2))))
            mine = []
            for a, b in zip(points[::2], points[1::2]):
                kind = r.choice(["insert", "delete", "replace"])
                if kind == "insert":
                    mine.append(BlockEdit(i, a, a, r.choice(_WORDS) + " "))
                elif b > a:
                    mine.append(BlockEdit(i, a, b, "" if kind == "delete" else r.choice(_WORDS).upper()))
            if r.random() < 0.3 and not any(e.start == 0 for e in mine):
                mine.append(BlockEdit(i, 0, 0, "Start "))
            if r.random() < 0.3 and not any(e.end == len(t) for e in mine):
                mine.append(BlockEdit(i, len(t), len(t), " end"))
            edits.extend(mine)
            new = t
            for e in sorted(mine, key=lambda e: -e.start):
                new = new[:e.start] + e.replacement + new[e.end:]
            accepted.append(new)
        for i in range(-1, n - 1):
            if r.random() < 0.15:
                groups[i] = [f"New paragraph {i}.{j} {r.choice(_WORDS)}" for j in range(r.randint(1, 2))]
                insertions.extend(BlockInsertion(i, x, like=max(i, 0)) for x in groups[i])
        out = tmp_path / f"out-{seed}.docx"
        out.write_bytes(write_tracked_copy(str(src), edits=edits, deletions=deletions,
                                           insertions=insertions, stamp=STAMP))
        assert validate_docx(out) == []
        expected = list(groups.get(-1, []))
        for i in range(n):
            if accepted[i] is not None:
                expected.append(accepted[i])
            expected.extend(groups.get(i, []))
        view = office.inspect(out, action="accept")
        assert view.redlines_after == 0
        assert view.paragraphs == expected, seed
        view = office.inspect(out, action="reject")
        assert view.redlines_after == 0
        assert view.paragraphs == texts, seed


def test_members_no_part_can_be_named_are_left_out_of_the_copy(tmp_path):
    """Zip members named "../x", "/x", "a\\b" or "C:x" are no parts of a .docx (ECMA-376 Part
    2 §9.1.1.1: a part name is a relative path of non-empty segments other than "." and "..")
    and would land outside the folder of whoever unpacks the copy: they are not copied."""
    from core.docx.tracked import unsafe_part_names
    from tests.support.bad_inputs import healthy_docx, rezip

    bad = {"../escape.txt": b"x", "/etc/owned.txt": b"x", "word\\back.xml": b"x", "C:drive.txt": b"x"}
    src = tmp_path / "draft.docx"
    src.write_bytes(rezip(healthy_docx(), replace=dict(bad)))
    assert sorted(unsafe_part_names(str(src))) == sorted(bad)
    data = write_tracked_copy(str(src), edits=[BlockEdit(0, 4, 12, "Vendor")],
                              stamp=RevisionStamp(author="T", date="2026-01-01T00:00:00Z"))
    with zipfile.ZipFile(io.BytesIO(data)) as zf:
        names = zf.namelist()
    assert not set(bad) & set(names) and "word/document.xml" in names
