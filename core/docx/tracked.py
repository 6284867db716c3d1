"""A copy of an existing .docx with tracked changes and comments written into it.

The counter-draft is the counterparty's own document with our changes as tracked changes
(ECMA-376 Part 1 §17.13.5) and our notes as comments (§17.13.4).  Nothing else changes:

* every zip member other than the main document part, the comments part, the content types,
  the relationships we add to and the custom file properties is copied byte for byte
  (same name, order, timestamp and attributes);
* the main document part is parsed once and re-serialised with its original XML prolog;
  every paragraph we do not edit keeps its exact XML (lxml keeps attribute order, namespace
  prefixes and white space of untouched elements);
* new ``w:id`` values start above every id already in the document and its comments, so
  they never clash with existing bookmarks, comments or revisions.

Callers speak in blocks (:class:`core.model.Block` indices and block-text offsets, the order
of :func:`core.docx.blocks.iter_body_paragraphs`); this module turns them into XML.

Cost: O(size of document.xml) to parse and write, plus the per-paragraph edit cost of
:func:`core.docx.revisions.apply_paragraph_edits`.
"""

from __future__ import annotations

import io
import posixpath
import re
import zipfile
from collections.abc import Mapping, Sequence
from dataclasses import dataclass

from lxml import etree

from ..errors import CounterdraftError
from .blocks import iter_body_paragraphs, paragraph_pieces
from .package import hardened_parser, open_docx_package
from .revisions import (
    Comment,
    IdAllocator,
    RevisionStamp,
    TextEdit,
    anchor_comment,
    apply_paragraph_edits,
    build_comments_part,
    delete_paragraph,
    followed_by_paragraph,
    insert_paragraph_after,
    mark_paragraph,
    max_annotation_id,
    paragraph_runs,
    part_bytes,
    w,
)
from .validate import COMMENTS_CT, COMMENTS_REL
from .writer import CUSTOM_PROPERTIES_CT, CUSTOM_PROPERTIES_REL, custom_properties_xml

__all__ = [
    "BlockDeletion",
    "BlockEdit",
    "BlockInsertion",
    "safe_part_name",
    "unsafe_part_names",
    "write_tracked_copy",
]

_REL_NS = "http://schemas.openxmlformats.org/package/2006/relationships"
_CT_NS = "http://schemas.openxmlformats.org/package/2006/content-types"
_OFFICE_DOC_REL = "http://schemas.openxmlformats.org/officeDocument/2006/relationships/officeDocument"


@dataclass(frozen=True, slots=True)
class BlockEdit:
    """Replace ``blocks[block].text[start:end]`` by ``replacement`` as a tracked change.

    With ``tracked=False`` nothing changes and only ``comment`` is anchored on the words.
    """

    block: int
    start: int
    end: int
    replacement: str = ""
    comment: str | None = None
    tracked: bool = True
    #: Each ``"\\n"`` of ``replacement`` starts a new paragraph (else a line break).
    paragraphs: bool = False


@dataclass(frozen=True, slots=True)
class BlockDeletion:
    """Delete block ``block`` entirely, paragraph mark included, as a tracked change."""

    block: int
    comment: str | None = None


@dataclass(frozen=True, slots=True)
class BlockInsertion:
    """Insert a new paragraph holding ``text`` after block ``after`` (-1: before the first
    block) as a tracked insertion.  It copies the paragraph properties of block ``like``
    (numbering, style, indents) -- pass a neighbour at the same list level -- and the run
    properties of that block's first run.  Several insertions after the same block keep
    their order.  ``numbered=False`` drops ``w:numPr`` from the copied properties."""

    after: int
    text: str
    like: int | None = None
    numbered: bool = True
    comment: str | None = None


def _prolog(data: bytes) -> bytes | None:
    """The bytes before the root element (XML declaration, comments), if UTF-8."""
    if data.startswith((b"\xff\xfe", b"\xfe\xff")):
        return None
    m = re.match(rb"(?:\xef\xbb\xbf)?(?:\s|<\?.*?\?>|<!--.*?-->)*", data, re.DOTALL)
    if m is None:
        return None
    prolog = m.group()
    decl = re.search(rb"encoding\s*=\s*[\"']([^\"']+)", prolog)
    if decl and decl.group(1).lower() not in (b"utf-8", b"utf8"):
        return None
    return prolog


def _serialise(root: etree._Element, original: bytes) -> bytes:
    prolog = _prolog(original)
    if prolog is None:
        return part_bytes(root)
    text: str = etree.tostring(root, encoding="unicode")
    return prolog + text.encode("utf-8")


