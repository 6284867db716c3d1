"""Read plain-text (.txt) and Markdown (.md) agreements into :class:`~core.model.Block`.

One block per paragraph.  Plain text comes in two shapes and both are handled:

* **hard-wrapped** (license texts, e-mails): paragraphs separated by blank lines, lines
  wrapped at a fixed width.  The lines of a paragraph are joined with single spaces; a line
  break inside a group of lines is kept as a paragraph break after a short line (a title or
  heading) or where a sentence ends and the next word would have fitted on the line (a
  greedy wrapper would not have broken there: a list item after "shall:"); see
  :func:`_breaks_before`.
* **one paragraph per line** (what word processors write when saving as text): every line
  is a paragraph.

The shape is decided once per file from the line lengths (see :func:`_wrap_width`).
Literal number labels stay in the text (``"7.2 The Supplier ..."``): the structure module
reads them.  Headings underlined with ``===`` or ``---`` (setext style) and lines framed in
an asterisk box (``* ... *``, as the MPL 2.0 prints its disclaimers) are unwrapped.

Markdown adds: ``#`` headings (``Block.outline_level`` = number of ``#``), setext headings
(``===`` level 1, ``---`` level 2), ``**bold**`` / ``__bold__`` lead-ins (``Block.lead``) and
whole-bold lines (``Block.emphasised``), bullets (``Block.bullet``, marker removed), ordered
list markers kept as literal labels, tables (one block per row, cells joined by tabs,
``in_table``), block quotes, links and inline emphasis reduced to their text.  Markdown's
own rule applies to line breaks: the lines of a paragraph are joined, except where a line
starts a list item, a heading, or a number label after a line that ends a sentence.

Decoding: UTF-8 (a byte-order mark is skipped), UTF-16 with a byte-order mark, else
Windows-1252, else Latin-1 (with a warning).  Empty files and binary files (NUL bytes,
control characters, or the signature of a zip / OLE / PDF file) are refused with a
:class:`~core.errors.CounterdraftError`.

Cost: O(n) in the size of the text (a constant number of passes over the lines).
"""

from __future__ import annotations

import codecs
import re
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path

from .errors import CounterdraftError
from .lazyre import lazy_compile
from .model import Block
from .structure import is_upper_text, parse_label

__all__ = [
    "MAX_TEXT_BYTES",
    "decode_text",
    "read_text_blocks",
    "read_text_file",
]

#: Largest text file read.  A 100-page agreement is about 300 KB of text; 50 MiB is far
#: beyond any agreement and keeps memory bounded for a mistaken input.
MAX_TEXT_BYTES = 50 * 1024 * 1024
#: A file whose wrapped lines are wider than this is not hard-wrapped (plain-text wrap
#: widths are 72-80 columns by convention; common practice, no source).
MAX_WRAP_COLUMNS = 100
#: ... and a text whose lines stay under this many columns is a list of short lines, not
#: wrapped prose (wrap widths are 60-80 columns; common practice, no source).
MIN_WRAP_COLUMNS = 40
#: Share of the lines inside paragraphs that must come close to the wrap width for a file
#: to count as hard-wrapped; close = at least WRAP_FILL_FRACTION of the width.  In wrapped
#: text nearly every non-final line does (the three license texts: over 90%).
MIN_WRAPPED_SHARE = 0.5
WRAP_FILL_FRACTION = 0.6
#: In wrapped text a line shorter than this fraction of the wrap width ends its paragraph
#: when the next line starts with a capital (a title or heading line; wrapped lines are
#: nearly full).  Common practice, no source.
SHORT_LINE_FRACTION = 0.5
#: Lines indented at least this much on both sides of a break are centred title lines
#: (paragraph and hanging indents are 2-10 columns in the license texts).
CENTRED_INDENT = 12
#: An underlined (setext) heading is at most this many lines and characters; a rule of
#: dashes under a longer paragraph is a separator (MPL 2.0's longest: one line, 70 chars).
MAX_SETEXT_LINES = 3
MAX_SETEXT_CHARS = 200
#: Binary detection: more than this share of control characters (other than tab, newline,
#: carriage return, form feed, vertical tab) means "not a text file".
MAX_CONTROL_SHARE = 0.01

_BINARY_SIGNATURES: tuple[tuple[bytes, str], ...] = (
    (b"PK\x03\x04", "a zip archive (a .docx saved with the wrong name?), not plain text"),
    (b"\xd0\xcf\x11\xe0\xa1\xb1\x1a\xe1", "an OLE compound file (legacy .doc?), not plain text"),
    (b"%PDF-", "a PDF file, not plain text"),
    (b"{\\rtf", "an RTF file, not plain text; save it as .docx or .txt"),
)


