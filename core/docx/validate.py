"""Our own structural check of the revision and comment markup in a .docx.

Word processors are lenient: LibreOffice silently accepts a missing or duplicate ``w:id``, a
missing author or date, or ``w:t`` inside ``w:del``, and then behaves unpredictably on
Accept/Reject.  So every output we write is checked here against the rules of ECMA-376
Part 1 §17.13 (annotations):

* every ``w:ins``, ``w:del``, ``w:moveFrom``, ``w:moveTo`` (run level, paragraph mark and
  table row) and every move range start has a numeric ``w:id`` (ST_DecimalNumber), unique
  among all of them, a non-empty ``w:author`` and a ``w:date`` in ISO 8601 form
  (§17.13.5.14, §17.13.5.18, §17.13.5.22, §17.13.5.25 attribute tables; dates are
  ST_DateTime, §17.18.9);
* ``w:delText`` / ``w:delInstrText`` only inside ``w:del`` or ``w:moveFrom`` (§17.3.3.7,
  §17.13.5.13), and no ``w:t`` / ``w:instrText`` there;
* no deletion nested inside a deletion;
* move ranges paired: each ``w:moveFromRangeStart``/``w:moveToRangeStart`` has a matching
  ``...RangeEnd`` with the same ``w:id`` after it, and each move name appears on both sides
  (§17.13.5.23 - §17.13.5.28); moved run content lies inside a range of its kind;
* comments: each ``w:commentRangeStart``, ``w:commentRangeEnd`` and ``w:commentReference``
  refers to a ``w:comment`` of the comments part, range starts precede their ends, and each
  comment has a unique numeric id, an author and a date (§17.13.4.2 - §17.13.4.5); the
  comments part is reachable through a relationship of the main document and has its content
  type (ECMA-376 Part 2, §10.1.2.2).

Cost: one pass over the document tree, O(number of elements).
"""

from __future__ import annotations

import io
import os
import posixpath
import re
import zipfile
from collections.abc import Iterable, Mapping

from lxml import etree

from .revisions import W_NS, w

__all__ = ["COMMENTS_CT", "COMMENTS_REL", "check_revisions", "validate_docx"]

COMMENTS_REL = "http://schemas.openxmlformats.org/officeDocument/2006/relationships/comments"
COMMENTS_CT = "application/vnd.openxmlformats-officedocument.wordprocessingml.comments+xml"
_OFFICE_DOC_REL = "http://schemas.openxmlformats.org/officeDocument/2006/relationships/officeDocument"
_REL_NS = "http://schemas.openxmlformats.org/package/2006/relationships"
_CT_NS = "http://schemas.openxmlformats.org/package/2006/content-types"

#: ST_DateTime as Word writes it: date, time, optional fraction and zone (§17.18.9 refers to
#: XML Schema dateTime).
_DATE_RE = re.compile(r"^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}(\.\d+)?(Z|[+-]\d{2}:\d{2})?$")

_TRACKED = (w("ins"), w("del"), w("moveFrom"), w("moveTo"))
_RANGE_STARTS = (w("moveFromRangeStart"), w("moveToRangeStart"))
_DELETING = (w("del"), w("moveFrom"))


def _where(el: etree._Element) -> str:
    line = el.sourceline
    name = etree.QName(el).localname
    return f"w:{name}" + (f" (line {line})" if line else "")


def _check_stamp(el: etree._Element, problems: list[str], *, need_date: bool = True) -> None:
    author = el.get(w("author"))
    if not author:
        problems.append(f"{_where(el)} has no w:author")
    date = el.get(w("date"))
    if need_date and not date:
        problems.append(f"{_where(el)} has no w:date")
    elif date and not _DATE_RE.match(date):
        problems.append(f"{_where(el)} has a malformed w:date {date!r}")


def _numeric_id(el: etree._Element, problems: list[str]) -> int | None:
    value = el.get(w("id"))
    if value is None:
        problems.append(f"{_where(el)} has no w:id")
        return None
    if not value.isdigit():
        problems.append(f"{_where(el)} has a non-numeric w:id {value!r}")
        return None
    return int(value)


class _Ids:
    """The w:id values claimed so far by revisions and move ranges (unique across both)."""

    def __init__(self, problems: list[str]) -> None:
        self.problems = problems
        self.seen: dict[int, etree._Element] = {}

    def claim(self, el: etree._Element) -> None:
        value = _numeric_id(el, self.problems)
        if value is None:
            return
        if value in self.seen:
            self.problems.append(f"{_where(el)} repeats w:id {value} of {_where(self.seen[value])}")
        else:
            self.seen[value] = el


