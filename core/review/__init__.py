"""The review engine: compare the counterparty's draft with the house precedent.

:func:`run_review` runs the stages in order:

1. **term map** (:mod:`.termmap`): a first map from the definitions (and the vocabulary model
   when there is one), an alignment with it, then the final map with the substitution
   evidence of the aligned provisions, which also finds names renamed throughout that
   neither document defines (the documents are then tokenised again with those names as
   terms); the alignment is redone when the map changed.  Each document's aliases are its
   terms ("Your" is "You"), and every name that is not renamed and no party's label is
   compared as the words it is written with;
2. **alignment** (:mod:`.align`): provisions paired by content and heading after term
   normalisation; statuses same / changed / moved / added / removed / split / merged;
3. **word diff** (:mod:`.worddiff`) of every aligned pair, with the draft's defined terms
   read as the precedent's and cross-references read as the provision they point at; each
   pair keeps its diff as ``Pair.edits`` (offsets into the original texts; the invariants
   are in :mod:`core.model`), which the outputs and the desktop app show as it is;
4. **classification** (:mod:`.classify`) of each change: formatting, punctuation, numbering,
   completion (a blank of the precedent filled in), term or substantive; a change that runs
   from one provision of a split or merged group into the next is cut at the boundary, so
   that each provision keeps its own deviation;
5. **severity** (:mod:`.severity`, rules in ``resources/severity.toml``).  A heading one
   side only adds or removes is formatting (the rule file's ``[headings]``); a heading whose
   words changed is a low substantive deviation.  Each deviation says which part it
   concerns (``part``: text, heading or the whole provision);
6. **numbers are always substance** (:mod:`.figures`): last, every deviation whose figures
   differ (digits, amounts, dates, versions; list labels and references followed to their
   provision aside) becomes substantive with the old and new values in its reasons,
   whatever the stages before said; then the ranking: by descending severity, ties in
   draft order;
7. **drafting checks** (:mod:`.checks`) of the draft: undefined terms, unused definitions,
   stale names of renamed terms, dangling references and changed definitions
   (``Review.checks``).

A pair's status is ``same`` when its only differences are renamed defined terms and
renumbering, ``changed`` otherwise; ``moved``, ``split`` and ``merged`` take precedence.

Cost: linear in the documents' length apart from the alignment's candidate scoring (see
:mod:`.align`) and Myers' diff per pair (O(N·D)); ``benchmarks/bench_review.py`` measures it.
"""

from __future__ import annotations

import math
import re
import time
from bisect import bisect_right
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass, replace

from ..docinfo import DocInfo, build_docinfo
from ..model import (
    Category,
    ChangeKind,
    Deviation,
    DeviationPart,
    Direction,
    Document,
    Edit,
    Pair,
    PairStatus,
    Provision,
    Review,
    TermMapping,
)
from ..parallel import Later, can_fork, cycles_uncollected, in_halves
from .align import Alignment, Features, Group, align
from .checks import DocumentWords, document_words, review_checks
from .classify import Change, TermContext, WordChange, classify_ops
from .figures import figure_reasons, figures_in
from .serialize import review_to_dict
from .severity import (
    SeverityRules,
    Signal,
    assess_text_change,
    category_severity,
    clause_types_for,
    default_rules,
    figure_severity,
    find_quantities,
    heading_only_reason,
    is_weight_reason,
    provision_change_severity,
)
from .spans import AlignedPoints
from .termmap import (
    TermMap,
    TermOverride,
    VocabularyModel,
    map_terms,
    scan_slots,
)
from .tokens import (
    BaseTokens,
    TermMatcher,
    TokenSeq,
    base_tokens,
    count_term_uses,
    plain_terms,
    rekey,
    term_matcher,
    word_keys,
)
from .worddiff import pair_edits_from_ops, token_ops

__all__ = ["NO_SHARED_NOTE", "TermOverride", "VocabularyModel", "clear_caches", "review_to_dict",
           "run_review"]

#: Words of context added around a change that has no letters or digits of its own (a
#: comma inserted), so that the reader sees where it is.
_CONTEXT_WORDS = 1
NO_SHARED_NOTE = ("the documents share no provision: every precedent provision is reported "
                  "as removed and every draft provision as added")


class _Side:
    """One document's provisions tokenised once (lazily); keys follow ``to_key``."""

    def __init__(self, info: DocInfo, matcher: TermMatcher | None,
                 memo: dict[str, BaseTokens] | None = None) -> None:
        self.info = info
        self.matcher = matcher
        #: text -> its tokens with this side's matcher; shared by two sides with the same
        #: matcher (most provisions of a draft are the precedent's words, tokenised once)
        self.memo: dict[str, BaseTokens] = {} if memo is None else memo
        n = len(info.provisions)
        self._text: list[BaseTokens | None] = [None] * n
        self._head: list[BaseTokens | None] = [None] * n
        self.to_key: Mapping[str, str] = {}
        #: names compared as their words (terms that only one document has)
        self.plain: frozenset[str] = frozenset()

    def _tokens(self, text: str) -> BaseTokens:
        bt = self.memo.get(text)
        if bt is None:
            bt = self.memo[text] = base_tokens(text, self.matcher)
        return bt

    def text(self, i: int) -> BaseTokens:
        bt = self._text[i]
        if bt is None:
            bt = self._text[i] = self._tokens(self.info.provisions[i].text)
        return bt

    def head(self, i: int) -> BaseTokens:
        bt = self._head[i]
        if bt is None:
            bt = self._head[i] = self._tokens(self.info.provisions[i].heading or "")
        return bt

    def seq(self, i: int, xref: Callable[[str, str], str] | None = None) -> TokenSeq:
        return rekey(self.text(i), term_key=self.to_key, xref=xref, as_words=self.plain)

    def renames(self, bt: BaseTokens) -> bool:
        """Whether this side's term map renames a term that *bt* uses."""
        return any(name in self.to_key for _i, name, _f in bt.terms)

    def rekey(self, bt: BaseTokens, *, mapped: bool,
              xref: Callable[[str, str], str] | None = None) -> TokenSeq:
        """*bt* (a text of this side) keyed for the diff; with *mapped*, the term map."""
        return rekey(bt, term_key=self.to_key if mapped else {}, xref=xref, as_words=self.plain)


def _aligned_features(dside: _Side, pside: _Side) -> Alignment:
    """The alignment of the two sides' provisions by their features (words keyed by the
    sides' term maps, headings, kinds, terms defined, parents)."""
    words: dict[tuple[int, int], tuple[str, ...]] = {}  # shared by the sides: see _features
    return align(_features(dside, words), _features(pside, words))


