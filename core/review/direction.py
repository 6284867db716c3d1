"""Whose side a change is on: each deviation judged for the party the reviewer acts for.

``counterdraft review ... --acting-for Supplier`` names one of the precedent's parties (its
defined term, any letter case).  Every deviation then gets a *direction* for that party
(:data:`DIRECTIONS`):

``adverse``
    the change takes from that party: a heavier obligation on it, a lighter one on the other
    side, a right of its own narrowed or one of the other side's widened;
``favourable``
    the opposite;
``neutral``
    no change of meaning (formatting, numbering, a renamed term, a heading), or a change of
    a provision that binds both parties alike ("each party shall", "the Receiving Party");
``unclear``
    the wording does not tell (a new governing law, a changed name, a sentence whose holder
    or effect cannot be read).  Without ``--acting-for`` every direction is ``unclear``.

How a change is read (common practice of contract reading, no source; the word lists are
the authors'):

1. **Who holds the provision.**  In the clause around the change (the sentence, cut at ";"),
   the modal phrase that governs the changed words -- the last one before them, else the
   first after -- and its subject: the nearest party named before it ("the Supplier shall",
   "Licensee's liability shall not exceed"), a party right after it ("in no event shall
   LICENSOR be liable") or the agent of a passive ("shall be paid by the Customer").  A
   clause without either takes the lead-in of its parent provision ("The Customer shall:").
   Parties are the precedent's defined terms that name a party (:func:`party_terms`), the
   draft's names for them (the term map), and the generic "each party", "either party",
   "the Receiving Party" ... which bind both sides.
2. **What the clause is for its holder.**  A *burden* -- an obligation (shall, must, will,
   agrees to, warrants, grants, is liable) or a restriction (shall not, may not) -- or a
   *benefit* -- a right (may, is entitled to, reserves the right to) or a release from
   liability (shall not be liable, shall have no obligation).
3. **Which way the change moves it** for the holder (+1 favourable, -1 adverse): an
   obligation weakened ("shall" -> "may"), an efforts standard lowered, a softening
   qualifier ("reasonable", "material") added to a burden, a carve-out ("except", "unless")
   added to a burden, a deadline lengthened ("within 30 days" -> "within 60 days"), a cap on
   its liability lowered, an amount it pays lowered, a right of its own widened, "not" added
   to its obligation ... are +1; their opposites -1.  A payment period's deadline helps the
   payer; a notice period burdens whoever must give or wait for it; a limit ("shall not
   exceed", "up to") on a burden helps its holder, on a benefit narrows it.  "and" -> "or"
   lightens the list of things an obligation requires, and widens the conditions that
   trigger it ("if A and B" -> "if A or B").  A party swapped moves the burden or benefit
   from one party to the other.  Sentences and provisions added or removed count each of
   their clauses: a burden added on a party is -1 for it, a benefit added +1, and the
   reverse when removed.
4. **For whom.**  The holder's +1 is favourable to the acting party when the holder is that
   party or on its side of the deal (:data:`core.docinfo.PARTY_ROLE_WORDS`), adverse
   when the holder is on the other side, and neutral when the clause binds each party.

Each judged deviation gains one reason naming the parties ("lightens the Licensee's
obligation ('shall pay ...'): favourable to the Licensee").  The ranking keeps the rules'
severity first; at equal severity an adverse deviation ranks above an unclear, neutral or
favourable one, and a favourable deviation ranks as if its severity were
:data:`FAVOURABLE_RANK_SHARE` of it, so that a gain never tops the list.

Cost: O(parties x text) once per document for the party mentions, then O(clause) per
deviation.
"""

from __future__ import annotations

import re
from collections.abc import Callable, Iterable, Iterator, Mapping, Sequence
from dataclasses import dataclass
from functools import lru_cache
from typing import Final, Protocol

from ..errors import CounterdraftError
from ..lazyre import compile_pattern
from ..model import DIRECTIONS, Direction, Document, Provision, TermMapping
from .classify import BLANK_FILLED
from .severity import (
    Quantity,
    SeverityRules,
    Signal,
    find_quantities,
    number_in_words,
    phrase_matches,
    sentence_bounds,
)

__all__ = [
    "ADVERSE",
    "DIRECTIONS",
    "FAVOURABLE",
    "FAVOURABLE_RANK_SHARE",
    "NEUTRAL",
    "RANK_ORDER",
    "UNCLEAR",
    "Judge",
    "JudgedChange",
    "Parties",
    "direction_rank_key",
    "find_parties",
    "party_terms",
    "resolve_acting_for",
]

ADVERSE: Final = "adverse"
FAVOURABLE: Final = "favourable"
NEUTRAL: Final = "neutral"
UNCLEAR: Final = "unclear"
#: The directions in the order they rank at equal severity.
RANK_ORDER: tuple[Direction, ...] = (ADVERSE, UNCLEAR, NEUTRAL, FAVOURABLE)
#: A favourable deviation ranks as if its severity were this share of it: a change in the
#: acting party's favour needs reading, seldom negotiating, so it should not sit above the
#: changes against it (the authors' judgement, common practice, no source).
FAVOURABLE_RANK_SHARE = 0.5

#: Party labels by side of the deal (common practice in commercial agreements, licences
#: and end-user agreements, no source), and labels that name a party of either side
#: ("the Company", "the Agent").
ROLE_WORDS: dict[str, frozenset[str]] = {
    "supply": frozenset({"supplier", "vendor", "seller", "provider", "licensor", "licenser",
                         "contractor", "consultant", "lessor", "landlord", "lender",
                         "manufacturer", "grantor", "contributor", "owner", "holder", "author",
                         "publisher", "franchisor", "assignor", "issuer", "creditor"}),
    "buy": frozenset({"customer", "client", "buyer", "purchaser", "licensee", "licencee",
                      "lessee", "tenant", "borrower", "you", "user", "recipient", "grantee",
                      "subscriber", "member", "franchisee", "assignee", "debtor"}),
}
_EITHER_SIDE_WORDS = frozenset({"company", "authority", "principal", "agent", "employer",
                                "employee", "developer", "distributor", "reseller", "partner"})
_ROLE_OF_WORD = {w: side for side, words in ROLE_WORDS.items() for w in words}
_PARTY_WORDS = frozenset(_ROLE_OF_WORD) | _EITHER_SIDE_WORDS
#: Words that name both parties, or a role either may take: a clause they hold binds each
#: side alike.
_MUTUAL_RE = compile_pattern(
    r"\b(?:(?:each|either|both|neither|any|a|the\s+other|each\s+of\s+the|one)\s+part(?:y|ies)(?:'s|\u2019s|s')?"
    r"|(?:the\s+)?parties(?:'|\u2019)?"
    r"|(?:receiving|disclosing|indemnifying|indemnified|affected|defaulting|non-defaulting|"
    r"notifying|breaching|non-breaching|terminating)\s+party(?:'s|\u2019s)?)\b",
    re.IGNORECASE)
#: Words of a definition that describe someone who can be a party (common practice, no
#: source).
_PERSON_RE = compile_pattern(
    r"\b(?:individual|person|legal\s+entity|entity|company|corporation|organi[sz]ation|firm|"
    r"partnership|incorporated|registered|limited|ltd|llc|inc|gmbh|plc|s\.a\.|b\.v\.|"
    r"university|institute|foundation|association)\b", re.IGNORECASE)
#: Names of things and of people who are not parties: a term whose name ends in one of
#: them is no party ("Customer Data", "Licensee Products", "End User", "Affiliate").
_NOT_PARTY_WORDS = frozenset({
    "affiliate", "affiliates", "entity", "entities", "person", "persons", "third", "party",
    "parties", "representative", "representatives", "personnel", "subsidiary", "subsidiaries",
    "group", "competitor", "control", "agreement", "software", "licence", "license", "licenses",
    "licences", "documentation", "product", "products", "service", "services", "code", "data",
    "term", "release", "version", "application", "applications", "materials", "material",
    "information", "work", "works", "platform", "platforms", "tools", "account", "use",
    "content", "site", "order", "orders", "form", "fees", "price", "marks", "rights",
    "property", "derivative", "derivatives", "modifications", "deliverables", "equipment",
    "goods", "premises", "territory", "not", "will", "shall", "end"})
