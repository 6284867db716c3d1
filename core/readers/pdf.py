"""The PDF reader: the text layer of a PDF (ISO 32000) read with pdfplumber.

A PDF holds characters placed on pages, nothing more: no paragraphs, styles or numbering.
This module turns the characters into :class:`core.layout.lines.Line` objects -- one per
printed line, with its position, font size, bold and italic share -- and hands them to the
page clean-up and the line labeller (:func:`core.layout.assemble.blocks_from_lines`), which
drop running headers, footers and page numbers, join lines into paragraphs, undo end-of-line
hyphenation and find where provisions, labels and headings start.

What it reads:

* characters of upright text (rotated text -- margin notes, watermarks -- is left out, with
  a warning), duplicates printed on top of each other (fake bold) counted once;
* word spaces: the space characters the file has, and a space wherever the gap between two
  characters is wider than :data:`SPACE_GAP` of the font size (files without space
  characters); a wide gap without a space character after the first word of a line (a tab
  after a number label) becomes a tab;
* ligature characters (U+FB00-FB06) written as their letters; a soft hyphen (U+00AD) at the
  end of a line joins the word;
* ruled tables (pdfplumber's line-based table finder): one line per row, the cells' text
  kept apart (the reader writes a row as cells separated by tabs).

Refused, in one line naming the file (exit 2 on the command line): a file that is not a PDF
or is damaged, a password-protected PDF, more than :data:`MAX_PDF_PAGES` pages, and a PDF
without a text layer (a scan: Counterdraft does not read text from images -- no OCR).

Cost: pdfplumber's layout analysis is linear in the characters of the file; about 0.05 s a
page on the test machine.
"""

from __future__ import annotations

import os
import re
import statistics
from collections.abc import Iterable, Sequence
from dataclasses import dataclass, field
from typing import Any

from ..errors import CounterdraftError
from ..layout.lines import Line
from ..model import Block

__all__ = ["MAX_PDF_BYTES", "MAX_PDF_PAGES", "SPACE_GAP", "pdf_lines", "read_blocks"]

#: Largest PDF read: an agreement of a few hundred pages with images stays far below it.
MAX_PDF_BYTES = 256 << 20
#: Most pages read: a long agreement with its schedules runs to a few hundred pages.
MAX_PDF_PAGES = 2000
#: A gap wider than this share of the font size between two characters is a word space when
#: the file has no space character there (a space is 0.25-0.33 em in common text fonts;
#: letter spacing inside a word stays below 0.1 em; common practice, no source).
SPACE_GAP = 0.18
#: ... and in a line that has space characters, a gap only counts as a space when it is
#: wider than this share (kerning and justification leave narrower gaps inside words).
SPACE_GAP_EXPLICIT = 0.15
#: A gap after a line's first word wider than this many spaces is a tab (a number label set
#: to a tab stop: "1<tab>Definitions"); justified text stretches spaces to about twice.
TAB_GAP_SPACES = 3.0
#: Vertical tolerance (points) when grouping characters into lines (pdfplumber's default).
Y_TOLERANCE = 3.0
#: Characters closer than this (points) with the same text and font are one character
#: printed twice (a fake bold).
DEDUPE_TOLERANCE = 1.0

_BOLD_RE = re.compile(r"bold|black|heavy|semibold|demibold|extrabold|ultrabold|,b\b", re.IGNORECASE)
_ITALIC_RE = re.compile(r"italic|oblique|,i\b", re.IGNORECASE)
_LIGATURES = {"\ufb00": "ff", "\ufb01": "fi", "\ufb02": "fl", "\ufb03": "ffi", "\ufb04": "ffl",
              "\ufb05": "st", "\ufb06": "st"}


def _font_flags(fontname: str) -> tuple[bool, bool]:
    base = fontname.split("+", 1)[-1]  # "BAAAAA+DejaVuSerif-Bold": drop the subset tag
    return bool(_BOLD_RE.search(base)), bool(_ITALIC_RE.search(base))


def _char_text(ch: dict[str, Any]) -> str:
    text = ch.get("text") or ""
    return "".join(_LIGATURES.get(c, c) for c in text)


#: One printed character of a line: (text, bold, x0, x1); " " for a word space (its x0, x1
#: the gap it spans).
_Item = tuple[str, bool, float, float]


@dataclass
class _Glyphs:
    """The characters of one line as :func:`_line_from_chars` reads them (:func:`_glyphs`)."""

    items: list[_Item] = field(default_factory=list)
    letters: int = 0
    bold_letters: int = 0
    italic_letters: int = 0
    sizes: list[float] = field(default_factory=list)
    widths: list[float] = field(default_factory=list)
    spaces: list[float] = field(default_factory=list)