def _features(side: _Side, words: dict[tuple[int, int], tuple[str, ...]]) -> list[Features]:
    """The features of *side*'s provisions.  *words* keeps the word keys of each tokenised
    text whose terms the side's term map leaves as they are, by the identity of its tokens
    and of the names compared as words: the other side, which shares the tokens of equal
    texts, finds them there."""
    info = side.info
    out: list[Features] = []
    # a parties provision is linked through the party label it defines, as a definition is
    party_term: dict[str, str] = {}
    for t in info.doc.terms:
        if t.term in info.party_labels:
            party_term.setdefault(t.provision, t.term)

    def keys(bt: BaseTokens) -> tuple[str, ...]:
        if side.renames(bt):
            return tuple(word_keys(side.rekey(bt, mapped=True)))
        k = (id(bt), id(side.plain))
        got = words.get(k)
        if got is None:
            got = words[k] = tuple(word_keys(side.rekey(bt, mapped=True)))
        return got

    for i, p in enumerate(info.provisions):
        name = p.term if p.kind == "definition" else party_term.get(p.id)
        term = side.to_key.get(name, name) if name else None
        out.append(Features(keys(side.text(i)), keys(side.head(i)), p.kind, term, info.parent_pos[i]))
    return out


def _label(info: DocInfo, pos: int, *, with_heading: bool = True) -> str:
    p = info.provisions[pos]
    num = info.full_number[pos]
    if p.kind == "definition" and p.term:
        base = f'definition of "{p.term}"'
        return f"{base} (clause {num})" if num else base
    if num:
        base = f"{'schedule' if p.kind == 'schedule' else 'clause'} {num}"
    else:
        base = p.kind if p.kind != "clause" else "provision"
    if with_heading and p.heading:
        return f"{base} ({p.heading.strip()})"
    if not num and not p.heading:
        words = p.text.split()[:6]
        if words:
            return f"{base} \"{' '.join(words)}{' ...' if len(p.text.split()) > 6 else ''}\""
    return base


def _with_context(text: str, span: tuple[int, int]) -> tuple[int, int]:
    """*span*, with a word of context each side when ``text[span]`` has no letter or digit
    (up to _CONTEXT_WORDS words, each with the white space between it and the span).  Cost:
    the words and white space stepped over, not the text."""
    a, b = span
    s = text[a:b]
    if not s or any(c.isalnum() for c in s):
        return span
    for _ in range(_CONTEXT_WORDS):
        i = a
        while i > 0 and text[i - 1].isspace():
            i -= 1
        j = i
        while j > 0 and not text[j - 1].isspace():
            j -= 1
        if j == i:
            break
        a = j
    for _ in range(_CONTEXT_WORDS):
        i = b
        while i < len(text) and text[i].isspace():
            i += 1
        j = i
        while j < len(text) and not text[j].isspace():
            j += 1
        if j == i:
            break
        b = j
    return a, b


def _trimmed(text: str, span: tuple[int, int]) -> tuple[int, int]:
    a, b = span
    while a < b and text[a].isspace():
        a += 1
    while b > a and text[b - 1].isspace():
        b -= 1
    return a, b


@dataclass
class _Dev:
    """A deviation before ranking."""

    order: tuple[float, int, int]
    severity: int
    category: Category
    change: ChangeKind
    draft_provision: str | None
    precedent_provision: str | None
    precedent_text: str
    draft_text: str
    reasons: tuple[str, ...]
    precedent_span: tuple[int, int] | None = None
    draft_span: tuple[int, int] | None = None
    part: DeviationPart = "text"
    precedent_text_span: tuple[int, int] | None = None
    draft_text_span: tuple[int, int] | None = None
    #: The signals the severity rules found in a substantive change of words (what its
    #: direction is judged from); () for the other deviations.
    signals: tuple[Signal, ...] = ()
    direction: Direction = "unclear"


def _pieces(text: str, starts: Sequence[int], span: tuple[int, int]) -> list[tuple[int, int]]:
    """*span* of a joined text (provisions joined with "\\n" from *starts*) cut at the
    provisions' boundaries, each piece trimmed of white space; [span] for an empty span."""
    a, b = span
    if a == b:
        return [span]
    k0 = bisect_right(starts, a) - 1
    k1 = bisect_right(starts, b - 1) - 1
    if k0 == k1:
        return [span]
    ends = [*starts[1:], len(text) + 1]
    out = [_trimmed(text, (max(a, starts[k]), min(b, ends[k] - 1))) for k in range(k0, k1 + 1)]
    return [p for p in out if p[0] < p[1]] or [span]


def _per_provision(ch: Change, ptext: str, pstarts: Sequence[int], dtext: str,
                   dstarts: Sequence[int]) -> list[Change]:
    """*ch* cut where a split or merged group's joined texts pass from one provision to the
    next, so that each deviation stays within one provision on each side (a change that ran
    on into the next provision would otherwise be clipped to the first, and the rest lost).
    Pieces pair up in order; a piece left over on one side is a deletion (or insertion) at
    the end of the other side's change."""
    pp = _pieces(ptext, pstarts, ch.p_span)
    dp = _pieces(dtext, dstarts, ch.d_span)
    if len(pp) == 1 and len(dp) == 1:
        return [ch]
    n = max(len(pp), len(dp))
    pend, dend = (ch.p_span[1],) * 2, (ch.d_span[1],) * 2
    out = []
    for k in range(n):
        ps = pp[k] if k < len(pp) else pend
        ds = dp[k] if k < len(dp) else dend
        kind: WordChange = "insert" if ps[0] == ps[1] else ("delete" if ds[0] == ds[1] else "replace")
        out.append(replace(ch, change=kind, p_span=ps, d_span=ds,
                           signals=ch.signals if k == 0 else ()))
    return out


def _rename_reason(m: TermMapping, *, defined: bool) -> str:
    """The reason of a renamed term's deviation; stale uses of the precedent's name that
    the draft keeps are named, never hidden."""
    uses = f'{m.occurrences} use{"s" * (m.occurrences != 1)} in the draft'
    if m.substitutions and m.aligned:
        uses += f"; replaced in {m.substitutions} of {m.aligned} aligned places"
    if m.stale:
        uses += (f', and {m.stale} stale use{"s" * (m.stale != 1)} of "{m.precedent}" left '
                 "in it")
    tail = f"({uses}; evidence: {', '.join(m.evidence)}; confidence {m.confidence:.2f})"
    if defined:
        return f'defined term renamed: the draft\'s "{m.draft}" is the precedent\'s "{m.precedent}" {tail}'
    return f'renamed throughout: the draft writes "{m.draft}" where the precedent writes "{m.precedent}" {tail}'