#: Words that may stand, capitalised, before a party's label ("The Supplier", "Each
#: Licensee").
_DETERMINERS = frozenset({"the", "this", "that", "each", "any", "either", "such", "neither",
                          "no", "every", "a", "an", "if", "where", "when", "unless", "and", "or",
                          "to", "by", "of", "for"})
#: Words a definition of a person starts with ("means an individual or legal entity"):
#: the first words of the definition, so that "a product of the company" does not count.
_PERSON_WORDS_WINDOW = 14
#: How often a term defined as a person must be the subject of a modal to count as a party
#: (an "Affiliate" seldom is): once could be a quotation, twice is a pattern (a judgement,
#: no source).
MIN_SUBJECT_USES = 2
#: How often a capitalised role word that the document does not define ("the Licensor",
#: "the Customer") must occur, on its own, to count as a party: a capitalised role word is
#: a party's label in the agreements we read (common practice, no source).
MIN_UNDEFINED_USES = 1

# -- modal phrases ---------------------------------------------------------------------
#: Permissions among the rule file's weak obligation phrases and beyond: a benefit of their
#: subject.
_PERMISSIONS = frozenset({
    "may", "might", "could", "can", "is entitled to", "are entitled to", "shall be entitled to",
    "will be entitled to", "reserves the right to", "reserve the right to", "has the right to",
    "have the right to", "shall have the right to", "will have the right to", "is permitted to",
    "are permitted to", "is free to", "are free to", "retains the right to", "may elect to",
})


def _is_permission(phrase: str) -> bool:
    """Whether a modal phrase grants a right ("may", "is entitled to", "has the right to",
    also negated: "is not entitled to")."""
    return phrase in _PERMISSIONS or _EXTRA_RIGHT_RE.fullmatch(phrase) is not None
#: Verbs that make their subject promise or give something (a burden), beyond the rule
#: file's obligation words.
_EXTRA_DUTY_RE = compile_pattern(
    r"(?<![\w'])(?:hereby\s+)?(?:grants?|warrants?|represents?|undertakes?|covenants?|agrees?|"
    r"acknowledges?|assumes?|bears?|accrues?|indemnif(?:y|ies)|(?:is|are)\s+(?:liable|responsible|obliged|"
    r"required|bound|due|payable))(?![\w])", re.IGNORECASE)
_EXTRA_RIGHT_RE = compile_pattern(
    r"(?<![\w'])(?:(?:shall|will)\s+(?:not\s+)?(?:be\s+entitled|have\s+the\s+right)\s+to|"
    r"(?:(?:shall|will)\s+(?:not\s+)?have|has|have|retains?)\s+(?:the\s+|no\s+|sole\s+|exclusive\s+|full\s+|absolute\s+)*"
    r"(?:right|control|option|discretion|authority|benefit)s?\b(?:\s+to)?|"
    r"(?:is|are)\s+(?:not\s+)?(?:entitled|permitted|free)\s+to|(?:is|are)\s+(?:not\s+|non-?)?refundable)(?![\w])",
    re.IGNORECASE)
#: A negation right after a modal ("shall not", "may never") or before it ("in no event
#: shall", "no ... shall").
_NEG_AFTER_RE = compile_pattern(r"\s*(?:not\b|never\b|n['\u2019]t\b|in\s+no\s+event\b|under\s+no\s+circumstances\b)",
                                re.IGNORECASE)
_NEG_BEFORE_RE = compile_pattern(
    r"(?:\b(?:in\s+no\s+event|under\s+no\s+circumstances|neither|nor|no)\s+(?:\S+\s+){0,3})$",
    re.IGNORECASE)
#: A clause that opens with a negation governing its first modal ("In no event and under no
#: legal theory ... shall any Contributor be liable").
_NEG_OPENING_RE = compile_pattern(r"\s*(?:\(?\w{1,4}[.)]\s*)?(?:in\s+no\s+event|under\s+no\s+circumstances|neither\b|"
                                  r"nothing\b|no\s+(?!later|less|more|fewer)\w+)", re.IGNORECASE)
#: Words after a negated modal that release from a burden rather than forbid an act
#: ("shall not be liable", "shall have no obligation").
_RELEASE_RE = compile_pattern(
    r"^(?:\s*(?:not|never|in\s+any\s+event|in\s+no\s+event|under\s+any\s+circumstances))?\s*(?:\w+\s+){0,2}?"
    r"(?:be\s+(?:held\s+)?(?:liable|responsible|obliged|obligated|required|bound)|"
    r"have\s+(?:any|no)\s+(?:liability|obligation|responsibility|duty)|"
    r"(?:liable|responsible|obliged|required|bound)\b|(?:any|no)\s+(?:liability|obligation|responsibility))",
    re.IGNORECASE)
#: Nouns that, negated ("has no right to"), take a benefit away.
_RIGHT_NOUN_RE = compile_pattern(
    r"^\s*(?:\w+\s+){0,2}?(?:right|rights|licen[cs]e|entitlement|claim|remedy|permission)\b",
    re.IGNORECASE)
#: Provisions that carry no terms of the deal: what changes there (a party's address, a
#: date, the title) favours no one.
_FORMAL_KINDS = frozenset({"title", "parties", "signature"})
#: After a party's possessive: what it owes, may do or bears ("Licensee's aggregate
#: liability", "the Supplier's obligations").
_OWED_NOUN_RE = compile_pattern(r"\s+(?:\w+\s+){0,2}?(?:liabilit\w*|obligations?|responsibilit\w*|dut(?:y|ies)|"
                                r"rights?|remed(?:y|ies)|consent|approval|discretion|option|election|decision)\b",
                                re.IGNORECASE)
#: Modal phrases of money owed, whose holder is its payer (:meth:`Judge._payer`).
_MONEY_PHRASE_RE = compile_pattern(r"(?:is|are)\s+(?:due|payable|refundable)|accrues?", re.IGNORECASE)
#: Words that open a condition: a change inside one moves when the clause applies.
_CONDITION_RE = compile_pattern(r"\b(?:if|where|when|whenever|in\s+the\s+event|provided\s+that|upon|"
                                r"in\s+case|on\s+the\s+occurrence)\b", re.IGNORECASE)

# -- qualifiers, carve-outs, figures ----------------------------------------------------
#: Qualifiers that soften what they qualify (a duty is lighter, a right's trigger harder to
#: meet); the others tighten it; discretion favours whoever holds it (common practice, no
#: source).
_SOFTENERS = ("reasonable", "reasonably", "unreasonably", "material", "materially", "substantially",
              "in all material respects", "to the knowledge of", "to the best of its knowledge",
              "so far as it is aware", "reasonable efforts", "reasonable endeavours",
              "commercially reasonable efforts", "as soon as reasonably practicable",
              "commercially", "practicable")
_TIGHTENERS = ("promptly", "without undue delay", "immediately", "best efforts", "best endeavours",
               "all reasonable endeavours", "in good faith", "forthwith", "without delay", "fully",
               "strictly", "at all times", "in full")
_DISCRETION = ("sole discretion", "absolute discretion", "sole and absolute discretion",
               "at its option", "discretion")
_QUALIFIER_WORD_RE = compile_pattern(r"\b(?:" + "|".join(
    r"\s+".join(map(re.escape, q.split())) for q in sorted({*_SOFTENERS, *_TIGHTENERS}, key=lambda q: (-len(q), q)))
    + r")\b", re.IGNORECASE)
#: Words that cut an exception out of what a clause says (common practice, no source).
_CARVE_OUT_RE = compile_pattern(r"\b(?:except|excepting|unless|provided\s+that|provided\s+however|save\s+"
                                r"(?:as|that|for|where)|other\s+than|subject\s+to|to\s+the\s+extent|excluding|"
                                r"solely|only|but\s+not|limited\s+to|up\s+to|not\s+exceed\w*|in\s+excess\s+of|"
                                r"no\s+more\s+than|not\s+more\s+than|maximum|cap(?:ped)?)\b", re.IGNORECASE)
