"""Drafting checks: the mechanical reading a careful associate gives every draft.

Five kinds (:data:`CHECK_KINDS`), each a plain :class:`Check` naming the document, the
provision and the words concerned:

``undefined-term``
    A capitalised phrase used the way a defined term is used, that the document defines
    nowhere.  Two readings, both conservative (a well-drafted document should raise none):

    * a term the *precedent* defines that the draft uses, capitalised, without defining it
      (the draft lost a definition, or borrowed a term of the house form);
    * on the draft alone (an English text), a phrase with the shape of a defined term:
      capitalised in the middle of a sentence, and a noun phrase -- several capitalised
      words after a determiner ("the Service Credits"), or one word after a determiner that
      either ends like a common noun ("the Deliverables") or is written in lower case
      elsewhere in the document ("the Software", "software"), or any phrase after a
      determiner only common nouns take ("any", "each", "such").  Never: a word starting a
      sentence, a line or a list item, a heading, a title line or a run-in heading, words
      in quotation marks, an acronym, a month or a day, a section word ("Section",
      "Schedule"), the document's name for itself ("this Agreement"), the title of an
      instrument ("the Data Protection Act", "the Privacy Policy"), the name of a body or a
      place ("the Free Software Foundation", "the Middle East"), a product named elsewhere
      in the document ("the Java Platform": "Java" heads other names and is never written
      in lower case), a title quoted after "entitled", a name being abbreviated ("Defense
      ("DFARS")"), a word English capitalises by convention ("Internet").  A term counts as
      defined in any of its forms: singular or plural, any letter case, another ending of
      the same word ("Distributing" of "Distribute"), hyphenated across a line or not, any
      of its aliases, inside a longer defined name or holding one ("Source" of "Source
      Code", "Front-Cover Texts" of "Cover Texts"); and so does a phrase the document puts
      in quotation marks anywhere, names in a parenthesis (``(the Licensor)``), after
      "hereinafter" or "referred to as", in a glossary line, or follows with "(as defined
      ...)", since a reader takes any of these for a definition.
``unused-definition``
    A capitalised defined term that the document never uses outside its own definition (any
    of its names, any letter case, plural, possessive and verb forms included).  Not
    reported: a lower-case gloss in brackets (``("synching")``), an abbreviation of the words
    before it (``the Federal Arbitration Act ("FAA")``), a term imported by reference ("a
    "commercial item," as that term is defined in 48 C.F.R. 2.101", "have the same meaning
    as under ..."), a term defined for another instrument ("For purposes of the EPL,
    "Program" will mean ..."), and a word offered as an alternative to a quoted one
    (``"DECLINE" (or "EXIT")``).
``stale-term``
    A use, in the draft, of the precedent's name of a renamed term (the term map counts
    them on :attr:`core.model.TermMapping.stale`; this check says where each one is).
``dangling-reference``
    A typed cross-reference (:func:`core.xrefs.find_references`) whose number names no
    provision of the document (:func:`core.xrefs.resolve` says "missing"), and that the
    document shows nowhere as a label in any style (a numbering read otherwise is no
    alarm).  Only absolute numbers are checked ("Section 14.7", not "paragraph (c)
    above"), only in a numbering the document has (a reference to "Exhibit C" in a
    document with no exhibit at all names an attachment sent separately), and not when the
    words around name another instrument ("section 1.13 of OPL.html", "Article 3, United
    Nations Universal Declaration ...").  A document many of whose references are missing
    is an excerpt: one check says so instead of one per reference.
``definition-changed``
    A definition whose words changed in substance between the precedent and the draft (a
    substantive deviation of the review inside the definition), which silently changes
    every clause that uses the term: the check names the term and the provisions using it.

Pure functions over :mod:`core.model` dataclasses; the review engine runs them last
(:func:`review_checks`) and the outputs show them as they are.

Cost: one pass of a few regular expressions over each document's text, one term-use pass
per document (:func:`core.review.tokens.find_term_uses`) and one cross-reference pass
(:func:`core.xrefs.find_references`, resolved through an index built once): linear in the
documents' length in practice.
"""

from __future__ import annotations

import re
from collections.abc import Callable, Iterable, Mapping, Sequence
from dataclasses import dataclass
from functools import lru_cache

from ..lazyre import CaselessPattern, compile_pattern
from ..model import (
    CHECK_DOCUMENTS,
    CHECK_KINDS,
    Check,
    CheckDocument,
    CheckKind,
    CheckPart,
    DefinedTerm,
    Document,
    Provision,
    Review,
)
from ..terms import term_forms
from .tokens import find_term_uses, term_matcher

__all__ = [
    "CHECKS_HEADING",
    "CHECK_DOCUMENTS",
    "CHECK_KINDS",
    "CHECK_TITLES",
    "MAX_TERM_WORDS",
    "TITLE_LINE_SHARE",
    "Check",
    "dangling_references",
    "definitions_changed",
    "document_checks",
    "document_words",
    "DocumentWords",
    "review_checks",
    "stale_terms",
    "undefined_terms",
    "unused_definitions",
]

#: How the outputs head the checks (the review table, the window, the issues list).
CHECKS_HEADING = "Drafting checks"
#: How the outputs name each kind (the trade's own words).
CHECK_TITLES: dict[CheckKind, str] = {
    "undefined-term": "Undefined term",
    "unused-definition": "Unused definition",
    "stale-term": "Old name of a renamed term",
    "dangling-reference": "Reference to no provision",
    "definition-changed": "Definition changed",
}


# --------------------------------------------------------------------------------------
# What a defined term looks like (common practice in English-language agreements, no source)
# --------------------------------------------------------------------------------------

#: Longest phrase read as one term (words, small joining words included): the longest
#: defined terms of agreements run to four or five words ("Data Protection Legislation",
#: "Copyright and Similar Rights"); a longer capitalised run is a title.
MAX_TERM_WORDS = 6
#: A line of which at least this share of words are capitalised (and at least
#: :data:`TITLE_LINE_MIN_WORDS` words) is a title or heading line, not prose: "Sun
#: Microsystems Binary Code License Agreement".  Prose capitalises about one word in ten.
TITLE_LINE_SHARE = 0.6
TITLE_LINE_MIN_WORDS = 3
#: A document many of whose cross-references name provisions it lacks is an excerpt (or
#: its numbering was not recognised): at least this many distinct numbers missing, and at
#: least this share of the numbers its references name.  A drafting slip leaves one or two
#: references dangling; a text cut from a longer agreement leaves many.  Judgement values
#: (common practice, no source); on the licence texts of ``benchmarks/measure_checks.py``
#: one excerpt has 17 of 32 missing, no other document more than 4.
EXCERPT_MIN_MISSING = 5
EXCERPT_SHARE = 1 / 3
#: Missing numbers named in the summary of an excerpt.
EXCERPT_NUMBERS_SHOWN = 8
#: A capitalised word never written in lower case that the document capitalises in this
#: many different phrases (or alone) names a company, a product or a place.  Two: one
#: phrase is a term of its own; a word heading several is a name.
BRAND_MIN_PHRASES = 2
#: Longest abbreviation read as one ("COPPA", "DFARS"): a longer word in capitals is a
#: name, not initials.
ABBREVIATION_MAX_LETTERS = 6

_CAP_WORD = r"[A-Z][a-z]+(?:-[A-Za-z][a-z]*)*"
#: Small words inside a capitalised name ("Statement of Work", "Terms of the Offer").
_JOINERS = r"(?:of|for|the|in|on|to|de|la|du|von|van)"
_POSSESSIVE = r"(?:['’]s|(?<=s)['’])?"
_PHRASE_RE = compile_pattern(
    r"(?<![\w'’\"“”‘.@/\\&+-])(?P<phrase>" + _CAP_WORD
    + r"(?:(?:[ \t]+|[ \t]*\n[ \t]*)(?:(?:" + _JOINERS + r"|and|or|&)\s+){0,2}" + _CAP_WORD + r")*)"
    + _POSSESSIVE + r"(?![\w@/\\&+-]|\.\w)")
#: A run parts into phrases at "and", "or" and "&" ("Licensor and Licensee").
_SPLIT_RE = compile_pattern(r"\s+(?:and|or|&)\s+")
_HONORIFICS = frozenset("Mr Mrs Ms Dr Prof Sir Dame Lord Lady St".split())
#: A run-in heading: title-case words at the start of a line, up to a full stop or colon.
_RUN_IN_RE = compile_pattern(
    r"[ \t]*(?P<words>[A-Z][^.:!?\n\u2013\u2014]{0,120}?)(?:[.:]|[ \t][\u2013\u2014-])[ \t]+(?=\S)")