def _local_label(num: str) -> str:
    m = re.search(r"\([^()]*\)$", num)
    if m:
        return m.group()
    return num.split(".")[-1]


def run_review(draft: Document, precedent: Document, *,
               overrides: Sequence[TermOverride] = (),
               vocabulary: VocabularyModel | None = None,
               rules: SeverityRules | None = None,
               clause_type: Callable[[Provision, Document], str | None] | None = None,
               acting_for: str | None = None,
               timings: dict[str, float] | None = None,
               stage: Callable[[str], None] | None = None) -> Review:
    """Compare *draft* (the counterparty's) with *precedent* (the house document).

    *overrides* confirm, reject or add term mappings; *vocabulary* is the precedent set's
    vocabulary model (optional); *rules* the severity rules (default
    ``resources/severity.toml``); *clause_type* a better clause-type classifier than the
    rules' heading keywords (optional).  *acting_for* names the precedent's party the
    reviewer acts for (its defined term, any letter case; :mod:`.direction`): every
    deviation is then judged adverse, favourable, neutral or unclear for it, and ranked so;
    an unknown party raises :class:`CounterdraftError` naming the party terms found.  When
    *timings* is given it receives each stage's wall-clock time in seconds (for
    ``benchmarks/bench_review.py``); *stage* is told, in a few words, what the review is doing
    as each step starts (for a progress bar)."""
    stage = stage or (lambda _what: None)
    stage("reading the words and defined terms")
    rules = rules or default_rules()
    if acting_for is not None:  # the direction judge is imported only for a side taken
        from .direction import resolve_acting_for

        acting_for = resolve_acting_for(precedent, acting_for)

    words: list[Later[DocumentWords]] = []

    def tokenised() -> None:  # the draft's own checks start on the other core now
        if sum(len(p.text) for p in draft.provisions) >= PARALLEL_CHECKS_MIN_CHARS:
            words.append(Later(lambda: document_words(draft)))

    clock = _Clock(timings)
    with cycles_uncollected():  # a review makes no reference cycle
        try:
            review = _compare(draft, precedent, overrides=overrides, vocabulary=vocabulary, rules=rules,
                              clause_type=clause_type, acting_for=acting_for, clock=clock, stage=stage,
                              tokenised=tokenised)
        except BaseException:
            for later in words:
                later.drop()
            raise
        review = replace(review, checks=review_checks(review, words=words[0].result() if words else None))
    clock.lap("drafting checks")
    return review


#: Characters of the aligned groups whose words differ (both sides) from which half of their
#: word diffs, classification and weighing run in a forked child.  Measured: two unrelated
#: 50-page agreements hold about 260,000; a 100-page draft that renames a term used throughout
#: about 400,000; one with a figure changed in every twelfth clause, or the demo pair, about
#: 37,000, whose diffs take less time than forking and sending them back.
PARALLEL_BUILD_MIN_CHARS = 150_000


def _changed_chars(g: Group, di: DocInfo, pi: DocInfo) -> int:
    """The characters of group *g*'s texts (both sides) when they differ, else 0."""
    d = "\n".join(di.provisions[k].text for k in g.drafts)
    p = "\n".join(pi.provisions[k].text for k in g.precedents)
    return 0 if d == p else len(d) + len(p)


#: A draft this long (characters) has its own drafting checks read beside the comparison, on
#: the other processor core (:class:`core.parallel.Later`), from the moment both documents
#: are tokenised: for a shorter one they take less time than forking a process and sending
#: them back (a few milliseconds, measured).
PARALLEL_CHECKS_MIN_CHARS = 40_000

#: Changes of one aligned group from which half of them are weighed (severity, reasons,
#: spans) in a forked child: a 10,000-word provision rewritten from scratch has about 500, at
#: about 0.14 ms each; forking and sending back 100 deviations costs about 5 ms.
PARALLEL_CHANGES_MIN = 200

#: Characters of distinct provision texts and headings to tokenise from which the second half
#: is tokenised in a forked child (:func:`_tokenise`): two 100-page agreements hold about
#: 600,000, tokenised in 0.13 s, whose second half comes back in about 0.01 s; below about
#: 50,000 (a 10-page pair) forking and sending cost more than half the work saves.
PARALLEL_TOKENS_MIN_CHARS = 50_000


def _compare(draft: Document, precedent: Document, *, overrides: Sequence[TermOverride],
             vocabulary: VocabularyModel | None, rules: SeverityRules,
             clause_type: Callable[[Provision, Document], str | None] | None, acting_for: str | None,
             clock: _Clock, stage: Callable[[str], None], tokenised: Callable[[], None]) -> Review:
    """The review of *draft* against *precedent* without its drafting checks (see
    :func:`run_review`); *tokenised* is called once both documents are tokenised."""
    di, pi = build_docinfo(draft), build_docinfo(precedent)
    extra = [n for o in overrides for n in (o.draft, o.precedent or "") if n.strip()]
    names = list(dict.fromkeys([*di.all_names, *pi.all_names, *extra]))
    dside, pside, uses = _sides(di, pi, names)
    tokenised()
    clock.lap("tokens: words, terms, cross-references")

    stage("matching defined terms and aligning provisions")
    tm, al, dside, pside = _map_and_align(di, pi, (dside, pside), names, uses, clock=clock,
                                          overrides=overrides, vocabulary=vocabulary)

    d_types = clause_types_for(draft, rules=rules, classifier=clause_type)
    p_types = clause_types_for(precedent, rules=rules, classifier=clause_type)
    builder = _Builder(di, pi, dside, pside, tm, al, rules, d_types, p_types, clock)
    builder.acting_for = acting_for
    stage(f"comparing the wording of {len(al.groups)} paired provision{'s' * (len(al.groups) != 1)}")
    review = builder.build()
    clock.lap("ranking and output")
    return review


