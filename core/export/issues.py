"""The issues list: the table a lawyer circulates, as .docx, .html or .csv.

One row per deviation shown, seven columns (:data:`ISSUE_COLUMNS`): the deviation's number
(its rank at review time, :attr:`core.model.Deviation.rank` -- the number the review table,
``counterdraft decide`` and the desktop window use), the clause, what changed (the
precedent's words → the draft's, a few words either side, the changed words in bold), why it
matters (the deviation's reasons), its past use -- how often the firm's past agreements carry
the draft's wording (only when a precedent set was used), the decision and the note.  Rows follow the
draft's clause order (``order="clause"``, the default) or the rank (``order="rank"``); the
renamed defined terms close the table as a group of their own either way.

The CSV is a plain table for spreadsheets: the header row, then one row per issue, with the
exact changed words of each side in two more columns at the end.  The .docx and the HTML
open with :data:`core.CAUTION` and explain the figures in notes under the table.

The drafting checks of the draft (:attr:`core.model.Review.checks`) follow the deviations:
in the .docx and the HTML page as a table of their own (:data:`CHECK_COLUMNS`: the check,
the clause, the words concerned and what the check found); in the CSV as rows of the same
table after the issues, without a number (the clause, the words in "What changed", the
check and what it found in "Why it matters").
"""


import bisect
import csv
import datetime as _dt
import html
import io
import os
import re
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass
from pathlib import Path

from .. import CAUTION, __version__
from ..decisions import Decision
from ..fileio import atomic_write_bytes, atomic_write_text
from ..labels import (
    check_label,
    clause_label,
    find_provision,
    full_number,
    provision_label,
)
from ..lazyre import compile_pattern
from ..model import (
    CATEGORIES,
    Deviation,
    Edit,
    EditTag,
    Frequency,
    Provision,
    Review,
)
from ..review.checks import CHECKS_HEADING
from .common import (
    CAUTION_PROPERTY,
    check_output,
    default_author,
    edits_of_pair,
    map_offset,
    stamp_date,
)
from .options import ISSUE_ORDERS, ISSUES_DEFAULT_ORDER

__all__ = [
    "CHANGE_CONTEXT_WORDS",
    "CHANGE_MAX_WORDS",
    "CHECK_COLUMNS",
    "CHECK_WIDTHS_CM",
    "ISSUES_DEFAULT_INCLUDE",
    "ISSUES_DEFAULT_ORDER",
    "ISSUE_COLUMNS",
    "ISSUE_CSV_COLUMNS",
    "ISSUE_ORDERS",
    "ISSUE_WIDTHS_CM",
    "Excerpt",
    "IssueRow",
    "check_rows",
    "clause_order",
    "issue_rows",
    "issues_list_csv",
    "issues_list_docx",
    "issues_list_html",
    "write_issues_list",
]


_NUMBER_COLUMN = "No."
_WHAT_COLUMN = "What changed"
_WHY_COLUMN = "Why it matters"
_FREQUENCY_COLUMN = "Past use"
_DIRECTION_COLUMN = "Direction"
#: The table's columns (.docx and HTML), in order; without a precedent set the "Past use"
#: column (how often the firm's past agreements carry the draft's wording) is left out, and
#: without a party acted for (``review --acting-for``) the "Direction" column (adverse,
#: favourable, neutral or unclear for that party).
ISSUE_COLUMNS = (_NUMBER_COLUMN, "Clause", _DIRECTION_COLUMN, _WHAT_COLUMN, _WHY_COLUMN,
                 _FREQUENCY_COLUMN, "Decision", "Note")
_PRECEDENT_WORDS_COLUMN = "Precedent's changed words"
_DRAFT_WORDS_COLUMN = "Draft's changed words"
#: The CSV's columns: the table's, then the exact changed words of each side, so that a
#: spreadsheet can filter and sort on them.
ISSUE_CSV_COLUMNS = (*ISSUE_COLUMNS, _PRECEDENT_WORDS_COLUMN, _DRAFT_WORDS_COLUMN)

#: Deviation categories the issues list shows unless asked for more: what a negotiator needs
#: -- the substantive deviations, the blanks of the precedent the draft filled in (for
#: information: what was filled in is the reader's to check), and the renamed defined terms
#: as a short informational group at the end.  Formatting, numbering and punctuation
#: differences are left out by default (``include=CATEGORIES`` or ``counterdraft export
#: --issues-all`` shows them).
ISSUES_DEFAULT_INCLUDE: tuple[str, ...] = ("substantive", "completion", "term")

# ISSUE_ORDERS and ISSUES_DEFAULT_ORDER live in .options (the command line reads them
# without importing this module).

#: Words quoted on each side of the changed words in "What changed", within their sentence:
#: enough to say where the change sits ("within thirty (30) days of the"), few enough that
#: both sides fit a few lines of the column (common practice, no source).
CHANGE_CONTEXT_WORDS = 3
#: Most changed words quoted per side, and most words quoted from an added or removed
#: provision; "…" marks the cut.  Twenty words are two or three lines of the column (7 cm at
#: 9 pt); the CSV's last two columns carry every changed word.
CHANGE_MAX_WORDS = 20

_ELLIPSIS = "\u2026"
#: Between the precedent's words and the draft's: the draft's start a line of their own
#: (a new paragraph of the cell in the .docx, a line break in the HTML and inside the CSV
#: cell), so the two quotes read one above the other.
_ARROW = "\n\u2192 "
_OPEN_QUOTE, _CLOSE_QUOTE = "\u201c", "\u201d"
_NO_TEXT = "(no text)"
#: Abbreviations whose full stop does not end a sentence (lower case, without the stop);
#: single letters (initials) are treated alike (common practice, no source).
_ABBREVIATIONS = frozenset({"e.g", "i.e", "etc", "no", "nos", "art", "arts", "cl", "para", "paras",
                            "inc", "ltd", "co", "corp", "plc", "llc", "mr", "mrs", "ms", "dr", "st",
                            "vs", "viz", "approx", "sec", "sch"})
