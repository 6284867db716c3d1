"""Drafting problems planted in real agreement texts, to test the drafting checks
(``core.review.checks``) against documents from outside the project.

Each function takes the text of an agreement (a licence text of the PyPI package
``licensedcode-data``) as read by :func:`core.reader.read_text` and returns a
:class:`Plant`: the text with one problem of one kind and what a reader should find, or
None when the text offers no place for it.  The problems are those a careful associate
looks for (common practice, no source): a capitalised term used but defined nowhere, a
definition never used, the old name of a renamed term left in one place, a cross-reference
to a provision that does not exist, a definition whose meaning changed.  The invented names
are ours.  Deterministic: the same text gives the same plant.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from core.model import DefinedTerm, Document
from core.reader import read_text

__all__ = ["INVENTED_TERMS", "Plant", "found", "plant_all", "plant_changed_definition", "plant_dangling_reference",
           "plant_deleted_definition", "plant_stale_term", "plant_undefined_term", "plant_unused_definition"]

#: Capitalised names no licence text uses: the undefined terms and unused definitions planted.
INVENTED_TERMS = ("Service Credits", "Escrow Materials", "Acceptance Criteria", "Hosting Charges",
                  "Transition Period", "Milestone Payments", "Key Personnel", "Support Fees")
#: New names for a renamed term.
INVENTED_RENAMES = ("Grantee", "Beneficiary", "Holder", "Recipient Party", "Transferee")


@dataclass(frozen=True, slots=True)
class Plant:
    """*text* carries one problem of *kind*; *expect* is the term or the number a check of
    that kind must name (the undefined name, the unused term, the precedent's name left,
    the missing number, the changed definition's term)."""

    kind: str
    text: str
    expect: str
    how: str


def _paragraphs(text: str) -> list[tuple[int, int]]:
    """(start, end) of the non-blank paragraphs of *text* (parted by blank lines)."""
    out, pos = [], 0
    for m in re.finditer(r"\n[ \t]*\n", text + "\n\n"):
        if text[pos:m.start()].strip():
            out.append((pos, m.start()))
        pos = m.end()
    return out


def _prose_paragraphs(text: str) -> list[tuple[int, int]]:
    """Paragraphs of running prose: a few sentences, not in capitals, ending in a full stop."""
    out = []
    for a, b in _paragraphs(text):
        para = text[a:b].strip()
        words = para.split()
        letters = [c for c in para if c.isalpha()]
        if (len(words) >= 25 and para.endswith(".") and letters
                and sum(c.isupper() for c in letters) < 0.3 * len(letters) and '"' not in para[:3]):
            out.append((a, b))
    return out


def _middle(spans: list[tuple[int, int]]) -> tuple[int, int] | None:
    return spans[len(spans) // 2] if spans else None


def _used_names(doc: Document) -> str:
    return "\n".join(t for p in doc.provisions for t in (p.heading or "", p.text))


def _unused_invented(doc: Document, k: int = 0) -> str:
    words = _used_names(doc).casefold()
    fresh = [n for n in INVENTED_TERMS if n.split()[0].casefold() not in words]
    fresh = fresh or [n for n in INVENTED_TERMS if n.casefold() not in words]
    return fresh[k % len(fresh)]


def plant_undefined_term(text: str) -> Plant | None:
    """A sentence using an invented capitalised term, added to a paragraph in the middle of
    the agreement."""
    doc = read_text(text)
    at = _middle(_prose_paragraphs(text))
    if at is None:
        return None
    name = _unused_invented(doc)
    sentence = f" Nothing in this paragraph limits the {name} payable under this agreement."
    return Plant("undefined-term", text[:at[1]] + sentence + text[at[1]:], name,
                 f'sentence using "{name}" added to the paragraph at offset {at[0]}')


def _definition_paragraph(text: str, t: DefinedTerm) -> tuple[int, int] | None:
    """The paragraph of *text* that holds *t*'s definition, when it is a paragraph of its own
    starting with the term ("X" means ...)."""
    for a, b in _paragraphs(text):
        head = text[a:b].lstrip()[:len(t.term) + 12]
        if t.term in head and re.search(r"\bmeans?\b|\bshall mean\b|\brefers? to\b", text[a:b][:len(t.term) + 80]):
            return a, b
    return None


def _definitions(doc: Document) -> list[DefinedTerm]:
    return [t for t in doc.terms if t.term[:1].isupper() and not t.aliases and t.span is not None]


def plant_deleted_definition(text: str) -> Plant | None:
    """The definition paragraph of a term used elsewhere taken out (the precedent keeps it):
    the term is then used but defined nowhere in the draft."""
    doc = read_text(text)
    for t in sorted(_definitions(doc), key=lambda t: -t.uses):
        if t.uses < 2 or len(t.term) < 4:
            continue
        at = _definition_paragraph(text, t)
        if at is None:
            continue
        planted = text[:at[0]] + text[at[1]:].lstrip("\n")
        if all(t.term not in u.names for u in read_text(planted).terms):  # defined nowhere else
            return Plant("undefined-term", planted, t.term, f'definition of "{t.term}" taken out')
    return None


def plant_unused_definition(text: str) -> Plant | None:
    """A new definition, of a term used nowhere, added after an existing definition
    paragraph (or, without one, after a paragraph in the middle)."""
    doc = read_text(text)
    name = _unused_invented(doc, 1)
    new = f'"{name}" means the materials deposited with the escrow agent under this agreement.'
    for t in _definitions(doc):
        at = _definition_paragraph(text, t)
        if at is not None:
            indent = re.match(r"[ \t]*", text[at[0]:]).group(0)
            return Plant("unused-definition", text[:at[1]] + "\n\n" + indent + new + text[at[1]:],
                         name, f'definition of "{name}" added after that of "{t.term}"')
    at = _middle(_prose_paragraphs(text))
    if at is None:
        return None
    return Plant("unused-definition", text[:at[1]] + " " + new + text[at[1]:], name,
                 f'definition of "{name}" added to the paragraph at offset {at[0]}')


def plant_stale_term(text: str) -> Plant | None:
    """A defined term renamed throughout (its definition and every use) but for one use in
    the middle of the text: the old name left there is stale."""
    doc = read_text(text)
    words = _used_names(doc)
    for t in sorted(_definitions(doc), key=lambda t: -t.uses):
        if t.uses < 4 or " " in t.term or not t.term.isalpha() or len(t.term) < 4:
            continue
        pattern = re.compile(r"(?<![\w-])" + re.escape(t.term) + r"(?=s?\b|['’]s\b)")
        places = [m.start() for m in pattern.finditer(text)]
        if len(places) < 5:
            continue
        new = next((n for n in INVENTED_RENAMES if n not in words), None)
        if new is None:
            return None
        keep = places[len(places) * 2 // 3]
        out, pos = [], 0
        for p in places:
            out.append(text[pos:p])
            out.append(t.term if p == keep else new)
            pos = p + len(t.term)
        out.append(text[pos:])
        return Plant("stale-term", "".join(out), t.term,
                     f'"{t.term}" renamed "{new}" throughout but at offset {keep}')
    return None


_REF_RE = re.compile(r"\b(Section|section|Clause|clause|Article|article)\s+(\d{1,2})(?:\.(\d{1,2}))?\b")


def plant_dangling_reference(text: str) -> Plant | None:
    """A sentence referring to a provision past the last one the agreement numbers, in the
    agreement's own keyword ("Section", "clause" or "Article")."""
    doc = read_text(text)
    tops = [int(m.group(1)) for p in doc.provisions if p.number
            for m in [re.search(r"(\d+)", p.number)] if m]
    at = _middle(_prose_paragraphs(text))
    if not tops or at is None:
        return None
    keyword = next((m.group(1) for m in _REF_RE.finditer(text)), "Section")
    number = str(max(tops) + 7)
    sentence = f" This paragraph is subject to {keyword.capitalize()} {number}."
    return Plant("dangling-reference", text[:at[1]] + sentence + text[at[1]:], number,
                 f"reference to {keyword} {number} added to the paragraph at offset {at[0]}")


def _definition_end(text: str, t: DefinedTerm) -> int | None:
    """Where the sentence defining *t* ends in *text* (before its full stop or semicolon),
    found from the definition the reader took."""
    words = t.definition.rstrip("\u2026").split()[:12]
    if len(words) < 4:
        return None
    m = re.search(r"\s+".join(re.escape(w) for w in words), text)
    if m is None:
        return None
    end = re.compile(r"[.;](?=\s|$)").search(text, m.end() - 1)
    return end.start() if end is not None else None


def plant_changed_definition(text: str) -> Plant | None:
    """A definition used elsewhere whose meaning is narrowed: words added at the end of the
    sentence that defines it."""
    doc = read_text(text)
    for t in sorted(_definitions(doc), key=lambda t: -t.uses):
        if t.uses < 2:
            continue
        end = _definition_end(text, t)
        if end is not None:
            return Plant("definition-changed", text[:end] + ", but only while held in escrow" + text[end:],
                         t.term, f'definition of "{t.term}" narrowed')
    return None


def plant_all(text: str) -> list[Plant]:
    """One plant of each kind the text allows (the deleted definition as a second kind of
    undefined term)."""
    makers = (plant_undefined_term, plant_deleted_definition, plant_unused_definition, plant_stale_term,
              plant_dangling_reference, plant_changed_definition)
    return [p for p in (m(text) for m in makers) if p is not None]


def found(plant: Plant, checks) -> bool:  # checks: core.review.checks.Check objects
    """Does one of *checks* report *plant*: a check of its kind naming its term or number?"""
    want = plant.expect.casefold()
    for c in checks:
        if c.kind != plant.kind:
            continue
        named = (c.term or "").casefold()
        if named == want or (plant.kind == "stale-term" and c.text.casefold().startswith(want)):
            return True
    return False