def _map_and_align(di: DocInfo, pi: DocInfo, sides: tuple[_Side, _Side], names: list[str],
                   uses: tuple[dict[str, int], dict[str, int]], *, clock: _Clock,
                   overrides: Sequence[TermOverride], vocabulary: VocabularyModel | None
                   ) -> tuple[TermMap, Alignment, _Side, _Side]:
    """The term map and the alignment, each found twice: the substitution evidence of the
    term map needs an alignment, and the alignment is better with the term map.  Returns
    them with the two sides (tokenised again when names were found from the text)."""
    dside, pside = sides
    tm0 = map_terms(di, pi, overrides=overrides, vocabulary=vocabulary, uses=uses)
    clock.lap("term map: definitions")
    dside.to_key = tm0.to_precedent
    dside.plain = pside.plain = _as_words(di, pi, tm0)
    al0 = _aligned_features(dside, pside)
    clock.lap("alignment: first pass")
    d_names, p_names = set(di.term_names), set(pi.term_names)
    d_only = [n for n in di.term_names if n not in p_names]
    p_only = [n for n in pi.term_names if n not in d_names]
    one_to_one = [(g.drafts[0], g.precedents[0]) for g in al0.groups if g.kind == "match"]
    dside.to_key = {}
    dside.plain = pside.plain = frozenset()  # the slots compare every name as a name
    keyed: dict[int, TokenSeq] = {}  # both sides now key a text alike: once per tokens

    def seq_of(side: _Side) -> Callable[[int], TokenSeq]:
        def seq(i: int) -> TokenSeq:
            bt = side.text(i)
            got = keyed.get(id(bt))
            if got is None:
                got = keyed[id(bt)] = side.seq(i)
            return got
        return seq

    scan = scan_slots(one_to_one, draft_seq=seq_of(dside), precedent_seq=seq_of(pside),
                      draft_names=d_only, precedent_names=p_only, known=names)
    tm = map_terms(di, pi, overrides=overrides, vocabulary=vocabulary, substitutions=scan.terms,
                   uses=uses, renames=scan.renames)
    clock.lap("term map: substitutions")
    known_names = set(names)
    found = [n for n in tm.names if n not in known_names]
    if found:  # names found from the text are terms from now on: tokenise again
        dside, pside, _uses = _sides(di, pi, [*names, *found])
        clock.lap("tokens: words, terms, cross-references")
    dside.to_key = tm.to_precedent
    dside.plain = pside.plain = _as_words(di, pi, tm)
    al = al0 if dict(tm.to_precedent) == dict(tm0.to_precedent) else _aligned_features(dside, pside)
    clock.lap("alignment: with the term map")
    return tm, al, dside, pside


def _group_status(g: Group, n_changes: int) -> PairStatus:
    """The status of the pairs of group *g*, whose words differ in *n_changes* places."""
    if g.kind == "split":
        return "split"
    if g.kind == "merged":
        return "merged"
    if g.moved:
        return "moved"
    return "same" if n_changes == 0 else "changed"


def _as_words(di: DocInfo, pi: DocInfo, tm: TermMap) -> frozenset[str]:
    """Names compared as the words they are written with: all but the renamed ones (whose
    uses must compare equal across the two names) and the parties' labels (whose swaps
    the classifier reports).  A term that only one document defines, or that one document
    writes in lower case, then differs from the other's words by letter case alone."""
    keep = set(tm.to_precedent) | set(tm.to_precedent.values()) | di.party_labels | pi.party_labels
    return frozenset(n for n in tm.names if n not in keep)


def _sides(di: DocInfo, pi: DocInfo, names: Sequence[str]
           ) -> tuple[_Side, _Side, tuple[dict[str, int], dict[str, int]]]:
    """Both documents tokenised with every name of *names* as a term (each document's own
    aliases read as their terms; long documents half in a forked child, :func:`_tokenise`),
    and the uses of each name in each document."""
    dmatch = term_matcher(names, aliases=di.alias_of, capitals=True)
    dside = _Side(di, dmatch)
    if dict(di.alias_of) == dict(pi.alias_of):  # the same matcher: share the tokens of equal texts
        pside = _Side(pi, dmatch, dside.memo)
    else:
        pside = _Side(pi, term_matcher(names, aliases=pi.alias_of, capitals=True))
    _tokenise((dside, pside))
    n_d, n_p = len(di.provisions), len(pi.provisions)
    uses = (count_term_uses([*(dside.text(i) for i in range(n_d)), *(dside.head(i) for i in range(n_d))]),
            count_term_uses([*(pside.text(i) for i in range(n_p)), *(pside.head(i) for i in range(n_p))]))
    return dside, pside, uses


def _tokenise(sides: Sequence[_Side]) -> None:
    """Tokenise every distinct text and heading of *sides* into their memos: when they hold
    at least PARALLEL_TOKENS_MIN_CHARS characters, the second half (by characters) in a
    forked child (:func:`core.parallel.in_halves`) while this process does the first."""
    jobs: dict[tuple[int, str], _Side] = {}
    for side in sides:
        for p in side.info.provisions:
            for text in (p.text, p.heading or ""):
                if text not in side.memo:
                    jobs.setdefault((id(side.memo), text), side)
    work = list(jobs.items())

    def tokens(part: Sequence[tuple[tuple[int, str], _Side]]) -> list[BaseTokens]:
        return [base_tokens(text, side.matcher) for (_m, text), side in part]

    halves = in_halves(work, [len(text) for (_m, text), _side in work], tokens,
                       min_work=PARALLEL_TOKENS_MIN_CHARS)
    for ((_m, text), side), bt in zip(work, [bt for half in halves for bt in half], strict=True):
        side.memo[text] = bt


def preload(*, long: bool) -> None:
    """Import now what a review imports when it first needs it: for *long* documents numpy,
    which the alignment's candidate search uses above :data:`.align.PLAIN_PRODUCT_MAX`
    multiply-adds (a 25-page pair is about there).  Called while the documents are read on
    other processor cores, so that the review does not wait for it."""
    if long:
        import numpy  # noqa: F401


def clear_caches() -> None:
    """Forget the engine's caches of token keys, figures and phrase matches (they only
    speed up reviews of the same texts; benchmarks clear them to time cold runs)."""
    from .checks import clear_name_cache
    from .figures import clear_skip_cache
    from .noise import clear_label_cache
    from .severity import clear_caches as _clear_severity
    from .tokens import clear_token_cache
    from .worddiff import clear_diff_cache

    clear_token_cache()
    clear_name_cache()
    clear_diff_cache()
    clear_label_cache()
    clear_skip_cache()
    _clear_severity()


class _Clock:
    """Accumulates stage times into a caller's dict (no-op without one)."""

    def __init__(self, sink: dict[str, float] | None) -> None:
        self.sink = sink
        self.t = time.perf_counter()

    def lap(self, stage: str) -> None:
        if self.sink is None:
            return
        now = time.perf_counter()
        self.sink[stage] = self.sink.get(stage, 0.0) + now - self.t
        self.t = now