def decode_text(data: bytes, *, path: str) -> tuple[str, tuple[str, ...]]:
    """Decode the bytes of a text file: (text, warnings).  Raises CounterdraftError."""
    if not data.strip():
        raise CounterdraftError("the file is empty", path=path)
    for sig, what in _BINARY_SIGNATURES:
        if data.startswith(sig):
            raise CounterdraftError(f"the file is {what}", path=path)
    if data.startswith((codecs.BOM_UTF16_LE, codecs.BOM_UTF16_BE)):
        try:
            text = data.decode("utf-16")
        except UnicodeDecodeError:
            raise CounterdraftError("the file starts like UTF-16 text but does not decode", path=path) from None
        return _check_text(text, path=path), ()
    if b"\x00" in data:
        raise CounterdraftError("not a text file (it contains binary data)", path=path)
    warnings: tuple[str, ...] = ()
    if data.startswith(codecs.BOM_UTF8):
        data = data[len(codecs.BOM_UTF8):]
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError:
        try:
            text = data.decode("cp1252")
            warnings = ("the file is not UTF-8; it was read as Windows-1252",)
        except UnicodeDecodeError:
            text = data.decode("latin-1")
            warnings = ("the file is not UTF-8; it was read as Latin-1",)
    return _check_text(text, path=path), warnings


def _check_text(text: str, *, path: str) -> str:
    if not text.strip():
        raise CounterdraftError("the file is empty", path=path)
    controls = sum(1 for ch in text if ord(ch) < 32 and ch not in "\t\n\r\f\v")
    if controls > MAX_CONTROL_SHARE * len(text):
        raise CounterdraftError("not a text file (it contains binary data)", path=path)
    return text


def read_text_file(path: str, *, markdown: bool = False) -> tuple[tuple[Block, ...], tuple[str, ...]]:
    """Read a .txt or .md file into blocks: (blocks, warnings).  Never modifies the file."""
    p = Path(path)
    try:
        size = p.stat().st_size
        if size > MAX_TEXT_BYTES:
            raise CounterdraftError(
                f"the file is too large for a text agreement ({size} bytes; limit {MAX_TEXT_BYTES})",
                path=path)
        with open(p, "rb") as fh:
            data = fh.read(MAX_TEXT_BYTES + 1)
    except CounterdraftError:
        raise
    except OSError as err:
        raise CounterdraftError(f"cannot read the file ({err.strerror or err})", path=path) from None
    text, warnings = decode_text(data, path=path)
    blocks = read_text_blocks(text, markdown=markdown)
    if not blocks:
        raise CounterdraftError("the file has no text", path=path)
    return blocks, warnings


# --------------------------------------------------------------------------------------
# Lines
# --------------------------------------------------------------------------------------


@dataclass(slots=True)
class _Line:
    raw: str  # without the newline, tabs kept
    blank: bool = False
    #: Set on the lines of a heading: 1/2 for setext (=== / ---), 1..6 for ATX (#).
    heading: int | None = None
    #: Markdown construct that always stands alone: "atx", "bullet", "ordered", "table", "code".
    md: str | None = None
    bullet_text: str | None = None

    @property
    def stripped(self) -> str:
        return self.raw.strip()

    @property
    def columns(self) -> int:
        return len(self.raw.rstrip().expandtabs(8))


_SETEXT_RE = lazy_compile(r"^\s{0,3}(=+|-+)\s*$")
_BOX_BORDER_RE = lazy_compile(r"^\s*(\*{10,})\s*$")
_BOX_INNER_RE = lazy_compile(r"^\s*\*(.*)\*\s*$")
_ATX_RE = lazy_compile(r"^\s{0,3}(#{1,6})\s+(.*?)(?:\s+#+)?\s*$")
_HR_RE = lazy_compile(r"^\s{0,3}([-*_])(?:\s*\1){2,}\s*$")
_BULLET_RE = lazy_compile(r"^\s*(?:[-*+•◦▪‣●]|\u2013)\s+(?P<text>\S.*)$")
_TXT_BULLET_RE = lazy_compile(r"^\s*[•◦▪‣●]\s+(?P<text>\S.*)$")
_ORDERED_RE = lazy_compile(r"^\s*\d{1,3}[.)]\s+\S")
_TABLE_RE = lazy_compile(r"^\s*\|.*\|\s*$")
_TABLE_SEP_RE = lazy_compile(r"^\s*\|?\s*:?-{2,}:?\s*(?:\|\s*:?-{2,}:?\s*)*\|?\s*$")
_FENCE_RE = lazy_compile(r"^\s{0,3}(```|~~~)")
_FRONT_MATTER_MAX_LINES = 60