#: A sentence ends at ".", "!" or "?" (after any closing quotes or brackets) followed by
#: white space and a capital, a digit or an opening quote or bracket; a line break (the
#: "\n" joining a provision's paragraphs) ends one too.
_SENTENCE_END = compile_pattern(r"[.!?][\"'\u201d\u2019)\]]*\s+(?=[\"'\u201c\u2018(\[]?[A-Z0-9])|\n")
_WORD = compile_pattern(r"\S+")


@dataclass(frozen=True, slots=True)
class Excerpt:
    """Words quoted from the agreements, with the changed words at ``marks`` (offsets into
    ``text``; bold in the .docx and the HTML)."""

    text: str
    marks: tuple[tuple[int, int], ...] = ()

    def pieces(self) -> list[tuple[str, bool]]:
        """(text, marked) pieces in order."""
        out, pos = [], 0
        for a, b in self.marks:
            if a > pos:
                out.append((self.text[pos:a], False))
            out.append((self.text[a:b], True))
            pos = b
        if pos < len(self.text):
            out.append((self.text[pos:], False))
        return out


@dataclass(frozen=True, slots=True)
class IssueRow:
    """One row of the issues list.  ``number`` is the deviation's rank (what the reader
    sees); ``ref`` its internal id (for matching, never shown).  ``what_changed`` is plain
    text with the changed words at ``what_changed_marks``; ``precedent_words`` /
    ``draft_words`` are the exact changed words of each side (empty on a side without)."""

    number: int
    ref: str
    clause: str
    what_changed: str
    why: str
    frequency: str | None
    decision: str
    note: str
    what_changed_marks: tuple[tuple[int, int], ...] = ()
    precedent_words: str = ""
    draft_words: str = ""
    category: str = "substantive"
    #: The deviation's direction for the party acted for; None for a review without one.
    direction: str | None = None

    @property
    def change_excerpt(self) -> Excerpt:
        return Excerpt(self.what_changed, self.what_changed_marks)

    def cells(self, columns: Sequence[str]) -> list[str]:
        """The row's plain-text cells for *columns* (names from :data:`ISSUE_CSV_COLUMNS`)."""
        values = {
            _NUMBER_COLUMN: str(self.number), "Clause": self.clause,
            _WHAT_COLUMN: self.what_changed, _WHY_COLUMN: self.why,
            _FREQUENCY_COLUMN: self.frequency or "", "Decision": self.decision, "Note": self.note,
            _DIRECTION_COLUMN: self.direction or "",
            _PRECEDENT_WORDS_COLUMN: self.precedent_words, _DRAFT_WORDS_COLUMN: self.draft_words,
        }
        return [values[c] for c in columns]


# --------------------------------------------------------------------------------------
# Quoting the changed words
# --------------------------------------------------------------------------------------


def _sentences(text: str) -> list[tuple[int, int]]:
    """(start, end) of each sentence of *text*, tiling it (see :data:`_SENTENCE_END`).  O(len)."""
    out: list[tuple[int, int]] = []
    start = 0
    for m in _SENTENCE_END.finditer(text):
        if m.group() != "\n":
            token_start = max(text.rfind(" ", 0, m.start()), text.rfind("\n", 0, m.start())) + 1
            token = text[token_start:m.start()].lstrip("(\"'\u201c\u2018").casefold()
            if token in _ABBREVIATIONS or (len(token) == 1 and token.isalpha()):
                continue
        out.append((start, m.end()))
        start = m.end()
    if start < len(text) or not out:
        out.append((start, len(text)))
    return out


def _assemble(parts: Sequence[tuple[str, bool]]) -> Excerpt:
    """Join (text, marked) parts with white space collapsed to single spaces; a marked part
    gives its leading and trailing spaces to its neighbours, so only words are marked."""
    text = ""
    marks: list[tuple[int, int]] = []
    for raw, marked in parts:
        piece = re.sub(r"\s+", " ", raw)
        if not piece:
            continue
        if text.endswith(" ") and piece.startswith(" "):
            piece = piece[1:]
        if not text and piece.startswith(" "):
            piece = piece[1:]
        if marked:
            core = piece.strip()
            lead = piece[: len(piece) - len(piece.lstrip())]
            if core:
                text += lead
                marks.append((len(text), len(text) + len(core)))
                text += core + piece[len(lead) + len(core):]
                continue
        text += piece
    stripped = text.rstrip()
    marks = [(a, min(b, len(stripped))) for a, b in marks if a < len(stripped)]
    return Excerpt(stripped, tuple(marks))


def _concat(*parts: Excerpt | str) -> Excerpt:
    """The parts one after the other (a plain string is unmarked)."""
    text = ""
    marks: list[tuple[int, int]] = []
    for part in parts:
        ex = Excerpt(part) if isinstance(part, str) else part
        marks += [(a + len(text), b + len(text)) for a, b in ex.marks]
        text += ex.text
    return Excerpt(text, tuple(marks))


def _quoted(ex: Excerpt) -> Excerpt:
    return _concat(_OPEN_QUOTE, ex, _CLOSE_QUOTE)