def _glyphs(chars: Sequence[dict[str, Any]]) -> _Glyphs:
    """The printed characters of a line with word spaces between them, no trailing space."""
    g = _Glyphs()
    items = g.items
    last_x1: float | None = None
    # A file that writes its word spaces as characters needs no guessing from gaps, except
    # where a gap is as wide as a word space would be (a space left out in a table cell).
    explicit = any(_char_text(ch).isspace() for ch in chars)
    gap_share = SPACE_GAP_EXPLICIT if explicit else SPACE_GAP
    for ch in chars:
        text = _char_text(ch)
        if not text:
            continue
        x0, x1 = float(ch["x0"]), float(ch["x1"])
        bold, italic = _font_flags(str(ch.get("fontname") or ""))
        if text.isspace():
            g.spaces.append(x1 - x0)
            if items and items[-1][0] != " ":
                items.append((" ", bold, last_x1 if last_x1 is not None else x0, x1))
            continue
        size = float(ch.get("size") or 0.0)
        if items and items[-1][0] == " ":
            items[-1] = (" ", items[-1][1], items[-1][2], x0)
        elif last_x1 is not None and x0 - last_x1 > gap_share * max(size, 1.0):
            items.append((" ", bold, last_x1, x0))
        items.extend((c, bold, x0, x1) for c in text)
        if any(c.isalpha() for c in text):
            g.letters += 1
            g.bold_letters += bold
            g.italic_letters += italic
        if size > 0:
            g.sizes.append(size)
        g.widths.append(x1 - x0)
        last_x1 = x1
    while items and items[-1][0] == " ":
        items.pop()
    return g


def _tab_gap(items: Sequence[_Item], chars: Sequence[dict[str, Any]], first_space: int | None,
             space: float) -> bool:
    """Whether the line's first gap is a tab: wider than :data:`TAB_GAP_SPACES` word spaces
    and holding no space character (spaces typed several times are characters)."""
    if first_space is None:
        return False
    gap = items[first_space]
    typed = any(_char_text(c).isspace() and gap[2] - 0.01 <= float(c["x0"]) <= gap[3] for c in chars)
    return not typed and gap[3] - gap[2] > TAB_GAP_SPACES * max(space, 0.5)


def _line_from_chars(chars: Sequence[dict[str, Any]], *, page: int) -> Line | None:
    """One line from its characters (sorted left to right)."""
    g = _glyphs(chars)
    items = g.items
    if not items:
        return None
    size = statistics.median(g.sizes) if g.sizes else 0.0
    space = statistics.median(g.spaces) if g.spaces else 0.28 * size
    text = "".join(c for c, *_ in items)
    first_space = next((i for i, it in enumerate(items) if it[0] == " "), None)
    x0, x1 = items[0][2], max(it[3] for it in items)
    first_word = (items[first_space - 1][3] if first_space is not None else x1) - x0
    if first_space is not None and _tab_gap(items, chars, first_space, space):
        text = text[:first_space] + "\t" + text[first_space + 1:]
    prefix = 0
    for _c, b, *_ in items:
        if not b:
            break
        prefix += 1
    visible = [c for c in chars if _char_text(c).strip()]
    letters = g.letters
    return Line(
        text=text, page=page, x0=x0, x1=x1,
        top=min(float(c["top"]) for c in visible), bottom=max(float(c["bottom"]) for c in visible),
        size=size, bold=g.bold_letters / letters if letters else 0.0,
        italic=g.italic_letters / letters if letters else 0.0,
        bold_prefix=prefix, space=space, char_width=statistics.fmean(g.widths) if g.widths else space,
        first_word=first_word,
    )


def _inside(ch: dict[str, Any], box: tuple[float, float, float, float]) -> bool:
    x0, top, x1, bottom = box
    cx = (float(ch["x0"]) + float(ch["x1"])) / 2
    cy = (float(ch["top"]) + float(ch["bottom"])) / 2
    return x0 <= cx <= x1 and top <= cy <= bottom


def _cell_text(chars: Iterable[dict[str, Any]], *, page: int) -> str:
    rows = _group_rows(list(chars))
    texts = []
    for row in rows:
        line = _line_from_chars(row, page=page)
        if line is not None:
            texts.append(line.text.replace("\t", " "))
    return " ".join(texts)


def _group_rows(chars: list[dict[str, Any]]) -> list[list[dict[str, Any]]]:
    """Characters grouped into lines by their vertical position, each sorted left to right."""
    chars = sorted(chars, key=lambda c: (float(c["top"]), float(c["x0"])))
    rows: list[list[dict[str, Any]]] = []
    bottoms: list[float] = []
    for ch in chars:
        mid = (float(ch["top"]) + float(ch["bottom"])) / 2
        if rows and abs(mid - bottoms[-1]) <= Y_TOLERANCE:
            rows[-1].append(ch)
        else:
            rows.append([ch])
            bottoms.append(mid)
    return [_dedupe(sorted(r, key=lambda c: float(c["x0"]))) for r in rows]