def _split_lines(text: str) -> list[str]:
    text = text.replace("\r\n", "\n").replace("\r", "\n")
    text = text.replace("\f", "\n\n").replace("\v", "\n").replace("\u2028", "\n").replace("\u2029", "\n\n")
    if text.startswith("\ufeff"):
        text = text[1:]
    return text.split("\n")


def _unbox(raws: list[str]) -> list[str]:
    """Remove asterisk frames: a border line, lines ``* ... *`` and a closing border."""
    out = list(raws)
    i = 0
    n = len(out)
    while i < n:
        if _BOX_BORDER_RE.match(out[i]):
            j = i + 1
            while j < n and not _BOX_BORDER_RE.match(out[j]) and _BOX_INNER_RE.match(out[j]):
                j += 1
            if j < n and j > i + 1 and _BOX_BORDER_RE.match(out[j]):
                out[i] = ""
                for k in range(i + 1, j):
                    m = _BOX_INNER_RE.match(out[k])
                    out[k] = m.group(1).rstrip() if m else out[k]
                out[j] = ""
                i = j + 1
                continue
        i += 1
    return out


def _skip_front_matter(raws: list[str]) -> list[str]:
    """Drop a YAML front-matter block (``---`` ... ``---`` at the very top) of a .md file."""
    if raws and raws[0].strip() == "---":
        for k in range(1, min(len(raws), _FRONT_MATTER_MAX_LINES)):
            if raws[k].strip() in ("---", "..."):
                return [""] * (k + 1) + raws[k + 1:]
    return raws


def _classify(raws: list[str], *, markdown: bool) -> list[_Line]:
    lines: list[_Line] = []
    in_code = False
    for raw in raws:
        if markdown and _FENCE_RE.match(raw):
            in_code = not in_code
            lines.append(_Line("", blank=True))
            continue
        if in_code:
            lines.append(_Line(raw, blank=not raw.strip(), md="code"))
            continue
        if markdown:
            raw = re.sub(r"^\s{0,3}(?:>\s?)+", "", raw)  # block quote markers
        if not raw.strip():
            lines.append(_Line(raw, blank=True))
            continue
        m = _SETEXT_RE.match(raw)
        if m and len(m.group(1)) >= 3 and lines and not lines[-1].blank and lines[-1].md is None:
            _underlined(lines, 1 if m.group(1)[0] == "=" else 2)
            lines.append(_Line("", blank=True))
            continue
        line = _markdown_line(raw) if markdown else _text_line(raw)
        if line is not None:
            lines.append(line)
    return lines


def _underlined(lines: list[_Line], level: int) -> None:
    """A setext underline below *lines*: the paragraph above it (a few short lines) is a
    heading of *level*; under a longer paragraph the underline is a separator rule."""
    k = len(lines) - 1
    while k >= 0 and not lines[k].blank and lines[k].md is None and lines[k].heading is None:
        k -= 1
    above = lines[k + 1:]
    chars = sum(len(ln.stripped) for ln in above)
    if above and len(above) <= MAX_SETEXT_LINES and chars <= MAX_SETEXT_CHARS:
        for ln in above:
            ln.heading = level


def _markdown_line(raw: str) -> _Line | None:
    """The line *raw* of a Markdown text (not blank, no setext underline); None for a line
    that is dropped (a table's separator row)."""
    if _HR_RE.match(raw):
        return _Line("", blank=True)
    atx = _ATX_RE.match(raw)
    if atx:
        return _Line(raw, md="atx", heading=len(atx.group(1)))
    if _TABLE_RE.match(raw):
        return None if _TABLE_SEP_RE.match(raw) else _Line(raw, md="table")
    mb = _BULLET_RE.match(raw)
    if mb:
        return _Line(raw, md="bullet", bullet_text=mb.group("text"))
    if _ORDERED_RE.match(raw):
        return _Line(raw, md="ordered")
    return _Line(raw)


def _text_line(raw: str) -> _Line:
    """The line *raw* of a plain text (not blank, no setext underline)."""
    mb = _TXT_BULLET_RE.match(raw)
    if mb:
        return _Line(raw, md="bullet", bullet_text=mb.group("text"))
    return _Line(raw)


