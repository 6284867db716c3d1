"""Successive versions of published licences as precedent and draft, with an outside
reference diff to measure the review against.

Texts: the PyPI package ``licensedcode-data`` (``licensedcode/data/licenses/<key>.LICENSE``,
through :func:`tests.support.legal_texts.license_text`), each read with
:func:`core.reader.read_text`; the older version is the precedent, the newer the draft.

Reference: the standard library's ``difflib.SequenceMatcher`` (``autojunk=False``, so that
frequent words are not ignored) on the words of the two documents' paragraphs (the text as
read: wrapped lines joined), normalised the way a reader discounts noise -- case-folded,
quotation marks and dashes unified (TeX-style ````x''`` counts as ``"x"``), white space
collapsed (words and punctuation marks are the tokens) and list labels removed (a label at
the start of a paragraph, "2." in "2.Scope" included, and a lettered or roman label in
brackets inside a sentence, "(iv)").  Every non-equal opcode is a change "whose words
differ after normalisation".

Against it, :func:`measure` counts for one review:

* **missed** changes: reference changes that no deviation touches (the changed words of a
  deviation in a provision's text or heading, the whole provision for an added, removed,
  moved or renumbered one; a renamed defined term covers the uses the pair's diff marks as
  renamed).  A phrase moved inside a sentence can be cut two ways ("sublicense, distribute
  or transfer" -> "sublicense, or distribute": delete "transfer", or delete "distribute"
  and insert it again); a change whose words the review's own diff keeps unchanged, with a
  deviation within :data:`NEAR_WORDS` words, is counted apart as *reordered*, not missed;
* **false substantive** deviations: substantive deviations whose words are equal after the
  normalisation above (``noise``), equal once the review's own term map is applied
  (``rename``, which the term-map engineer owns) or whose changed words the reference finds
  unchanged in the same place, with no change within NEAR_WORDS words (``unchanged``: text
  split into a deletion and a re-insertion, or provisions paired wrongly);
* changes of **figures** (words with a digit, outside references to the document's own
  provisions) that no substantive deviation touches.
"""

from __future__ import annotations

import bisect
import difflib
import re
from collections.abc import Iterable, Sequence
from dataclasses import dataclass

from core.model import Deviation, Document, Provision, Review
from core.reader import read_text
from core.review import run_review
from core.review.tokens import find_cross_references

from .legal_texts import license_text

__all__ = [
    "PAIRS",
    "PairFigures",
    "RefChange",
    "VersionPair",
    "measure",
    "normalised_words",
    "reference_changes",
    "reference_diff",
    "review_pair",
]


@dataclass(frozen=True, slots=True)
class VersionPair:
    """Two successive versions of one licence: *precedent* older, *draft* newer."""

    precedent: str
    draft: str
    why: str  # why the pair is in the set
    rewrite: bool = False  # the newer version is largely rewritten