def _first_run_rpr(p: etree._Element) -> etree._Element | None:
    for run in paragraph_runs(p):
        rpr = run.find(w("rPr"))
        if next(run.iter(w("t")), None) is not None:
            return rpr
    return None


def write_tracked_copy(
    source: str,
    *,
    edits: Sequence[BlockEdit] = (),
    deletions: Sequence[BlockDeletion] = (),
    insertions: Sequence[BlockInsertion] = (),
    stamp: RevisionStamp,
    comment_author: str | None = None,
    properties: Mapping[str, str] | None = None,
    expected_blocks: int | None = None,
    block_texts: Mapping[int, str] | None = None,
) -> bytes:
    """The bytes of a copy of the .docx *source* with the given changes tracked.

    *expected_blocks* (the number of blocks the caller read from *source*) guards against a
    file that changed since it was read; *block_texts* (block index -> the text the offsets
    of its edits refer to) guards each edited paragraph: a paragraph whose own text differs
    (its words sit across a tracked paragraph-mark deletion) is refused rather than edited
    at the wrong place.  Comments are written by *comment_author* (default: the stamp's
    author).  *properties* are added as custom file properties.
    """
    copy = _TrackedCopy(source, stamp=stamp, comment_author=comment_author)
    if expected_blocks is not None and expected_blocks != len(copy.paragraphs):
        raise CounterdraftError("the document changed since it was read; review it again", path=source)
    by_block: dict[int, list[BlockEdit]] = {}
    for e in edits:
        by_block.setdefault(e.block, []).append(e)
    deleted = {d.block: d for d in deletions}
    for index in by_block:
        if index in deleted:
            raise ValueError(f"block {index} is both edited and deleted")
    # Insertions are anchored on the original paragraphs, so do them first (they do not
    # change the original paragraphs' XML), then edits and deletions of originals.
    group_ends = copy.insert(insertions)
    for index, group in sorted(by_block.items()):
        copy.edit(index, group, group_ends=group_ends, by_block=by_block,
                  expected_text=(block_texts or {}).get(index))
    for index, d in sorted(deleted.items()):
        copy.delete(index, d.comment)
    return copy.package(properties)