def _wrap_width(lines: Sequence[_Line]) -> int | None:
    """The wrap width of a hard-wrapped text, or None when lines are paragraphs.

    Looks at lines followed by another line of the same paragraph group: in wrapped text
    most of them come close to one width (the 90th percentile of their lengths).
    """
    filled_rows = [i for i, ln in enumerate(lines) if not ln.blank]
    if not filled_rows:
        return None
    first, last = filled_rows[0], filled_rows[-1]
    if not any(lines[i].blank for i in range(first, last)):
        return None  # no blank line between paragraphs: one paragraph per line
    inner = [lines[i].columns for i in range(len(lines) - 1)
             if not lines[i].blank and not lines[i + 1].blank and lines[i].md is None
             and lines[i + 1].md is None and lines[i].heading is None]
    if len(inner) < 2:
        return None
    ordered = sorted(inner)
    width = ordered[int(0.9 * (len(ordered) - 1))]
    if not MIN_WRAP_COLUMNS <= width <= MAX_WRAP_COLUMNS:
        return None
    filled = sum(1 for c in inner if c >= WRAP_FILL_FRACTION * width)
    if filled < MIN_WRAPPED_SHARE * len(inner):
        return None
    return width


_SENTENCE_END = (".", ":", ";", "?", "!", ".\"", ".”", ":\"")
#: How a list item ends before the next item: "...; and" / "...; or" / "..., and/or".
_ITEM_END_RE = lazy_compile(r"[;,]\s*(?:and|or|and/or|but)$")


def _indent(line: _Line) -> int:
    return len(line.raw.expandtabs(8)) - len(line.raw.expandtabs(8).lstrip())


def _breaks_before(prev: _Line, line: _Line, *, width: int | None, group_width: int,
                   markdown: bool) -> bool:
    """Does *line* start a new paragraph although no blank line separates it from *prev*?

    Hard-wrapped text (``width`` is its wrap width) breaks a paragraph inside a group of
    lines when

    * the line before is short (under SHORT_LINE_FRACTION of the width: a title, a
      heading) and the line does not start in lower case, or both lines are centred;
    * the line before ends a sentence or a lead-in (``.``, ``:``, ``;``; before a number
      label also a list item's ``; and`` / ``; or``) and the line's
      first word would have fitted on it (a greedy wrapper, which is what every
      plain-text wrapper is, would not have broken there; *group_width*, the widest line of
      the group, is a lower bound of the fill column) and the line starts with a capital,
      a digit, a quote or a number label.

    Everything else is a wrap: ``"1.1. "Contributor"`` / ``means ...`` stays one paragraph.
    """
    if line.md is not None or prev.md in ("atx", "table", "code"):
        return True  # a list item, heading, table row or code line stands alone
    if line.heading != prev.heading:
        return True
    if not markdown and width is None:
        return True  # one paragraph per line
    s = line.stripped
    p = prev.stripped
    label = parse_label(s)
    ends = p.endswith(_SENTENCE_END) or (label is not None and _ITEM_END_RE.search(p) is not None)
    if markdown:
        return label is not None and ends
    assert width is not None
    lower = s[:1].islower() and label is None
    if len(p) < SHORT_LINE_FRACTION * width:
        if not lower:
            return True
        if _indent(prev) >= CENTRED_INDENT and _indent(line) >= CENTRED_INDENT:
            return True
    if lower or not ends:
        return False
    return prev.columns + 1 + len(s.split()[0]) <= group_width


def _join(lines: Sequence[_Line]) -> str:
    out = ""
    for ln in lines:
        s = ln.stripped
        if not out:
            out = s
        elif out.endswith("-") and len(out) > 1 and out[-2].isalpha() and s[:1].islower():
            out += s  # a word hyphenated across lines keeps its hyphen, loses the break
        else:
            out += " " + s
    return out


# --------------------------------------------------------------------------------------
# Markdown inline markup
# --------------------------------------------------------------------------------------

_MD_ESCAPE_RE = lazy_compile(r"\\([\\`*_{}\[\]()#+\-.!|>~])")
_MD_IMAGE_RE = lazy_compile(r"!\[([^\]]*)\]\([^)]*\)")
_MD_LINK_RE = lazy_compile(r"\[([^\]]+)\]\([^)]*\)")
_MD_CODE_RE = lazy_compile(r"`([^`]*)`")
_MD_BOLD_RE = lazy_compile(r"(\*\*|__)(?=\S)(.+?)(?<=\S)\1")
_MD_ITALIC_STAR_RE = lazy_compile(r"(?<![\w*])\*(?=\S)(.+?)(?<=\S)\*(?![\w*])")
_MD_ITALIC_UNDER_RE = lazy_compile(r"(?<![\w_])_(?=\S)(.+?)(?<=\S)_(?![\w_])")
_MD_STRIKE_RE = lazy_compile(r"~~(.+?)~~")