def _check_tracked(document: etree._Element, ids: _Ids, problems: list[str]) -> None:
    """Revision elements: ids, author and date, no deletion inside a deletion."""
    for el in document.iter(*_TRACKED):
        ids.claim(el)
        _check_stamp(el, problems)
        if el.tag in _DELETING:
            anc = el.getparent()
            while anc is not None:
                if anc.tag in _DELETING:
                    problems.append(f"{_where(el)} is nested inside {_where(anc)}")
                    break
                anc = anc.getparent()


def _check_text_elements(document: etree._Element, problems: list[str]) -> None:
    """Text elements and the tracking that governs them."""
    for el in document.iter(w("t"), w("instrText"), w("delText"), w("delInstrText")):
        deleting = _deleting_ancestor(el)
        if el.tag in (w("t"), w("instrText")) and deleting is not None:
            problems.append(f"{_where(el)} inside {_where(deleting)}: deleted text must be w:delText")
        if el.tag in (w("delText"), w("delInstrText")) and deleting is None:
            problems.append(f"{_where(el)} outside any w:del or w:moveFrom")


def _range_ends(document: etree._Element, problems: list[str]) -> dict[tuple[str, str], etree._Element]:
    """The move range ends by (kind, w:id)."""
    ends: dict[tuple[str, str], etree._Element] = {}
    for kind in ("moveFrom", "moveTo"):
        for el in document.iter(w(f"{kind}RangeEnd")):
            value = el.get(w("id"))
            if value is None:
                problems.append(f"{_where(el)} has no w:id")
            else:
                ends[(kind, value)] = el
    return ends


def _check_moves(document: etree._Element, order: Mapping[etree._Element, int], ids: _Ids,
                 problems: list[str]) -> None:
    """Move ranges: each start paired with its end after it, both sides of a move named
    alike, and every moved run inside a range of its kind."""
    ends = _range_ends(document, problems)
    names: dict[str, set[str]] = {"moveFrom": set(), "moveTo": set()}
    open_ranges: dict[str, list[tuple[int, int]]] = {"moveFrom": [], "moveTo": []}
    for el in document.iter(*_RANGE_STARTS):
        kind = "moveFrom" if el.tag == w("moveFromRangeStart") else "moveTo"
        ids.claim(el)
        _check_stamp(el, problems)
        name = el.get(w("name"))
        if not name:
            problems.append(f"{_where(el)} has no w:name")
        else:
            names[kind].add(name)
        end = ends.pop((kind, el.get(w("id")) or ""), None)
        if end is None:
            problems.append(f"{_where(el)} w:id {el.get(w('id'))} has no matching w:{kind}RangeEnd")
        elif order[end] < order[el]:
            problems.append(f"{_where(end)} comes before its range start")
        else:
            open_ranges[kind].append((order[el], order[end]))
    for (kind, value), el in ends.items():
        problems.append(f"{_where(el)} w:id {value} has no matching w:{kind}RangeStart")
    for name in names["moveFrom"] ^ names["moveTo"]:
        problems.append(f"move {name!r} has only one side (w:moveFrom and w:moveTo ranges pair by w:name)")
    for kind in ("moveFrom", "moveTo"):
        for el in document.iter(w(kind)):
            if el.getparent() is not None and el.getparent().tag == w("rPr"):
                continue  # a paragraph mark: logically at the paragraph's end
            pos = order[el]
            if not any(a < pos < b for a, b in open_ranges[kind]):
                problems.append(f"{_where(el)} lies outside every w:{kind}RangeStart/End range")


def _comment_ids(comments: etree._Element, problems: list[str]) -> set[str]:
    """The ids of the comments part's comments (each once, with author and date)."""
    known: set[str] = set()
    for c in comments.iter(w("comment")):
        value = _numeric_id(c, problems)
        _check_stamp(c, problems)
        if value is None:
            continue
        if str(value) in known:
            problems.append(f"{_where(c)} repeats comment id {value}")
        known.add(str(value))
    return known


def _check_comment_marks(value: str, by_tag: Mapping[str, list[etree._Element]],
                         order: Mapping[etree._Element, int], problems: list[str]) -> None:
    """One comment's range start, end and reference in the document."""
    starts = by_tag.get("commentRangeStart", [])
    ends_ = by_tag.get("commentRangeEnd", [])
    if len(starts) > 1 or len(ends_) > 1:
        problems.append(f"comment id {value} has more than one range start or end")
    if starts and ends_ and order[ends_[0]] < order[starts[0]]:
        problems.append(f"comment id {value}: range end before range start")
    if bool(starts) != bool(ends_):
        problems.append(f"comment id {value}: range start and end must both be present")
    if "commentReference" not in by_tag:
        problems.append(f"comment id {value} has no w:commentReference")


