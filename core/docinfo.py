"""Per-document facts the review stages share: provision positions, full clause numbers,
defined-term names (each term's own name and its aliases) and the parties' own labels.
Built once per document, O(provisions + terms)."""

from __future__ import annotations

import re
from dataclasses import dataclass, field

from .lazyre import compile_pattern
from .model import Document, Provision

__all__ = ["DocInfo", "PARTY_ROLE_WORDS", "build_docinfo", "item_label", "party_role"]

#: Labels the parties give themselves, by side of the deal (common practice in commercial
#: contracts, no source).  A party label on one side is never mapped onto the other side.
PARTY_ROLE_WORDS: dict[str, frozenset[str]] = {
    "supply": frozenset({
        "supplier", "vendor", "seller", "provider", "licensor", "contractor", "consultant",
        "lessor", "landlord", "lender", "manufacturer", "distributor", "agent", "developer",
    }),
    "buy": frozenset({
        "customer", "client", "buyer", "purchaser", "licensee", "lessee", "tenant",
        "borrower", "principal", "authority", "company", "reseller",
    }),
}
_ALL_ROLE_WORDS = PARTY_ROLE_WORDS["supply"] | PARTY_ROLE_WORDS["buy"]

#: Words of a definition that describe a legal person (common practice, no source).
_ENTITY_RE = compile_pattern(
    r"\b(?:incorporated|registered (?:office|number|in)|company (?:number|no)|limited|ltd|llp|"
    r"llc|inc|plc|gmbh|s\.?a\.?|b\.?v\.?|corporation|whose (?:registered|principal) "
    r"(?:office|place))\b", re.IGNORECASE)

#: Generic names for "either party", never a party's own label.
_GENERIC_PARTY_TERMS = frozenset({"party", "parties", "the parties", "receiving party",
                                  "disclosing party", "affected party"})


def party_role(name: str, definition: str = "") -> str | None:
    """``"supply"``, ``"buy"`` or None, from the words of a party label (or, failing that,
    from "as supplier"/"as customer" in its definition)."""
    words = name.casefold().split()
    for side, vocab in PARTY_ROLE_WORDS.items():
        if any(w in vocab for w in words):
            return side
    m = re.search(r"\bas (?:the )?(\w+)", definition.casefold())
    if m:
        for side, vocab in PARTY_ROLE_WORDS.items():
            if m.group(1) in vocab:
                return side
    return None


@dataclass(frozen=True, slots=True)
class DocInfo:
    doc: Document
    provisions: tuple[Provision, ...]
    position: dict[str, int]  # provision id -> index in provisions
    parent_pos: tuple[int | None, ...]
    full_number: tuple[str | None, ...]  # "7.2(a)" for (a) under 7.2
    by_number: dict[tuple[str, str], int]  # (namespace, full number) -> position
    term_names: tuple[str, ...]
    definitions: dict[str, str]  # term -> definition text
    defining_provision: dict[str, str]  # term -> provision id
    term_uses: dict[str, int]  # term -> DefinedTerm.uses
    party_labels: frozenset[str]
    party_roles: dict[str, str | None]
    #: alias -> the term it names ("Your" -> "You"); aliases are never in ``term_names``
    alias_of: dict[str, str] = field(default_factory=dict)

    @property
    def all_names(self) -> tuple[str, ...]:
        """Every name of every term: the terms, then the aliases."""
        return (*self.term_names, *self.alias_of)

    def names_of(self, term: str) -> tuple[str, ...]:
        """*term* and its aliases."""
        return (term, *(a for a, t in self.alias_of.items() if t == term))


#: Number keywords a label may start with (those core.structure reads as labels); a full
#: number is written without them ("Section 14.3" -> "14.3", "Exhibit A" -> "A").
_KEYWORD_PREFIX_RE = compile_pattern(
    r"^(?:schedule|clause|section|article|part|annexure|annex|appendix|exhibit|attachment|"
    r"addendum)", re.IGNORECASE)
#: A list item's own label in any of the styles core.structure reads: "(b)", "b)", "b"
#: (from "b."), "(iv)", "1)".  A bare number ("1") is a clause number, not an item.
_LIST_ITEM_RE = compile_pattern(r"^(?:\((?P<tok>[A-Za-z]{1,4}|\d{1,3})\)|(?P<close>[A-Za-z]{1,4}|\d{1,3})\)"
                                r"|(?P<dot>[A-Za-z]{1,4}))$")


def item_label(number: str) -> str | None:
    """A list item's own label written as ``"(b)"``, whichever style the document uses
    (``"(b)"``, ``"b)"``, ``"b"`` from ``"b."``); None for a clause number (``"7"``,
    ``"7.2"``, ``"Schedule 2"``).

    >>> item_label("b)"), item_label("(iv)"), item_label("7.2")
    ('(b)', '(iv)', None)
    """
    m = _LIST_ITEM_RE.match("".join(number.split()).rstrip(".:"))
    if m is None:
        return None
    return f"({m.group('tok') or m.group('close') or m.group('dot')})"


def _namespace(p: Provision) -> str:
    return "schedule" if p.kind == "schedule" else "clause"


def build_docinfo(doc: Document) -> DocInfo:
    provs = doc.provisions
    position = {p.id: i for i, p in enumerate(provs)}
    parent_pos = tuple(position.get(p.parent) if p.parent else None for p in provs)
    full: list[str | None] = []
    by_number: dict[tuple[str, str], int] = {}
    for i, p in enumerate(provs):
        num = (p.number or "").strip().rstrip(".:")
        if not num:
            full.append(None)
            continue
        num = "".join(num.split())
        pos = parent_pos[i]
        parent = full[pos] if pos is not None else None
        item = item_label(num)
        if item is not None and parent:
            num = f"{parent}{item}"  # "b)" or "b." under section 6 is item 6(b), as "(b)" is
        num = _KEYWORD_PREFIX_RE.sub("", num)
        full.append(num)
        by_number.setdefault((_namespace(p), num), i)
    names: list[str] = []
    definitions: dict[str, str] = {}
    defining: dict[str, str] = {}
    uses: dict[str, int] = {}
    alias_of: dict[str, str] = {}
    for t in doc.terms:
        if t.term in definitions or t.term in alias_of:
            continue
        names.append(t.term)
        definitions[t.term] = t.definition
        defining[t.term] = t.provision
        uses[t.term] = t.uses
        for a in t.aliases:
            if a not in definitions:
                alias_of.setdefault(a, t.term)
    parties: set[str] = set()
    for t in doc.terms:
        if t.term.casefold() in _GENERIC_PARTY_TERMS or t.term not in definitions:
            continue
        kind = provs[position[t.provision]].kind if t.provision in position else ""
        words = [w for n in t.names for w in n.casefold().split()]
        role_word = any(w in _ALL_ROLE_WORDS for w in words)
        if kind == "parties" or (role_word and _ENTITY_RE.search(t.definition)):
            parties.add(t.term)
    roles = {t: _role_of_names(t, [a for a, o in alias_of.items() if o == t], definitions.get(t, ""))
             for t in parties}
    return DocInfo(doc, provs, position, parent_pos, tuple(full), by_number, tuple(names),
                   definitions, defining, uses, frozenset(parties), roles, alias_of)


def _role_of_names(term: str, aliases: list[str], definition: str) -> str | None:
    """The side of a party label, from its own name first, then from its aliases ("You"
    (or "Licensee")), then from its definition."""
    for name in (term, *aliases):
        role = party_role(name)
        if role is not None:
            return role
    return party_role(term, definition)