#: The pairs measured and tested, from these families only: the Creative Commons
#: Attribution licences (and -sa, -nc, -nd), the Eclipse software user agreement, Google's
#: terms of service, the Hippocratic licence, the GFDL, GPL, LGPL, AGPL, the Tanuki community
#: licence, the ZPL, the OpenLDAP licence, Apache, Artistic and the PSF licence.
PAIRS: tuple[VersionPair, ...] = (
    VersionPair("cc-by-1.0", "cc-by-2.0", "attribution terms reworded, sections renumbered"),
    VersionPair("cc-by-2.0", "cc-by-2.5", "a small revision: the attribution clause widened"),
    VersionPair("cc-by-2.5", "cc-by-3.0", "a revision with new sections, all-caps headings"),
    VersionPair("cc-by-3.0", "cc-by-4.0", "a complete rewrite", rewrite=True),
    VersionPair("cc-by-sa-2.0", "cc-by-sa-2.5", "share-alike: small revision, version numbers"),
    VersionPair("cc-by-sa-2.5", "cc-by-sa-3.0", "share-alike: compatible licences added"),
    VersionPair("cc-by-nc-2.0", "cc-by-nc-2.5", "non-commercial: small revision"),
    VersionPair("cc-by-nc-2.5", "cc-by-nc-3.0", "non-commercial: royalties clause reworded"),
    VersionPair("cc-by-nd-2.0", "cc-by-nd-2.5", "no-derivatives: small revision"),
    VersionPair("cc-by-nd-2.5", "cc-by-nd-3.0", "no-derivatives: collective works renamed"),
    VersionPair("eclipse-sua-2004", "eclipse-sua-2005", "a dated agreement: dates and lists"),
    VersionPair("eclipse-sua-2005", "eclipse-sua-2010", "a revision: licences added to a list"),
    VersionPair("eclipse-sua-2010", "eclipse-sua-2011", "a revision of a few words and dates"),
    VersionPair("google-tos-2013", "google-tos-2014", "terms of service: a paragraph added"),
    VersionPair("google-tos-2017", "google-tos-2019", "terms of service: small edits"),
    VersionPair("hippocratic-1.1", "hippocratic-1.2", "a short licence growing a clause"),
    VersionPair("hippocratic-2.0", "hippocratic-2.1", "a short licence: a regulation cited"),
    VersionPair("gfdl-1.1", "gfdl-1.2", "a long licence: sections added, version numbers"),
    VersionPair("gfdl-1.2", "gfdl-1.3", "a long licence: relicensing section added"),
    VersionPair("gpl-1.0", "gpl-2.0", "a long licence largely reworded", rewrite=True),
    VersionPair("lgpl-2.0", "lgpl-2.1", "a long licence: the name changed throughout"),
    VersionPair("tanuki-community-sla-1.0", "tanuki-community-sla-1.1",
                "a commercial licence: clauses added, figures"),
    VersionPair("zpl-1.1", "zpl-2.0", "a short licence: conditions removed, a number changed"),
    VersionPair("zpl-2.0", "zpl-2.1", "a short licence: one condition reworded"),
    VersionPair("openldap-1.3", "openldap-1.4", "a short licence: a few words"),
    VersionPair("openldap-2.2", "openldap-2.3", "a short licence: one word, a version number"),
    VersionPair("openldap-2.7", "openldap-2.8", "a short licence: sections renumbered"),
    VersionPair("apache-1.0", "apache-1.1", "a short licence: the advertising clause removed"),
    VersionPair("artistic-1.0", "artistic-2.0", "a complete rewrite", rewrite=True),
    VersionPair("psf-2.0", "psf-3.7.2", "a short licence: years and a version number"),
)


# ----------------------------------------------------------------------------------------
# Normalised words
# ----------------------------------------------------------------------------------------

#: Words and punctuation marks; TeX-style quotation marks (two backticks, two apostrophes)
#: are one token each.
_TOKEN_RE = re.compile(r"``|''|\w+|[^\w\s]")
_FOLD = {"``": '"', "''": '"', "\u2018": "'", "\u2019": "'", "\u201a": "'", "\u201b": "'",
         "`": "'", "\u201c": '"', "\u201d": '"', "\u201e": '"', "\u201f": '"', "\u00ab": '"',
         "\u00bb": '"', **{c: "-" for c in "\u2010\u2011\u2012\u2013\u2014\u2015\u2212"}}
#: A list label at the start of a paragraph: "2.", "2.1", "2.1.3", "(a)", "a)", "iv.",
#: "(12)" (common practice, no source), also when glued to the next word ("2.Scope").
_LEAD_LABEL_RE = re.compile(
    r"\s*(?:\(\s*(?:\d{1,3}|[a-z]{1,2}|[ivxlc]{1,6})\s*\)|(?:\d{1,3}|[a-z]|[ivxlc]{1,6})[.)]"
    r"(?:\d{1,3}[.)]?)*|\d{1,3}(?:\.\d{1,3})+\.?)(?=\s|[A-Za-z]|$)", re.IGNORECASE)
#: A lettered or roman list label in brackets inside a sentence: "(a)", "(iv)", "(B)".
_INLINE_LABEL_RE = re.compile(r"(?<![\w)])\((?:[a-z]|[ivxlc]{1,6})\)(?![\w(])", re.IGNORECASE)