def _whole_words(text: str, span: tuple[int, int]) -> tuple[int, int]:
    """*span* widened to whole words: a span that starts with a letter or digit reaches back
    to the white space before it, one that ends with a letter or digit reaches on to the white
    space after it, less the sentence punctuation (".,;:") it would end with.  The review's
    spans can stop inside a token ("(200" of "(200%)" where only the figure differs); a reader
    expects the whole "(200%)" marked, but not the "party" before an inserted ", save that".
    An empty span (an insertion point) stays as it is."""
    s, e = span
    while s < e and text[s].isspace():
        s += 1
    while e > s and text[e - 1].isspace():
        e -= 1
    if s >= e:
        return span
    if text[s].isalnum():
        while s > 0 and not text[s - 1].isspace():
            s -= 1
    end = e
    if text[e - 1].isalnum():
        while end < len(text) and not text[end].isspace():
            end += 1
    while end > e and text[end - 1] in ".,;:":
        end -= 1
    return s, end


def _snippet(text: str, span: tuple[int, int], *, context: int = CHANGE_CONTEXT_WORDS,
             max_words: int = CHANGE_MAX_WORDS) -> Excerpt:
    """``text[span]`` with up to *context* words either side, within the sentence(s) that
    hold it; the span's words marked, cut to *max_words* words.  "…" where the quote stops
    inside a sentence.  An empty span (words the other side has) marks nothing: the quote
    shows where they would go.  O(len(text))."""
    n_text = len(text)
    s = min(max(span[0], 0), n_text)
    e = min(max(span[1], s), n_text)
    sentences = _sentences(text)
    a = next((x for x, y in sentences if x <= s < y), sentences[-1][0])
    last = max(e - 1, s)
    b = next((y for x, y in sentences if x <= last < y), n_text)
    words = [(m.start(), m.end()) for m in _WORD.finditer(text, a, b)]
    if not words:
        return _assemble([(text[s:e], True)]) if text[s:e].strip() else Excerpt(_NO_TEXT)
    n = len(words)
    changed = [i for i, (x, y) in enumerate(words) if x < e and y > s]
    if changed:
        lo, hi = changed[0], changed[-1] + 1
    else:
        lo = hi = next((i for i, (x, _) in enumerate(words) if x >= s), n)
    cut = hi - lo > max_words
    if cut:
        hi = lo + max_words
    w0 = max(0, lo - context)
    w1 = hi if cut else min(n, hi + context)
    c0, c1 = words[w0][0], words[w1 - 1][1]
    parts: list[tuple[str, bool]] = [(_ELLIPSIS + " ", False)] if w0 > 0 else []
    m0, m1 = max(s, c0), min(e, c1)
    if m0 < m1:
        parts += [(text[c0:m0], False), (text[m0:m1], True), (text[m1:c1], False)]
    else:
        parts.append((text[c0:c1], False))
    if w1 < n:
        parts.append((" " + _ELLIPSIS, False))
    return _assemble(parts)


def _opening(text: str, *, max_words: int = CHANGE_MAX_WORDS) -> Excerpt:
    """The first sentence(s) of *text*, as many whole ones as fit in *max_words* words (the
    first one cut to *max_words* when longer), "…" when more follows.  O(len(text))."""
    words = [(m.start(), m.end()) for m in _WORD.finditer(text)]
    if not words:
        return Excerpt(_NO_TEXT)
    starts = [a for a, _ in words]
    end = None
    for _, y in _sentences(text):
        if bisect.bisect_left(starts, y) > max_words:  # words starting before y
            break
        end = y
    if end is None:
        end = words[min(max_words, len(words)) - 1][1]
    more = any(a >= end for a, _ in words)
    return _assemble([(text[:end], False)] + ([(" " + _ELLIPSIS, False)] if more else []))


def _swap(edits: Sequence[Edit]) -> tuple[Edit, ...]:
    """A pair's word diff read the other way round (draft to precedent)."""
    flip: dict[EditTag, EditTag] = {"insert": "delete", "delete": "insert"}
    return tuple(Edit(flip.get(e.tag, e.tag), e.d1, e.d2, e.p1, e.p2) for e in edits)


def _side(prov: Provision | None, span: tuple[int, int] | None, verbatim: str,
          at: int | None) -> tuple[Excerpt | None, str]:
    """One side's quote of a word-level deviation, and its exact changed words (None for a
    side without the provision).  Without a span (a review built by hand), the side's
    verbatim words are looked up in the text, else *at* (the other side's change mapped
    through the pair's diff) places it, else the provision's opening words stand for it."""
    if prov is None:
        return None, verbatim
    text = prov.text
    if span is None and verbatim:
        i = text.find(verbatim)
        if i >= 0:
            span = (i, i + len(verbatim))
    if span is None and at is not None:
        span = (at, at)
    if span is None:  # nothing places the change: the provision's start stands for it
        return _opening(text), verbatim
    span = _whole_words(text, span)
    return _snippet(text, span), text[span[0]:span[1]]


def _old_new(old: Excerpt | None, new: Excerpt | None) -> Excerpt:
    """``“old”`` and, on the next line, ``→ “new”``; a missing side reads "nothing"."""
    return _concat(_quoted(old) if old else "nothing", _ARROW, _quoted(new) if new else "nothing")


def _words_of(text: str, max_words: int = CHANGE_MAX_WORDS) -> Excerpt:
    """*text* cut to *max_words* words, "…" where cut."""
    words = text.split()
    more = f" {_ELLIPSIS}" if len(words) > max_words else ""
    return Excerpt(" ".join(words[:max_words]) + more)


def _provision_quote(prov: Provision | None) -> Excerpt:
    """The start of a provision, or its heading when it has no text of its own."""
    if prov is None:
        return Excerpt(_NO_TEXT)
    if not prov.text.strip() and prov.heading:
        return _quoted(_words_of(prov.heading))
    return _quoted(_opening(prov.text))