#: Words that widen what a clause covers.
_WIDEN_RE = compile_pattern(r"\b(?:including|includes|any\s+and\s+all|and/or|without\s+limitation|"
                            r"whatsoever|howsoever|all|any|every|each|indirect|consequential)\b",
                            re.IGNORECASE)
#: Words that add an item to a list (", defend", "or lost data", "A and"): the clause
#: covers more.
_LIST_ITEM_RE = compile_pattern(r"^\s*(?:,|and\b|or\b|as\s+well\s+as\b)|(?:,|\band|\bor)\s*$", re.IGNORECASE)
#: Before a period: a deadline (more time helps whoever must act) ...
_DEADLINE_RE = compile_pattern(r"\b(?:within|no\s+later\s+than|not\s+later\s+than|by|before|"
                               r"prior\s+to(?:\s+the\s+end\s+of)?|net|"
                               r"up\s+to|at\s+the\s+latest|no\s+more\s+than|not\s+more\s+than)\s*$", re.IGNORECASE)
#: ... how long a duty or right lasts ("for no less than three (3) years", "for a period of")
_DURATION_RE = compile_pattern(
    r"\b(?:for|during|period\s+of|term\s+of|lasting)\s+(?:a\s+(?:further\s+)?period\s+of\s+)?"
                          r"(?:at\s+least|no\s+less\s+than|not\s+less\s+than|up\s+to|a\s+minimum\s+of)?\s*$",
    re.IGNORECASE)
#: ... a notice or waiting period (a longer one burdens whoever must give or wait for it) ...
_NOTICE_RE = compile_pattern(r"(?:\b(?:notice|prior|advance|in\s+advance|at\s+least|not\s+less\s+than|"
                             r"no\s+less\s+than|minimum\s+of|after|following)\b)", re.IGNORECASE)
#: ... words that say what a figure limits ("shall not exceed", "up to", "a maximum of").
_LIMIT_RE = compile_pattern(r"\b(?:exceed\w*|up\s+to|maximum|max|cap(?:ped)?|limit(?:ed)?|in\s+excess\s+of|"
                            r"more\s+than|greater\s+than|at\s+most)\b", re.IGNORECASE)
#: ... and words of money or liability: a figure that measures a burden of whoever pays.
_PAYMENT_RE = compile_pattern(r"\b(?:pay\w*|paid|fees?|price|charges?|costs?|interest|royalt\w+|"
                              r"compensat\w+|damages|penalt\w+|liab\w+|sum|amounts?|refund\w*|"
                              r"reimburs\w+|invoice\w*|deposit)\b", re.IGNORECASE)
_RECEIVE_RE = compile_pattern(r"\b(?:charge|invoice|receive|recover|claim|collect|be\s+paid|be\s+entitled)\b",
                              re.IGNORECASE)
#: Characters before a figure read for the words that say what it is.
_FIGURE_CONTEXT = 60


@dataclass(frozen=True, slots=True)
class Parties:
    """The parties of a review, by the precedent's names: ``side`` maps each party to
    "supply", "buy" or None; ``forms`` each name either document writes for a party
    (case-folded) to the precedent's name."""

    names: tuple[str, ...]
    side: Mapping[str, str | None]
    forms: Mapping[str, str]

    def pattern(self) -> re.Pattern[str] | None:
        return _mention_re(tuple(sorted(self.forms, key=len, reverse=True)))


@lru_cache(maxsize=64)
def _mention_re(forms: tuple[str, ...]) -> re.Pattern[str] | None:
    if not forms:
        return None
    body = "|".join(r"\s+".join(map(re.escape, f.split())) for f in forms)
    # not the first word of a longer name ("LSI Licensed Code", "Licensee Products")
    return re.compile(r"(?<![\w-])(?:" + body + r")(?:'s|\u2019s|s'|s\u2019)?(?![\w-])(?!(?-i:[ \t]+[A-Z][a-z]))",
                      re.IGNORECASE)


def _head(name: str) -> str:
    """The last word of a name, case-folded ("Customer Data" -> "data")."""
    words = re.split(r"[\s-]+", name.casefold().strip())
    return re.sub(r"(?:'s|\u2019s)$", "", words[-1]) if words else ""


def _role(names: Iterable[str]) -> str | None:
    """"supply", "buy" or None: the side a party's names say (by their last word)."""
    for name in names:
        side = _ROLE_OF_WORD.get(_head(name))
        if side is not None:
            return side
    return None


def _describes_a_person(term: str, definition: str) -> bool:
    """Whether *definition* says *term* is a person or company: "means an individual or
    legal entity", or the words around the quoted name ("Altova GmbH ("Altova")", "("Esri"),
    a California corporation")."""
    if _PERSON_RE.search(" ".join(definition.split()[:_PERSON_WORDS_WINDOW])) and re.match(
            r"\s*(?:[\"\u201c]?[^\"\u201d]*[\"\u201d]?\s*)?(?:means|shall\s+mean|refers\s+to|is)\b",
            definition, re.IGNORECASE):
        return True
    m = next(_quoted(term, definition), None)
    if m is None:
        return False
    if _PERSON_RE.search(definition, max(0, m.start() - _PERSON_NEAR), m.start()):
        return True  # "a company incorporated in Ontario ("SOLACE")"
    after = re.match(r"\)?\s*,\s*(?:a|an)\s+(?:\S+\s+){0,4}?", definition[m.end():m.end() + _PERSON_NEAR])
    return after is not None and _PERSON_RE.match(definition, m.end() + after.end()) is not None


def _named_company(term: str, text: str) -> bool:
    """Whether *text* defines *term* as the short name of a company: "Tanuki Software, Ltd.
    ("TSI")", "Altova GmbH ("Altova")"."""
    for m in _quoted(term, text):
        if re.search(r"\(\s*(?:the\s+)?$", text[max(0, m.start() - 8):m.start()], re.IGNORECASE) and \
                _PERSON_RE.search(text, max(0, m.start() - _PERSON_NEAR), m.start()):
            return True
    return False


#: A name in quotation marks (straight or curly, double or single).
_QUOTED_RE = compile_pattern(r"[\"\u201c\u2018']([^\"\u201c\u201d\u2018\u2019'\n]{1,80})[\"\u201d\u2019']")


def _quoted(term: str, text: str) -> Iterator[re.Match[str]]:
    """Every place *text* quotes *term* (one compiled pattern for all terms)."""
    if term not in text:
        return
    for m in _QUOTED_RE.finditer(text):
        if m.group(1) == term:
            yield m


#: Characters around a quoted name read for the words that say it is a company.
_PERSON_NEAR = 80


def _names_a_party(names: Sequence[str]) -> bool:
    return any(_head(n) in _PARTY_WORDS for n in names)


_SUBJECT_RE_CACHE: dict[str, re.Pattern[str]] = {}


def _subject_uses(text: str, name: str) -> int:
    """How often *name* (as written, capitalised) is the subject of a modal in *text*."""
    pat = _SUBJECT_RE_CACHE.get(name)
    if pat is None:
        pat = _SUBJECT_RE_CACHE[name] = re.compile(
            r"(?<![\w-])" + r"\s+".join(map(re.escape, name.split()))
            + r"(?:'s|\u2019s)?\s+(?:\w+\s+){0,2}?(?:shall|will|must|may|agrees|warrants|"
            r"represents|undertakes|grants|is\s+(?:liable|responsible|entitled))\b")
    return sum(1 for _ in pat.finditer(text))