class _Builder:
    """Turns an alignment into pairs and ranked deviations (word diff, classification,
    severity per aligned group; one deviation per added or removed subtree, per moved
    provision, per renumbered label and per renamed term)."""

    def __init__(self, di: DocInfo, pi: DocInfo, dside: _Side, pside: _Side, tm: TermMap,
                 al: Alignment, rules: SeverityRules, d_types: Sequence[str | None],
                 p_types: Sequence[str | None], clock: _Clock) -> None:
        self.clock = clock
        self.di, self.pi, self.dside, self.pside = di, pi, dside, pside
        self.tm, self.al, self.rules = tm, al, rules
        self.d_types, self.p_types = d_types, p_types
        self.devs: list[_Dev] = []
        self.acting_for: str | None = None  # the precedent's party term (run_review)
        self.keep_terms: frozenset[str] | None = None
        # (draft position, precedent position) -> the pair's word diff (Pair.edits)
        self.edits: dict[tuple[int, int], tuple[Edit, ...]] = {}
        # where a removed precedent provision would sit in the draft's order
        self.p_anchor: dict[int, float] = {}
        last = -0.5
        for p in range(len(pi.provisions)):
            if p in al.precedent_to_draft:
                last = float(al.precedent_to_draft[p])
            else:
                self.p_anchor[p] = last + 0.5

    # -- cross-references -------------------------------------------------------------
    def _xref_draft(self, number: str, keyword: str) -> str:
        ns = "schedule" if keyword == "schedule" else "clause"
        d = self.di.by_number.get((ns, number))
        if d is None:
            return "N:" + number
        p = self.al.draft_to_precedent.get(d)
        return f"P:{self.pi.provisions[p].id}" if p is not None else f"D:{self.di.provisions[d].id}"

    def _xref_precedent(self, number: str, keyword: str) -> str:
        ns = "schedule" if keyword == "schedule" else "clause"
        p = self.pi.by_number.get((ns, number))
        return f"P:{self.pi.provisions[p].id}" if p is not None else "N:" + number

    # -- pieces -------------------------------------------------------------------------
    def _joined(self, info: DocInfo, positions: Sequence[int]) -> tuple[str, list[int]]:
        texts = [info.provisions[i].text for i in positions]
        starts = []
        off = 0
        for t in texts:
            starts.append(off)
            off += len(t) + 1
        return "\n".join(texts), starts

    def _ctx(self, dterm_at: Mapping[int, str], pterm_at: Mapping[int, str]) -> TermContext:
        return TermContext(dterm_at, pterm_at, self.pi.party_labels, self.tm.to_precedent)

    def _type_of(self, ppos: int | None, dpos: int | None) -> tuple[str | None, str]:
        if ppos is not None:
            t = self.p_types[ppos]
            if t is None and dpos is not None:
                t = self.d_types[dpos]
            return t, self.pi.provisions[ppos].kind
        assert dpos is not None
        return self.d_types[dpos], self.di.provisions[dpos].kind

    def _widened(self, text: str, span: tuple[int, int]) -> tuple[int, int]:
        """The changed words as shown: whole figures ("thirty (30) days", not "thirty (30"),
        and a word of context around a change without letters or digits."""
        a, b = span
        for qs, qe in self._quantities(text, [span]):
            if qs < b and a < qe:
                a, b = min(a, qs), max(b, qe)
        return _with_context(text, (a, b))

    def _shown_spans(self, ch: Change, ptext: str, dtext: str, points: AlignedPoints | None
                     ) -> tuple[tuple[int, int], tuple[int, int]]:
        """Corresponding spans of the words shown on each side (see :mod:`.spans`); without
        a diff (a heading as a whole) each side's widened span, trimmed."""
        pw = self._widened(ptext, ch.p_span) if ch.change != "insert" else ch.p_span
        dw = self._widened(dtext, ch.d_span) if ch.change != "delete" else ch.d_span
        if points is not None:
            return points.spans(precedent=pw, draft=dw)
        return _trimmed(ptext, pw), _trimmed(dtext, dw)

    def _add_change(self, ch: Change, *, ptext: str, pstarts: Sequence[int], ppos: Sequence[int],
                    dtext: str, dstarts: Sequence[int], dpos: Sequence[int], heading: bool,
                    points: AlignedPoints | None = None) -> None:
        if ch.category == "term":
            return  # reported once per term pair
        pk = bisect_right(pstarts, ch.p_span[0]) - 1
        dk = bisect_right(dstarts, ch.d_span[0]) - 1
        pp, dp = ppos[max(pk, 0)], dpos[max(dk, 0)]
        p0, d0 = pstarts[max(pk, 0)], dstarts[max(dk, 0)]
        plen = len(self.pi.provisions[pp].text) if not heading else len(ptext)
        dlen = len(self.di.provisions[dp].text) if not heading else len(dtext)
        pspan = (ch.p_span[0] - p0, min(ch.p_span[1] - p0, plen))
        dspan = (ch.d_span[0] - d0, min(ch.d_span[1] - d0, dlen))
        (pa, pb), (da, db) = self._shown_spans(ch, ptext, dtext, points)
        # Shown spans are clipped to the provision that holds the change (a split or merged
        # group joins several provisions' texts with "\n").
        pa, pb = min(max(pa, p0), p0 + plen), min(max(pb, p0), p0 + plen)
        da, db = min(max(da, d0), d0 + dlen), min(max(db, d0), d0 + dlen)
        ptxt, dtxt = ptext[pa:pb], dtext[da:db]
        signals: tuple[Signal, ...] = ()
        if ch.category == "substantive":
            ctype, kind = self._type_of(pp, dp)
            got = assess_text_change(
                p_text=ptext, p_span=ch.p_span, d_text=dtext, d_span=ch.d_span,
                clause_type=ctype, kind=kind, rules=self.rules, extra=ch.signals, heading=heading)
            sev, reasons, signals = got.severity, got.reasons, got.signals
        else:
            key: str = ch.category
            if ch.category == "numbering" and "unchanged" in ch.note:
                key = "numbering_cross_reference"
            sev = category_severity(key, rules=self.rules)
            reasons = (ch.note,) if ch.note else ()
        if heading and ch.category != "substantive" and not ch.note.startswith("heading"):
            reasons = tuple(f"heading: {r}" for r in reasons)
        # An insert's precedent span and a delete's draft span are empty at the insertion
        # point; a heading has no span in the text.
        self.devs.append(_Dev(
            (float(dp), 0 if heading else 1, ch.d_span[0]), sev, ch.category, ch.change,
            self.di.provisions[dp].id, self.pi.provisions[pp].id, ptxt, dtxt, reasons,
            None if heading else pspan, None if heading else dspan,
            "heading" if heading else "text", (pa - p0, pb - p0), (da - d0, db - d0), signals))

    def _quantities(self, text: str, spans: Sequence[tuple[int, int]]) -> list[tuple[int, int]]:
        """Character spans of the figures near the given spans of *text*."""
        out: set[tuple[int, int]] = set()
        for sp in spans:
            out.update((q.start, q.end) for q in find_quantities(text, around=sp))
        return sorted(out)

    def _diff_group(self, g: Group) -> int:
        """Add the deviations of one group; the number of changes other than term or
        numbering."""
        if self._same_words(g):
            d, p = g.drafts[0], g.precedents[0]
            n = len(self.pi.provisions[p].text)
            self.edits[(d, p)] = (Edit("equal", 0, n, 0, n),) if n else ()
            return self._heading_changes(g, 0)
        ptext, pstarts = self._joined(self.pi, g.precedents)
        dtext, dstarts = self._joined(self.di, g.drafts)
        clock = self.clock
        clock.lap("ranking and output")
        if len(g.precedents) == 1 and len(g.drafts) == 1:
            a = self.pside.seq(g.precedents[0], self._xref_precedent)
            b = self.dside.seq(g.drafts[0], self._xref_draft)
            pterm = self.pside.text(g.precedents[0]).term_at
            dterm = self.dside.text(g.drafts[0]).term_at
        else:
            pbt = base_tokens(ptext, self.pside.matcher)
            dbt = base_tokens(dtext, self.dside.matcher)
            a = self.pside.rekey(pbt, mapped=False, xref=self._xref_precedent)
            b = self.dside.rekey(dbt, mapped=True, xref=self._xref_draft)
            pterm, dterm = pbt.term_at, dbt.term_at
        a, b = self._plain(a), self._plain(b)
        clock.lap("tokens: words, terms, cross-references")
        ops = token_ops(a, b)
        if len(g.precedents) == 1 and len(g.drafts) == 1:
            self.edits[(g.drafts[0], g.precedents[0])] = pair_edits_from_ops(a, b, ops)
        clock.lap("word diff: diff-match-patch")
        counted = 0
        if all(op.tag == "equal" for op in ops):
            clock.lap("classification")
            return self._heading_changes(g, counted)
        changed = [op for op in ops if op.tag in ("insert", "delete", "replace")]
        together = (self._quantities(ptext, [a.span(op.i1, op.i2) for op in changed]),
                    self._quantities(dtext, [b.span(op.j1, op.j2) for op in changed]))
        changes = classify_ops(a, b, ops, self._ctx(dterm, pterm), keep_together=together)
        clock.lap("classification")
        points = AlignedPoints(ops, a, b)
        each = [ch for whole in changes for ch in _per_provision(whole, ptext, pstarts, dtext, dstarts)]
        counted += sum(1 for ch in each if ch.category not in ("term", "numbering"))

        def weigh(part: Sequence[Change]) -> list[_Dev]:
            start = len(self.devs)
            for ch in part:
                self._add_change(ch, ptext=ptext, pstarts=pstarts, ppos=g.precedents,
                                 dtext=dtext, dstarts=dstarts, dpos=g.drafts, heading=False,
                                 points=points)
            got = self.devs[start:]
            del self.devs[start:]
            return got

        # a provision rewritten: half its changes weighed in a forked child (not when stage
        # times are asked for: the child's would be lost)
        split = PARALLEL_CHANGES_MIN if clock.sink is None else math.inf
        for devs in in_halves(each, [1] * len(each), weigh, min_work=split):
            self.devs += devs
        clock.lap("severity")
        return self._heading_changes(g, counted)

    def _same_words(self, g: Group) -> bool:
        """Whether one-to-one group *g* pairs two equal texts that the word diff keys alike
        (the same tokens, no cross-reference, no term the term map renames): their diff is
        one equal hunk, without tokens to key or diff."""
        if len(g.precedents) != 1 or len(g.drafts) != 1:
            return False
        bt = self.pside.text(g.precedents[0])
        return bt is self.dside.text(g.drafts[0]) and not bt.xrefs and not self.dside.renames(bt)

    def _heading_changes(self, g: Group, counted: int) -> int:
        # the heading (of the first provision on each side): one deviation at most
        ph = self.pi.provisions[g.precedents[0]].heading or ""
        dh = self.di.provisions[g.drafts[0]].heading or ""
        if ph != dh:
            hpb, hdb = self.pside.head(g.precedents[0]), self.dside.head(g.drafts[0])
            ha, hpt = self._plain(self.pside.rekey(hpb, mapped=False)), hpb.term_at
            hb, hdt = self._plain(self.dside.rekey(hdb, mapped=True)), hdb.term_at
            changes = [c for c in classify_ops(ha, hb, token_ops(ha, hb), self._ctx(hdt, hpt))
                       if c.category != "term"]
            rank = {"substantive": 0, "completion": 1, "punctuation": 2, "formatting": 3,
                    "numbering": 4}
            changes.sort(key=lambda c: rank[c.category])
            if changes:
                top = changes[0]
                kind: WordChange = "insert" if not ph.strip() else ("delete" if not dh.strip() else "replace")
                if (top.category == "substantive" and kind != "replace"
                        and self.rules.heading_added_or_removed == "formatting"):
                    # a heading only added or removed: formatting (rule file, [headings])
                    whole = Change("formatting", kind, (0, len(ph)), (0, len(dh)), "heading",
                                   note=heading_only_reason(ph, dh))
                else:
                    whole = Change(top.category, kind, (0, len(ph)), (0, len(dh)), top.detail,
                                   note=top.note if top.category != "substantive" else "")
                counted += 1
                self._add_change(whole, ptext=ph, pstarts=[0], ppos=g.precedents[:1],
                                 dtext=dh, dstarts=[0], dpos=g.drafts[:1], heading=True)
        return counted

    # -- numbers are always substance (core.review.figures) ----------------------------
    def _figures_of(self, v: _Dev) -> tuple[tuple[str, ...], tuple[str, ...]] | None:
        """The figures of each side of a deviation (the words it shows), or None for a
        deviation the guard does not read: a label renumbered or a provision moved (their
        digits are labels), a provision added or removed (substantive already)."""
        if v.part == "provision":
            if v.category != "term":
                return None
            return (figures_in(v.precedent_text, references=True),
                    figures_in(v.draft_text, references=True))
        sides = []
        for info, pid, span in ((self.pi, v.precedent_provision, v.precedent_text_span),
                                (self.di, v.draft_provision, v.draft_text_span)):
            p = info.provisions[info.position[pid]] if pid is not None else None
            text = (p.heading or "") if p is not None and v.part == "heading" else (p.text if p else "")
            sides.append(figures_in(text, span) if span is not None else ())
        return sides[0], sides[1]

    def _guard_figures(self) -> None:
        """Make every deviation whose figures differ substantive, with the old and new
        values in its reasons (:mod:`.figures`); it runs after every other rule, so none can
        override it."""
        for v in self.devs:
            got = self._figures_of(v)
            if got is None or got[0] == got[1]:
                continue
            found = figure_reasons(*got)
            pp = self.pi.position.get(v.precedent_provision) if v.precedent_provision else None
            dp = self.di.position.get(v.draft_provision) if v.draft_provision else None
            ctype, kind = self._type_of(pp, dp) if (pp, dp) != (None, None) else (None, "clause")
            sev = figure_severity(found, clause_type=ctype, kind=kind, rules=self.rules,
                                  filled_in=self._fills_blank_with_a_value(v),
                                  interest=any(s.name == "interest_rate_changed" for s in v.signals))
            if v.category == "substantive":  # add the values its reasons do not give yet
                known = set(re.findall(r"\d+", " ".join(v.reasons)))
                v.reasons += tuple(r for r in found if not set(re.findall(r"\d+", r)) <= known)
            else:
                v.category = "substantive"
                v.reasons = found + v.reasons
            v.severity = max(v.severity, sev)

    def _fills_blank_with_a_value(self, v: _Dev) -> bool:
        """A completion whose figures name something (a date, an address, a company
        number) rather than an amount, percentage or period: "[●] days" filled in as "30
        days" scores as a figure added, "[ADDRESS]" as "15 Mill Lane" as a blank filled in."""
        if v.category != "completion":
            return False
        return all(q.kind == "number" for q in find_quantities(v.draft_text))

    def _plain(self, seq: TokenSeq) -> TokenSeq:
        """*seq* keyed for the word diff: the uses of defined terms that are neither renamed
        nor a party's label compare as plain words (see :func:`.tokens.plain_terms`)."""
        keep = self.keep_terms
        if keep is None:
            keep = self.keep_terms = frozenset(self.tm.to_precedent.values()) | self.pi.party_labels
        return plain_terms(seq, keep=keep)

    def _label_dev(self, d0: int, p0: int) -> _Dev | None:
        """The numbering deviation of a pair whose labels differ: renumbered, or labelled on
        one side only ("Appendix:" dropped, a paragraph numbered); None when the labels
        agree or differ only because the parents were renumbered."""
        di, pi, al = self.di, self.pi, self.al
        dn, pn = di.full_number[d0], pi.full_number[p0]
        draw, praw = di.provisions[d0].number or "", pi.provisions[p0].number or ""
        ids = (di.provisions[d0].id, pi.provisions[p0].id)
        sev = category_severity("numbering", rules=self.rules)
        if bool(draw) != bool(praw):
            reason = f"label added: {draw}" if draw else f"label removed: {praw}"
            return _Dev((float(d0), 0, -2), sev, "numbering", "insert" if draw else "delete",
                        *ids, praw, draw, (reason,), part="provision")
        if not (dn and pn and dn != pn):
            return None
        dpar, ppar = di.parent_pos[d0], pi.parent_pos[p0]
        parents_paired = (dpar is not None and ppar is not None
                          and al.draft_to_precedent.get(dpar) == ppar)
        if parents_paired and _local_label(dn) == _local_label(pn):
            return None
        return _Dev((float(d0), 0, -2), sev, "numbering", "replace", *ids, praw or pn,
                    draw or dn, (f"renumbered from {pn} to {dn}",), part="provision")

    def _pair_edits(self, d: int, p: int) -> tuple[Edit, ...]:
        """Pair.edits of draft position *d* and precedent position *p*: the group's own diff
        for a one-to-one pair; for a split or merged group, a diff of the pairing's two
        texts with the same keys (term map and cross-references)."""
        got = self.edits.get((d, p))
        if got is None:
            a = self._plain(self.pside.seq(p, self._xref_precedent))
            b = self._plain(self.dside.seq(d, self._xref_draft))
            got = self.edits[(d, p)] = pair_edits_from_ops(a, b, token_ops(a, b))
        return got

    def _fold(self, info: DocInfo, positions: Sequence[int]) -> list[list[int]]:
        """Group positions into subtrees: a provision whose parent is in the set joins it."""
        s = set(positions)
        root_of: dict[int, int] = {}
        out: dict[int, list[int]] = {}
        for p in sorted(positions):
            par = info.parent_pos[p]
            r = root_of.get(par) if par is not None and par in s else None
            root = r if r is not None else p
            root_of[p] = root
            out.setdefault(root, []).append(p)
        return list(out.values())

    def _whole(self, info: DocInfo, members: Sequence[int]) -> str:
        texts = [info.provisions[m].text for m in members if info.provisions[m].text.strip()]
        if texts:
            return "\n".join(texts)
        return info.provisions[members[0]].heading or ""

    def _subtree_dev(self, members: Sequence[int], *, added: bool) -> _Dev:
        """The one deviation for an added subtree of the draft (*added*) or a removed subtree
        of the precedent; *members* as grouped by :meth:`_fold`, root first."""
        info, types = (self.di, self.d_types) if added else (self.pi, self.p_types)
        root = members[0]
        text = self._whole(info, members)
        ctype = next((types[m] for m in members if types[m]), None)
        sev, reasons = provision_change_severity(
            added=added, label=_label(info, root).capitalize(), text=text, clause_type=ctype,
            kind=info.provisions[root].kind, rules=self.rules)
        if len(members) > 1:
            reasons = (reasons[0] + f", with {len(members) - 1} sub-provision"
                       f"{'s' * (len(members) > 2)}",) + reasons[1:]
        root_id = info.provisions[root].id
        if added:
            return _Dev((float(root), 0, -3), sev, "substantive", "add-provision",
                        root_id, None, "", text, reasons, part="provision")
        return _Dev((self.p_anchor[root], 0, -3), sev, "substantive", "remove-provision",
                    None, root_id, text, "", reasons, part="provision")

    def build(self) -> Review:
        di, pi, al = self.di, self.pi, self.al
        pairs = self._groups_pairs()
        # Added and removed provisions: one deviation per subtree.
        for members in self._fold(di, al.added):
            self.devs.append(self._subtree_dev(members, added=True))
        for d in al.added:
            pairs.append(((float(d), 0, -1), Pair(di.provisions[d].id, None, "added", 0.0)))
        for members in self._fold(pi, al.removed):
            self.devs.append(self._subtree_dev(members, added=False))
        for p in al.removed:
            pairs.append(((self.p_anchor[p], 0, p), Pair(None, pi.provisions[p].id, "removed", 0.0)))
        self.devs += self._rename_devs()  # one deviation per renamed term
        self._guard_figures()  # numbers are always substance: the last rule
        self._judge_directions()
        pairs.sort(key=lambda t: t[0])
        notes: list[str] = []
        if not al.groups and (di.provisions or pi.provisions):
            notes.append(NO_SHARED_NOTE)
        return Review(di.doc, pi.doc, self.tm.mappings, tuple(p for _k, p in pairs),
                      self._ranked_deviations(), tuple(notes), self.acting_for)

    def _groups_pairs(self) -> list[tuple[tuple[float, int, int], Pair]]:
        """The pairs of every aligned group, their deviations added in group order.  When the
        groups whose words differ hold PARALLEL_BUILD_MIN_CHARS characters or more (two
        agreements far apart), the second half of that work is done in a forked child
        (:func:`core.parallel.in_halves`) and its results joined in the same order; not when
        stage times are asked for (the child's would be lost), nor where no child can be forked
        (the split would buy nothing, and its estimate of the work costs time)."""
        groups = self.al.groups
        group_of_draft = {d: g for g in groups for d in g.drafts}
        if self.clock.sink is not None or not can_fork():
            return [x for g in groups for x in self._group_pairs(g, group_of_draft)]

        def run(part: Sequence[Group]) -> list[tuple[list[tuple[tuple[float, int, int], Pair]], list[_Dev]]]:
            out = []
            for g in part:
                start = len(self.devs)
                got = self._group_pairs(g, group_of_draft)
                out.append((got, self.devs[start:]))
                del self.devs[start:]
            return out

        halves = in_halves(groups, [_changed_chars(g, self.di, self.pi) for g in groups], run,
                           min_work=PARALLEL_BUILD_MIN_CHARS)
        pairs: list[tuple[tuple[float, int, int], Pair]] = []
        for got, devs in (x for half in halves for x in half):
            pairs += got
            self.devs += devs
        return pairs

    def _group_pairs(self, g: Group, group_of_draft: Mapping[int, Group]
                     ) -> list[tuple[tuple[float, int, int], Pair]]:
        """The pairs of group *g* (one per pairing, with its sort key), after recording the
        deviations of its words, of its move and of its number label."""
        di, pi = self.di, self.pi
        status = _group_status(g, self._diff_group(g))
        pairs = [((float(d), 0, p), Pair(di.provisions[d].id, pi.provisions[p].id, status, round(s, 3),
                                         edits=self._pair_edits(d, p)))
                 for (d, p), s in zip(g.pairings, g.pair_similarities)]
        d0, p0 = g.drafts[0], g.precedents[0]
        if g.moved:
            dpar, ppar = di.parent_pos[d0], pi.parent_pos[p0]
            pg = group_of_draft.get(dpar) if dpar is not None else None
            if not (pg is not None and pg.moved and ppar in pg.precedents):
                self.devs.append(_Dev(
                    (float(d0), 0, -1), category_severity("move", rules=self.rules), "numbering",
                    "move", di.provisions[d0].id, pi.provisions[p0].id, "", "",
                    (f"moved: {_label(pi, p0)} of the precedent is "
                     f"{_label(di, d0, with_heading=False)} of the draft, in a different "
                     "place in the order",), part="provision"))
        elif g.kind == "match":
            label = self._label_dev(d0, p0)
            if label is not None:
                self.devs.append(label)
        return pairs

    def _rename_devs(self) -> list[_Dev]:
        out: list[_Dev] = []
        for m in self.tm.mappings:
            dprov = self.di.defining_provision.get(m.draft)
            pprov = self.pi.defining_provision.get(m.precedent)
            dpos = self.di.position.get(dprov, -1) if dprov else -1
            out.append(_Dev(
                (float(dpos), -1, 0), category_severity("term", rules=self.rules), "term", "replace",
                dprov, pprov, m.precedent, m.draft, (_rename_reason(m, defined=bool(dprov or pprov)),),
                part="provision"))
        return out

    def _ranked_deviations(self) -> tuple[Deviation, ...]:
        """The deviations with ids in draft order, ranked by severity (and, acting for a
        party, direction) then draft order."""
        in_order = sorted(self.devs, key=lambda v: v.order)
        ids = {id(v): f"v{i}" for i, v in enumerate(in_order, 1)}
        if self.acting_for is None:
            ranked = sorted(in_order, key=lambda v: (-v.severity, v.order))
        else:
            from .direction import direction_rank_key

            ranked = sorted(in_order, key=lambda v: (direction_rank_key(v.severity, v.direction), v.order))
        return tuple(
            Deviation(ids[id(v)], r, v.severity, v.category, v.change, v.draft_provision,
                      v.precedent_provision, v.precedent_text, v.draft_text, v.reasons,
                      None, v.precedent_span, v.draft_span, v.part, v.precedent_text_span,
                      v.draft_text_span, v.direction)
            for r, v in enumerate(ranked, 1))

    def _judge_directions(self) -> None:
        """Each deviation's direction for the party acted for (:mod:`.direction`), with a
        reason naming the parties before the clause type's weight."""
        if self.acting_for is None:
            return
        from .direction import Judge, find_parties

        parties = find_parties(self.di.doc, self.pi.doc, self.tm.mappings)
        judge = Judge(parties=parties, acting_for=self.acting_for, rules=self.rules,
                      draft=self.di.doc, precedent=self.pi.doc)
        for v in self.devs:
            v.direction, reason = judge.judge(v)
            if reason:  # before the weight of the clause type, after the findings
                k = next((i for i, r in enumerate(v.reasons) if is_weight_reason(r)), len(v.reasons))
                v.reasons = (*v.reasons[:k], reason, *v.reasons[k:])