def _text_change(review: Review, dev: Deviation, dp: Provision | None,
                 pp: Provision | None) -> tuple[Excerpt, str, str]:
    edits = edits_of_pair(review, dp.id, pp.id) if dp is not None and pp is not None else ()
    d_at = (map_offset(edits, dev.precedent_span[0])
            if dev.draft_span is None and dev.precedent_span is not None else None)
    p_at = (map_offset(_swap(edits), dev.draft_span[0])
            if dev.precedent_span is None and dev.draft_span is not None else None)
    new, dwords = _side(dp, dev.draft_span, dev.draft_text, d_at)
    old, pwords = _side(pp, dev.precedent_span, dev.precedent_text, p_at)
    return _old_new(old, new), pwords, dwords


def _term_change(review: Review, dev: Deviation) -> tuple[Excerpt, str, str]:
    """A defined term renamed, with its count of uses in the draft."""
    uses = next((m.occurrences for m in review.term_map
                 if m.draft == dev.draft_text and m.precedent == dev.precedent_text), None)
    ex = _concat("Defined term ", _old_new(Excerpt(dev.precedent_text, ((0, len(dev.precedent_text)),)),
                                           Excerpt(dev.draft_text, ((0, len(dev.draft_text)),))))
    if uses:
        ex = _concat(ex, f" ({uses} use{'s' * (uses != 1)} in the draft)")
    return ex, dev.precedent_text, dev.draft_text


def _move_change(review: Review, dp: Provision | None, pp: Provision | None) -> tuple[Excerpt, str, str]:
    """A provision moved, with its numbers on both sides when both are known."""
    dn = full_number(dp, doc=review.draft) if dp else ""
    pn = full_number(pp, doc=review.precedent) if pp else ""
    where = f" (precedent {pn}, draft {dn})" if dn and pn else ""
    return Excerpt(f"Provision moved to another place in the order{where}"), "", ""


def _heading_words(dev: Deviation, dp: Provision | None,
                   pp: Provision | None) -> tuple[Excerpt, str, str]:
    """A heading changed: the whole old and new headings."""
    dh = (dp.heading if dp is not None else None) or dev.draft_text
    ph = (pp.heading if pp is not None else None) or dev.precedent_text
    old = Excerpt(ph, ((0, len(ph)),)) if ph else None
    new = Excerpt(dh, ((0, len(dh)),)) if dh else None
    return _concat("Heading ", _old_new(old, new)), ph or "", dh or ""


def _whole_change(dev: Deviation) -> tuple[Excerpt, str, str]:
    """A renumbering, or a change with no provision to quote from: the deviation's own words."""
    if dev.part == "provision" and dev.category == "numbering":
        old = Excerpt(dev.precedent_text) if dev.precedent_text else None
        new = Excerpt(dev.draft_text) if dev.draft_text else None
        return _concat("Renumbered ", _old_new(old, new)), dev.precedent_text, dev.draft_text
    # no provision to quote from (the whole document): the deviation's own words
    old = _words_of(dev.precedent_text) if dev.precedent_text.strip() else None
    new = _words_of(dev.draft_text) if dev.draft_text.strip() else None
    return _old_new(old, new), dev.precedent_text, dev.draft_text


def _what_changed(review: Review, dev: Deviation) -> tuple[Excerpt, str, str]:
    """(what changed, the precedent's changed words, the draft's changed words)."""
    dp = find_provision(review.draft, dev.draft_provision)
    pp = find_provision(review.precedent, dev.precedent_provision)
    if dev.category == "term":
        return _term_change(review, dev)
    if dev.change == "add-provision":
        return _concat("Provision added: ", _provision_quote(dp)), "", dp.text if dp else dev.draft_text
    if dev.change == "remove-provision":
        return (_concat("Provision left out: ", _provision_quote(pp)),
                pp.text if pp else dev.precedent_text, "")
    if dev.change == "move":
        return _move_change(review, dp, pp)
    if dev.part == "heading":
        return _heading_words(dev, dp, pp)
    if dev.part == "text" and (dp is not None or pp is not None):
        return _text_change(review, dev, dp, pp)
    return _whole_change(dev)


# --------------------------------------------------------------------------------------
# The other cells
# --------------------------------------------------------------------------------------


def _agreements(n: int) -> str:
    return f"{n} past agreement{'s' * (n != 1)}"


def _share(matching: int, of: int) -> str:
    """"in 3 of 12 past agreements", "in none of the 12 past agreements", "in all 12 ..."."""
    if of == 1:
        return "in the one past agreement" if matching else "not in the one past agreement"
    if matching == 0:
        return f"in none of the {_agreements(of)}"
    if matching >= of:
        return f"in all {_agreements(of)}"
    return f"in {matching} of {_agreements(of)}"


def _how_common(dev: Deviation) -> str | None:
    """The "past use" cell in words (see :func:`_table_notes` for what the figures mean);
    the firm's stance on the wording after it.  None without a precedent set."""
    f = dev.frequency
    if f is None:
        return None
    if dev.category == "term":
        text = (f"the draft's name {_share(f.matching, f.same_type)} that define the term"
                if f.same_type else "no past agreement defines the term")
    elif dev.change == "remove-provision":
        lacking = min(f.matching, f.total)
        if lacking == 0:
            text = f"present {_share(f.total, f.total)}"
        elif f.total == 1:
            text = "absent from the one past agreement"
        else:
            text = (f"absent from all {_agreements(f.total)}" if lacking == f.total
                    else f"absent from {lacking} of the {_agreements(f.total)}")
    elif f.same_type:
        text = f"{_share(f.matching, f.same_type)} with such a clause"
    else:
        text = ("the one past agreement has no such clause" if f.total == 1
                else f"none of the {_agreements(f.total)} has such a clause")
    if f.position:
        text += f"; firm's stance: {f.position}"
    return text


def _frequency_reasons(freq: Frequency | None) -> tuple[str, ...]:
    if freq is None:
        return ()
    from ..library.frequency import frequency_reasons

    return frequency_reasons(freq)