def party_terms(doc: Document) -> tuple[str, ...]:
    """The names of the parties of *doc*: its defined terms that name a side of the deal
    (a role word such as "Supplier", "Licensee", "You" as their last word), that open the
    parties provision defined as a person or company, or that are defined as a person or
    company and act as the subject of obligations at least :data:`MIN_SUBJECT_USES` times;
    then capitalised role words the document uses undefined, on their own, at least
    :data:`MIN_UNDEFINED_USES` times ("The Licensor shall ...").  In that order."""
    text = "\n".join(p.text for p in doc.provisions)
    kinds = {p.id: p.kind for p in doc.provisions}
    own_text = {p.id: p.text for p in doc.provisions}
    found: list[str] = []
    for t in doc.terms:
        if all(_head(n) in _NOT_PARTY_WORDS for n in t.names):
            continue
        around = own_text.get(t.provision, "")
        if t.span is not None:  # the definition's own sentence and a little before it
            around = around[max(0, t.span[0] - _PERSON_NEAR):t.span[1]]
        person = _describes_a_person(t.term, t.definition) or _named_company(t.term, around)
        in_front = kinds.get(t.provision) in ("parties", "title")
        if _names_a_party(t.names) or (in_front and person) or (
                person and sum(_subject_uses(text, n) for n in t.names) >= MIN_SUBJECT_USES):
            found.append(t.term)
    known = {n.casefold() for t in doc.terms for n in t.names}
    counts: dict[str, int] = {}
    # a capitalised role word on its own: not part of a longer name ("User Product", "The
    # Qt Company"), not a sentence's first word (capitalised anyway)
    for m in re.finditer(r"(?<![\w-])[A-Z][A-Za-z]+(?![\w-])(?!(?-i:\s+[A-Z][a-z]))", text):
        w = m.group()
        fold = w.casefold()
        if fold not in _PARTY_WORDS or fold in known or fold == "you":
            continue
        before = text[max(0, m.start() - 40):m.start()]
        prev = re.search(r"(\S+)\s+$", before)
        if prev is None or re.search(r"[.!?:;]$", prev.group(1)) or re.fullmatch(
                r"\(?(?:[0-9]+(?:\.[0-9]+)*|[a-z]|[ivx]+)[.)]?\)?", prev.group(1)):
            continue  # the first word of a sentence, a line or a list item
        if prev.group(1)[:1].isupper() and prev.group(1).casefold() not in _DETERMINERS:
            continue  # "The Qt Company", "SNMP Agent"
        if w.isupper() and len(w) > 1 and prev.group(1).isupper():
            continue  # a disclaimer in capitals ("... ANY AGENT OR EMPLOYEE ...")
        counts[w] = counts.get(w, 0) + 1
    for w, n in counts.items():
        if w.casefold() in known:
            continue
        if n >= MIN_UNDEFINED_USES:
            found.append(w)
            known.add(w.casefold())
    return tuple(dict.fromkeys(found))


def _names_of(doc: Document, term: str) -> tuple[str, ...]:
    for t in doc.terms:
        if t.term == term:
            return t.names
    return (term,)


def resolve_acting_for(precedent: Document, given: str) -> str:
    """The precedent's party term *given* names (any letter case, or one of its aliases);
    one line naming the party terms found when none matches."""
    wanted = " ".join(given.split()).casefold()
    names = party_terms(precedent)
    for n in names:
        if wanted in {a.casefold() for a in _names_of(precedent, n)}:
            return n
    found = ", ".join(names) if names else "none"
    raise CounterdraftError(f"--acting-for {given!r} is no party of the precedent (party terms found: {found})",
                            path=precedent.source)


def find_parties(draft: Document, precedent: Document, term_map: Sequence[TermMapping]) -> Parties:
    """The parties of a review: the precedent's party terms with every name either document
    writes for them (aliases, and the draft's names through the term map)."""
    names = party_terms(precedent)
    forms: dict[str, str] = {}
    side: dict[str, str | None] = {}
    for n in names:
        aliases = _names_of(precedent, n)
        side[n] = _role(aliases)
        for a in aliases:
            forms.setdefault(a.casefold(), n)
    to_precedent = {m.draft: m.precedent for m in term_map}
    for n in party_terms(draft):
        target = to_precedent.get(n, n)
        owner = forms.get(target.casefold())
        if owner is None:
            continue
        for a in _names_of(draft, n):
            forms.setdefault(a.casefold(), owner)
    # "You" is also written "you", "your": the same party
    for form in list(forms):
        if form == "you":
            forms.setdefault("your", forms[form])
    # a party whose name says no side ("the Company") is on the side no other party is on:
    # among the parties the precedent defines, then among all
    defined = {t.term for t in precedent.terms}
    for group in ([n for n in names if n in defined], list(names)):
        _fill_sides(group, side)
    return Parties(names, side, forms)


def _fill_sides(group: Sequence[str], side: dict[str, str | None]) -> None:
    """Give the parties of *group* whose name says no side the side no other party of the
    group is on (in place in *side*)."""
    known = {side[n] for n in group if side[n]}
    unknown = [n for n in group if side[n] is None]
    if unknown and len(known) == 1:
        other = "buy" if "supply" in known else "supply"
        for n in unknown:
            side[n] = other
    elif len(unknown) == 2 and not known:
        side[unknown[0]], side[unknown[1]] = "supply", "buy"


# ----------------------------------------------------------------------------------------
# Reading a clause
# ----------------------------------------------------------------------------------------

BURDEN, BENEFIT = -1, 1


@dataclass(frozen=True, slots=True)
class Holding:
    """What a clause is for whom: *holder* (a precedent party name, ``MUTUAL`` or None),
    *stance* (BURDEN or BENEFIT), the modal phrase, and whether it is negated."""

    holder: str | None
    stance: int
    modal: str
    negated: bool
    release: bool
    start: int  # offset of the modal in the text
    end: int


MUTUAL = "\x00each party"
#: Where a change sits in a provision's text: ``text[a:b]``.
Span = tuple[int, int]
#: A party named in a text: (start, end, the precedent's name of the party).
_Mention = tuple[int, int, str]


class JudgedChange(Protocol):
    """What :meth:`Judge.judge` reads of a deviation: the fields of
    :class:`core.model.Deviation` it needs and the ``signals`` the severity rules found."""

    @property
    def category(self) -> str: ...
    @property
    def change(self) -> str: ...
    @property
    def part(self) -> str: ...
    @property
    def reasons(self) -> tuple[str, ...]: ...
    @property
    def draft_text(self) -> str: ...
    @property
    def precedent_text(self) -> str: ...
    @property
    def draft_provision(self) -> str | None: ...
    @property
    def precedent_provision(self) -> str | None: ...
    @property
    def draft_span(self) -> Span | None: ...
    @property
    def precedent_span(self) -> Span | None: ...
    @property
    def signals(self) -> tuple[Signal, ...]: ...


#: A clause that only qualifies the one before it ("; provided that ...", "; and ..."):
#: read with it.
_PROVISO_RE = compile_pattern(r"\s*(?:\([a-z0-9]{1,4}\)\s*)?(?:provided|but|and|or|unless|except|save|subject|"
                              r"in\s+which\s+case|failing\s+which)\b", re.IGNORECASE)


def _clause_bounds(text: str, span: tuple[int, int]) -> tuple[int, int]:
    """The clause around *span*: its sentence cut at ";", joined with the clause before when
    it only qualifies it ("...; provided, however, that ...")."""
    lo, hi = sentence_bounds(text, span)
    while lo > 1 and text[lo - 1].isspace() and text[:lo].rstrip().endswith(";") and _PROVISO_RE.match(text, lo):
        lo = sentence_bounds(text, (lo - 2, lo - 2))[0]
    return lo, hi


def _whole_sentence(text: str, span: tuple[int, int]) -> tuple[int, int]:
    """The sentence around *span*, not cut at ";" (a list of items after "shall not:")."""
    a, b = span
    start = 0
    for m in re.finditer(r"(?<=[.!?])\s+(?=[A-Z(\"\u201c0-9])|\n\s*\n", text[:a]):
        start = m.end()
    end = re.compile(r"(?<=[.!?])\s+(?=[A-Z(\"\u201c0-9])|\n\s*\n").search(text, max(b, start))
    return start, (end.start() if end else len(text))