class _TrackedCopy:
    """One .docx being copied with tracked changes: its main part parsed once, the
    paragraphs in block order, new ids above every existing one, the comments written."""

    def __init__(self, source: str, *, stamp: RevisionStamp, comment_author: str | None) -> None:
        package = open_docx_package(source)  # the safety checks; also parses the main part
        with open(source, "rb") as fh:
            self.zin = zipfile.ZipFile(io.BytesIO(fh.read()))
        self.source = source
        self.infos = self.zin.infolist()
        self.names = {i.filename for i in self.infos}
        self.main_info = next(i for i in self.infos
                              if i.filename.lstrip("/").lower() == package.main_part.lower())
        self.original_main = self.zin.read(self.main_info)
        self.root = etree.fromstring(self.original_main, hardened_parser())
        self.paragraphs = list(iter_body_paragraphs(self.root))
        self.folder, base = posixpath.split(self.main_info.filename)
        self.rels_name = posixpath.join(self.folder, "_rels", base + ".rels")
        self.rels_root = (etree.fromstring(self.zin.read(self.rels_name), hardened_parser())
                          if self.rels_name in self.names else None)
        self.comments_name = None
        if self.rels_root is not None:
            for rel in self.rels_root.iter(f"{{{_REL_NS}}}Relationship"):
                if rel.get("Type") == COMMENTS_REL and rel.get("TargetMode") != "External":
                    self.comments_name = posixpath.normpath(posixpath.join(self.folder, rel.get("Target", "")))
        self.existing_comments = (self.zin.read(self.comments_name)
                                  if self.comments_name in self.names else None)
        comments_root = (etree.fromstring(self.existing_comments, hardened_parser())
                         if self.existing_comments else None)
        self.ids = IdAllocator(max_annotation_id(self.root, comments_root) + 1)
        self.stamp = stamp
        self.author = comment_author or stamp.author
        self.comments: list[Comment] = []

    def new_comment(self, text: str) -> int:
        cid = self.ids.next()
        self.comments.append(Comment(id=cid, author=self.author, date=self.stamp.date, text=text,
                                     initials=_initials(self.author)))
        return cid

    def para(self, index: int) -> etree._Element:
        if not 0 <= index < len(self.paragraphs):
            raise ValueError(f"block {index} is not in the document ({len(self.paragraphs)} blocks)")
        return self.paragraphs[index]

    # -- the changes ------------------------------------------------------------------------
    def insert(self, insertions: Sequence[BlockInsertion]) -> dict[int, etree._Element]:
        """Write the new paragraphs; returns anchor block -> last new paragraph after it (for
        the anchors whose group ends with its own tracked mark)."""
        by_anchor: dict[int, list[BlockInsertion]] = {}
        for ins in insertions:
            by_anchor.setdefault(ins.after, []).append(ins)
        group_ends: dict[int, etree._Element] = {}
        for after, group in by_anchor.items():
            if after < 0 and not self.paragraphs:
                raise ValueError("cannot insert into a document without paragraphs")
            anchor = self.para(after) if after >= 0 else None
            last = None
            for ins in group:
                last = anchor = self._insert_one(ins, anchor)
            if after >= 0 and last is not None:
                group_ends[after] = last
                if not followed_by_paragraph(last):
                    self._mark_anchor_instead(after, last)
                    del group_ends[after]
        return group_ends

    def _insert_one(self, ins: BlockInsertion, anchor: etree._Element | None) -> etree._Element:
        like = self.para(ins.like) if ins.like is not None else (anchor if anchor is not None else self.paragraphs[0])
        ppr = like.find(w("pPr"))
        if ppr is not None and not ins.numbered:
            ppr = _without_numbering(ppr)
        if anchor is None:  # before the first paragraph
            placeholder = etree.Element(w("p"))
            self.paragraphs[0].addprevious(placeholder)
            new_p = insert_paragraph_after(placeholder, ins.text, ppr=ppr, rpr=_first_run_rpr(like),
                                           stamp=self.stamp, ids=self.ids)
            placeholder.getparent().remove(placeholder)
        else:
            new_p = insert_paragraph_after(anchor, ins.text, ppr=ppr, rpr=_first_run_rpr(like),
                                           stamp=self.stamp, ids=self.ids)
        if ins.comment:
            content = [c for c in new_p if c.tag != w("pPr")]
            if content:
                anchor_comment(content[0], content[-1], self.new_comment(ins.comment))
        return new_p

    def _mark_anchor_instead(self, after: int, last: etree._Element) -> None:
        """A paragraph mark before a table (or at the end of a cell or the body) cannot be
        removed by rejecting it: the paragraph has nothing to merge into, and word processors
        leave an empty paragraph behind (LibreOffice 7.4 does, checked on this machine type).
        So the mark that is tracked as inserted is the anchor's own mark (as when a reviewer
        presses Enter at the end of the anchor paragraph), and the last new paragraph keeps an
        untracked mark.  Rejecting then joins the anchor's words with that last mark: the text
        is the draft's again, and the paragraph properties those of the last new paragraph
        (its neighbour's, by the caller)."""
        _unmark_paragraph(last)
        mark_paragraph(self.para(after), "ins", stamp=self.stamp, ids=self.ids)

    def edit(self, index: int, group: Sequence[BlockEdit], *, group_ends: Mapping[int, etree._Element],
             by_block: Mapping[int, Sequence[BlockEdit]], expected_text: str | None) -> None:
        """Write the edits of one paragraph."""
        p = self.para(index)
        own = "".join(piece.text for piece in paragraph_pieces(p))
        if expected_text is not None and own != expected_text:
            raise CounterdraftError(
                f"paragraph {index + 1} cannot be edited safely: its text runs across a "
                "tracked deletion of a paragraph mark; accept or reject the document's own "
                "tracked changes first, then review it again", path=self.source)
        tracked = []
        for e in group:
            cid = self.new_comment(e.comment) if e.comment else None
            if e.tracked:
                tracked.append(TextEdit(e.start, e.end, e.replacement, comment=cid,
                                        paragraphs=e.paragraphs))
            elif cid is not None:
                tracked.append(TextEdit(e.start, e.end, "", comment=cid, track=False))
        if self._next_opens_with_insertion(index, group_ends, by_block):
            tracked = _end_with_deletion(tracked, own)
        apply_paragraph_edits(p, tracked, stamp=self.stamp, ids=self.ids)

    def _next_opens_with_insertion(self, index: int, group_ends: Mapping[int, etree._Element],
                                   by_block: Mapping[int, Sequence[BlockEdit]]) -> bool:
        """Does the paragraph after block *index* open with inserted words?"""
        if index in group_ends:
            return True  # new paragraphs follow it
        if index + 1 >= len(self.paragraphs) or not followed_by_paragraph(self.paragraphs[index]):
            return False
        # A pure insertion there opens it with inserted words; a replacement opens with the
        # deletion (deletion first is the order written unless _end_with_deletion says otherwise).
        return any(e.start == e.end == 0 and e.replacement and e.tracked
                   for e in by_block.get(index + 1, []))

    def delete(self, index: int, comment: str | None) -> None:
        p = self.para(index)
        wrappers = delete_paragraph(p, stamp=self.stamp, ids=self.ids)
        if comment:
            cid = self.new_comment(comment)
            if wrappers:
                anchor_comment(wrappers[0], wrappers[-1], cid)
            else:
                marker = etree.SubElement(p, w("r"))
                anchor_comment(marker, marker, cid)

    # -- the package --------------------------------------------------------------------------
    def package(self, properties: Mapping[str, str] | None) -> bytes:
        """The copy's bytes: every member as it was but the parts we changed or added."""
        replaced: dict[str, bytes] = {self.main_info.filename: _serialise(self.root, self.original_main)}
        added: list[tuple[str, bytes]] = []
        content_types = etree.fromstring(self.zin.read("[Content_Types].xml"), hardened_parser())
        ct_changed = False
        if self.comments:
            ct_changed |= self._comments_part(replaced, added, content_types)
        if properties:
            ct_changed |= self._custom_properties(properties, replaced, added, content_types)
        if ct_changed:
            replaced["[Content_Types].xml"] = part_bytes(content_types)
        buf = io.BytesIO()
        with zipfile.ZipFile(buf, "w") as zout:
            for info in self.infos:
                if not safe_part_name(info.filename):
                    continue  # never copied: see safe_part_name
                data = replaced.get(info.filename)
                zout.writestr(_copy_info(info), data if data is not None else self.zin.read(info))
            for name, data in added:
                info = zipfile.ZipInfo(name, date_time=self.infos[0].date_time if self.infos else (1980, 1, 1, 0, 0, 0))
                info.compress_type = zipfile.ZIP_DEFLATED
                info.external_attr = 0o644 << 16
                zout.writestr(info, data)
        return buf.getvalue()

    def _comments_part(self, replaced: dict[str, bytes], added: list[tuple[str, bytes]],
                       content_types: etree._Element) -> bool:
        name = self.comments_name
        if name is None:
            name = posixpath.join(self.folder, "comments.xml")
            if name in self.names:
                name = posixpath.join(self.folder, "counterdraft-comments.xml")
            rels = self.rels_root
            if rels is None:
                rels = etree.Element(f"{{{_REL_NS}}}Relationships", nsmap={None: _REL_NS})
            _add_relationship(rels, COMMENTS_REL, posixpath.relpath(name, self.folder))
            rels_bytes = part_bytes(rels)
            if self.rels_name in self.names:
                replaced[self.rels_name] = rels_bytes
            else:
                added.append((self.rels_name, rels_bytes))
            added.append((name, build_comments_part(self.comments)))
        else:
            replaced[name] = build_comments_part(self.comments, existing=self.existing_comments)
        return _ensure_override(content_types, name, COMMENTS_CT)

    def _custom_properties(self, properties: Mapping[str, str], replaced: dict[str, bytes],
                           added: list[tuple[str, bytes]], content_types: etree._Element) -> bool:
        pkg_rels = etree.fromstring(self.zin.read("_rels/.rels"), hardened_parser())
        custom_name = None
        for rel in pkg_rels.iter(f"{{{_REL_NS}}}Relationship"):
            if rel.get("Type") == CUSTOM_PROPERTIES_REL:
                custom_name = rel.get("Target", "").lstrip("/")
        if custom_name and custom_name in self.names:
            replaced[custom_name] = custom_properties_xml(properties, existing=self.zin.read(custom_name))
        else:
            custom_name = "docProps/custom.xml"
            if custom_name in self.names:
                custom_name = "docProps/counterdraft-custom.xml"
            _add_relationship(pkg_rels, CUSTOM_PROPERTIES_REL, custom_name)
            replaced["_rels/.rels"] = part_bytes(pkg_rels)
            added.append((custom_name, custom_properties_xml(properties)))
        return _ensure_override(content_types, custom_name, CUSTOM_PROPERTIES_CT)