def _why(review: Review, dev: Deviation) -> str:
    """The deviation's reasons joined, without those that restate the "past use" cell
    and without the clause type's weight in the ranking (a detail of the firm's rule file,
    not a reason a reader outside the firm weighs).  A renamed defined term, whose reason
    repeats the names and uses "what changed" shows, says instead on what evidence the two
    names are read as one term (:class:`core.model.TermMapping`)."""
    from ..review.severity import is_weight_reason

    if dev.category == "term":
        m = next((m for m in review.term_map
                  if m.draft == dev.draft_text and m.precedent == dev.precedent_text), None)
        if m is not None:
            return (f"Read as the same defined term (evidence: {', '.join(m.evidence)}; "
                    f"confidence {m.confidence:.2f})")
    repeated = set(_frequency_reasons(dev.frequency))
    text = "; ".join(r for r in dev.reasons if r not in repeated and not is_weight_reason(r))
    return text[:1].upper() + text[1:]


def _decision_text(dec: Decision | None) -> str:
    if dec is None:
        return "undecided"
    if dec.action == "amend":
        return f"amend: {dec.text or ''}"
    return dec.action


# --------------------------------------------------------------------------------------
# Which rows, in which order
# --------------------------------------------------------------------------------------


def _included(include: Iterable[str]) -> frozenset[str]:
    chosen = frozenset(include)
    unknown = sorted(chosen - set(CATEGORIES))
    if unknown:
        raise ValueError(f"unknown deviation categories {unknown}; choose from {CATEGORIES}")
    return chosen


def _checked_order(order: str) -> str:
    if order not in ISSUE_ORDERS:
        raise ValueError(f"unknown order {order!r}; choose from {ISSUE_ORDERS}")
    return order


def clause_order(review: Review) -> dict[str, tuple[float, int, int, int, int]]:
    """Deviation id -> its place in the draft's clause order: the draft provision's position.
    A provision only the precedent has sits where it would have been: after the draft
    provision aligned with the last precedent provision before it and after the draft's own
    additions that follow that one, i.e. just before the next provision both documents share
    (several such in the precedent's order).  Within a provision the heading and the
    provision as a whole come before its words, the words by their place in the text; ties
    by rank.  A deviation without a provision (the whole document) comes first.
    O(provisions + deviations)."""
    provisions = review.draft.provisions
    dpos = {p.id: i for i, p in enumerate(provisions)}
    aligned = {pair.precedent: pair.draft for pair in review.pairs
               if pair.draft is not None and pair.precedent is not None}
    shared = {d for d in aligned.values() if d in dpos}
    # after[j]: the last position of the run of draft-only provisions from position j on
    # (j - 1 when the provision at j is shared or j is the end)
    after = [0] * (len(provisions) + 1)
    after[-1] = len(provisions) - 1
    for j in range(len(provisions) - 1, -1, -1):
        after[j] = after[j + 1] if provisions[j].id not in shared else j - 1
    ppos: dict[str, tuple[float, int]] = {}
    last = -1
    for k, p in enumerate(review.precedent.provisions):
        d = aligned.get(p.id)
        if d is not None and d in dpos:
            last = dpos[d]
            ppos[p.id] = (float(last), -1)
        else:
            ppos[p.id] = (after[last + 1] + 0.5, k)
    out = {}
    for dev in review.deviations:
        if dev.draft_provision in dpos:
            at, within = float(dpos[dev.draft_provision]), -1
            offset = dev.draft_span[0] if dev.draft_span is not None else 0
        elif dev.precedent_provision in ppos:
            at, within = ppos[dev.precedent_provision]
            offset = dev.precedent_span[0] if dev.precedent_span is not None else 0
        else:
            at, within, offset = -1.0, -1, 0
        part = 1 if dev.part == "text" else 0  # the heading and the whole provision first
        out[dev.id] = (at, within, part, offset, dev.rank)
    return out


def _shown(review: Review, decisions: Sequence[Decision], include: Iterable[str],
           order: str) -> list[Deviation]:
    """The deviations the issues list shows, in order: those of the included categories (and
    every decided one), by clause order or by rank; renamed defined terms last, as a group
    of their own."""
    chosen = _included(include)
    decided = {d.deviation for d in decisions}
    if _checked_order(order) == "clause":
        place = clause_order(review)
        devs = sorted(review.deviations, key=lambda d: place[d.id])
    else:
        devs = sorted(review.deviations, key=lambda d: (d.rank, d.id))
    devs = [d for d in devs if d.category in chosen or d.id in decided]
    return [d for d in devs if d.category != "term"] + [d for d in devs if d.category == "term"]


def issue_rows(review: Review, decisions: Sequence[Decision] = (), *,
               include: Iterable[str] = ISSUES_DEFAULT_INCLUDE,
               order: str = ISSUES_DEFAULT_ORDER) -> list[IssueRow]:
    """The rows of the issues list: one per deviation of the *include* categories (by
    default the substantive ones and the renamed defined terms) and per decided deviation,
    in the draft's clause order (*order* ``"clause"``) or by rank (``"rank"``), the renamed
    defined terms last.  O(deviations x provision length)."""
    by_id: Mapping[str, Decision] = {d.deviation: d for d in decisions}
    rows = []
    for dev in _shown(review, decisions, include, order):
        dec = by_id.get(dev.id)
        what, pwords, dwords = _what_changed(review, dev)
        rows.append(IssueRow(
            number=dev.rank, ref=dev.id, clause=clause_label(review, dev),
            what_changed=what.text, why=_why(review, dev), frequency=_how_common(dev),
            decision=_decision_text(dec), note=(dec.note or "") if dec else "",
            what_changed_marks=what.marks, precedent_words=pwords, draft_words=dwords,
            category=dev.category, direction=dev.direction if review.acting_for else None,
        ))
    return rows