class Judge:
    """Judges deviations for one review (see the module's notes)."""

    def __init__(self, *, parties: Parties, acting_for: str, rules: SeverityRules,
                 draft: Document, precedent: Document) -> None:
        self.parties = parties
        self.acting_for = acting_for
        self.rules = rules
        self.draft = draft
        self.precedent = precedent
        self._mentions = parties.pattern()
        self._dpos = {p.id: p for p in draft.provisions}
        self._ppos = {p.id: p for p in precedent.provisions}

    # -- mentions and modals --------------------------------------------------------------
    def _party_at(self, text: str, lo: int, hi: int) -> list[tuple[int, int, str]]:
        """Party mentions in text[lo:hi]: (start, end, party name or MUTUAL)."""
        out: list[tuple[int, int, str]] = []
        if self._mentions is not None:
            for m in self._mentions.finditer(text, lo, hi):
                s = m.group()
                base = re.sub(r"(?:'s|\u2019s|s'|s\u2019)$", "", s)
                owner = self.parties.forms.get(" ".join(base.split()).casefold())
                if owner is None:
                    owner = self.parties.forms.get(" ".join(s.split()).casefold())
                if owner is None:
                    continue
                if not s[:1].isupper() and base.casefold() not in ("you", "your"):
                    continue  # "licensee" in lower case is a word, not the party
                out.append((m.start(), m.end(), owner))
        for m in _MUTUAL_RE.finditer(text, lo, hi):
            if any(a < m.end() and m.start() < b for a, b, _o in out):
                continue
            out.append((m.start(), m.end(), MUTUAL))
        out.sort()
        return out

    def _modals(self, text: str, lo: int, hi: int) -> list[tuple[int, int, str]]:
        rights = [(m.start(), m.end(), " ".join(m.group().lower().split()))
                  for m in _EXTRA_RIGHT_RE.finditer(text, lo, hi)]  # "shall have the right to" first
        found = [m for m in phrase_matches(self.rules, "obligation", text) if lo <= m[0] < hi
                 and not any(a < m[1] and m[0] < b for a, b, _p in rights)] + rights
        for m in _EXTRA_DUTY_RE.finditer(text, lo, hi):
            if not any(a < m.end() and m.start() < b for a, b, _p in found):
                found.append((m.start(), m.end(), " ".join(m.group().lower().split())))
        found.sort()
        return found

    def _holding_of(self, text: str, modal: tuple[int, int, str], lo: int,
                    modals: Sequence[tuple[int, int, str]], parent: str | None) -> Holding:
        ms, me, phrase = modal
        after = text[me:me + 80]
        before = text[max(lo, ms - 60):ms]
        negated = (bool(_NEG_AFTER_RE.match(after)) or bool(_NEG_BEFORE_RE.search(before))
                   or re.search(r"\b(?:not|no)\s|\bnon-?refundable", phrase) is not None
                   or (_NEG_OPENING_RE.match(text, lo) is not None
                       and not any(lo <= m[0] < ms for m in modals if m[0] != ms)))
        if not negated and _EXTRA_DUTY_RE.fullmatch(phrase) is None and re.match(r"\s+(?:have|has)\s+no\b", after):
            negated = True
        permission = _is_permission(phrase)
        release = False
        if negated and not permission and _RELEASE_RE.match(after):
            release = True
        right_noun = negated and bool(_RIGHT_NOUN_RE.match(re.sub(r"^\s*(?:not|no|have|has)\s+", "", after)))
        if re.match(r"(?:is|are)\s+(?:liable|responsible|obliged|required|bound)", phrase) and negated:
            release = True
        if permission:
            stance = BURDEN if negated else BENEFIT
        elif release:
            stance = BENEFIT
        elif right_noun:
            stance = BURDEN
        else:
            stance = BURDEN
        holder = self._holder(text, modal, lo, modals, parent)
        return Holding(holder, stance, phrase, negated, release, ms, me)

    def _holder(self, text: str, modal: tuple[int, int, str], lo: int,
                modals: Sequence[tuple[int, int, str]], parent: str | None) -> str | None:
        ms, me, _phrase = modal
        # the passive's agent: "shall be paid by the Customer"
        m = re.match(r"(?:\s+not)?\s+be\s+\w+(?:ed|en|id|wn)\s+(?:\w+\s+){0,3}?by\s+", text[me:me + 80])
        if m:
            got = self._party_at(text, me + m.end(), me + m.end() + 40)
            if got and got[0][0] - (me + m.end()) <= 5:
                return got[0][2]
        # inverted: "in no event shall LICENSOR be liable"
        got = self._party_at(text, me, me + 40)
        if got and re.fullmatch(r"\s*(?:(?:the|any|a|an|each)\s+)?", text[me:got[0][0]], re.IGNORECASE) and (
                re.search(r"\b(?:event|circumstances?|neither|nor)\s*$", text[max(lo, ms - 30):ms], re.IGNORECASE)
                or re.search(r"[,;]\s*$", text[max(lo, ms - 3):ms])):
            return got[0][2]  # "..., shall any Contributor be liable"
        # the subject: the nearest party before the modal, after the previous modal
        prev_end = max([e for s, e, _p in modals if e <= ms] or [lo])
        mentions = [mm for mm in self._party_at(text, max(lo, prev_end), ms) if not self._owns_a_thing(text, mm)]

        def after(words: str, mm: tuple[int, int, str]) -> bool:
            return re.search(r"\b(?:" + words + r")\s+(?:the\s+)?$", text[max(lo, mm[0] - 25):mm[0]],
                             re.IGNORECASE) is not None

        subjects = [mm for mm in mentions
                    if not after(r"to|from|against|with|for|by|than|of|on\s+behalf\s+of|notify|inform", mm)]
        if subjects:
            return subjects[-1][2]
        if _MONEY_PHRASE_RE.fullmatch(_phrase):
            return self._payer(text, ms, me, lo, mentions, after)
        # "damages from X to Y shall not exceed", "liability of X": the one who owes
        owing = [mm for mm in mentions if after(r"from|of|by", mm)]
        if owing:
            return owing[-1][2]
        if mentions:
            return mentions[-1][2]
        # no party since the previous modal: that modal's holder ("Licensor warrants that
        # the Software will ...")
        earlier = [md for md in modals if md[1] <= ms]
        if earlier:
            return self._holder(text, earlier[-1], lo, [md for md in modals if md[1] <= earlier[-1][0]], parent)
        return parent

    @staticmethod
    def _owns_a_thing(text: str, mention: tuple[int, int, str]) -> bool:
        """Whether a possessive mention names what a party owns ("LSI's confidential
        information") rather than what it owes or may do ("Licensee's liability", "the
        Supplier's obligations"), which makes it no subject."""
        s, e, _owner = mention
        if not re.search(r"(?:'s|\u2019s|s'|s\u2019)$", text[s:e]):
            return False
        return not _OWED_NOUN_RE.match(text, e)

    def _payer(self, text: str, ms: int, me: int, lo: int, mentions: Sequence[_Mention],
               after: Callable[[str, _Mention], bool]) -> str | None:
        """Who owes money that "is due", "is payable", "accrues" or "is refundable": the
        party it is payable by ("payable by Licensee"), else the other side of the party that
        issues the invoice ("invoices issued by the Supplier are due"), else the buying side,
        who pays in a commercial agreement ("all amounts payable are due net 30 days"; common
        practice, no source)."""
        _lo, hi = _clause_bounds(text, (ms, me))
        for s, _e, owner in self._party_at(text, me, hi):
            if re.search(r"\b(?:by|from)\s+(?:the\s+)?$", text[max(me, s - 12):s], re.IGNORECASE):
                return owner
        sides = self.parties.side
        issuers = [mm for mm in mentions if after(r"by|to", mm)]
        if issuers:
            by = issuers[-1][2]
            others = [n for n in self.parties.names if sides.get(n) and sides.get(n) != sides.get(by)]
            return others[0] if others else None
        payers = [mm for mm in mentions if after(r"from|of", mm)]
        if payers:
            return payers[-1][2]
        return next((n for n in self.parties.names if sides.get(n) == "buy"), None)

    def holding(self, text: str, span: tuple[int, int], *, parent_text: str | None = None
                ) -> Holding | None:
        """How the clause of *text* around *span* stands for whom (None: no modal, no
        parent lead-in)."""
        lo, hi = _clause_bounds(text, span)
        modals = self._modals(text, lo, hi)
        if not modals:  # a list item: the sentence's lead-in, else the parent's
            slo, shi = _whole_sentence(text, span)
            modals = [m for m in self._modals(text, slo, shi) if m[1] <= span[0]]
            if modals:
                lo = slo
        if not modals and lo > 0:
            # a sentence without a modal that qualifies the one before ("The Supplier shall
            # deliver ... Time of delivery is not of the essence."): the provision's last
            # modal before it
            earlier = self._modals(text, 0, lo)
            if earlier:
                lo = _clause_bounds(text, (earlier[-1][0], earlier[-1][1]))[0]
                modals = self._modals(text, lo, earlier[-1][1])
        parent = None
        parent_holding = None
        if parent_text:
            parent_holding = self._lead_in(parent_text)
            parent = parent_holding.holder if parent_holding else None
        if not modals:
            return parent_holding
        before = [m for m in modals if m[0] < max(span[1], span[0] + 1)]
        modal = before[-1] if before else modals[0]
        return self._holding_of(text, modal, lo, modals, parent)

    def _lead_in(self, text: str) -> Holding | None:
        """The holding of a parent provision's last clause ("The Customer shall:")."""
        if not text.strip():
            return None
        lo, hi = _clause_bounds(text, (len(text.rstrip()), len(text.rstrip())))
        modals = self._modals(text, lo, hi)
        if not modals:
            return None
        return self._holding_of(text, modals[-1], lo, modals, None)

    # -- the judgement --------------------------------------------------------------------
    def relative(self, holder: str | None) -> int | None:
        """+1 when *holder* is the acting party or on its side, -1 when on the other side,
        0 for a clause binding each party, None when unknown."""
        if holder is None:
            return None
        if holder == MUTUAL:
            return 0
        if holder == self.acting_for:
            return 1
        a, h = self.parties.side.get(self.acting_for), self.parties.side.get(holder)
        if a is not None and h is not None:
            return 1 if a == h else -1
        if len(self.parties.names) == 2:
            return -1  # the other party
        return None  # a third party of unknown side

    def _name(self, holder: str) -> str:
        return "each party" if holder == MUTUAL else f"the {holder}" if holder.casefold() not in ("you",) else holder


    # -- effects --------------------------------------------------------------------------
    def judge(self, v: JudgedChange) -> tuple[Direction, str | None]:
        """(direction, reason naming the parties or None) of deviation *v*, which has the
        attributes of :class:`core.model.Deviation` and the ``signals`` the rules found."""
        if v.category != "substantive" or v.part == "heading" or v.change == "move":
            return NEUTRAL, None
        if any(r.startswith(BLANK_FILLED) for r in v.reasons):  # a value the precedent asked for
            return NEUTRAL, None
        if v.part == "provision":
            # the words of the whole subtree added or removed
            if v.change == "add-provision":
                return self._verdict(self._clauses(v.draft_text, added=True))
            if v.change == "remove-provision":
                return self._verdict(self._clauses(v.precedent_text, added=False))
            return NEUTRAL, None
        dp = self._dpos.get(v.draft_provision) if v.draft_provision else None
        pp = self._ppos.get(v.precedent_provision) if v.precedent_provision else None
        if dp is None or pp is None or v.draft_span is None or v.precedent_span is None:
            return UNCLEAR, None
        effects = self._text_effects(v, (pp, v.precedent_span), (dp, v.draft_span))
        if not effects and pp.kind in _FORMAL_KINDS:  # the names and dates of the parties
            return NEUTRAL, None
        return self._verdict(effects)

    def _parent_text(self, doc_pos: Mapping[str, Provision], p: Provision) -> str | None:
        parent = doc_pos.get(p.parent) if p.parent else None
        return parent.text if parent is not None else None

    def _text_effects(self, v: JudgedChange, precedent: tuple[Provision, Span],
                      draft: tuple[Provision, Span]) -> list[_Effect]:
        (pp, ps), (dp, ds) = precedent, draft
        P, D = pp.text, dp.text
        hp = self.holding(P, ps, parent_text=self._parent_text(self._ppos, pp))
        hd = self.holding(D, ds, parent_text=self._parent_text(self._dpos, dp))
        h = hd or hp
        names = {s.name for s in v.signals}
        out: list[_Effect] = []
        if "party_swapped" in names and hp and hd and hp.holder != hd.holder:
            what = "obligation" if hd.stance == BURDEN else "right"
            quote = _excerpt(D, hd.start)
            out.append(_Effect(hd.stance, hd.holder, f"moves the {what} ('{quote}') from "
                               f"{self._name(hp.holder) if hp.holder else 'the precedent party'} to "
                               f"{self._name(hd.holder) if hd.holder else 'another party'}", hd.stance))
            if hp.holder is not None:
                out.append(_Effect(-hp.stance, hp.holder, "", hp.stance))
            return out
        modal_signals = names & {"obligation_weakened", "obligation_strengthened", "obligation_added",
                                 "obligation_removed", "negation_added", "negation_removed"}
        if modal_signals and hp and hd:
            got = self._modal_effect(hp, hd, modal_signals, D)
            if got is not None:
                out.append(got)
        if h is None:
            return out + self._new_clauses(P, D, ps, ds)
        for s in v.signals:
            if s.name == "efforts_weakened":
                out.append(self._effect(h, +1, D, "lowers the efforts standard of"))
            elif s.name == "efforts_strengthened":
                out.append(self._effect(h, -1, D, "raises the efforts standard of"))
            elif s.name in ("qualifier_added", "qualifier_removed", "qualifier_changed"):
                e = self._qualifier_effect(s, h, D, ds)
                if e is not None:
                    out.append(e)
            elif s.name in ("conjunction_in_obligation", "conjunction_changed"):
                e = self._conjunction_effect(s, h, D, ds)
                if e is not None:
                    out.append(e)
        if names & {"number_changed", "number_added", "number_removed", "interest_rate_changed"} or \
                any(r.startswith("figure ") for r in v.reasons):
            out += self._figure_effects(h, P, ps, D, ds)
        elif "wording_changed" in names:  # "one copy" -> "two copies": a count in words
            old, new = _count_in_words(P[ps[0]:ps[1]]), _count_in_words(D[ds[0]:ds[1]])
            if old is not None and new is not None and old != new:
                out.append(_Effect(h.stance if new > old else -h.stance, h.holder,
                                   f"('{_excerpt(D, h.start)}')", h.stance, release=h.release))
            else:  # "twice the fees" for "the fees": a multiple added or removed
                factor = _multiplier(D[ds[0]:ds[1]]) / _multiplier(P[ps[0]:ps[1]])
                if factor != 1:
                    at = _Figure(ds[0], max(ds[1], ds[0] + 1), "amount")
                    e = self._figure_effect(h, D, at, higher=factor > 1)
                    if e is not None:
                        out.append(e)
        if not out and names & {"sentence_inserted", "sentence_deleted", "wording_changed",
                                "obligation_added", "obligation_removed"}:
            out += self._new_clauses(P, D, ps, ds)
            if not out:
                out += self._scope_effects(h, P, ps, D, ds)
        return out

    def _effect(self, h: Holding, lighter: int, text: str, verb: str) -> _Effect:
        """The effect of a change that makes the clause lighter (*lighter* +1) or heavier
        (-1) for its holder when it is a burden -- and the reverse when it is a benefit (a
        lighter standard narrows a right)."""
        value = lighter if h.stance == BURDEN else -lighter
        return _Effect(value, h.holder, f"{verb} ('{_excerpt(text, h.start)}')", h.stance)

    def _narrowing(self, h: Holding, narrows: bool, text: str) -> _Effect:
        """A change that narrows (or widens) what the clause gives or asks of its holder."""
        value = (-h.stance if narrows else h.stance)
        return _Effect(value, h.holder, f"('{_excerpt(text, h.start)}')", h.stance, release=h.release)

    def _modal_effect(self, hp: Holding, hd: Holding, names: set[str], D: str) -> _Effect | None:
        def val(h: Holding) -> float:
            if h.stance == BENEFIT:
                return 1.0
            weak = h.modal not in self.rules.strong and not _EXTRA_DUTY_RE.fullmatch(h.modal)
            return -0.5 if weak and not h.negated else -1.0
        delta = val(hd) - val(hp)
        if delta == 0 and "negation_added" in names:
            delta = 1.0 if hp.stance == BURDEN else -1.0
        elif delta == 0 and "negation_removed" in names:
            delta = -1.0 if hd.stance == BURDEN else 1.0
        if delta == 0:
            return None
        holder = hd.holder or hp.holder
        return _Effect(1 if delta > 0 else -1, holder,
                       f"('{_excerpt(D, hd.start)}', was '{hp.modal}{' not' if hp.negated else ''}')",
                       hp.stance)

    def _qualifier_effect(self, s: Signal, h: Holding, D: str, ds: Span) -> _Effect | None:
        quoted = re.findall(r"'([^']*)'", s.reason)
        if not quoted:
            return None
        if s.name == "qualifier_changed" and len(quoted) >= 2:
            old, new = _qualifier_kind(quoted[0]), _qualifier_kind(quoted[1])
            if old == new:
                return None
            if 0 in (old, new):  # discretion gained or lost by the holder
                return _Effect(1 if new == 0 else -1, h.holder,
                               f"('{_excerpt(D, h.start)}'): discretion {'given to' if new == 0 else 'taken from'}",
                               h.stance)
            narrows = new < old
        else:
            kind = _qualifier_kind(quoted[0])
            added = s.name == "qualifier_added"
            if kind == 0:
                return _Effect(1 if added else -1, h.holder,
                               f"('{_excerpt(D, h.start)}'): discretion {'given to' if added else 'taken from'}",
                               h.stance)
            narrows = (kind < 0) == added
        if self._in_carve_out(D, ds, h):
            narrows = not narrows
        return self._narrowing(h, narrows, D)

    def _in_carve_out(self, text: str, span: Span, h: Holding) -> bool:
        """Whether *span* lies in an exception of the clause ("unless", "except"): a change
        there works the other way round."""
        lo, _hi = _clause_bounds(text, span)
        before = text[max(lo, h.end):span[0]]
        return re.search(r"\b(?:except|excepting|unless|other\s+than|excluding|save\s+(?:as|that|for|where))\b",
                         before, re.IGNORECASE) is not None

    def _in_condition(self, text: str, span: Span, h: Holding) -> bool:
        lo, _hi = _clause_bounds(text, span)
        conds = list(_CONDITION_RE.finditer(text, lo, span[0]))
        if not conds:
            return False
        last = conds[-1].end()
        return not (last < h.start < span[0])

    def _conjunction_effect(self, s: Signal, h: Holding, D: str, ds: Span) -> _Effect | None:
        quoted = re.findall(r"'([^']*)'", s.reason)
        if len(quoted) < 2:
            return None
        old, new = quoted[0].split(), quoted[1].split()
        if not ({*old, *new} <= {"and", "or", "and/or"}) or not old or not new:
            return None
        to_or = new[-1] in ("or", "and/or") and old[-1] == "and"
        to_and = new[-1] == "and" and old[-1] in ("or", "and/or")
        if not (to_or or to_and):
            return None
        if self._in_condition(D, ds, h):
            widens = to_or  # "if A and B" -> "if A or B": applies more often
        elif h.negated:
            widens = to_or  # "shall not A and B" -> "shall not A or B": forbids more
        else:
            widens = to_and  # "shall A or B" -> "shall A and B": asks more
        if self._in_carve_out(D, ds, h):
            widens = not widens
        return self._narrowing(h, not widens, D)

    def _figure_effects(self, h: Holding, P: str, ps: Span, D: str, ds: Span) -> list[_Effect]:
        def inside(text: str, span: Span) -> list[Quantity]:
            a, b = span
            qs = find_quantities(text, around=span)
            if a == b:
                return [q for q in qs if q.start < a < q.end]
            return [q for q in qs if q.start < b and q.end > a]

        olds, news = inside(P, ps), inside(D, ds)
        out: list[_Effect] = []
        for kind in ("amount", "percentage", "duration", "number"):
            o = [q for q in olds if q.kind == kind]
            n = [q for q in news if q.kind == kind]
            for a, b in zip(o, n):
                va, vb = _magnitude(a), _magnitude(b)
                if va == vb:
                    continue
                e = self._figure_effect(h, D, b, higher=vb > va)
                if e is not None:
                    out.append(e)
            for q in n[len(o):]:
                e = self._limit_effect(h, D, q, added=True)
                if e is not None:
                    out.append(e)
            for q in o[len(n):]:
                e = self._limit_effect(h, P, q, added=False)
                if e is not None:
                    out.append(e)
        return out

    def _context(self, text: str, q: Quantity | _Figure) -> tuple[str, str, str]:
        lo, hi = _clause_bounds(text, (q.start, q.end))
        return (text[max(lo, q.start - _FIGURE_CONTEXT):q.start], text[q.end:min(hi, q.end + 30)],
                text[lo:hi])

    def _figure_effect(self, h: Holding, D: str, q: Quantity | _Figure, *, higher: bool) -> _Effect | None:
        before, after, clause = self._context(D, q)
        what = f"('{_excerpt(D, h.start)}')"
        if q.kind == "duration":
            if _DURATION_RE.search(before):  # how long the duty or right lasts
                return _Effect(h.stance if higher else -h.stance, h.holder, what, h.stance)
            if _DEADLINE_RE.search(before):  # more time to act helps whoever acts
                actor = self._actor(D, h, q.start)
                return _Effect(1 if higher else -1, actor, what, h.stance, "time")
            if _NOTICE_RE.search(before[-25:]) or re.match(
                    r"\W*\s*(?:(?:written\s+|prior\s+)?(?:notice|prior|in\s+advance|before)|"
                    r"(?:after|following)\s+(?:\w+\s+){0,2}?notice)", after, re.IGNORECASE):
                return _Effect(-1 if higher else 1, h.holder, what, h.stance, "notice")
            return _Effect(h.stance if higher else -h.stance, h.holder, what, h.stance)
        money = _PAYMENT_RE.search(clause) is not None
        receives = h.stance == BENEFIT and not h.release and _RECEIVE_RE.search(clause) is not None
        if _LIMIT_RE.search(before[-30:]) or _LIMIT_RE.search(after[:15]):
            if money and not receives:  # a cap on what the holder pays or owes
                return _Effect(-1 if higher else 1, h.holder, what, h.stance, "cap")
            return _Effect(1 if higher else -1, h.holder, what, h.stance, "limit")
        if money:
            sign = 1 if receives or (h.stance == BENEFIT and not h.release) else -1
            return _Effect(sign if higher else -sign, h.holder, what, h.stance, "amount")
        return _Effect(h.stance if higher else -h.stance, h.holder, what, h.stance)

    def _actor(self, text: str, h: Holding, at: int) -> str | None:
        """Who must act by a deadline at *at*: the subject named between the clause's modal
        and the deadline ("LSI may terminate ... unless Licensee cures the breach within 60
        days"), else the clause's holder."""
        lo, _hi = _clause_bounds(text, (at, at))
        start = h.end if lo <= h.end <= at else lo
        for s, _e, owner in reversed(self._party_at(text, start, at)):
            if not re.search(r"\b(?:to|from|against|with|for|by|than|of|notify|inform)\s+(?:the\s+)?$",
                             text[max(start, s - 25):s], re.IGNORECASE) and \
                    re.match(r"\s+(?:\w+ly\s+)?(?!(?:of|to|and|or|with|for|by|from|in|on|at|under|that|which|"
                             r"who|as|is|are|was|were|has|have|had|be|been|shall|will|may|must)\b)[a-z]\w*\b",
                             text[_e:_e + 40]) and \
                    not re.match(r"\s+(?:is|are|was|were|be|been)\s+\w+(?:ed|en)\b", text[_e:_e + 40]) and \
                    owner != MUTUAL:
                return owner
        return h.holder

    def _limit_effect(self, h: Holding, text: str, q: Quantity | _Figure, *, added: bool) -> _Effect | None:
        """A figure that only one side has: a cap or limit introduced (or dropped)."""
        before, after, clause = self._context(text, q)
        if not (_LIMIT_RE.search(before[-30:]) or _LIMIT_RE.search(after[:15])):
            return None
        money = _PAYMENT_RE.search(clause) is not None
        receives = h.stance == BENEFIT and not h.release and _RECEIVE_RE.search(clause) is not None
        helps = money and not receives  # a cap on a burden helps its holder
        value = 1 if helps else -1
        return _Effect(value if added else -value, h.holder, f"('{_excerpt(text, h.start)}')", h.stance, "cap")

    def _new_clauses(self, P: str, D: str, ps: Span, ds: Span) -> list[_Effect]:
        """Clauses with their own modal inside the words added (or removed)."""
        out: list[_Effect] = []
        for text, span, added in ((D, ds, True), (P, ps, False)):
            a, b = span
            if b - a < 3:
                continue
            modals = [m for m in self._modals(text, a, b)]
            for m in modals:
                lo, _hi = _clause_bounds(text, (m[0], m[1]))
                h = self._holding_of(text, m, lo, self._modals(text, lo, _hi), None)
                if h.holder is None:
                    continue
                value = h.stance if added else -h.stance
                verb = "adds" if added else "removes"
                what = "an obligation on" if h.stance == BURDEN else "a right of"
                if h.release:
                    what = "a release of"
                out.append(_Effect(value, h.holder, f"{verb} {what} {{holder}} ('{_excerpt(text, m[0])}')",
                                   h.stance, "clause"))
        return out

    def _scope_effects(self, h: Holding, P: str, ps: Span, D: str, ds: Span) -> list[_Effect]:
        """Words added or removed that cut an exception out of the clause or widen it."""
        added, removed = D[ds[0]:ds[1]], P[ps[0]:ps[1]]
        score = 0
        for words, sign in ((added, 1), (removed, -1)):  # "promptly", "reasonably" ...
            for q in _QUALIFIER_WORD_RE.findall(words):
                kind = _qualifier_kind(q)
                score += sign * (-1 if kind > 0 else 1) if kind != 0 else 0
        if score:
            return [self._narrowing(h, score > 0, D)]
        if _CARVE_OUT_RE.search(added):
            score += 1
        if _CARVE_OUT_RE.search(removed):
            score -= 1
        if score == 0:
            if _WIDEN_RE.search(added) and not _WIDEN_RE.search(removed):
                score = -1
            elif _WIDEN_RE.search(removed) and not _WIDEN_RE.search(added):
                score = 1
        if score == 0:  # an item added to a list ("indemnify, defend and hold"), or removed
            if _LIST_ITEM_RE.search(added) and not removed.strip():
                score = -1
            elif _LIST_ITEM_RE.search(removed) and not added.strip():
                score = 1
        if score == 0:
            return []
        narrows = score > 0
        if self._in_carve_out(D, ds, h):
            narrows = not narrows
        return [self._narrowing(h, narrows, D)]

    def _clauses(self, text: str, *, added: bool) -> list[_Effect]:
        return self._new_clauses("" if added else text, text if added else "",
                                 (0, 0 if added else len(text)), (0, len(text) if added else 0))

    # -- the verdict ------------------------------------------------------------------------
    def _verdict(self, effects: Sequence[_Effect]) -> tuple[Direction, str | None]:
        known = [(e, self.relative(e.holder)) for e in effects]
        judged = [(e, r) for e, r in known if r is not None]
        if not judged:
            return UNCLEAR, None
        if all(r == 0 for _e, r in judged):
            e = judged[0][0]
            return NEUTRAL, f"{self._describe(e)}: it binds each party alike"
        total = sum(e.value * r for e, r in judged)
        if total == 0:
            return UNCLEAR, None
        direction: Direction = FAVOURABLE if total > 0 else ADVERSE
        lead = next(e for e, r in judged if r != 0 and e.text)
        return direction, f"{self._describe(lead)}: {direction} to the {self.acting_for}" \
            if self.acting_for.casefold() != "you" else f"{self._describe(lead)}: {direction} to You"

    def _describe(self, e: _Effect) -> str:
        holder = self._name(e.holder) if e.holder else "a party"
        possessive = "each party's" if e.holder == MUTUAL else "Your" if holder.casefold() == "you" else (
            f"{holder}'s" if not holder.endswith("s") else f"{holder}'")
        if "{holder}" in e.text:
            return e.text.replace("{holder}", holder)
        if e.text.startswith("moves") or e.text.startswith("lowers") or e.text.startswith("raises"):
            if e.text.startswith(("lowers", "raises")):
                verb, rest = e.text.split(" of ", 1)
                return f"{verb} of {possessive} obligation {rest}"
            return e.text
        if e.kind == "time":
            return f"{'gives' if e.value > 0 else 'leaves'} {holder} {'more' if e.value > 0 else 'less'} time {e.text}"
        if e.kind == "notice":
            change = "shortens" if e.value > 0 else "lengthens"
            return f"{change} a notice period {holder} must give or wait for {e.text}"
        if e.kind == "cap":
            return f"{'lowers' if e.value > 0 else 'raises'} the limit of {possessive} liability or payment {e.text}"
        if e.stance == BURDEN:
            verb = "lightens" if e.value > 0 else "adds to"
            return f"{verb} {possessive} obligation {e.text}"
        verb = "widens" if e.value > 0 else "narrows"
        return f"{verb} {possessive} {'protection' if e.release else 'right'} {e.text}"