def _check_comments(document: etree._Element, comments: etree._Element | None, comments_expected: bool | None,
                    order: Mapping[etree._Element, int], problems: list[str]) -> None:
    """Comment ranges and references against the comments part."""
    refs: dict[str, dict[str, list[etree._Element]]] = {}
    for tag in ("commentRangeStart", "commentRangeEnd", "commentReference"):
        for el in document.iter(w(tag)):
            value = el.get(w("id"))
            if value is None:
                problems.append(f"{_where(el)} has no w:id")
                continue
            refs.setdefault(value, {}).setdefault(tag, []).append(el)
    known: set[str] = set()
    if comments is not None:
        known = _comment_ids(comments, problems)
    elif refs and comments_expected is not False:
        problems.append("the document refers to comments but has no comments part")
    for value, by_tag in refs.items():
        if comments is not None and value not in known:
            problems.append(f"comment id {value} is used in the document but not in the comments part")
        _check_comment_marks(value, by_tag, order, problems)
    if comments is not None:
        for value in known - set(refs):
            problems.append(f"comment id {value} is never referenced from the document")


def check_revisions(document: etree._Element, *, comments: etree._Element | None = None,
                    comments_expected: bool | None = None) -> list[str]:
    """Problems found in the revision and comment markup of a main document part (and its
    comments part, if any).  An empty list means the markup passed every rule."""
    problems: list[str] = []
    ids = _Ids(problems)
    _check_tracked(document, ids, problems)
    _check_text_elements(document, problems)
    order = {el: i for i, el in enumerate(document.iter())}
    _check_moves(document, order, ids, problems)
    _check_comments(document, comments, comments_expected, order, problems)
    return problems


def _deleting_ancestor(el: etree._Element) -> etree._Element | None:
    cur = el.getparent()
    while cur is not None:
        if cur.tag in _DELETING:
            return cur
        if cur.tag == w("p"):
            return None
        cur = cur.getparent()
    return None


def _parser() -> etree.XMLParser:
    return etree.XMLParser(resolve_entities=False, no_network=True, load_dtd=False)


def _rels(zf: zipfile.ZipFile, name: str) -> Iterable[etree._Element]:
    try:
        data = zf.read(name)
    except KeyError:
        return []
    rels: Iterable[etree._Element] = etree.fromstring(data, _parser()).iter(f"{{{_REL_NS}}}Relationship")
    return rels


def validate_docx(source: str | os.PathLike[str] | bytes) -> list[str]:
    """Problems in the revision and comment markup of a whole .docx (path or bytes)."""
    if isinstance(source, bytes):
        data = source
    else:
        with open(source, "rb") as fh:
            data = fh.read()
    with zipfile.ZipFile(io.BytesIO(data)) as zf:
        main = "word/document.xml"
        for rel in _rels(zf, "_rels/.rels"):
            if rel.get("Type") == _OFFICE_DOC_REL:
                main = rel.get("Target", main).lstrip("/")
        document = etree.fromstring(zf.read(main), _parser())
        folder, base = posixpath.split(main)
        comments_name = None
        for rel in _rels(zf, posixpath.join(folder, "_rels", base + ".rels")):
            if rel.get("Type") == COMMENTS_REL:
                comments_name = posixpath.normpath(posixpath.join(folder, rel.get("Target", "")))
        comments = None
        problems: list[str] = []
        if comments_name is not None:
            try:
                comments = etree.fromstring(zf.read(comments_name), _parser())
            except KeyError:
                problems.append(f"the comments relationship points at a missing part {comments_name}")
            types = etree.fromstring(zf.read("[Content_Types].xml"), _parser())
            declared = {o.get("PartName", "").lstrip("/"): o.get("ContentType")
                        for o in types.iter(f"{{{_CT_NS}}}Override")}
            if declared.get(comments_name) != COMMENTS_CT:
                problems.append(f"{comments_name} lacks the comments content type override")
        elif "word/comments.xml" in zf.namelist() and document.find(f".//{{{W_NS}}}commentReference") is not None:
            problems.append("word/comments.xml exists but no relationship points at it")
    problems.extend(check_revisions(document, comments=comments))
    return problems