#: Longest run-in heading (words): "Warranty of Provenance and Disclaimer of Warranty".
MAX_RUN_IN_WORDS = 12
_AFTER_RE = compile_pattern(r"[ \t]*\n?[ \t]*(?P<next>[A-Za-z0-9(©]+)")
#: A designation after a phrase makes it a label, not a term: "Product X", "Exhibit 2".
_DESIGNATION_RE = compile_pattern(r"^(?:[A-Z]|\d+|[IVX]+)$")
_TITLE_AFTER_RE = compile_pattern(
    r",\s+(?:[A-Z][\w'’-]*\s+(?:(?:and|&|of|the)\s+)*){1,6}(?:Act|Acts|Regulations?|Code|Rules|Directive)\b")
_ABBREVIATED_RE = compile_pattern(r"\s*\(\s*(?:the\s+)?[\"“'‘]?[A-Z][A-Z0-9&.-]+[\"”'’]?\s*\)")
#: Words that follow a noun without being its head: "the Service Credits payable", "the
#: Fees due" (a participle may go either way: "the Products described", "a Texas limited
#: liability company", so it is read as a head).
_POSTPOSITIVE_RE = compile_pattern(r"(?:able|ible|due|thereof|hereunder|herein)$")
_NOTICE_RE = compile_pattern(r"[ \t]*(?:\(c\)|©|\d{4})", re.IGNORECASE)
#: Function words: a capitalised one is no term ("This License", "Your use"): articles,
#: pronouns, prepositions, conjunctions, auxiliaries (common practice, no source).
_FUNCTION_WORDS = frozenset(
    "a an the this that these those such any each every all no none some other another both "
    "either neither i me my mine you your yours yourself we us our ours he him his she her hers "
    "it its they them their theirs who whom whose which what of in on at to by for from with "
    "without within into onto upon under over between among about against through during before "
    "after above below and or nor but if unless whether than then so as not only also is are "
    "was were be been being has have had do does did shall will may must can could would should "
    "might here there hereby herein hereof hereunder thereof therein where when while "
    "notwithstanding except unless provided pursuant save subject".split())
_FUNCTION_WORDS_CAPITALISED = frozenset(w.capitalize() for w in _FUNCTION_WORDS)
#: Words frequent in any English text and rare in other languages: their share tells an
#: English document (about a quarter of the words of an agreement; under 3 % of a German
#: or French one).  Judgement value, common practice, no source.
_ENGLISH_MARKERS = frozenset("the of and to or any shall be is by with this that which".split())
ENGLISH_MIN_SHARE = 0.08
#: A word written in lower case as a word of prose (not part of a file name, an address or
#: a program identifier: "java.lang", "www.example.org").
_LOWER_WORD_RE = compile_pattern(r"(?<![\w.@/\\:-])[a-z]+(?:-[a-z]+)*(?![\w@/\\]|\.\w)")
_WORD_RE = compile_pattern(r"[A-Za-z][A-Za-z'’-]*")
#: The word right before a phrase: ASCII letters, then blanks (spaces, tabs) holding at most
#: one line break.  :func:`_word_before` reads it backwards from the phrase (the law tests
#: compare it with a search of this pattern from the start of the text, which made a long
#: provision quadratic).
_PREVIOUS_WORD_RE = compile_pattern(r"(?P<word>[A-Za-z]+)(?:[ \t]+|[ \t]*\n[ \t]*)$")
_ASCII_LETTERS = frozenset("ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz")
#: How far back the two-names pattern (:data:`_NAME_BEFORE_RE`) looks: far more than two words
#: of any language, and bounded so that each look is constant time.
LOOKBEHIND_CHARS = 200


def _word_before(text: str, end: int) -> str | None:
    """The word of :data:`_PREVIOUS_WORD_RE` ending before *end* of *text*, or None (like the
    pattern's ``$``, also when one line break more comes between them)."""
    word = _word_right_before(text, end)
    if word is None and end > 0 and text[end - 1] == "\n":
        word = _word_right_before(text, end - 1)
    return word


def _word_right_before(text: str, end: int) -> str | None:
    i = end
    while i > 0 and text[i - 1] in " \t":
        i -= 1
    if i > 0 and text[i - 1] == "\n":
        i -= 1
        while i > 0 and text[i - 1] in " \t":
            i -= 1
    elif i == end:
        return None  # no blank between the word and the phrase
    j = i
    while j > 0 and text[j - 1] in _ASCII_LETTERS:
        j -= 1
    return text[j:i] if j < i else None

#: Determiners that go with a common noun, never with a proper name: "any Service Credits",
#: "each Contributor" (whereas "the" goes with both: "the United States").
_COMMON_DETERMINERS = frozenset("a an any each every such no another all other these those".split())
#: Any determiner: the phrase after it is a noun phrase.
_DETERMINERS = _COMMON_DETERMINERS | frozenset("the this that its their your our his her my".split())
#: Endings of common nouns ("Deliverables", "Payments", "Contributors"): a single
#: capitalised word with one, after a determiner, reads as a defined term.
_COMMON_NOUN_END_RE = compile_pattern(r"(?:ables?|ibles?|ments?|tions?|sions?|ances?|ences?|ity|ities|ees|ors|ings)$")
#: Closed classes of capitalised words that are no defined terms.
_CALENDAR = frozenset(
    "January February March April May June July August September October November December "
    "Monday Tuesday Wednesday Thursday Friday Saturday Sunday".split())
#: Words that name a part of a document ("Section 3", "the Schedule").
_SECTION_WORDS = frozenset(
    "Clause Clauses Sub-clause Sub-clauses Section Sections Sub-section Sub-sections Subsection "
    "Subsections Paragraph Paragraphs Sub-paragraph Sub-paragraphs Subparagraph Subparagraphs "
    "Article Articles Part Parts Schedule Schedules Annex Annexes Annexure Annexures Appendix "
    "Appendices Exhibit Exhibits Attachment Attachments Addendum Addenda Recital Recitals "
    "Preamble Title Chapter Chapters Item Items Table Figure Page Pages Line Lines Glossary".split())
#: Names a document gives itself or another instrument: "this Agreement", "the License",
#: "the Privacy Policy", "the Data Protection Act".  A phrase ending in one is a title.
_INSTRUMENT_WORDS = frozenset(
    "Agreement Agreements Contract Contracts Deed Deeds License Licenses Licence Licences Terms "
    "Conditions Policy Policies Addendum Amendment Amendments Guidelines Requirements Rules "
    "Act Acts Regulation Regulations Directive Directives Convention Conventions Treaty "
    "Treaties Statute Statutes Ordinance Constitution Protocol Charter Declaration Notice List "
    "Covenant Covenants Standard Standards Principles Framework Statement Exception Definition "
    "Agreement's License's Licence's".split())
#: A document's names for itself: "of the Agreement" is this document.
_SELF_WORDS = frozenset("Agreement Contract Deed License Licence Terms Conditions".split())
#: First words of an instrument's title: "Terms of Service", "Rules of Arbitration".
_TITLE_FIRST_WORDS = frozenset("Terms Conditions Rules Code Principles Standards".split())
#: Words that make a phrase the name of a body or a place: "the Free Software Foundation",
#: "the State of California", "the Government", "the Courts".
_BODY_WORDS = frozenset(
    "Foundation Corporation Incorporated Inc Ltd Limited Company Co Corp LLC LLP PLC GmbH "
    "University College Institute Association Society Consortium Initiative Alliance Council "
    "Commission Committee Office Department Agency Bureau Ministry Court Courts Tribunal "
    "Government Parliament Congress Senate Republic Kingdom Empire States State Union Nations "
    "Organization Organisation Project Board Bank District County Province Commonwealth City "
    "Territory Territories Region Area Community Communities Federation Authority Group Commons "
    "Inc's".split())
#: Words that make a run of capitalised words, however parted by "and", a title.
_TITLE_WORDS = _INSTRUMENT_WORDS | _BODY_WORDS
#: Words that make a phrase a proper name wherever they stand in it: regions and
#: nationalities ("the Middle East", "the Australian Consumer Law"), titles of the Crown
#: ("Her Majesty the Queen") and words of public bodies' names ("the Federal Register",
#: "the National Archives").  From memory, common practice, no source.
_NAME_CUES = frozenset(
    "East West North South Southeast Southwest Northeast Northwest Middle Central Eastern Western "
    "Northern Southern Asian European American African Australian Canadian British English French "
    "German Japanese Chinese Korean Indian Irish Scottish Welsh Dutch Swiss Nordic Pacific Atlantic "
    "Majesty Queen King Crown Royal Prince Princess Federal National International Universal "
    "Uniform".split())