@dataclass(frozen=True, slots=True)
class _Effect:
    """+1 (*value*) when the change favours *holder*, -1 when it goes against it."""

    value: int
    holder: str | None
    text: str
    stance: int
    kind: str = ""
    release: bool = False


@dataclass(frozen=True, slots=True)
class _Figure:
    """Where a figure stands in a text, and its kind (as :class:`.severity.Quantity`)."""

    start: int
    end: int
    kind: str


#: Words that multiply the sum they come before ("twice the fees"; common English).
_MULTIPLIERS = {"twice": 2.0, "double": 2.0, "treble": 3.0, "triple": 3.0, "half": 0.5,
                "one half": 0.5, "two times": 2.0, "three times": 3.0, "quarter": 0.25}


def _multiplier(words: str) -> float:
    """The factor *words* put before a sum (1 when none)."""
    w = " ".join(words.casefold().replace(" of", "").split())
    return _MULTIPLIERS.get(w, 1.0)


def _count_in_words(s: str) -> float | None:
    """The count a few words give ("two copies" -> 2), or None."""
    words = s.casefold().split()
    if not words or len(words) > 3:
        return None
    return number_in_words(words[0])


#: Rough length of each unit of a period in days, to compare "30 days" with "1 month".
_UNIT_DAYS = {"minutes": 1 / 1440, "hours": 1 / 24, "days": 1.0, "business days": 1.4,
              "working days": 1.4, "banking days": 1.4, "calendar days": 1.0, "clear days": 1.0,
              "weeks": 7.0, "months": 30.0, "quarters": 91.0, "years": 365.0}