def _left_out(review: Review, rows: Sequence[IssueRow]) -> int:
    return len(review.deviations) - len(rows)


def _columns(rows: Sequence[IssueRow], columns: Sequence[str] = ISSUE_COLUMNS) -> tuple[str, ...]:
    left_out = set()
    if not any(r.frequency is not None for r in rows):
        left_out.add(_FREQUENCY_COLUMN)
    if not any(r.direction is not None for r in rows):
        left_out.add(_DIRECTION_COLUMN)
    return tuple(c for c in columns if c not in left_out)


def _first_term_row(rows: Sequence[IssueRow]) -> int | None:
    return next((i for i, r in enumerate(rows) if r.category == "term"), None)


def _table_notes(review: Review, rows: Sequence[IssueRow], order: str) -> list[str]:
    """The notes under the table (.docx and HTML): the numbers and the order, what the
    "what changed" quotes, the "past use" figures, the renamed-terms group and what was
    left out."""
    arranged = ("Rows follow the order of the draft's clauses; a provision the draft leaves "
                "out sits where it would have been." if order == "clause" else "Rows are in "
                "order of severity.")
    notes = [f"{arranged} No. is the deviation's number in this review: its rank by the "
             "severity the review gives it, 1 the highest.",
             f"What changed: the precedent's words, then (\u2192) the draft's, with up to "
             f"{CHANGE_CONTEXT_WORDS} words either side; the changed words are in bold, and "
             f"\u201c{_ELLIPSIS}\u201d marks a cut."]
    freqs = [d.frequency for d in review.deviations if d.frequency is not None]
    if freqs and any(r.frequency is not None for r in rows):
        total = max(f.total for f in freqs)
        notes.append(
            f"Past use: of the firm's {_agreements(total)} in the precedent set, how many "
            "that have a clause of the same type carry the draft's wording; for a provision "
            "the draft leaves out, how many lack it as well; for a renamed defined term, how "
            "many of those that define the term use the draft's name. \u201cFirm's stance\u201d "
            "is the firm's stance on that wording (house wording, can live with, last concession, "
            "refuse).")
    if review.acting_for and any(r.direction is not None for r in rows):
        notes.append(f"Direction: for the {review.acting_for}, the party acted for -- adverse "
                     "(against it), favourable (for it), neutral (no change of meaning, or a "
                     "clause binding each party alike), unclear (the wording does not tell).")
    if _first_term_row(rows) is not None:
        notes.append("The last rows are renamed defined terms, for information: the draft calls "
                     "a defined term differently, and the comparison reads both names as one term.")
    left = _left_out(review, rows)
    if left:
        notes.append(f"Left out: {left} difference{'s' if left != 1 else ''} of formatting, "
                     "numbering or punctuation only (an export with all differences lists them).")
    return notes


# --------------------------------------------------------------------------------------
# The drafting checks
# --------------------------------------------------------------------------------------

#: Columns of the drafting checks' table (.docx, HTML).
CHECK_COLUMNS = ("Check", "Clause", "Words", "What the check found")
#: Their relative widths, in centimetres of the landscape A4 text width (as ISSUE_WIDTHS_CM).
CHECK_WIDTHS_CM = {"Check": 3.2, "Clause": 4.2, "Words": 7.0, "What the check found": 10.3}
#: Provisions named in full where a changed definition's term is used; past it, "and N more".
CHECK_USES_SHOWN = 12
NO_CHECKS = "The drafting checks found nothing in the draft."


def check_rows(review: Review) -> list[tuple[str, str, str, str]]:
    """(check, clause, words, what the check found) of each drafting check of *review*;
    for a changed definition, what it found names the provisions using the term."""
    from ..review.checks import CHECK_TITLES

    out: list[tuple[str, str, str, str]] = []
    for c in review.checks:
        found = c.message
        if c.kind == "definition-changed" and c.provisions:
            labels = [provision_label(p, doc=review.draft, compact=True)
                      for p in (find_provision(review.draft, pid) for pid in c.provisions[:CHECK_USES_SHOWN])
                      if p is not None]
            more = len(c.provisions) - len(labels)
            found += ". Used in: " + "; ".join(labels) + (f"; and {more} more" if more > 0 else "")
        out.append((CHECK_TITLES[c.kind], check_label(review, c), _words_of(c.text).text if c.text else "", found))
    return out


def _checks_html(review: Review) -> list[str]:
    e = html.escape
    out = [f"<h2>{e(CHECKS_HEADING)}</h2>"]
    rows = check_rows(review)
    if not rows:
        return [*out, f"<p>{e(NO_CHECKS)}</p>"]
    total_cm = sum(CHECK_WIDTHS_CM.values())
    out.append('<table border="1" class="checks"><colgroup>' + "".join(
        f'<col style="width: {100 * CHECK_WIDTHS_CM[c] / total_cm:.1f}%">' for c in CHECK_COLUMNS) + "</colgroup>")
    out.append("<thead><tr>" + "".join(f'<th scope="col">{e(c)}</th>' for c in CHECK_COLUMNS) + "</tr></thead><tbody>")
    for row in rows:
        out.append('<tr valign="top">' + "".join(f"<td>{_html_text(v)}</td>" for v in row) + "</tr>")
    out.append("</tbody></table>")
    return out


# --------------------------------------------------------------------------------------
# The three formats
# --------------------------------------------------------------------------------------