#: Words after which a capitalised phrase is a title quoted, not a term used: "the Sections
#: entitled Restrictions".
_TITLE_CUE_WORDS = frozenset("entitled titled called named headed captioned".split())
#: Common nouns that English style capitalises by convention.
_CONVENTION_WORDS = frozenset("Internet Web Earth God".split())

_QUOTED_RE = compile_pattern(r"[\"“”„]([^\"“”„\n]{1,80}(?:\n[^\"“”„\n]{1,80})?)[\"“”]"
                             r"|‘([^‘’\n]{1,80})’|«\s?([^«»\n]{1,80}?)\s?»"
                             r"|(?<![\w'’])'([^'\n]{1,80})'(?![\w'])|``([^`'\n]{1,80})''")
#: An unquoted name in a parenthesis after what it names: "(the Licensor)", "(Customer)".
_PAREN_NAME_RE = compile_pattern(
    r"\((?:(?:hereinafter|hereafter)\s+(?:referred\s+to\s+as\s+|called\s+)?)?"
    r"(?:(?:collectively|together|jointly|each|individually),?\s+)?(?:the\s+|an?\s+)?"
    r"(?P<name>" + _CAP_WORD + r"(?:\s+(?:" + _JOINERS + r"\s+)?" + _CAP_WORD + r"){0,4})\)")
#: "Affiliates (as defined below)", "Content Viewer (as defined in the terms of use)": the
#: drafter points to a definition.
_AS_DEFINED_NAME_RE = compile_pattern(
    r"(?P<name>" + _CAP_WORD + r"(?:\s+(?:" + _JOINERS + r"\s+)?" + _CAP_WORD + r"){0,4})"
    r"['’]?s?\s*,?\s*\(?\s*(?:as\s+(?:such\s+|that\s+|the\s+|those\s+)?(?:terms?\s+)?)?(?:is\s+|are\s+)?"
    r"(?:defined|described|set\s+(?:forth|out))\b")
#: A glossary line: a title-case name, then a colon or a dash ("Participation Obligation -
#: a licensing obligation ...").
_GLOSSARY_NAME_RE = compile_pattern(
    r"(?m)^[ \t]*(?:[\w.()]{1,6}[ \t]+)?(?P<name>" + _CAP_WORD + r"(?:[ \t]+(?:" + _JOINERS + r"[ \t]+)?"
    + _CAP_WORD + r"){0,4})[ \t]*(?::|[ \t][-\u2013\u2014][ \t])")
_HEREINAFTER_NAME_RE = compile_pattern(
    r"\b(?:hereinafter|hereafter|(?:is|are)\s+(?:referred\s+to|called|known)(?:\s+herein)?(?:\s+as)?)\s+"
    r"(?:referred\s+to\s+as\s+|called\s+)?(?:the\s+)?"
    r"(?P<name>" + _CAP_WORD + r"(?:\s+(?:" + _JOINERS + r"\s+)?" + _CAP_WORD + r"){0,4})")
#: "a "commercial item," as that term is defined in ...": a term imported by reference.
_BY_REFERENCE_RE = compile_pattern(
    r"\bas\s+(?:that|such|the|this|these|those)\s+terms?\s+(?:is|are)\s+(?:defined|used)\b"
    r"|\b(?:has|have)\s+the\s+same\s+meanings?\b"
    r"|\b(?:has|have)\s+the\s+meanings?\s+(?:given|set\s+out|ascribed|assigned)\s+"
    r"(?:to\s+(?:it|them)\s+)?(?:in|under|by)\s+(?!this\b|clause|section|paragraph|schedule)",
    re.IGNORECASE)
#: "For purposes of the EPL, "Program" will mean ...": a term of another instrument.
_OTHER_INSTRUMENT_TERM_RE = compile_pattern(
    r"\b[Ff]or\s+(?:the\s+)?purposes?\s+of\s+(?:the\s+)?(?!this\b|these\b|This\b)(?P<name>[A-Z][\w-]*)")
#: Provision kinds whose words are no prose to check: a title, signature blocks.
_NOT_PROSE = frozenset({"title", "signature"})


_INDEX_CACHE: dict[int, tuple[Document, dict[str, Provision]]] = {}
#: Documents whose provision index is kept (a review has two).
_INDEX_CACHE_SIZE = 4


def _provision(doc: Document, pid: str | None) -> Provision | None:
    """The provision *pid* of *doc*, or None; through an index built once per document
    (``Document.provision`` scans the provisions, and the checks ask once per term)."""
    hit = _INDEX_CACHE.get(id(doc))
    if hit is None or hit[0] is not doc:
        if len(_INDEX_CACHE) >= _INDEX_CACHE_SIZE:
            _INDEX_CACHE.pop(next(iter(_INDEX_CACHE)))
        hit = _INDEX_CACHE[id(doc)] = (doc, {p.id: p for p in doc.provisions})
    return hit[1].get(pid) if pid is not None else None


def _singulars(word: str) -> set[str]:
    """*word* (lower case) and the singular it may be the plural of."""
    out = {word}
    if word.endswith("ies") and len(word) > 4:
        out.add(word[:-3] + "y")
    if word.endswith("es") and len(word) > 3:
        out.add(word[:-2])
    if word.endswith("s") and len(word) > 2:
        out.add(word[:-1])
    return out


def _strip_possessive(phrase: str) -> str:
    for suffix in ("'s", "’s", "'", "’"):
        if phrase.endswith(suffix):
            return phrase[: -len(suffix)]
    return phrase


# --------------------------------------------------------------------------------------
# One document's words
# --------------------------------------------------------------------------------------


@dataclass(frozen=True, slots=True)
class _Texts:
    """The prose of a document: (provision, part, text) in document order."""

    doc: Document
    parts: tuple[tuple[Provision, CheckPart, str], ...]

    @staticmethod
    def of(doc: Document) -> _Texts:
        parts: list[tuple[Provision, CheckPart, str]] = []
        for p in doc.provisions:
            if p.heading:
                parts.append((p, "heading", p.heading))
            if p.text:
                parts.append((p, "text", p.text))
        return _Texts(doc, tuple(parts))


def _lower_words(texts: Iterable[str]) -> set[str]:
    out: set[str] = set()
    for t in texts:
        out.update(_LOWER_WORD_RE.findall(t))
    return out


#: The patterns of names marked as defined, each with words one of which a match holds (None:
#: no such words): a text without them is not searched (a pattern that may start at any
#: capitalised word is slow to search where it cannot match).
_NAME_MARKS: tuple[tuple[re.Pattern[str], tuple[str, ...] | None], ...] = (
    (_PAREN_NAME_RE, None),
    (_HEREINAFTER_NAME_RE, ("hereinafter", "hereafter", "referred", "called", "known")),
    (_AS_DEFINED_NAME_RE, ("defined", "described", "forth", "out")),
    (_GLOSSARY_NAME_RE, None),
)


def _marked_names(texts: Iterable[str]) -> set[str]:
    """Phrases a reader takes for defined names although the term finder may not: any
    phrase in quotation marks, a name in a parenthesis, a name after "hereinafter"."""
    out: set[str] = set()
    for t in texts:
        for m in _QUOTED_RE.finditer(t):
            body = next(g for g in m.groups() if g is not None)
            out.add(" ".join(body.strip(" ,.;:").split()).casefold())
        for rx, cues in _NAME_MARKS:
            if cues is not None and not any(c in t for c in cues):
                continue
            for m in rx.finditer(t):
                out.add(" ".join(m.group("name").split()).casefold())
    return {n for n in out if n}


def _title_line(line: str) -> bool:
    words = _WORD_RE.findall(line)
    if len(words) < TITLE_LINE_MIN_WORDS:
        return False
    caps = sum(1 for w in words if w[:1].isupper())
    return caps >= TITLE_LINE_SHARE * len(words)


def _masked(text: str, pattern: re.Pattern[str] | None) -> str:
    """*text* with every match of *pattern* (term uses, quoted words) blanked out."""
    if pattern is None:
        return text
    return pattern.sub(lambda m: "\x00" * len(m.group(0)), text)


_DASHES = "-\u2010\u2011\u2012\u2013\u2014\u2212"
_DASH_RE = compile_pattern("[" + _DASHES + "]")


def _fold(name: str) -> str:
    """*name* as compared: case-folded, white space collapsed, any dash a hyphen."""
    return _DASH_RE.sub("-", " ".join(name.split())).casefold()


def _form_regex(form: str) -> str:
    """A regex of *form*: any run of white space between words, any dash for a hyphen."""
    words = [("[" + _DASHES + "]").join(re.escape(p) for p in w.split("-")) for w in form.split(" ")]
    return r"\s+".join(words)