#: A drive letter at the start of a name ("C:..."): a Windows path, never a part name.
_DRIVE_RE = re.compile(r"^[A-Za-z]:")


def safe_part_name(name: str) -> bool:
    """Can a zip member of this name be copied into the counter-draft?  A part name is a
    relative path with forward slashes and no empty, "." or ".." segment (ECMA-376 Part 2,
    §9.1.1.1); a member named otherwise -- "../x", "/etc/x", "a\\b", "C:x" -- is no part of
    the document, and a file unpacked from ours would land outside its folder, so it is left
    out.  Folder entries ("word/") are kept."""
    if not name or "\\" in name or name.startswith("/") or _DRIVE_RE.match(name):
        return False
    segments = name[:-1].split("/") if name.endswith("/") else name.split("/")
    return all(seg not in ("", ".", "..") for seg in segments)


def unsafe_part_names(source: str) -> tuple[str, ...]:
    """The zip members of *source* that :func:`write_tracked_copy` leaves out."""
    with zipfile.ZipFile(source) as zf:
        return tuple(i.filename for i in zf.infolist() if not safe_part_name(i.filename))


def _end_with_deletion(edits: list[TextEdit], text: str) -> list[TextEdit]:
    """*edits* rewritten so that the paragraph does not end with an insertion.

    Used when the next paragraph opens with inserted words: LibreOffice 7.4 (checked on this
    machine type) joins an insertion ending one paragraph with one opening the next into a
    single change, and rejecting it also removes the paragraph mark between them.  The
    equivalent forms written instead (accepting or rejecting gives the same text):

    * a replacement ending the paragraph is written insertion first, deletion last;
    * a pure insertion at the very end becomes the replacement of the paragraph's last word
      by that word plus the insertion, written the same way;
    * when that replacement would start the paragraph (the paragraph is one word, or the
      whole paragraph is replaced), its first word (or letter) is deleted on its own first,
      so the paragraph does not open with an insertion either: "[del t1][ins new][del t2]".
    """
    last = max(edits, key=lambda e: e.end, default=None)
    if last is None or not last.track or not last.replacement or last.end != len(text) or last.paragraphs:
        return edits
    rest = [e for e in edits if e is not last]
    start, replacement = last.start, last.replacement
    if start == last.end:  # a pure insertion at the end: take in the last word
        m = re.search(r"\S+\s*$", text[: last.end])
        if m is None:
            return edits
        start = m.start()
        if any(e.end > start for e in rest):
            return edits  # another edit holds the last word
        replacement = text[start:last.end] + replacement
    if start == 0 and last.end >= 2:
        m = re.match(r"\S+\s*", text)
        cut = m.end() if m is not None and m.end() < last.end else 1
        return rest + [TextEdit(0, cut, "", comment=last.comment),
                       TextEdit(cut, last.end, replacement, insert_first=True)]
    return rest + [TextEdit(start, last.end, replacement, comment=last.comment, insert_first=True)]