@dataclass(frozen=True, slots=True)
class Word:
    key: str  # normalised
    block: int
    start: int
    end: int


def normalised_words(text: str, *, block: int = 0, paragraph_start: bool = True) -> list[Word]:
    """The normalised words of *text* (one paragraph), with their offsets."""
    skip: list[tuple[int, int]] = []
    if paragraph_start:
        m = _LEAD_LABEL_RE.match(text)
        if m:
            skip.append((m.start(), m.end()))
    skip += [(m.start(), m.end()) for m in _INLINE_LABEL_RE.finditer(text)]
    out: list[Word] = []
    for m in _TOKEN_RE.finditer(text):
        if any(a <= m.start() < b for a, b in skip):
            continue
        tok = m.group()
        out.append(Word(_FOLD.get(tok, tok).casefold(), block, m.start(), m.end()))
    return out


def _document_words(doc: Document) -> list[Word]:
    words: list[Word] = []
    for b in doc.blocks:
        words += normalised_words(b.text, block=b.index)
    return words


@dataclass(frozen=True, slots=True)
class RefChange:
    """One non-equal opcode of the reference diff: precedent words ``p`` became ``d``."""

    tag: str
    p: tuple[Word, ...]
    d: tuple[Word, ...]

    def shown(self) -> str:
        return (" ".join(w.key for w in self.p) or "-") + " -> " + (
            " ".join(w.key for w in self.d) or "-")


@dataclass(frozen=True, slots=True)
class ReferenceDiff:
    changes: tuple[RefChange, ...]
    #: word index (reading order) in the precedent -> its equal word in the draft, and back
    p_to_d: dict[int, int]
    d_to_p: dict[int, int]


def reference_diff(precedent: Document, draft: Document) -> ReferenceDiff:
    """The reference diff (see the module's docstring)."""
    pw, dw = _document_words(precedent), _document_words(draft)
    sm = difflib.SequenceMatcher(None, [w.key for w in pw], [w.key for w in dw], autojunk=False)
    changes: list[RefChange] = []
    p_to_d: dict[int, int] = {}
    for tag, i1, i2, j1, j2 in sm.get_opcodes():
        if tag == "equal":
            p_to_d.update(zip(range(i1, i2), range(j1, j2)))
        else:
            changes.append(RefChange(tag, tuple(pw[i1:i2]), tuple(dw[j1:j2])))
    return ReferenceDiff(tuple(changes), p_to_d, {d: p for p, d in p_to_d.items()})


def reference_changes(precedent: Document, draft: Document) -> list[RefChange]:
    """The reference diff's changes (see the module's docstring)."""
    return list(reference_diff(precedent, draft).changes)


# ----------------------------------------------------------------------------------------
# Where each deviation lies in the paragraphs
# ----------------------------------------------------------------------------------------

Ranges = tuple[tuple[int, int, int], ...]  # (block, start, end)