def _md_plain(text: str) -> str:
    """Markdown inline markup reduced to the text it displays."""
    escapes: list[str] = []
    # A private-use character the text does not contain marks where escapes were.
    placeholder = next(chr(c) for c in range(0xE000, 0xF900) if chr(c) not in text)

    def keep(m: re.Match[str]) -> str:
        escapes.append(m.group(1))
        return placeholder

    t = _MD_ESCAPE_RE.sub(keep, text)
    t = _MD_CODE_RE.sub(lambda m: m.group(1), t)
    t = _MD_IMAGE_RE.sub(lambda m: m.group(1), t)
    t = _MD_LINK_RE.sub(lambda m: m.group(1), t)
    t = _MD_BOLD_RE.sub(lambda m: m.group(2), t)
    t = _MD_ITALIC_STAR_RE.sub(lambda m: m.group(1), t)
    t = _MD_ITALIC_UNDER_RE.sub(lambda m: m.group(1), t)
    t = _MD_STRIKE_RE.sub(lambda m: m.group(1), t)
    t = re.sub(r"<br\s*/?>", "\n", t)
    it = iter(escapes)
    return re.sub(re.escape(placeholder), lambda _m: next(it), t)


def _md_emphasis(text: str) -> tuple[str | None, bool]:
    """(lead, emphasised) of a markdown paragraph: a leading bold span followed by more text
    is a lead-in; a paragraph that is one bold span is emphasised.  A literal number label
    before the bold span is allowed (``7. **Price.** The ...``)."""
    body = text.strip()
    label = parse_label(body)
    start = label.end if label is not None else 0
    seg = body[start:].lstrip()
    m = _MD_BOLD_RE.match(seg)
    if m is None:
        m2 = _MD_BOLD_RE.match(body)  # "**7. Price.** The ..."
        if m2 is None:
            return None, False
        m, seg = m2, body
    tail = seg[m.end():].strip()
    inner = _md_plain(m.group(2)).strip()
    if not tail:
        return None, True
    if tail[:1] in ".:":  # "**Price**. The ..." -> the separator belongs to the lead
        inner += tail[0]
    return inner, False


# --------------------------------------------------------------------------------------
# Blocks
# --------------------------------------------------------------------------------------


def _make_block(index: int, lines: Sequence[_Line], *, markdown: bool) -> Block | None:
    first = lines[0]
    heading = first.heading
    bullet = first.md == "bullet"
    in_table = first.md == "table"
    if first.md == "atx":
        m = _ATX_RE.match(first.raw)
        raw = m.group(2) if m else first.stripped
    elif bullet:
        raw = _join([_Line(first.bullet_text or "")] + list(lines[1:]))
    elif in_table:
        cells = [c.strip() for c in first.stripped.strip("|").split("|")]
        raw = "\t".join(cells)
    elif first.md == "code":
        raw = first.raw.rstrip()
    else:
        raw = _join(lines)
    lead = None
    emphasised = heading is not None and not markdown
    if markdown and first.md != "code":
        lead, bold_all = _md_emphasis(raw)
        emphasised = emphasised or bold_all
        text = _md_plain(raw)
    else:
        text = raw
    text = text.strip()
    if not text:
        return None
    return Block(
        index=index,
        text=text,
        bullet=bullet,
        outline_level=heading if markdown else None,
        lead=lead,
        emphasised=emphasised,
        all_caps=is_upper_text(text),
        in_table=in_table,
    )


def read_text_blocks(text: str, *, markdown: bool = False) -> tuple[Block, ...]:
    """The paragraphs of a plain-text (or, with ``markdown=True``, Markdown) document."""
    raws = _split_lines(text)
    if markdown:
        raws = _skip_front_matter(raws)
    raws = _unbox(raws)
    lines = _classify(raws, markdown=markdown)
    width = _wrap_width(lines)
    blocks: list[Block] = []
    group: list[_Line] = []

    def flush() -> None:
        if group:
            block = _make_block(len(blocks), group, markdown=markdown)
            if block is not None:
                blocks.append(block)
            group.clear()

    # The widest line of each run of non-blank lines (the group a line belongs to).
    group_width = [0] * len(lines)
    start = 0
    for i in range(len(lines) + 1):
        if i == len(lines) or lines[i].blank:
            widest = max((lines[k].columns for k in range(start, i)), default=0)
            for k in range(start, i):
                group_width[k] = widest
            start = i + 1

    for i, line in enumerate(lines):
        if line.blank:
            flush()
            continue
        if group and _breaks_before(group[-1], line, width=width, group_width=group_width[i],
                                    markdown=markdown):
            flush()
        group.append(line)
    flush()
    return tuple(blocks)