def _fold_text(text: str) -> str:
    """*text* folded as :func:`_fold` folds a name, character for character (so offsets
    stay): lower case, any dash a hyphen, any white space a space."""
    return "".join("-" if ch in _DASHES else " " if ch.isspace() else (low if len(low := ch.lower()) == 1 else ch)
                   for ch in text)


def _folded_finder(forms: Iterable[str]) -> Callable[[str], list[tuple[int, str]]]:
    """A function giving (start, folded form) of the uses of *forms* (folded names, see
    :func:`_fold`) in a text, whole words, possessive endings allowed: a regular expression
    for an agreement's names, a character-trie walk (:func:`core.terms.walk_forms`) for the
    thousands of a hostile document, whose pattern would take long to compile."""
    from ..terms import REGEX_FORMS_MAX, char_trie, walk_forms

    forms = [f for f in forms if f]
    if len(forms) > REGEX_FORMS_MAX:
        trie = char_trie(forms)
        return lambda text: [(a, f) for a, _b, f, _p in walk_forms(_fold_text(text), trie, word_start=True)]
    source = _names_source(forms)
    assert source is not None
    pattern = CaselessPattern(source, compile=re.compile)
    return lambda text: [(m.start(), _fold(_strip_possessive(m.group(0)))) for m in pattern.finditer(text)]


def _names_source(names: Iterable[str]) -> str | None:
    """A pattern's source for the uses of *names* (in lower case) with any dash, plural and
    possessive forms included; None when there is none."""
    forms = sorted({_fold(f) for n in names for f in term_forms(" ".join(n.split())) if f},
                   key=len, reverse=True)
    if not forms:
        return None
    body = "|".join(_form_regex(f) for f in forms)
    return r"(?<![\w-])(?:" + body + r")" + _POSSESSIVE + r"(?!\w)"


@dataclass(frozen=True, slots=True)
class _Use:
    """A capitalised phrase in the middle of a sentence."""

    provision: Provision
    part: CheckPart
    start: int
    end: int
    phrase: str
    #: After a determiner of a common noun that goes with it ("any Service Credits"; not
    #: "a Delaware corporation", where "a" goes with "corporation").
    common: bool = False
    #: Followed by a content word it qualifies ("Places listings", "Microsoft URL").
    attributive: bool = False
    #: After any determiner ("the", "each", "its", ...): used as a noun phrase.
    determined: bool = False


def _run_in_heading_end(line: str) -> int:
    """Where a run-in heading at the start of *line* ends ("Acceptance and Termination. If
    You ..."): title-case words up to a full stop or colon; 0 when there is none."""
    m = _RUN_IN_RE.match(line)
    if m is None:
        return 0
    words = _WORD_RE.findall(m.group("words"))
    caps = sum(1 for w in words if w[:1].isupper() or w.lower() in _FUNCTION_WORDS)
    if not words or len(words) > MAX_RUN_IN_WORDS or caps < len(words):
        return 0
    return m.end()


def _candidate_uses(texts: _Texts) -> list[_Use]:
    """Capitalised phrases in the middle of sentences of prose, outside quotation marks,
    title lines and run-in headings (see the module's notes).  A phrase may run over a
    line break ("its Board\nof Directors"): lines of a paragraph wrap anywhere."""
    out: list[_Use] = []
    for prov, part, text in texts.parts:
        if part == "heading" or prov.kind in _NOT_PROSE:
            continue
        chars = list(_masked(text, _QUOTED_RE))
        pos = 0
        for line in text.split("\n"):
            cut = len(line) if _title_line(line) else _run_in_heading_end(line)
            chars[pos:pos + cut] = "\x00" * cut
            pos += len(line) + 1
        masked = "".join(chars)
        for m in _PHRASE_RE.finditer(masked):
            out.extend(_uses_in_run(masked, m, prov, part, 0))
    return out


def _no_phrase_here(line: str, m: re.Match[str], *, run: str, before: str, nxt: str) -> bool:
    """Whether the capitalised *run* (after the word *before*, before the word *nxt*) is
    part of a title or a designation, a verb or a quoted or abbreviated name."""
    if _TITLE_AFTER_RE.match(line, m.end()):
        return True  # one name of a title's list: "the Copyright, Designs and Patents Act 1988"
    if _DESIGNATION_RE.match(nxt) or (run.endswith("Copyright") and _NOTICE_RE.match(line, m.end())):
        return True  # "Product X", "Schedule 2", "Copyright (C) 2002"
    if before == "to" and nxt.lower() in _FUNCTION_WORDS and " " not in run:
        return True  # a verb: "to Use the Software"
    # a title quoted ("entitled Restrictions"), a name abbreviated ("Defense ("DFARS")")
    return before in _TITLE_CUE_WORDS or bool(_ABBREVIATED_RE.match(line, m.end()))


def _piece_words(words: list[str], determiner: str | None) -> tuple[str | None, list[str]]:
    """The determiner and the capitalised words of one piece of a run: leading function
    words become the determiner ("by Your Modifications": the phrase is "Modifications"),
    trailing words in lower case are dropped."""
    lead = 0
    while lead < len(words) and words[lead].lower() in _FUNCTION_WORDS:
        determiner = words[lead].lower()
        lead += 1
    rest = words[lead:]
    while rest and not rest[-1][:1].isupper():
        rest.pop()
    return determiner, rest


def _attributive(nxt: str) -> bool:
    """Whether a run followed by the word *nxt* qualifies it ("Software License"): a word,
    not a function word nor one written after its noun."""
    return (bool(nxt) and nxt[0].isalpha() and nxt.lower() not in _FUNCTION_WORDS
            and not _POSTPOSITIVE_RE.search(nxt))


def _uses_in_run(line: str, m: re.Match[str], prov: Provision, part: CheckPart, offset: int) -> list[_Use]:
    """The phrases of one run of capitalised words (parted at "and" / "or"), unless the run
    is a title, starts a sentence or is a verb ("to Preserve its Title")."""
    run = m.group("phrase")
    caps = [w for w in run.split() if w[:1].isupper()]
    if len(caps) > MAX_TERM_WORDS or (len(caps) > 1 and any(w in _TITLE_WORDS for w in caps)):
        return []  # a title: "the Berne Convention for the Protection of Literary and Artistic Works"
    before = _word_before(line, m.start())
    if before is None or not before.islower():
        return []  # the start of a sentence, a line, a list item or a list of names
    after = _AFTER_RE.match(line, m.end())
    nxt = after.group("next") if after else ""
    if _no_phrase_here(line, m, run=run, before=before, nxt=nxt):
        return []
    attributive = _attributive(nxt)
    out: list[_Use] = []
    cuts = [0, *(x for sep in _SPLIT_RE.finditer(run) for x in (sep.start(), sep.end())), len(run)]
    pieces = [(cuts[i], run[cuts[i]:cuts[i + 1]]) for i in range(0, len(cuts), 2)]
    determiner: str | None = before
    for k, (piece_start, piece) in enumerate(pieces):
        determiner, rest = _piece_words(piece.split(), determiner)
        if not rest or rest[0] in _HONORIFICS:
            determiner = None
            continue
        phrase = _strip_possessive(" ".join(rest))
        a = offset + m.start("phrase") + piece_start + piece.index(rest[0])
        b = offset + m.start("phrase") + piece_start + piece.rindex(rest[-1]) + len(rest[-1])
        b -= len(rest[-1]) - len(_strip_possessive(rest[-1]))
        last = k == len(pieces) - 1
        out.append(_Use(prov, part, a, b, phrase,
                        common=determiner in _COMMON_DETERMINERS and not (last and attributive),
                        attributive=last and attributive, determined=determiner in _DETERMINERS))
        determiner = None
    return out


def _english(texts: _Texts) -> bool:
    """Is the document written in English (whose capitals these checks read)?  German
    capitalises every noun; a French or Dutch text has its own conventions."""
    words = [w.lower() for _p, _k, t in texts.parts for w in _WORD_RE.findall(t)]
    if not words:
        return False
    return sum(1 for w in words if w in _ENGLISH_MARKERS) >= ENGLISH_MIN_SHARE * len(words)


def _excluded(phrase: str) -> bool:
    """Is *phrase* a closed-class word or a name that is no defined term?"""
    words = phrase.split()
    caps = [w for w in words if w[:1].isupper()]
    if any(w in _CALENDAR or w in _CONVENTION_WORDS or w in _NAME_CUES for w in caps):
        return True
    if words[0] in _SECTION_WORDS and len(words) == 1:
        return True
    if words[-1] in _INSTRUMENT_WORDS or (len(words) > 1 and words[0] in _TITLE_FIRST_WORDS):
        return True  # "the Privacy Policy", "the Terms of Service"
    return any(w in _BODY_WORDS for w in caps)


