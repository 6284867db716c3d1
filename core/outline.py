"""A readable outline of a document for a terminal: one line per provision (number,
heading, kind, first words), indented by nesting, then the defined terms.

Every line fits in *width* terminal columns: East Asian wide characters count as two
columns and combining marks as none (Unicode Standard Annex #11, via
:func:`unicodedata.east_asian_width`); a line that would be longer is cut and ends in "…".

Cost: linear in the number of provisions and terms.
"""

from __future__ import annotations

import unicodedata

from .model import Document, Provision

__all__ = ["display_width", "format_outline"]

#: Columns of indentation per nesting step.
INDENT = 2
#: Deepest indentation shown; deeper provisions are shown at this depth so that a badly
#: nested document still leaves room for words.
MAX_INDENT_DEPTH = 8
#: The column where headings start (labels are padded to line up, when they fit).
LABEL_COLUMNS = 8
#: Narrowest width honoured; a narrower request is treated as this (a line must hold at
#: least a label and an ellipsis).
MIN_WIDTH = 20
ELLIPSIS = "…"


def _char_width(ch: str) -> int:
    if unicodedata.combining(ch) or unicodedata.category(ch) in ("Mn", "Me", "Cf"):
        return 0
    return 2 if unicodedata.east_asian_width(ch) in ("W", "F") else 1


def display_width(text: str) -> int:
    """Terminal columns *text* takes (wide characters 2, combining marks 0)."""
    return sum(_char_width(ch) for ch in text)


def _fit(text: str, width: int) -> str:
    if display_width(text) <= width:
        return text
    out = []
    used = 0
    limit = width - display_width(ELLIPSIS)
    for ch in text:
        w = _char_width(ch)
        if used + w > limit:
            break
        out.append(ch)
        used += w
    return "".join(out).rstrip() + ELLIPSIS


def _one_line(text: str) -> str:
    return " ".join(text.split())


def _depths(doc: Document) -> dict[str, int]:
    depth: dict[str, int] = {}
    for p in doc.provisions:  # parents precede their children
        depth[p.id] = depth[p.parent] + 1 if p.parent in depth else 0
    return depth


def _line(p: Provision, depth: int, width: int) -> str:
    indent = " " * (INDENT * min(depth, MAX_INDENT_DEPTH))
    label = p.number or "·"
    label = label.ljust(max(LABEL_COLUMNS - len(indent), len(label) + 1))
    parts: list[str] = []
    if p.heading:
        parts.append(_one_line(p.heading))
    if p.kind == "definition" and p.term:
        parts.append(f"[definition: {p.term}]")
    elif p.kind != "clause":
        parts.append(f"[{p.kind}]")
    words = _one_line(p.text)
    head = " ".join(parts)
    if words:
        body = f"{head} — {words}" if head else words
    else:
        body = head
    return _fit(indent + label + body, width).rstrip()


def format_outline(doc: Document, *, width: int = 100) -> str:
    """The outline of *doc*: a header line, one line per provision, then the terms."""
    width = max(width, MIN_WIDTH)
    name = doc.source.replace("\\", "/").rsplit("/", 1)[-1]
    lines = [_fit(f"{name}: {len(doc.provisions)} provisions, {len(doc.terms)} defined terms", width)]
    depth = _depths(doc)
    for p in doc.provisions:
        lines.append(_line(p, depth[p.id], width))
    if doc.terms:
        lines.append("")
        lines.append(_fit("Defined terms (uses elsewhere):", width))
        for t in doc.terms:
            also = f" [also {', '.join(_one_line(a) for a in t.aliases)}]" if t.aliases else ""
            lines.append(_fit(f"  {_one_line(t.term)}{also} ({t.provision}): {t.uses}", width))
    return "\n".join(lines)
