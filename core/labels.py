"""Clause labels: how a provision, and the provision a deviation concerns, are named to the
reader ("14.3(a) Liability Cap").  One place for the review table, the decisions, the
outputs and the desktop app, so that a clause is called the same everywhere.

* :func:`provision_label` names one provision: its number and its heading.  Given the
  document, a list item's number is completed by its parents' ("(a)" under 14.3 is
  "14.3(a)"), an unnumbered provision takes its parent's number, and a provision without a
  heading takes the nearest heading up its chain.  A definition is named by its term; a
  provision with neither number nor heading by its kind (and, unless *compact*, its first
  words).
* :func:`clause_label` names the provision a deviation concerns: the draft's, with the
  precedent's number in brackets when it differs (renumbered or moved) unless *compact*;
  the precedent's, marked "(precedent only)", for a provision the draft lacks; "Whole
  document" (or "Defined terms") when the deviation has no provision.

Cost: O(provisions) per label (one index of the document's provisions, then a walk up the
parent chain, bounded by :data:`MAX_DEPTH`).
"""

from __future__ import annotations

import re

from .lazyre import compile_pattern
from .model import Check, Deviation, Document, Provision, Review

__all__ = ["MAX_DEPTH", "check_label", "clause_label", "find_provision", "full_number", "provision_label"]

#: Deepest parent chain walked for a number or a heading (agreements nest a handful of
#: levels; the bound only guards against a malformed parent cycle).
MAX_DEPTH = 64
#: Words of a provision's text quoted in a label when it has no number, heading or term.
LABEL_WORDS = 6

_KEYWORD_RE = compile_pattern(r"^(?:Article|Section|Clause|Schedule|Part)\s+", re.IGNORECASE)


#: Documents whose provisions are indexed by id (the last few labelled: a review's two).
_INDEX_DOCUMENTS = 4
_indexes: dict[int, tuple[Document, dict[str, Provision]]] = {}


def _by_id(doc: Document) -> dict[str, Provision]:
    """*doc*'s provisions by id, built once per document object: a table of a thousand
    deviations labels a thousand provisions, and a search of the document for each (or an
    index built for each) made labelling quadratic."""
    got = _indexes.get(id(doc))
    if got is not None and got[0] is doc:
        return got[1]
    if len(_indexes) >= _INDEX_DOCUMENTS:
        _indexes.pop(next(iter(_indexes)))
    index = {p.id: p for p in doc.provisions}
    _indexes[id(doc)] = (doc, index)
    return index


def find_provision(doc: Document, pid: str | None) -> Provision | None:
    """The provision with id *pid* in *doc*, or None (no id, or no such provision)."""
    if pid is None:
        return None
    return _by_id(doc).get(pid)


def _bare(number: str | None) -> str:
    """A number without its keyword ("Section 3.1" -> "3.1")."""
    return _KEYWORD_RE.sub("", number.strip()) if number else ""


def _chain(doc: Document | None, prov: Provision) -> list[Provision]:
    """*prov* and its ancestors, nearest first (at most MAX_DEPTH)."""
    if doc is None or prov.parent is None:
        return [prov]
    by_id = _by_id(doc)
    out = [prov]
    cur = by_id.get(prov.parent)
    while cur is not None and len(out) < MAX_DEPTH:
        out.append(cur)
        cur = by_id.get(cur.parent) if cur.parent else None
    return out


def full_number(prov: Provision, *, doc: Document | None = None) -> str:
    """The number the reader cites: a list item's number after its parents' ("14.3(a)"),
    an unnumbered provision's parent's number; "" when none.  Without *doc*, the provision's
    own number.  The outermost number's keyword is kept ("Section 14.3(a)", "Schedule 2")."""
    parts: list[str] = []
    outer = ""  # the outermost number as written, for its keyword
    for cur in _chain(doc, prov):
        if parts and not parts[0].startswith("("):
            break  # "14.3" is complete; its parent's "14" is not repeated
        n = _bare(cur.number)
        if n:
            parts.insert(0, n)
            outer = cur.number.strip() if cur.number else ""
    if not parts:
        return ""
    keyword = outer[: len(outer) - len(_bare(outer))]
    return keyword + "".join(parts)


def provision_label(prov: Provision, *, doc: Document | None = None, compact: bool = False) -> str:
    """``"14.3(a) Liability Cap"``: the provision's number and heading (see the module's
    notes); ``"1.1 Definition of \u201cGoods\u201d"`` (compact: ``"1.1 \u201cGoods\u201d"``) for a
    definition; its kind (and first words unless *compact*) when it has neither."""
    number = full_number(prov, doc=doc)
    if prov.kind == "definition" and prov.term:
        name = f"\u201c{prov.term}\u201d" if compact else f"Definition of \u201c{prov.term}\u201d"
        return f"{number} {name}" if number else name
    heading = next((c.heading.strip() for c in _chain(doc, prov) if c.heading and c.heading.strip()), "")
    if number or heading:
        return " ".join(x for x in (number, heading) if x)
    kind = "provision" if prov.kind == "clause" else prov.kind
    words = prov.text.split()
    if compact or not words:
        return kind
    more = " \u2026" if len(words) > LABEL_WORDS else ""
    return f"{kind} \u201c{' '.join(words[:LABEL_WORDS])}{more}\u201d"


def clause_label(review: Review, deviation: Deviation, *, compact: bool = False) -> str:
    """The clause a deviation concerns, by the draft's numbering: ``"9.1 Notice"``, with
    ``" (precedent 14.1)"`` when the precedent numbers it differently (unless *compact*);
    ``"25 Non-Solicitation (precedent only)"`` for a provision only the precedent has;
    ``"Whole document"`` (``"Defined terms"`` for a term) without a provision."""
    dp = find_provision(review.draft, deviation.draft_provision)
    pp = find_provision(review.precedent, deviation.precedent_provision)
    if dp is None and pp is None:
        return "Defined terms" if deviation.category == "term" else "Whole document"
    if dp is None:
        assert pp is not None
        return f"{provision_label(pp, doc=review.precedent, compact=compact)} (precedent only)"
    label = provision_label(dp, doc=review.draft, compact=compact)
    if not compact and pp is not None:
        dn, pn = full_number(dp, doc=review.draft), full_number(pp, doc=review.precedent)
        if pn and pn != dn:
            label += f" (precedent {pn})"
    return label


def check_label(review: Review, check: Check, *, compact: bool = False) -> str:
    """The clause a drafting check concerns, by its document's numbering (the precedent's
    marked "(precedent)"); "Whole document" when the check names no provision."""
    doc = review.draft if check.document == "draft" else review.precedent
    prov = find_provision(doc, check.provision)
    if prov is None:
        return "Whole document"
    label = provision_label(prov, doc=doc, compact=compact)
    return label if check.document == "draft" else f"{label} (precedent)"