def _common_noun(phrase: str, lower: set[str]) -> bool:
    """Does the document write every capitalised word of *phrase* in lower case elsewhere
    (as a word of prose, any singular or plural form)?"""
    for w in phrase.split():
        if not w[:1].isupper():
            continue
        forms = _singulars(w.lower()) | {w.lower() + "s", w.lower() + "es"}
        if not forms & lower:
            return False
    return True


_NAME_SPLIT_RE = compile_pattern(r"[" + _DASHES + r"\s]+")
#: Distinct names whose word keys are kept (a long agreement has a few thousand capitalised
#: phrases, most of them met many times).
WORD_KEY_CACHE = 20_000


def clear_name_cache() -> None:
    """Forget the word keys of names (benchmarks time cold runs)."""
    _word_key.cache_clear()


@lru_cache(maxsize=WORD_KEY_CACHE)
def _word_key(name: str) -> tuple[str, ...]:
    """A name's words as compared: case-folded, parted at spaces and hyphens, each reduced
    to its stem (:func:`_stem`: "Front-Cover Texts" -> ("front", "cov", "text"),
    "Distributing" -> ("distribut",)), so that a plural or another form of a defined word
    is the same name."""
    return tuple(_stem(w) for w in _NAME_SPLIT_RE.split(_strip_possessive(name).casefold()) if w)


_SUFFIXES = ("ations", "ation", "ions", "ion", "ings", "ing", "ies", "ied", "ers", "er", "ed", "es", "s", "e", "y")


def _stem(word: str) -> str:
    """A crude English stem: the word without one inflection or derivation ending
    ("controlled" -> "controll" -> "control", "distribution" -> "distribut", "uses" ->
    "us"), never shorter than three letters.  Enough to tell that two words are forms of
    one, which is all the checks ask."""
    for suffix in _SUFFIXES:
        if word.endswith(suffix) and len(word) - len(suffix) >= (2 if suffix == "s" else 3):
            word = word[: -len(suffix)]
            break
    if len(word) > 3 and word[-1] == word[-2] and word[-1] not in "aeiou":
        word = word[:-1]  # "controll" -> "control"
    return word


class _NameParts:
    """Defined *names* (word keys) indexed for one question asked of every capitalised phrase
    of a document: is the phrase part of one of the names, or one of them part of it (word
    for word)?  A phrase inside a defined name ("Source" of "Source Code", "Entitled" of
    "Entitled XYZ") is a piece of that term; a phrase holding one ("Front-Cover Texts"
    holding "Cover Texts", "Runtime Software" holding "Software") is built on it.  Each
    name's runs of consecutive words are kept in a set (names are a few words long), so one
    question costs a few lookups, not a pass over every name."""

    __slots__ = ("names", "runs")

    def __init__(self, names: Iterable[tuple[str, ...]]) -> None:
        self.names = frozenset(names)
        self.runs = frozenset(n[i:j] for n in self.names for i in range(len(n)) for j in range(i + 1, len(n) + 1))

    def overlaps(self, words: tuple[str, ...]) -> bool:
        if not self.names:
            return False
        if not words or () in self.names or words in self.runs:
            return True
        return any(words[i:j] in self.names for i in range(len(words)) for j in range(i + 1, len(words) + 1))


def _uses_of(doc: Document, texts: _Texts, names: Mapping[str, str]) -> dict[str, list[_Use]]:
    """Capitalised uses, anywhere in the prose, of the precedent's terms *names* (form ->
    term) that *doc* does not define."""
    out: dict[str, list[_Use]] = {}
    matcher = term_matcher(list(dict.fromkeys(names.values())))
    for prov, part, text in texts.parts:
        if prov.kind in _NOT_PROSE:
            continue
        for u in find_term_uses(text, matcher):
            mid = _word_before(text, u.start) is not None
            out.setdefault(u.term, []).append(_Use(prov, part, u.start, u.end, text[u.start:u.end],
                                                   common=mid))
    return out


def _foreign_undefined(doc: Document, texts: _Texts, *, own: Sequence[str], foreign: Iterable[str],
                       document: CheckDocument) -> list[Check]:
    """The checks of the precedent's terms that *doc* uses capitalised without defining them
    (in the middle of a sentence at least once, or a name of several words)."""
    own_keys = {_word_key(n) for n in own}
    missing = {n: n for n in foreign if _word_key(n) not in own_keys and n[:1].isupper()
               and n not in _FUNCTION_WORDS_CAPITALISED}
    return [_undefined_check(uses, document=document, term=term,
                             why="is defined in the precedent but not in this document")
            for term, uses in _uses_of(doc, texts, missing).items()
            if any(u.common for u in uses) or " " in term]


def _looks_defined(uses: Sequence[_Use], words: Sequence[str], lower: set[str]) -> bool:
    """Whether the capitalised *uses* (their capitalised *words*) read like a defined term:
    not only attributive, and determined ("the ...") with several words, a common-noun
    ending or a common noun, or capitalised in the middle of a sentence."""
    if all(u.attributive for u in uses):
        return False
    determined = any(u.determined for u in uses)
    return ((len(words) > 1 and determined)
            or (determined and bool(_COMMON_NOUN_END_RE.search(words[0])))
            or (determined and _common_noun(uses[0].phrase, lower))
            or any(u.common for u in uses))


#: A :class:`_Use` as plain values: the position of its provision in the document, then its
#: other fields in order.
_UseAt = tuple[int, CheckPart, int, int, str, bool, bool, bool]


@dataclass(frozen=True, slots=True)
class DocumentWords:
    """What the drafting checks read from one document alone, before any comparison: its
    capitalised candidate phrases (with their word keys), the names it marks as defined,
    its words in lower case, its brand words, whether it is English, and the checks that
    need nothing else (unused definitions, dangling references).  The costly part of the
    checks: a review computes it beside the comparison (:mod:`core.parallel`)."""

    #: Each candidate phrase not excluded, as plain values (sent between processes cheaply):
    #: its word key, its key with dashes joined, and its use with the provision's position.
    candidates: tuple[tuple[tuple[str, ...], tuple[str, ...], _UseAt], ...]
    marked: frozenset[str]
    lower: frozenset[str]
    brand: frozenset[str]
    english: bool
    unused: tuple[Check, ...]
    dangling: tuple[Check, ...]


def document_words(doc: Document, *, document: CheckDocument = "draft") -> DocumentWords:
    """The document-only findings of *doc* (see :class:`DocumentWords`)."""
    texts = _Texts.of(doc)
    english = _english(texts)
    lower = _lower_words(t for _p, _k, t in texts.parts) if english else set()
    position = {id(p): i for i, p in enumerate(doc.provisions)}
    candidates = tuple((_word_key(u.phrase), _word_key(_DASH_RE.sub("", u.phrase)),
                        (position[id(u.provision)], u.part, u.start, u.end, u.phrase, u.common, u.attributive,
                         u.determined))
                       for u in (_candidate_uses(texts) if english else ()) if not _excluded(u.phrase))
    return DocumentWords(
        candidates, frozenset(_marked_names(t for _p, _k, t in texts.parts)), frozenset(lower),
        _brand_words(texts, lower) if english else frozenset(), english,
        unused_definitions(doc, document=document), dangling_references(doc, document=document))


def _unknown_uses(doc: Document, words: DocumentWords, known_parts: _NameParts,
                  reported: set[tuple[str, ...]]) -> dict[tuple[str, ...], list[_Use]]:
    """The capitalised candidate uses of *doc* by word key, leaving out the phrases already
    *reported* and those that overlap a known name."""
    found: dict[tuple[str, ...], list[_Use]] = {}
    for key, joined, (pos, part, start, end, phrase, common, attributive, determined) in words.candidates:
        if key in reported or known_parts.overlaps(key) or known_parts.overlaps(joined):
            continue
        found.setdefault(key, []).append(_Use(doc.provisions[pos], part, start, end, phrase, common=common,
                                              attributive=attributive, determined=determined))
    return found


def undefined_terms(doc: Document, *, defined: Iterable[str] = (), foreign: Iterable[str] = (),
                    document: CheckDocument = "draft", words: DocumentWords | None = None) -> tuple[Check, ...]:
    """The undefined-term checks of *doc* (see the module's notes).

    *defined* adds names that count as defined (the names of renamed terms, whose stale
    uses another check reports); *foreign* names the terms another document (the precedent)
    defines: a capitalised use of one that *doc* does not define is reported whatever its
    shape (in the middle of a sentence at least once, or a name of several words).  *words*
    are :func:`document_words` of *doc* when already computed."""
    words = words or document_words(doc, document=document)
    texts = _Texts.of(doc)
    own = [n for t in doc.terms for n in _written_names(t)] + list(defined)
    known_parts = _NameParts(_word_key(m) for n in [*own, *words.marked] if n.strip()
                             for m in (n, _DASH_RE.sub("", n)))
    out = _foreign_undefined(doc, texts, own=own, foreign=foreign, document=document)
    reported = {_word_key(c.term or "") for c in out}
    if not words.english:
        return tuple(out)
    lower = set(words.lower)
    for uses in _unknown_uses(doc, words, known_parts, reported).values():
        caps = [w for w in uses[0].phrase.split() if w[:1].isupper()]
        if any(w in words.brand for w in caps):
            continue  # "the Java Platform": "Java" names a product elsewhere in the document
        if not _looks_defined(uses, caps, lower):
            continue
        out.append(_undefined_check(uses, document=document, term=uses[0].phrase,
                                    why="is capitalised like a defined term but defined nowhere in the document"))
    return tuple(out)