def issues_list_csv(review: Review, decisions: Sequence[Decision] = (), *,
                    include: Iterable[str] = ISSUES_DEFAULT_INCLUDE,
                    order: str = ISSUES_DEFAULT_ORDER) -> str:
    """CSV (RFC 4180 quoting by the csv module): the header row
    (:data:`ISSUE_CSV_COLUMNS`, without the frequency column when no precedent set was
    used), then one row per issue.  Nothing else: the caution is printed by the command
    line and shown by the desktop app when they write the file."""
    rows = issue_rows(review, decisions, include=include, order=order)
    cols = _columns(rows, ISSUE_CSV_COLUMNS)
    buf = io.StringIO()
    writer = csv.writer(buf, lineterminator="\r\n")
    writer.writerow(cols)
    for r in rows:
        writer.writerow(r.cells(cols))
    for check, clause, words, found in check_rows(review):
        values = {"Clause": clause, _WHAT_COLUMN: words, _WHY_COLUMN: f"{check}: {found}"}
        writer.writerow([values.get(c, "") for c in cols])
    return buf.getvalue()


#: Relative column widths of the issues-list table, in centimetres of the landscape A4 text
#: width (24.7 cm; scaled exactly to it).  The narrow columns hold their longest word on one
#: line at 9 pt in a wide serif (DejaVu Serif, LibreOffice's stand-in when Liberation Serif is
#: missing; measured in LibreOffice's PDF of the demo's table with pdftotext -bbox: bold "No."
#: 0.61 cm, "Decision" 1.53 cm, plain "undecided" 1.67 cm, "agreements" 1.90 cm,
#: "Confidentiality" 2.37 cm; the header words "Past" and "use" have fewer letters than
#: "Decision") plus the cell margins (2 x 0.19 cm) and some slack; "What changed" gets the
#: most room, "Why it matters" the next, "Past use" enough that its sentence takes three
#: lines, not five; "Direction" as much as "Decision" (its longest word, "favourable", is
#: about as long as "undecided").  Without the frequency or direction column the others
#: share its width.
ISSUE_WIDTHS_CM = {_NUMBER_COLUMN: 1.1, "Clause": 3.2, _DIRECTION_COLUMN: 2.3, _WHAT_COLUMN: 7.2,
                   _WHY_COLUMN: 4.4, _FREQUENCY_COLUMN: 3.4, "Decision": 2.3, "Note": 3.1}

#: The page's palette (ours): ink, secondary text, rules, header fill, the fill of the
#: renamed-terms group, and the washes behind the changed words -- the precedent's ("was",
#: before the arrow) and the draft's ("now", after it): the desktop window's lavender and
#: mint (``desktop.palette.DELETED`` / ``INSERTED`` backgrounds), so the page reads like the
#: window.  Dark ink on pale throughout so a greyscale print stays legible; the two washes
#: differ in lightness, and the changed words are bold as well as washed.
_PALETTE = {"ink": "#1e2b29", "muted": "#56625f", "rule": "#8a9a95", "head": "#dde6e2",
            "group": "#f3f5f4", "was": "#e0cdef", "now": "#e1f6ec"}

_HTML_STYLE = """
body {{ font-family: "Liberation Serif", "DejaVu Serif", Georgia, serif; margin: 2em; color: {ink}; }}
h1 {{ font-size: 1.4em; margin-bottom: 0.2em; }}
p.meta {{ margin-top: 0; color: {muted}; }}
p.caution {{ border-top: 1px solid {rule}; border-bottom: 1px solid {rule}; padding: 0.5em 0;
            font-style: italic; }}
table {{ border-collapse: collapse; width: 100%; table-layout: fixed; font-size: 0.85em; }}
th, td {{ border: 1px solid {rule}; padding: 0.3em 0.4em; vertical-align: top; text-align: left;
          overflow-wrap: break-word; }}
th {{ background: {head}; }}
td.num {{ text-align: right; }}
strong.was {{ background: {was}; }}
strong.now {{ background: {now}; }}
tbody.terms tr:first-child td {{ border-top: 2px solid {ink}; }}
tbody.terms td {{ background: {group}; }}
thead {{ display: table-header-group; }}
tr {{ break-inside: avoid; page-break-inside: avoid; }}
p.note {{ font-size: 0.85em; color: {muted}; margin: 0.4em 0; }}
@page {{ size: A4 landscape; margin: 12mm; }}
@media print {{ body {{ margin: 0; }}
  th, td, strong {{ -webkit-print-color-adjust: exact; print-color-adjust: exact; }} }}
""".format(**_PALETTE)


def _title(review: Review) -> str:
    return f"Issues list: {Path(review.draft.source).name} against {Path(review.precedent.source).name}"


def _html_text(text: str) -> str:
    return "<br>".join(html.escape(line) for line in text.split("\n"))


def _html_excerpt(excerpt: Excerpt) -> str:
    """The excerpt with its changed words in bold, washed as the precedent's words before
    the arrow (:data:`_ARROW`) and as the draft's after it."""
    arrow = excerpt.text.find(_ARROW)
    out, pos = [], 0
    for t, m in excerpt.pieces():
        if m:
            side = "now" if 0 <= arrow < pos else "was"
            out.append(f'<strong class="{side}">{_html_text(t)}</strong>')
        else:
            out.append(_html_text(t))
        pos += len(t)
    return "".join(out)