def _unmark_paragraph(p: etree._Element) -> None:
    rpr = p.find(f"{w('pPr')}/{w('rPr')}")
    if rpr is None:
        return
    for mark in [c for c in rpr if c.tag in (w("ins"), w("del"))]:
        rpr.remove(mark)
    if len(rpr) == 0:
        rpr.getparent().remove(rpr)


def _copy_info(info: zipfile.ZipInfo) -> zipfile.ZipInfo:
    out = zipfile.ZipInfo(info.filename, date_time=info.date_time)
    out.compress_type = info.compress_type
    out.external_attr = info.external_attr
    out.create_system = info.create_system
    out.comment = info.comment
    out.extra = b""  # local extra fields (e.g. timestamps) are not part of the content
    return out


def _without_numbering(ppr: etree._Element) -> etree._Element:
    import copy

    out = copy.deepcopy(ppr)
    for el in out.findall(w("numPr")):
        out.remove(el)
    return out


def _add_relationship(rels: etree._Element, rel_type: str, target: str) -> None:
    used = {r.get("Id") for r in rels}
    n = 1
    while f"rIdCd{n}" in used:
        n += 1
    rel = etree.SubElement(rels, f"{{{_REL_NS}}}Relationship")
    rel.set("Id", f"rIdCd{n}")
    rel.set("Type", rel_type)
    rel.set("Target", target)


def _ensure_override(types: etree._Element, part: str, content_type: str) -> bool:
    name = "/" + part.lstrip("/")
    for o in types.iter(f"{{{_CT_NS}}}Override"):
        if o.get("PartName", "").lower() == name.lower():
            if o.get("ContentType") == content_type:
                return False
            o.set("ContentType", content_type)
            return True
    el = etree.SubElement(types, f"{{{_CT_NS}}}Override")
    el.set("PartName", name)
    el.set("ContentType", content_type)
    return True


def _initials(name: str) -> str:
    return "".join(part[0] for part in name.split() if part)[:8].upper()