def _brand_words(texts: _Texts, lower: set[str]) -> frozenset[str]:
    """Capitalised words that name something (a company, a product, a place): never
    written in lower case in the document, and capitalised in at least two different
    phrases or alone ("Java" of "the Java Platform", "Java technology", "Java SE")."""
    contexts: dict[str, set[str]] = {}
    for _p, _k, t in texts.parts:
        for m in _PHRASE_RE.finditer(t):
            run = m.group("phrase")
            for w in run.split():
                if w[:1].isupper():
                    contexts.setdefault(w, set()).add(run)
    return frozenset(w for w, runs in contexts.items()
                     if len(runs) >= BRAND_MIN_PHRASES and not (_singulars(w.lower()) | {w.lower()}) & lower)


def _undefined_check(uses: Sequence[_Use], *, document: CheckDocument, term: str, why: str) -> Check:
    first = uses[0]
    n_prov = len({u.provision.id for u in uses})
    where = f"; used in {n_prov} provisions" if n_prov > 1 else ""
    text = (first.provision.text if first.part == "text" else first.provision.heading or "")[first.start:first.end]
    return Check(kind="undefined-term", document=document, provision=first.provision.id, text=text,
                 message=f'"{term}" {why}{where}', span=(first.start, first.end), part=first.part, term=term,
                 provisions=tuple(dict.fromkeys(u.provision.id for u in uses[1:]
                                                if u.provision.id != first.provision.id)))


# --------------------------------------------------------------------------------------
# Unused definitions
# --------------------------------------------------------------------------------------


def _definition_area(doc: Document, t: DefinedTerm) -> tuple[str, tuple[int, int] | None]:
    """The defining provision's id and the span of its text that defines *t*: None for the
    whole provision (a definition provision of its own: ``"X" means ...``), else the
    sentence or table row the term finder gave."""
    prov = _provision(doc, t.provision)
    if prov is None:
        return t.provision, None
    if (prov.kind == "definition" and prov.term == t.term) or t.span is None or t.span == (0, 0):
        return prov.id, None
    return prov.id, t.span


def _use_name(name: str) -> str:
    """The name whose uses count as uses of a defined *name*: "to propagate" is used as
    "propagate"."""
    words = name.split()
    return " ".join(words[1:]) if len(words) > 1 and words[0].casefold() == "to" else name


def _use_lookup(doc: Document) -> dict[str, set[str]]:
    """The defined terms of *doc* by each folded form of their names that counts as a use."""
    lookup: dict[str, set[str]] = {}
    for t in doc.terms:
        for n in _written_names(t):
            n = _use_name(n)
            for f in [*term_forms(" ".join(n.split())), *_verb_forms(n)]:
                lookup.setdefault(_fold(f), set()).add(t.term)
    return lookup


def _never_reported_unused(t: DefinedTerm, doc: Document) -> bool:
    """Whether *t* is a definition the unused check leaves alone: not capitalised, defined by
    reference, no name, an abbreviation, another instrument's term or an alternative word."""
    return bool(not t.term[:1].isupper() or _BY_REFERENCE_RE.search(t.definition or "")
                or _NOT_A_NAME_RE.search(t.term) or _abbreviation(t, doc) or _other_instrument_term(t)
                or _alternative_word(t))


def unused_definitions(doc: Document, *, document: CheckDocument = "draft") -> tuple[Check, ...]:
    """Defined terms that *doc* never uses outside their definitions.

    A definition provision of its own (``"X" means ...``) is the definition in its first
    paragraph (its words may name the term again); a term defined inside a sentence is used
    by any other mention, in that sentence too ("(the "EAR") and that you will comply with
    the EAR").  Names are compared in any letter case, so two terms that differ only by
    case ("AGREEMENT" in a notice in capitals, "Agreement") share their uses."""
    if not doc.terms:
        return ()
    lookup = _use_lookup(doc)
    find = _folded_finder(lookup)
    areas = {t.term: _definition_area(doc, t) for t in doc.terms}
    defining_seen: set[str] = set()
    used: set[str] = set()
    for prov, part, text in _Texts.of(doc).parts:
        first_paragraph = text.find("\n") if "\n" in text else len(text)
        for start, form in find(text):
            for term in lookup.get(form, ()):
                if term in used:
                    continue
                pid, span = areas[term]
                if pid == prov.id and part == "text":
                    if span is None and start < first_paragraph:
                        continue  # inside the definition itself
                    if span is not None and span[0] <= start < span[1] and term not in defining_seen:
                        defining_seen.add(term)  # the defining mention
                        continue
                used.add(term)
    out = []
    for t in doc.terms:
        if t.term in used or _never_reported_unused(t, doc):
            continue
        pid, span = areas[t.term]
        defining = _provision(doc, pid)
        if defining is None:
            continue
        at = _name_span(defining.text, t.term, span)
        out.append(Check(
            kind="unused-definition", document=document, provision=pid,
            text=defining.text[at[0]:at[1]] if at else t.term,
            message=f'"{t.term}" is defined but never used outside its definition',
            span=at, term=t.term))
    return tuple(out)


#: An optional ending written in brackets: "Program(s)", "You(r)".
_OPTIONAL_ENDING_RE = compile_pattern(r"\((?:s|es|r)\)$")
#: Characters of a name that a reader takes for no name: "based on [the Program/...]".
_NOT_A_NAME_RE = compile_pattern(r"[\[\]/{}<>=]")


_INNER_HYPHEN_RE = compile_pattern(r"(?<=[a-z])-(?=[a-z])")
_NAME_PARTS_RE = compile_pattern(r"\s+(?:or|and/or)\s+|\s*\(([^()]+)\)\s*$")


def _written_names(t: DefinedTerm) -> list[str]:
    """The names of *t* as they may be written: "Program(s)" is used as "Program" and
    "Programs", "You(r)" as "You" and "Your", "Party or Parties" as either, "Application
    Programming Interfaces (APIs)" as either."""
    out: list[str] = []
    for n in t.names:
        m = _OPTIONAL_ENDING_RE.search(n)
        if m:
            out.extend([n[:m.start()], n[:m.start()] + m.group(0)[1:-1]])
            continue
        out.append(n)
        out.extend(p for p in _NAME_PARTS_RE.split(n) if p and p.strip() and p != n)
        if _INNER_HYPHEN_RE.search(n):
            out.append(_INNER_HYPHEN_RE.sub("", n))  # "Recip-ient", hyphenated across a line
    return out


_ALTERNATIVE_RE = compile_pattern(r"[\"”'’]\s*\((?:or|OR)\s+[\"“'‘](?P<alt>[^\"”'’)]{1,80})")


def _alternative_word(t: DefinedTerm) -> bool:
    """Is *t* only a word offered as an alternative to a quoted one ("select the "DECLINE"
    (or "EXIT") button"), which a reader does not take for a definition?"""
    return any(m.group("alt").strip() == t.term for m in _ALTERNATIVE_RE.finditer(t.definition or ""))


def _other_instrument_term(t: DefinedTerm) -> bool:
    """Is *t* defined for another instrument ("For purposes of the EPL, "Program" will
    mean the Content")?  It is that instrument's term, not one this document must use."""
    m = _OTHER_INSTRUMENT_TERM_RE.search(t.definition or "")
    return m is not None and m.group("name") not in _SELF_WORDS


def _abbreviation(t: DefinedTerm, doc: Document) -> bool:
    """Is *t* an abbreviation of the words before it ("the Federal Arbitration Act
    ("FAA")")?  Introducing an abbreviation is a convention of style, not a defined term
    the agreement relies on, so an unused one is not reported."""
    term = t.term
    letters = term[:-1] if term.endswith("s") else term  # "LLMs" for "Large Language Models"
    if not (2 <= len(letters) <= ABBREVIATION_MAX_LETTERS and letters.isupper() and letters.isalpha()):
        return False
    prov = _provision(doc, t.provision)
    if prov is None:
        return False
    text = prov.text
    a = (t.span or (0, len(text)))[0]
    at = text.find(term, a)
    if at < 0:
        return False
    initials = "".join(w[0] for w in _WORD_RE.findall(text[max(0, at - 120):at])[-12:]).upper()
    it = iter(initials)
    return all(ch in it for ch in letters)