class _Layout:
    """Where each provision's text, heading and whole extent lie in the document's blocks."""

    def __init__(self, doc: Document) -> None:
        self.doc = doc
        self.words: dict[int, list[Word]] = {}
        self.order = _document_words(doc)
        #: (block, start) of a word -> its index in reading order; (block, -1) and
        #: (block, -2) -> the block's first word and one past its last.
        self.at: dict[tuple[int, int], int] = {}
        self.keys = [(w.block, w.start) for w in self.order]
        for k, w in enumerate(self.order):
            self.words.setdefault(w.block, []).append(w)
            self.at[(w.block, w.start)] = k
            self.at.setdefault((w.block, -1), k)
            self.at[(w.block, -2)] = k + 1
        #: block -> (segment start, segment end, provision id, offset in the text)
        self.in_text: dict[int, list[tuple[int, int, str, int]]] = {}
        for p in doc.provisions:
            off = 0
            for sg in p.segments:
                self.in_text.setdefault(sg.block, []).append((sg.start, sg.end, p.id, off))
                off += sg.end - sg.start + 1
        self.pos = {p.id: i for i, p in enumerate(doc.provisions)}
        self.start_block: list[int] = []
        self.heading_at: list[tuple[int, int, int] | None] = []
        cursor = 0
        for p in doc.provisions:
            first = p.segments[0].block if p.segments else None
            found = self._find_heading(p, cursor, first)
            start = found[0] if found else (first if first is not None else cursor)
            self.heading_at.append(found)
            self.start_block.append(start)
            cursor = max([start + 1, *(sg.block + 1 for sg in p.segments)])

    def _find_heading(self, p: Provision, cursor: int, first: int | None
                      ) -> tuple[int, int, int] | None:
        if not p.heading:
            return None
        last = first if first is not None else cursor + 4
        for b in range(max(cursor - 1, 0), min(last + 1, len(self.doc.blocks))):
            k = self.doc.blocks[b].text.find(p.heading)
            if k >= 0:
                return (b, k, k + len(p.heading))
        return None

    def index_at(self, block: int, offset: int) -> int:
        """Reading-order index of the first word of *block* starting at or after *offset*
        (or of the next block's first word)."""
        return bisect.bisect_left(self.keys, (block, offset))

    def word_span(self, dev: Deviation, side: int) -> tuple[int, int] | None:
        """Reading-order word indices [k0, k1) of a text or heading deviation's changed
        words on one side (k0 == k1 at an insertion point)."""
        pid = (dev.precedent_provision, dev.draft_provision)[side]
        if pid is None:
            return None
        if dev.part == "heading":
            at = self.heading_at[self.pos[pid]]
            tspan = (dev.precedent_text_span, dev.draft_text_span)[side]
            if at is None or tspan is None:
                return None
            return self.index_at(at[0], at[1] + tspan[0]), self.index_at(at[0], at[1] + tspan[1])
        span = (dev.precedent_span, dev.draft_span)[side]
        if span is None:
            return None
        a, b = self.text_point(pid, span[0]), self.text_point(pid, span[1])
        return self.index_at(*a), self.index_at(*b)

    def text_point(self, pid: str, k: int) -> tuple[int, int]:
        """(block, offset) of offset *k* of the provision's text."""
        p = self.doc.provisions[self.pos[pid]]
        off = 0
        for s in p.segments:
            n = s.end - s.start
            if k <= off + n:
                return s.block, s.start + k - off
            off += n + 1
        last = p.segments[-1] if p.segments else None
        return (last.block, last.end) if last else (self.start_block[self.pos[pid]], 0)

    def locate(self, w: Word) -> tuple[str, int] | None:
        """(provision id, offset in its text) of word *w*; None in a label or heading."""
        for a, e, pid, off in self.in_text.get(w.block, ()):
            if a <= w.start < e:
                return pid, off + w.start - a
        return None

    def text_ranges(self, pid: str, span: tuple[int, int]) -> Ranges:
        """Blocks and offsets of ``provision.text[span]``."""
        p = self.doc.provisions[self.pos[pid]]
        out = []
        off = 0
        for s in p.segments:
            n = s.end - s.start
            a, b = max(span[0], off), min(span[1], off + n)
            if a < b:
                out.append((s.block, s.start + a - off, s.start + b - off))
            off += n + 1
        return tuple(out)

    def heading_range(self, pid: str, span: tuple[int, int]) -> Ranges:
        at = self.heading_at[self.pos[pid]]
        if at is None:
            return ()
        return ((at[0], at[1] + span[0], at[1] + span[1]),)

    def extent(self, pid: str, *, subtree: bool) -> Ranges:
        """Every block of the provision (with its sub-provisions when *subtree*)."""
        i = self.pos[pid]
        provs = self.doc.provisions
        ids = {pid}
        j = i + 1
        while subtree and j < len(provs) and provs[j].parent in ids:
            ids.add(provs[j].id)
            j += 1
        if not subtree:
            j = i + 1
        end = self.start_block[j] if j < len(provs) else len(self.doc.blocks)
        end = max(end, max((s.block + 1 for s in provs[i].segments), default=end))
        return tuple((b, 0, len(self.doc.blocks[b].text)) for b in range(self.start_block[i], end))