def _dedupe(row: list[dict[str, Any]]) -> list[dict[str, Any]]:
    """A row's characters with a character printed twice on itself (a fake bold, a shadow)
    kept once: same text and font within DEDUPE_TOLERANCE points."""
    out: list[dict[str, Any]] = []
    for ch in row:
        if any(o["text"] == ch["text"] and o.get("fontname") == ch.get("fontname")
               and abs(float(o["x0"]) - float(ch["x0"])) <= DEDUPE_TOLERANCE
               and abs(float(o["top"]) - float(ch["top"])) <= DEDUPE_TOLERANCE
               for o in out[-3:]):
            continue
        out.append(ch)
    return out


def _page_lines(page: Any, index: int) -> tuple[list[Line], int]:
    """(lines of one page in reading order, count of rotated characters left out)."""
    chars = [c for c in page.chars if _char_text(c)]
    rotated = sum(1 for c in chars if not c.get("upright", True) and _char_text(c).strip())
    chars = [c for c in chars if c.get("upright", True)]
    tables = []
    if any(True for _ in page.rects) or any(True for _ in page.lines):
        tables = [t for t in page.find_tables() if len(t.rows) >= 1]
    boxes = [tuple(t.bbox) for t in tables]
    running = [c for c in chars if not any(_inside(c, b) for b in boxes)]
    items: list[tuple[float, Line]] = []
    for row in _group_rows(running):
        line = _line_from_chars(row, page=index)
        if line is not None:
            items.append((line.top, line))
    for table in tables:
        for row in table.rows:
            cells = []
            for cell in row.cells:
                if cell is None:
                    continue
                cells.append(_cell_text((c for c in chars if _inside(c, cell)), page=index))
            if not any(cells):
                continue
            x0, top, x1, bottom = row.bbox
            text = "\t".join(cells)
            items.append((top, Line(text=text, page=index, x0=x0, x1=x1, top=top, bottom=bottom,
                                    cells=tuple(cells), bold=0.0, italic=0.0)))
    items.sort(key=lambda item: item[0])
    return [line for _, line in items], rotated


def _open_error(err: BaseException, path: str) -> CounterdraftError:
    name = type(err).__name__
    if "Password" in name or "Encrypt" in name or "password" in str(err).lower():
        return CounterdraftError("the PDF is password-protected; Counterdraft cannot read it",
                                 path=path)
    detail = " ".join(str(err).split())[:120] or name
    return CounterdraftError(f"damaged or not a PDF file ({detail})", path=path)


def pdf_lines(path: str) -> tuple[tuple[Line, ...], tuple[str, ...]]:
    """The printed lines of the PDF at *path* in reading order, and warnings.  Raises
    CounterdraftError for everything the module docstring lists."""
    try:
        size = os.path.getsize(path)
    except OSError as err:
        raise CounterdraftError(f"cannot read the file ({err.strerror or err})", path=path) from None
    if size == 0:
        raise CounterdraftError("the file is empty", path=path)
    if size > MAX_PDF_BYTES:
        raise CounterdraftError(f"the PDF is too large ({size >> 20} MB; limit {MAX_PDF_BYTES >> 20} MB)",
                                path=path)
    import pdfplumber

    lines: list[Line] = []
    rotated = 0
    empty_pages: list[int] = []
    try:
        with pdfplumber.open(path) as pdf:
            pages = pdf.pages
            if len(pages) > MAX_PDF_PAGES:
                raise CounterdraftError(f"the PDF has {len(pages)} pages (limit {MAX_PDF_PAGES})", path=path)
            for i, page in enumerate(pages):
                found, turned = _page_lines(page, i)
                rotated += turned
                if not any(ln.text.strip() for ln in found):
                    empty_pages.append(i + 1)
                lines.extend(found)
                page.close()
    except CounterdraftError:
        raise
    except MemoryError:
        raise CounterdraftError("the PDF is too large to read", path=path) from None
    except Exception as err:
        raise _open_error(err, path) from None
    if not any(ln.text.strip() for ln in lines):
        raise CounterdraftError("the PDF has no text layer (scanned pages or images only); "
                                "Counterdraft does not read text from images (no OCR)", path=path)
    warnings: list[str] = []
    if empty_pages:
        shown = ", ".join(str(p) for p in empty_pages[:10]) + (" ..." if len(empty_pages) > 10 else "")
        warnings.append(f"page{'s' if len(empty_pages) > 1 else ''} {shown} of the PDF "
                        "ha{} no text layer (images only?) and {} not read".format(
                            "ve" if len(empty_pages) > 1 else "s",
                            "were" if len(empty_pages) > 1 else "was"))
    if rotated:
        warnings.append(f"{rotated} characters of rotated text (margin notes, watermarks) were not read")
    return tuple(lines), tuple(warnings)


def read_blocks(path: str, *, fmt: Any = None, structure: Any = None
                ) -> tuple[tuple[Block, ...], tuple[str, ...]]:
    """(blocks, warnings) of the PDF at *path*: lines cleaned up and joined into paragraphs
    by the line labeller *structure* (None: the shipped default model)."""
    del fmt
    from ..layout.assemble import blocks_from_lines

    lines, warnings = pdf_lines(path)
    blocks, notes = blocks_from_lines(lines, structure=structure)
    return blocks, warnings + notes