def _verb_forms(name: str) -> list[str]:
    """A one-word name may be a verb ("Incorporate" means to publish ...): its inflected
    forms ("incorporated", "incorporating") are uses of it."""
    if " " in name or not name.isalpha() or len(name) < 3:
        return []
    stem = name[:-1] if name.endswith("e") else name
    return [stem + "ed", stem + "ing", name + "d" if name.endswith("e") else name + "ed"]


def _name_span(text: str, name: str, within: tuple[int, int] | None) -> tuple[int, int] | None:
    """Where *name* is written in *text* (inside *within* when given), as a whole word."""
    a, b = within or (0, len(text))
    k = text.find(name, a, b)
    while k >= 0:
        end = k + len(name)
        if (k == 0 or not text[k - 1].isalnum()) and (end >= len(text) or not text[end].isalnum()):
            return k, end
        k = text.find(name, k + 1, b)
    return None


# --------------------------------------------------------------------------------------
# Cross-references to no provision
# --------------------------------------------------------------------------------------


#: A number typed as a label: at the start of a line ("12.", "(b)", "Section 4", "IV.") or
#: an item in brackets anywhere ("(iii)").
_LINE_LABEL_RE = compile_pattern(
    r"(?m)^[ \t]*(?:[*\u2022\u00b7-][ \t]*)?(?:(?:section|article|clause|part|schedule|annex|appendix|"
    r"exhibit|attachment|paragraph)[ \t]+)?\(?(?P<label>\d{1,3}(?:\.\d{1,3})*|[A-Za-z]{1,4})(?:[.):]|[ \t]+-)",
    re.IGNORECASE)
_ITEM_RE = compile_pattern(r"\((?P<label>\d{1,3}|[A-Za-z]{1,4})\)")
#: A dotted number run into the paragraph before it after a full stop ("... a Larger
#: Work. 2.2. PATENT LICENSE"): a label the reader did not part from the words before.
_RUN_IN_LABEL_RE = compile_pattern(r"(?<=[.;:\"”)])[ \t]+(?P<label>\d{1,3}(?:\.\d{1,3})+)\.?[ \t]+(?=[A-Z(\"“])")
_LABEL_KEYWORD_RE = compile_pattern(
    r"^\s*(?:section|article|clause|part|schedule|annex|annexure|appendix|exhibit|attachment|"
    r"paragraph|addendum)\s+", re.IGNORECASE)
#: After a reference: "of" and the name of another instrument ("section 1.13 of OPL.html",
#: "paragraph 598 (2) of the Austrian Code", "Section 39 of the 1980 Act"), unless it is
#: this document's own name; or a comma and such a name ("Article 3, *United Nations
#: Universal Declaration of Human Rights*").
_OTHER_INSTRUMENT_RE = compile_pattern(
    r"(?:[ \t]*\(\w{1,4}\))*[ \t]*,?[ \t]*(?:of|in|under)[ \t]+(?:the[ \t]+)?(?:\d{4}[ \t]+)?"
    r"(?P<name>[A-Z][\w.&-]*)")
_INSTRUMENT_AFTER_RE = compile_pattern(
    r"[ \t]*,?[ \t]*(?:(?:of|in|under)[ \t]+)?(?:the[ \t]+)?[*_\"“]?"
    r"(?P<name>(?:[A-Z][\w'’-]*[ \t]+(?:(?:of|on|the|and|for)[ \t]+)*){1,10}"
    r"(?:[A-Z][\w'’-]*))")
#: Words of the name of another instrument or body cited after a reference.
_CITED_WORDS = _INSTRUMENT_WORDS | _BODY_WORDS | frozenset("Code Codes Supplement".split())
#: Two capitalised words right before a lower-case keyword: the keyword is a part of the
#: thing they name ("the Time Zone Database section 7").
_NAME_BEFORE_RE = compile_pattern(r"[A-Z][\w'’-]*[ \t]+[A-Z][\w'’-]*[ \t]+$")


def _label(number: str) -> str:
    """A provision number as compared: no keyword, brackets or closing punctuation, lower
    case ("Section 4." -> "4", "(b)" -> "b", "IV" -> "iv")."""
    return _LABEL_KEYWORD_RE.sub("", number).strip().strip("().:").casefold()


@dataclass(frozen=True, slots=True)
class _Labels:
    """Every number a document shows, however its numbering was read: the provisions'
    labels and full numbers, labels typed at the start of a line, items in brackets."""

    heads: frozenset[str]
    items: frozenset[str]

    @staticmethod
    def of(doc: Document) -> _Labels:
        from ..docinfo import build_docinfo

        info = build_docinfo(doc)
        heads: set[str] = set()
        for p, full in zip(info.provisions, info.full_number):
            for n in (p.number, full):
                if n:
                    heads.add(_label(n))
        heads.update(_label(b.label) for b in doc.blocks if b.label)
        items = set(heads)
        texts = [t for p in doc.provisions for t in (p.heading or "", p.text)]
        for t in [*texts, *(b.text for b in doc.blocks)]:
            heads.update(m.group("label").casefold() for m in _LINE_LABEL_RE.finditer(t))
            heads.update(m.group("label") for m in _RUN_IN_LABEL_RE.finditer(t))
            items.update(m.group("label").casefold() for m in _ITEM_RE.finditer(t))
        return _Labels(frozenset(heads), frozenset(items | heads))

    def shows(self, number: str) -> bool:
        """Does the document show *number* ("2.5(b)(iii)") anywhere, in any style?  A
        clause is shown by its own label or by a label of one of its sub-clauses ("1.1"
        shows clause 1, whose heading line may carry no number); a sub-clause of a clause
        whose sub-clauses carry no numbers at all cannot be checked ("Article 4.1": the
        first paragraph of Article 4) and counts as shown."""
        head, _, rest = number.partition("(")
        items = re.findall(r"\(([^()]*)\)", "(" + rest) if rest else []
        if head and not self._head_shown(head.casefold()):
            return False
        return all(i.casefold() in self.items for i in items)

    def _head_shown(self, head: str) -> bool:
        if head in self.heads or _roman_twin(head) in self.heads:
            return True
        if any(h.startswith(head + ".") for h in self.heads):
            return True
        parent, dot, _last = head.rpartition(".")
        return bool(dot) and self._head_shown(parent) and not any(h.startswith(parent + ".") for h in self.heads)


_ROMAN = (("m", 1000), ("cm", 900), ("d", 500), ("cd", 400), ("c", 100), ("xc", 90), ("l", 50),
          ("xl", 40), ("x", 10), ("ix", 9), ("v", 5), ("iv", 4), ("i", 1))


def _roman_twin(head: str) -> str:
    """The same number in the other figures: "4" <-> "iv" (articles are numbered either
    way); "" when there is none."""
    if head.isdigit():
        value, out = int(head), ""
        if not 0 < value < 4000:
            return ""
        for sym, v in _ROMAN:
            while value >= v:
                out += sym
                value -= v
        return out
    total, rest = 0, head
    for sym, v in _ROMAN:
        while rest.startswith(sym):
            total += v
            rest = rest[len(sym):]
    return str(total) if total and not rest else ""


def _names_other_instrument(text: str, start: int, end: int) -> bool:
    """Do the words around a reference (``text[start:end]``) name another instrument?"""
    from ..xrefs import find_references

    m = _OTHER_INSTRUMENT_RE.match(text, end)
    if m is not None:
        name = m.group("name")
        if name not in ("This", "These") and _label(name) == name.casefold() and not find_references(
                text[m.start("name"):m.end() + 12]):
            return name.rstrip(".,") not in _INSTRUMENT_WORDS or name.rstrip(".,") not in _SELF_WORDS
    m = _INSTRUMENT_AFTER_RE.match(text, end)
    if m is not None and any(w in _CITED_WORDS for w in m.group("name").split()):
        return True
    if end + 1 < len(text) and text[end] in _DASHES and text[end + 1].isdigit():
        return True  # a citation's number: "Clause 252.227-7013"
    named_before = _NAME_BEFORE_RE.search(text, max(0, start - LOOKBEHIND_CHARS), start)
    return text[start:start + 1].islower() and named_before is not None


def _heading_label(text: str, start: int, end: int) -> bool:
    """Is the reference the label of a heading line typed in the text ("Part II: Dedication
    to the public domain"), not a reference?"""
    line_start = text.rfind("\n", 0, start) + 1
    return not text[line_start:start].strip() and (end >= len(text) or text[end] in ":.\n\u2013\u2014-")