def deviation_ranges(dev: Deviation, players: tuple[_Layout, _Layout]) -> tuple[Ranges, Ranges]:
    """(precedent, draft) ranges of the words a deviation concerns: its changed words in a
    text, its shown words in a heading, the provision (and its sub-provisions) as a whole."""
    pl, dl = players
    out: list[Ranges] = []
    for layout, pid, span, tspan in ((pl, dev.precedent_provision, dev.precedent_span,
                                      dev.precedent_text_span),
                                     (dl, dev.draft_provision, dev.draft_span,
                                      dev.draft_text_span)):
        if pid is None:
            out.append(())
        elif dev.part == "text" and span is not None:
            out.append(layout.text_ranges(pid, span))
        elif dev.part == "heading" and tspan is not None:
            out.append(layout.heading_range(pid, tspan))
        else:
            out.append(layout.extent(pid, subtree=dev.change != "replace"))
    return out[0], out[1]


def shown_ranges(dev: Deviation, players: tuple[_Layout, _Layout]) -> tuple[Ranges, Ranges]:
    """(precedent, draft) ranges of the words a text or heading deviation shows."""
    out: list[Ranges] = []
    for layout, pid, tspan in ((players[0], dev.precedent_provision, dev.precedent_text_span),
                               (players[1], dev.draft_provision, dev.draft_text_span)):
        if pid is None or tspan is None:
            out.append(())
        elif dev.part == "heading":
            out.append(layout.heading_range(pid, tspan))
        else:
            out.append(layout.text_ranges(pid, tspan))
    return out[0], out[1]


def _touches(ranges: Ranges, words: Iterable[Word]) -> bool:
    return any(b == w.block and a < w.end and w.start < e for w in words for b, a, e in ranges)


# ----------------------------------------------------------------------------------------
# Measuring one review
# ----------------------------------------------------------------------------------------

@dataclass(frozen=True, slots=True)
class PairFigures:
    pair: str
    changes: int  # reference changes
    missed: tuple[RefChange, ...]
    #: changes the engine describes as a reordering: their words are unchanged in its own
    #: diff and a deviation lies within NEAR_WORDS words (another cut of the same change)
    reordered: tuple[RefChange, ...]
    covered_by: tuple[tuple[str, int], ...]  # category -> reference changes it covers
    false_substantive: tuple[tuple[str, Deviation], ...]  # (why, deviation)
    substantive: int
    #: reference changes of figures (outside cross-references) that no substantive
    #: deviation touches: numbers are always substance
    figures_not_substantive: tuple[RefChange, ...] = ()

    def false_count(self, *, without: Sequence[str] = ()) -> int:
        return sum(why not in without for why, _v in self.false_substantive)


def _keys_in(layout: _Layout, ranges: Ranges) -> list[str]:
    """The normalised words of the document (as the reference reads them) inside *ranges*."""
    out: list[str] = []
    for b, a, e in ranges:
        out += [w.key for w in layout.words.get(b, ()) if a < w.end and w.start < e]
    return out


def _renamed(review: Review, keys: list[str]) -> list[str]:
    """*keys* (the draft's words) with the review's renamed terms read as the precedent's."""
    out = list(keys)
    for m in review.term_map:
        dk = [w.key for w in normalised_words(m.draft, paragraph_start=False)]
        pk = [w.key for w in normalised_words(m.precedent, paragraph_start=False)]
        for old, new in ((dk, pk), (dk[:-1] + [dk[-1] + "s"], pk[:-1] + [pk[-1] + "s"])):
            k = 0
            while k + len(old) <= len(out):
                if out[k:k + len(old)] == old:
                    out[k:k + len(old)] = new
                    k += len(new)
                else:
                    k += 1
    return out


#: A deviation whose changed words lie within this many words of a reference change is
#: the same change described another way: Myers' diff and difflib may cut a phrase moved
#: inside a sentence differently ("sublicense, distribute or transfer" -> "sublicense, or
#: distribute": one deletes "distribute" and re-inserts it, the other deletes "transfer").
NEAR_WORDS = 3