def issues_list_html(review: Review, decisions: Sequence[Decision] = (), *,
                     date: _dt.datetime | None = None,
                     include: Iterable[str] = ISSUES_DEFAULT_INCLUDE,
                     order: str = ISSUES_DEFAULT_ORDER) -> str:
    """A self-contained printable HTML page: no external resources, print CSS inline (A4
    landscape, the header row repeated on each page, no row split), the caution under the
    title, the changed words in bold."""
    rows = issue_rows(review, decisions, include=include, order=order)
    cols = _columns(rows)
    e = html.escape
    title = _title(review)
    total_cm = sum(ISSUE_WIDTHS_CM[c] for c in cols)
    out = [
        "<!DOCTYPE html>",
        '<html lang="en"><head><meta charset="utf-8">',
        f"<title>{e(title)}</title>",
        f"<style>{_HTML_STYLE}</style></head><body>",
        f"<h1>{e(title)}</h1>",
        f'<p class="meta">Written by Counterdraft {e(__version__)} on {e(stamp_date(date)[:10])}.</p>',
        f'<p class="caution">{e(CAUTION)}</p>',
        # border="1" and valign="top" repeat the style sheet for word processors that open the
        # page and read HTML attributes but little CSS (LibreOffice 7.4, checked on this machine).
        '<table border="1"><colgroup>' + "".join(
            f'<col style="width: {100 * ISSUE_WIDTHS_CM[c] / total_cm:.1f}%">' for c in cols) + "</colgroup>",
        "<thead><tr>" + "".join(f'<th scope="col">{e(c)}</th>' for c in cols) + "</tr></thead><tbody>",
    ]
    first_term = _first_term_row(rows)
    for i, r in enumerate(rows):
        if i == first_term:
            out.append('</tbody><tbody class="terms">')
        cells = []
        for c, v in zip(cols, r.cells(cols)):
            if c == _WHAT_COLUMN:
                cells.append(f"<td>{_html_excerpt(r.change_excerpt)}</td>")
            else:
                cls = ' class="num"' if c == _NUMBER_COLUMN else ""
                cells.append(f"<td{cls}>{_html_text(v)}</td>")
        out.append('<tr valign="top">' + "".join(cells) + "</tr>")
    out.append("</tbody></table>")
    if rows:
        out.extend(f'<p class="note">{e(n)}</p>' for n in _table_notes(review, rows, order))
    else:
        out.append("<p>No substantive deviation was found.</p>")
    out.extend(_checks_html(review))
    out.append("</body></html>")
    return "\n".join(out) + "\n"


def issues_list_docx(review: Review, decisions: Sequence[Decision] = (), *, author: str,
                     date: _dt.datetime | None = None,
                     include: Iterable[str] = ISSUES_DEFAULT_INCLUDE,
                     order: str = ISSUES_DEFAULT_ORDER) -> bytes:
    """The issues list as a Word table (ECMA-376 Part 1 §17.4) on landscape A4 pages: the
    full text width, fixed column widths, the header row repeated on each page, no row split
    across pages; the changed words in bold; notes under the table."""
    from ..docx.revisions import RevisionStamp
    from ..docx.writer import Cell, Element, Para, Run, Table, build_docx

    rows = issue_rows(review, decisions, include=include, order=order)
    cols = _columns(rows)
    stamp = RevisionStamp(author=author, date=stamp_date(date))
    title = _title(review)

    def cells(r: IssueRow) -> tuple[Cell, ...]:
        return tuple(tuple(Run(t, bold=m) for t, m in r.change_excerpt.pieces()) if c == _WHAT_COLUMN
                     else v for c, v in zip(cols, r.cells(cols)))

    body: list[Element] = [
        Para((Run(title),), style="Title"),
        Para((Run(f"Written by Counterdraft {__version__} on {stamp.date[:10]}."),)),
        Para((Run(CAUTION),), style="Caution"),
        Table(tuple(cols), tuple(cells(r) for r in rows),
              widths=tuple(ISSUE_WIDTHS_CM[c] for c in cols), divider_before=_first_term_row(rows)),
    ]
    if rows:
        body.extend(Para((Run(n),), style="TableNote") for n in _table_notes(review, rows, order))
    else:
        body.append(Para((Run("No substantive deviation was found."),)))
    body.append(Para((Run(CHECKS_HEADING),), style="Heading1"))
    checks = check_rows(review)
    if checks:
        body.append(Table(CHECK_COLUMNS, tuple(checks), widths=tuple(CHECK_WIDTHS_CM[c] for c in CHECK_COLUMNS)))
    else:
        body.append(Para((Run(NO_CHECKS),)))
    return build_docx(body, stamp=stamp, title=title, properties={CAUTION_PROPERTY: CAUTION},
                      landscape=True)


def write_issues_list(review: Review, out: str | os.PathLike[str], *,
                      decisions: Sequence[Decision] = (), author: str | None = None,
                      date: _dt.datetime | None = None, inputs: Sequence[str] = (),
                      include: Iterable[str] = ISSUES_DEFAULT_INCLUDE,
                      order: str = ISSUES_DEFAULT_ORDER) -> None:
    """Write the issues list as .docx, .html or .csv (by the suffix of *out*), atomically.
    *include* names the deviation categories listed (:data:`ISSUES_DEFAULT_INCLUDE`; pass
    :data:`core.model.CATEGORIES` for every difference); decided deviations are always listed.
    *order* is ``"clause"`` (the draft's order, the default) or ``"rank"``."""
    include = tuple(_included(include))
    _checked_order(order)
    path = check_output(out, (".docx", ".html", ".htm", ".csv"),
                        [review.draft.source, review.precedent.source, *inputs])
    suffix = path.suffix.lower()
    if suffix == ".csv":
        # A byte-order mark first: spreadsheet programs then read the file as UTF-8 rather
        # than a legacy code page, so curly quotes and ellipses survive (common practice, no
        # source).  Python reads it back with encoding="utf-8-sig".
        data = issues_list_csv(review, decisions, include=include, order=order)
        atomic_write_bytes(path, data.encode("utf-8-sig"))
    elif suffix in (".html", ".htm"):
        atomic_write_text(path, issues_list_html(review, decisions, date=date, include=include,
                                                 order=order))
    else:
        atomic_write_bytes(path, issues_list_docx(review, decisions, author=author or default_author(),
                                                  date=date, include=include, order=order))