def dangling_references(doc: Document, *, document: CheckDocument = "draft") -> tuple[Check, ...]:
    """Typed cross-references whose number names no provision of *doc*: what
    :func:`core.xrefs.resolve` cannot find, in a numbering the document has, and that the
    document shows nowhere as a label in any style (so that a numbering read otherwise --
    "1)" for clause 1, items nested one level too deep -- is no alarm)."""
    from ..xrefs import find_references, numbered_in, resolve

    labels: _Labels | None = None
    out: list[Check] = []
    named: set[str] = set()
    missing_numbers: list[str] = []
    for prov, part, text in _Texts.of(doc).parts:
        for ref in find_references(text):
            if ref.external or ref.scope not in (None, ("document", "")) or not numbered_in(ref, doc):
                continue
            if _names_other_instrument(text, ref.start, ref.end) or _heading_label(text, ref.start, ref.end):
                continue
            lost: list[str] = []
            for r in resolve(ref, doc, within=prov):
                n = r.number
                if n.relative:
                    continue
                named.add(n.number)
                if r.status != "missing":
                    continue
                labels = labels or _Labels.of(doc)
                if not labels.shows(n.number):
                    lost.append(n.number)
            if lost:
                words = text[ref.start:ref.end]
                which = f"{ref.keyword} {lost[0]}" if len(lost) == 1 else \
                    f"{ref.keyword}s {', '.join(lost[:-1])} and {lost[-1]}"
                out.append(Check(
                    kind="dangling-reference", document=document, provision=prov.id,
                    text=words, part=part, span=(ref.start, ref.end), term=lost[0],
                    message=f'"{words}" refers to {which}, which the document does not have'))
                missing_numbers.extend(lost)
    missing = list(dict.fromkeys(missing_numbers))
    if len(missing) >= EXCERPT_MIN_MISSING and len(missing) >= EXCERPT_SHARE * len(named):
        shown = ", ".join(missing[:EXCERPT_NUMBERS_SHOWN]) + (", ..." if len(missing) > EXCERPT_NUMBERS_SHOWN else "")
        return (Check(
            kind="dangling-reference", document=document, provision=None, text="",
            message=(f"{len(missing)} of the {len(named)} provisions the cross-references name are not in "
                     f"the document ({shown}): it reads as an excerpt of a longer one, or its numbering "
                     "was not recognised; the references are not listed one by one"),
            provisions=tuple(dict.fromkeys(c.provision for c in out if c.provision))),)
    return tuple(out)


# --------------------------------------------------------------------------------------
# Checks of a review: the draft's own, and those against the precedent
# --------------------------------------------------------------------------------------


def document_checks(doc: Document, *, document: CheckDocument = "draft", defined: Iterable[str] = (),
                    foreign: Iterable[str] = (), words: DocumentWords | None = None) -> tuple[Check, ...]:
    """The checks one document allows on its own: undefined terms, unused definitions and
    dangling references (*defined*, *foreign* and *words* as for :func:`undefined_terms`)."""
    words = words or document_words(doc, document=document)
    return (*undefined_terms(doc, defined=defined, foreign=foreign, document=document, words=words),
            *words.unused, *words.dangling)


def stale_terms(review: Review) -> tuple[Check, ...]:
    """Each use, in the draft, of the precedent's name of a renamed term."""
    stale = [m for m in review.term_map if m.stale]
    if not stale:
        return ()
    draft = review.draft
    names = [n for t in draft.terms for n in t.names]
    alias_of = {a: t.term for t in draft.terms for a in t.aliases}
    every = list(dict.fromkeys([*names, *(m.draft for m in review.term_map),
                                *(m.precedent for m in review.term_map)]))
    matcher = term_matcher(every, aliases=alias_of, capitals=True)
    wanted = {m.precedent: m for m in stale}
    out: list[Check] = []
    for prov, part, text in _Texts.of(draft).parts:
        for u in find_term_uses(text, matcher):
            m = wanted.get(u.term)
            if m is None:
                continue
            out.append(Check(
                kind="stale-term", document="draft", provision=prov.id, text=text[u.start:u.end],
                part=part, span=(u.start, u.end), term=m.draft,
                message=(f'"{text[u.start:u.end]}" is the precedent\'s name for what the draft '
                         f'calls "{m.draft}" ({m.occurrences} uses); {m.stale} such '
                         f'use{"s" * (m.stale != 1)} left in the draft')))
    return tuple(out)


def definitions_changed(review: Review) -> tuple[Check, ...]:
    """Definitions of the draft whose words changed in substance against the precedent."""
    draft, precedent = review.draft, review.precedent
    p_terms = {t.term: t for t in precedent.terms}
    to_precedent = {m.draft: m.precedent for m in review.term_map}
    out: list[Check] = []
    for t in draft.terms:
        pt = p_terms.get(to_precedent.get(t.term, t.term))
        if pt is None or _in_parties(draft, t) or _in_parties(precedent, pt):
            continue  # a party's label names whoever signs: a new party is no new meaning
        d_pid, d_span = _sentence_area(draft, *_definition_area(draft, t))
        p_pid, p_span = _sentence_area(precedent, *_definition_area(precedent, pt))
        devs = [v for v in review.deviations
                if v.category == "substantive" and v.part == "text"
                and v.draft_provision == d_pid and v.precedent_provision == p_pid
                and _inside(v.draft_span, d_span) and _inside(v.precedent_span, p_span)]
        if not devs:
            continue
        users = _provisions_using(draft, t, exclude=d_pid)
        prov = _provision(draft, d_pid)
        assert prov is not None
        a, b = d_span or (0, len(prov.text))
        ranks = ", ".join(str(v.rank) for v in sorted(devs, key=lambda v: v.rank))
        n = len(users)
        out.append(Check(
            kind="definition-changed", document="draft", provision=d_pid, text=prov.text[a:b],
            span=(a, b), term=t.term, provisions=users,
            message=(f'the definition of "{t.term}" changed (No. {ranks}): '
                     f'{n} provision{"s" * (n != 1)} use{"s" * (n == 1)} the term')))
    return tuple(out)


_SENTENCE_END_RE = compile_pattern(r"[.;](?=\s|$)")


def _sentence_area(doc: Document, pid: str, span: tuple[int, int] | None) -> tuple[str, tuple[int, int] | None]:
    """*span* widened to the end of its sentence, over line breaks (the term finder's
    sentence stops at a line break, which a paragraph wrapped in a text file has anywhere)."""
    if span is None:
        return pid, None
    prov = _provision(doc, pid)
    if prov is None:
        return pid, span
    text = prov.text
    m = _SENTENCE_END_RE.search(text, max(span[1] - 1, span[0]))
    return pid, (span[0], m.end() if m else len(text))


def _in_parties(doc: Document, t: DefinedTerm) -> bool:
    """Is *t* a party's label defined in the parties block ("Acme Ltd (the "Supplier")")?"""
    prov = _provision(doc, t.provision)
    return prov is not None and prov.kind == "parties"


def _inside(span: tuple[int, int] | None, area: tuple[int, int] | None) -> bool:
    """Does a deviation's span touch the definition's area (None: the whole provision)?"""
    if area is None:
        return True
    if span is None:
        return False
    a, b = span
    return a <= area[1] and b >= area[0]


def _provisions_using(doc: Document, t: DefinedTerm, *, exclude: str) -> tuple[str, ...]:
    alias_of = {a: x.term for x in doc.terms for a in x.aliases}
    matcher = term_matcher([x.term for x in doc.terms], aliases=alias_of, capitals=True)
    out = []
    for prov in doc.provisions:
        if prov.id == exclude:
            continue
        if any(u.term == t.term for text in (prov.heading or "", prov.text)
               for u in find_term_uses(text, matcher)):
            out.append(prov.id)
    return tuple(out)


def review_checks(review: Review, *, words: DocumentWords | None = None) -> tuple[Check, ...]:
    """Every drafting check of *review*'s draft, in :data:`CHECK_KINDS` order, each kind in
    document order (*words*: :func:`document_words` of the draft, when already computed)."""
    renamed = [n for m in review.term_map for n in (m.draft, m.precedent)]
    foreign = [t.term for t in review.precedent.terms]
    checks = [*document_checks(review.draft, defined=renamed, foreign=foreign, words=words),
              *stale_terms(review), *definitions_changed(review)]
    position = {p.id: i for i, p in enumerate(review.draft.provisions)}
    kind_order = {k: i for i, k in enumerate(CHECK_KINDS)}
    return tuple(sorted(checks, key=lambda c: (kind_order[c.kind], position.get(c.provision or "", -1),
                                              c.part != "heading", (c.span or (0, 0))[0])))