class _Index:
    """Marked words of a document (in reading order), for quick tests of what lies near."""

    def __init__(self, layout: _Layout, marked: Iterable[Word]) -> None:
        self.order = layout.order
        self.at = layout.at
        keys = {(w.block, w.start) for w in marked}
        self.prefix = [0]
        for w in self.order:
            self.prefix.append(self.prefix[-1] + ((w.block, w.start) in keys))

    def near(self, k0: int, k1: int, *, near: int = 0) -> bool:
        """Whether a marked word is among words k0..k1-1 or within *near* words of them."""
        lo, hi = max(0, k0 - near), min(len(self.order), k1 + near)
        return self.prefix[hi] > self.prefix[lo]

    def touches(self, ranges: Ranges, *, near: int = 0) -> bool:
        """Whether a marked word lies in *ranges* or within *near* words of them."""
        for b, a, e in ranges:
            hit = [self.at[(b, w.start)] for w in _words_in(self.order, self.at, b, a, e)]
            if hit and self.near(hit[0], hit[-1] + 1, near=near):
                return True
        return False


def _words_in(order: Sequence[Word], at: dict[tuple[int, int], int], block: int, a: int, e: int
              ) -> list[Word]:
    """The words of *block* that overlap offsets a..e."""
    return [w for w in order[at.get((block, -1), 0):at.get((block, -2), 0)]
            if a < w.end and w.start < e]


def _counterparts_near(ref: ReferenceDiff, spans: tuple[tuple[int, int], tuple[int, int]]
                       ) -> bool:
    """Whether the reference pairs the words of each side's span with words at the other
    side's span (within NEAR_WORDS): the same text, kept in place."""
    for side, (k0, k1) in enumerate(spans):
        other = spans[1 - side]
        mapping = (ref.p_to_d, ref.d_to_p)[side]
        for k in range(k0, k1):
            m = mapping.get(k)
            if m is not None and not other[0] - NEAR_WORDS <= m < other[1] + NEAR_WORDS:
                return False
    return True


def _false_reason(review: Review, dev: Deviation, players: tuple[_Layout, _Layout],
                  ranges: tuple[Ranges, Ranges], changed: tuple[_Index, _Index],
                  ref: ReferenceDiff) -> str | None:
    if dev.part == "provision":
        if not (changed[0].touches(ranges[0], near=NEAR_WORDS)
                or changed[1].touches(ranges[1], near=NEAR_WORDS)):
            return "unchanged"
        return None
    shown = shown_ranges(dev, players)
    pk, dk = _keys_in(players[0], shown[0]), _keys_in(players[1], shown[1])
    if pk == dk:
        return "noise"
    if review.term_map and pk == _renamed(review, dk):
        return "rename"
    spans = (players[0].word_span(dev, 0), players[1].word_span(dev, 1))
    if spans[0] is None or spans[1] is None:
        return None
    if any(changed[k].near(*spans[k], near=NEAR_WORDS) for k in (0, 1)):
        return None
    # unchanged where the reference finds these words in the same place: split text
    return "unchanged" if _counterparts_near(ref, (spans[0], spans[1])) else None


def _term_ranges(review: Review, players: tuple[_Layout, _Layout]) -> list[tuple[Ranges, Ranges]]:
    """The renamed-term (and renumbered-reference) hunks of every pair's diff."""
    out = []
    for pair in review.pairs:
        if pair.draft is None or pair.precedent is None:
            continue
        for e in pair.edits:
            if e.restyle:
                out.append((players[0].text_ranges(pair.precedent, (e.p1, e.p2)),
                            players[1].text_ranges(pair.draft, (e.d1, e.d2))))
    return out


def _engine_equal(review: Review, players: tuple[_Layout, _Layout], rc: RefChange) -> bool:
    """Whether the engine's own pair diffs keep every word of *rc* as unchanged (the words
    are still there, in another place of the sentence)."""
    for side, words in ((0, rc.p), (1, rc.d)):
        for w in words:
            got = players[side].locate(w)
            if got is None:
                return False
            pid, off = got
            edits = [e for pr in review.pairs if (pr.precedent, pr.draft)[side] == pid
                     for e in pr.edits]
            if not any(e.tag == "equal" and (e.p1, e.d1)[side] <= off < (e.p2, e.d2)[side]
                       for e in edits):
                return False
    return True