def _magnitude(q: Quantity) -> float:
    if q.kind == "duration":
        return q.value * _UNIT_DAYS.get(q.unit, _UNIT_DAYS.get(q.unit.split()[-1], 1.0))
    return q.value


def _excerpt(text: str, start: int, words: int = 8) -> str:
    w = text[start:].split()
    s = " ".join(w[:words])
    return s + ("\u2026" if len(w) > words else "")


def _qualifier_kind(q: str) -> int:
    """+1 a qualifier that tightens, -1 one that softens, 0 discretion (see _DISCRETION)."""
    q = q.casefold()
    if any(q == d or q.endswith(d) for d in _DISCRETION):
        return 0
    if any(q == t or t in q for t in _TIGHTENERS):
        return 1
    return -1


def direction_rank_key(severity: int, direction: str) -> tuple[float, int]:
    """Sort key of a deviation for the ranking (ascending): severity first, a favourable
    one as if :data:`FAVOURABLE_RANK_SHARE` of it; at equal severity, :data:`RANK_ORDER`."""
    effective = severity * FAVOURABLE_RANK_SHARE if direction == FAVOURABLE else float(severity)
    return (-effective, RANK_ORDER.index(direction) if direction in RANK_ORDER else len(RANK_ORDER))


__all__ += ["BENEFIT", "BURDEN", "Holding", "MUTUAL"]