def _span_of(index: _Index, words: Sequence[Word]) -> tuple[int, int] | None:
    if not words:
        return None
    return index.at[(words[0].block, words[0].start)], index.at[(words[-1].block, words[-1].start)] + 1


def measure(review: Review, *, name: str) -> PairFigures:
    """The review's missed changes and false substantive deviations (module docstring)."""
    players = (_Layout(review.precedent), _Layout(review.draft))
    ref = reference_diff(review.precedent, review.draft)
    refs = ref.changes
    changed = (_Index(players[0], (w for rc in refs for w in rc.p)),
               _Index(players[1], (w for rc in refs for w in rc.d)))
    spans = [(v, deviation_ranges(v, players)) for v in review.deviations]
    false = tuple((why, v) for v, r in spans if v.category == "substantive"
                  for why in [_false_reason(review, v, players, r, changed, ref)] if why)
    terms = _term_ranges(review, players)
    shown = [_Index(players[k], (w for _v, r in spans for b, a, e in r[k]
                                 for w in _words_in(players[k].order, players[k].at, b, a, e)))
             for k in (0, 1)]
    missed: list[RefChange] = []
    reordered: list[RefChange] = []
    covered: dict[str, int] = {}
    for rc in refs:
        cats = {v.category for v, (pr, dr) in spans if _touches(pr, rc.p) or _touches(dr, rc.d)}
        if not cats and any(_touches(pr, rc.p) or _touches(dr, rc.d) for pr, dr in terms):
            cats = {"term"}
        if not cats and rc.p and rc.d and _renamed(review, [w.key for w in rc.d]) == [w.key for w in rc.p]:
            cats = {"term"}  # a use of a renamed term inside a longer change: reported once, as the rename
        if not cats:
            near = [shown[k].near(*sp, near=NEAR_WORDS) for k, words in ((0, rc.p), (1, rc.d))
                    for sp in [_span_of(shown[k], words)] if sp]
            if near and all(near) and _engine_equal(review, players, rc):
                reordered.append(rc)
            else:
                missed.append(rc)
        for c in cats:
            covered[c] = covered.get(c, 0) + 1
    return PairFigures(name, len(refs), tuple(missed), tuple(reordered),
                       tuple(sorted(covered.items())), false,
                       sum(v.category == "substantive" for v in review.deviations),
                       _figures_not_substantive(review, refs, spans))


def _figure_words(doc: Document, words: Sequence[Word]) -> list[Word]:
    """The words of *words* with a digit, less the numbers of cross-references to the
    agreement's own provisions (the review follows those to the provision they name:
    core.review.tokens.find_cross_references)."""
    out = []
    for w in words:
        if any(c.isdigit() for c in w.key):
            refs = find_cross_references(doc.blocks[w.block].text)
            if not any(a <= w.start < b for a, b, *_ in refs):
                out.append(w)
    return out


def _figures_not_substantive(review: Review, refs: Sequence[RefChange],
                             spans: Sequence[tuple[Deviation, tuple[Ranges, Ranges]]]
                             ) -> tuple[RefChange, ...]:
    """Reference changes of figures that no substantive deviation touches."""
    out = []
    for rc in refs:
        pf, df = _figure_words(review.precedent, rc.p), _figure_words(review.draft, rc.d)
        if (pf or df) and not any(v.category == "substantive" and (_touches(pr, pf) or _touches(dr, df))
                                  for v, (pr, dr) in spans):
            out.append(rc)
    return tuple(out)


def review_pair(pair: VersionPair) -> Review:
    """The review of *pair*'s newer version (draft) against its older one (precedent)."""
    precedent = read_text(license_text(pair.precedent), source=f"{pair.precedent}.txt")
    draft = read_text(license_text(pair.draft), source=f"{pair.draft}.txt")
    return run_review(draft, precedent)
