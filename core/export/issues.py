"""The issues list: the negotiating table as .docx, .html or .csv."""


import bisect
import csv
import datetime as _dt
import html
import io
import os
import re
from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from pathlib import Path

from .. import CAUTION, __version__
from ..decisions import Decision
from ..fileio import atomic_write_bytes, atomic_write_text
from ..labels import clause_label, find_provision
from ..model import (
    CATEGORIES,
    Deviation,
    Edit,
    Provision,
    Review,
)
from .common import (
    CAUTION_PROPERTY,
    check_output,
    default_author,
    edits_of_pair,
    map_offset,
    stamp_date,
)

__all__ = [
    "CSV_MARK_CLOSE",
    "CSV_MARK_OPEN",
    "Excerpt",
    "ISSUE_COLUMNS",
    "ISSUE_CSV_COLUMNS",
    "ISSUE_WIDTHS_CM",
    "IssueRow",
    "POSITION_LEAD_WORDS",
    "POSITION_MAX_WORDS",
    "issue_rows",
    "issues_list_csv",
    "issues_list_docx",
    "issues_list_html",
    "write_issues_list",
]


ISSUE_COLUMNS = ("Ref", "Clause", "Draft position", "House position", "Severity",
                 "How common in the precedent set", "Decision", "Note")



#: Deviation categories the issues list shows unless asked for more: what a negotiator needs
#: -- the substantive deviations, and the renamed defined terms as a short informational group
#: at the end.  Formatting, numbering and punctuation differences are left out by default
#: (``include=CATEGORIES`` or ``counterdraft export --issues-all`` shows them).
ISSUES_DEFAULT_INCLUDE: tuple[str, ...] = ("substantive", "term")

#: Most words a position quotes.  A position is the sentence that holds the change; a longer
#: sentence is cut to this many words around the change, with "…" where it was cut, and an
#: added or removed provision shows its first sentence(s) up to this many words.  50 words are
#: some six or seven lines of the issues list's position column (5.6 cm at 9 pt) -- a
#: clause-sized excerpt a negotiator reads at a glance (common practice, no source).
POSITION_MAX_WORDS = 50
#: Words of a long sentence's start kept before a cut in its middle ("The Vendor's total
#: liability to the Client, whether … shall not exceed …"): the subject and its verb usually
#: sit there, and a position without them does not say whose obligation it is (common
#: practice, no source).
POSITION_LEAD_WORDS = 8
#: Marks around the changed words inside a position in the CSV (plain text, no bold).  Not
#: square brackets: drafts and precedents use them for placeholders and open points ("[DATE]"
#: in the demo precedent), so a bracket would read as the agreement's own (common practice,
#: no source).  Braces are plain ASCII -- any spreadsheet shows them -- and agreements hardly
#: use them.  The exact changed words are in columns of their own too.
CSV_MARK_OPEN, CSV_MARK_CLOSE = "{", "}"

_FREQUENCY_COLUMN = "How common in the precedent set"
_DRAFT_WORDS_COLUMN = "Draft's changed words"
_HOUSE_WORDS_COLUMN = "House's changed words"
#: The CSV's columns: the table's, with the exact changed words of each side after the two
#: positions (a spreadsheet can filter and sort on them; its cells cannot show bold).
ISSUE_CSV_COLUMNS = ("Ref", "Clause", "Draft position", "House position", _DRAFT_WORDS_COLUMN,
                     _HOUSE_WORDS_COLUMN, "Severity", _FREQUENCY_COLUMN, "Decision", "Note")

_ELLIPSIS = "\u2026"
_NO_PROVISION = "(no such provision)"
_NO_HEADING = "(no heading)"
_NO_TEXT = "(no text)"
#: Abbreviations whose full stop does not end a sentence (lower case, without the stop);
#: single letters (initials) are treated alike (common practice, no source).
_ABBREVIATIONS = frozenset({"e.g", "i.e", "etc", "no", "nos", "art", "arts", "cl", "para", "paras",
                            "inc", "ltd", "co", "corp", "plc", "llc", "mr", "mrs", "ms", "dr", "st",
                            "vs", "viz", "approx", "sec", "sch"})
#: A sentence ends at ".", "!" or "?" (after any closing quotes or brackets) followed by
#: white space and a capital, a digit or an opening quote or bracket; a line break (the
#: "\n" joining a provision's paragraphs) ends one too.
_SENTENCE_END = re.compile(r"[.!?][\"'\u201d\u2019)\]]*\s+(?=[\"'\u201c\u2018(\[]?[A-Z0-9])|\n")
_WORD = re.compile(r"\S+")


@dataclass(frozen=True, slots=True)
class Excerpt:
    """Words quoted from one side, with the changed words at ``marks`` (offsets into
    ``text``, shown in bold in the .docx and the HTML, between braces in the CSV)."""

    text: str
    marks: tuple[tuple[int, int], ...] = ()

    def marked(self, open_: str = CSV_MARK_OPEN, close: str = CSV_MARK_CLOSE) -> str:
        """The text with *open_* and *close* around each marked stretch."""
        out, pos = [], 0
        for a, b in self.marks:
            out += [self.text[pos:a], open_, self.text[a:b], close]
            pos = b
        out.append(self.text[pos:])
        return "".join(out)

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
    """One row of the issues list.  ``draft_position``/``house_position`` are each side's
    words in context as plain text (see :data:`POSITION_MAX_WORDS`), the changed words at
    ``draft_marks``/``house_marks``; ``draft_words``/``house_words`` are the exact changed
    words (empty on the side that has none)."""

    ref: str
    rank: int
    clause: str
    draft_position: str
    house_position: str
    severity: int
    frequency: str | None
    decision: str
    note: str
    draft_marks: tuple[tuple[int, int], ...] = ()
    house_marks: tuple[tuple[int, int], ...] = ()
    draft_words: str = ""
    house_words: str = ""
    category: str = "substantive"

    @property
    def draft_excerpt(self) -> Excerpt:
        return Excerpt(self.draft_position, self.draft_marks)

    @property
    def house_excerpt(self) -> Excerpt:
        return Excerpt(self.house_position, self.house_marks)


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


def _excerpt(text: str, span: tuple[int, int], *, max_words: int = POSITION_MAX_WORDS) -> Excerpt:
    """The sentence(s) of *text* holding ``text[span]``, cut to *max_words* words around the
    span with "…" where cut; the span's words marked.  An empty span marks nothing (the
    words are missing on this side) but still chooses the sentence.  O(len(text))."""
    n_text = len(text)
    s = min(max(span[0], 0), n_text)
    e = min(max(span[1], s), n_text)
    sentences = _sentences(text)
    a = next((x for x, y in sentences if x <= s < y), sentences[-1][0])
    last = max(e - 1, s)
    b = next((y for x, y in sentences if x <= last < y), n_text)
    words = [(m.start(), m.end()) for m in _WORD.finditer(text, a, b)]
    if not words:
        return _assemble([(text[s:e], True)])
    n = len(words)
    changed = [i for i, (x, y) in enumerate(words) if x < e and y > s]
    if changed:
        lo, hi = changed[0], changed[-1] + 1
    else:
        lo = hi = next((i for i, (x, _) in enumerate(words) if x >= s), n)

    def window(budget: int) -> tuple[int, int]:
        if n <= budget:
            return 0, n
        if hi - lo >= budget:
            return lo, lo + budget
        spare = budget - (hi - lo)
        before = min(lo, spare // 2)
        after = min(n - hi, spare - before)
        return lo - min(lo, spare - after), hi + after

    w0, w1 = window(max_words)
    lead = 0  # words kept from the sentence's start before a cut in its middle
    if w0 > 0 and max_words > 2 * POSITION_LEAD_WORDS:
        w0, w1 = window(max_words - POSITION_LEAD_WORDS)
        if w0 <= POSITION_LEAD_WORDS:
            w0, w1 = 0, min(n, w1 + w0)  # the lead reaches the window: no cut at all
        else:
            lead = POSITION_LEAD_WORDS
    c0, c1 = words[w0][0], words[w1 - 1][1]
    parts: list[tuple[str, bool]] = []
    if lead:
        parts.append((text[words[0][0]:words[lead - 1][1]] + " " + _ELLIPSIS + " ", False))
    elif w0 > 0:
        parts.append((_ELLIPSIS + " ", False))
    m0, m1 = max(s, c0), min(e, c1)
    if m0 < m1:
        parts += [(text[c0:m0], False), (text[m0:m1], True), (text[m1:c1], False)]
    else:
        parts.append((text[c0:c1], False))
    if w1 < n:
        parts.append((" " + _ELLIPSIS, False))
    return _assemble(parts)


def _opening(text: str, *, max_words: int = POSITION_MAX_WORDS) -> Excerpt:
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
    flip = {"insert": "delete", "delete": "insert"}
    return tuple(Edit(flip.get(e.tag, e.tag), e.d1, e.d2, e.p1, e.p2) for e in edits)


def _side_position(prov: Provision | None, span: tuple[int, int] | None, verbatim: str,
                   at: int | None) -> tuple[Excerpt, str]:
    """One side's position of a word-level deviation, and its exact changed words.  Without
    a span (a review built by hand), the side's verbatim words are looked up in the text,
    else *at* (the other side's change mapped through the pair's diff) places it, else the
    provision's opening sentence(s) stand for it."""
    if prov is None:
        return Excerpt(_NO_PROVISION), ""
    text = prov.text
    if span is None and verbatim:
        i = text.find(verbatim)
        if i >= 0:
            span = (i, i + len(verbatim))
    if span is None and at is not None:
        span = (at, at)
    if span is None:
        return _opening(text), verbatim
    span = _whole_words(text, span)
    return _excerpt(text, span), text[span[0]:span[1]]


def _whole(text: str) -> Excerpt:
    return Excerpt(text, ((0, len(text)),) if text else ())


def _labelled(label: str, value: str) -> Excerpt:
    """``"label value"`` with the value marked."""
    return Excerpt(f"{label}{value}", ((len(label), len(label) + len(value)),))


def _positions(review: Review, dev: Deviation) -> tuple[Excerpt, Excerpt, str, str]:
    """(draft position, house position, draft's changed words, house's changed words)."""
    dp = find_provision(review.draft, dev.draft_provision)
    pp = find_provision(review.precedent, dev.precedent_provision)
    if dev.category == "term":
        uses = next((m.occurrences for m in review.term_map
                     if m.draft == dev.draft_text and m.precedent == dev.precedent_text), None)
        draft = _labelled("defined term ", f"\u201c{dev.draft_text}\u201d")
        if uses:
            draft = Excerpt(f"{draft.text} ({uses} uses)", draft.marks)
        return draft, _labelled("defined term ", f"\u201c{dev.precedent_text}\u201d"), dev.draft_text, dev.precedent_text
    if dev.part == "heading":
        dh = (dp.heading if dp is not None else None) or dev.draft_text
        ph = (pp.heading if pp is not None else None) or dev.precedent_text
        return (_labelled("Heading: ", dh) if dh else Excerpt(_NO_HEADING),
                _labelled("Heading: ", ph) if ph else Excerpt(_NO_HEADING), dh or "", ph or "")
    whole_provision = dev.change in ("add-provision", "remove-provision", "move")
    if dev.part == "text" and not whole_provision and (dp is not None or pp is not None):
        edits = edits_of_pair(review, dp.id, pp.id) if dp is not None and pp is not None else ()
        d_at = (map_offset(edits, dev.precedent_span[0])
                if dev.draft_span is None and dev.precedent_span is not None else None)
        p_at = (map_offset(_swap(edits), dev.draft_span[0])
                if dev.precedent_span is None and dev.draft_span is not None else None)
        draft, dwords = _side_position(dp, dev.draft_span, dev.draft_text, d_at)
        house, pwords = _side_position(pp, dev.precedent_span, dev.precedent_text, p_at)
        return draft, house, dwords, pwords
    if whole_provision or dp is None or pp is None:
        draft = _opening(dp.text) if dp is not None else Excerpt(_NO_PROVISION)
        house = _opening(pp.text) if pp is not None else Excerpt(_NO_PROVISION)
        if dp is not None and not dp.text.strip() and dp.heading:
            draft = Excerpt(f"Heading: {dp.heading}")
        if pp is not None and not pp.text.strip() and pp.heading:
            house = Excerpt(f"Heading: {pp.heading}")
        dwords = dp.text if dp is not None and dev.change == "add-provision" else ""
        pwords = pp.text if pp is not None and dev.change == "remove-provision" else ""
        return draft, house, dwords, pwords
    # the provision as a whole otherwise (its number): the deviation's own words
    return (_whole(dev.draft_text) if dev.draft_text else Excerpt(_NO_TEXT),
            _whole(dev.precedent_text) if dev.precedent_text else Excerpt(_NO_TEXT),
            dev.draft_text, dev.precedent_text)


def _frequency_text(dev: Deviation) -> str | None:
    """``"3 of 10"`` (and the reviewer's label of the wording: ``"3 of 10; preferred"``);
    ``"none"`` when no agreement of the set has such a clause.  Explained under the table."""
    f = dev.frequency
    if f is None:
        return None
    text = f"{f.matching} of {f.same_type}" if f.same_type else "none"
    if f.position:
        text += f"; {f.position}"
    return text


def _decision_text(dec: Decision | None) -> str:
    if dec is None:
        return "undecided"
    if dec.action == "amend":
        return f"amend: {dec.text or ''}"
    return dec.action


def _included(include: Iterable[str]) -> frozenset[str]:
    chosen = frozenset(include)
    unknown = sorted(chosen - set(CATEGORIES))
    if unknown:
        raise ValueError(f"unknown deviation categories {unknown}; choose from {CATEGORIES}")
    return chosen


def _shown(review: Review, decisions: Sequence[Decision], include: Iterable[str]) -> list[Deviation]:
    """The deviations the issues list shows, in order: those of the included categories (and
    every decided one), by rank; renamed defined terms last, as a group of their own."""
    chosen = _included(include)
    decided = {d.deviation for d in decisions}
    devs = [d for d in sorted(review.deviations, key=lambda d: (d.rank, d.id))
            if d.category in chosen or d.id in decided]
    return [d for d in devs if d.category != "term"] + [d for d in devs if d.category == "term"]


def issue_rows(review: Review, decisions: Sequence[Decision] = (), *,
               include: Iterable[str] = ISSUES_DEFAULT_INCLUDE) -> list[IssueRow]:
    """The rows of the issues list: one per deviation of the *include* categories (by
    default the substantive ones and the renamed defined terms) and per decided deviation,
    by rank, with the renamed defined terms last.  Each position is the sentence (or a
    bounded excerpt) of that side's provision holding the change.  O(deviations x
    provision length)."""
    by_id = {d.deviation: d for d in decisions}
    rows = []
    for dev in _shown(review, decisions, include):
        dec = by_id.get(dev.id)
        draft, house, dwords, pwords = _positions(review, dev)
        rows.append(IssueRow(
            ref=dev.id, rank=dev.rank, clause=clause_label(review, dev),
            draft_position=draft.text, house_position=house.text,
            severity=dev.severity, frequency=_frequency_text(dev), decision=_decision_text(dec),
            note=(dec.note or "") if dec else "",
            draft_marks=draft.marks, house_marks=house.marks,
            draft_words=dwords, house_words=pwords, category=dev.category,
        ))
    return rows


def _left_out(review: Review, rows: Sequence[IssueRow]) -> int:
    return len(review.deviations) - len(rows)


def _columns(rows: Sequence[IssueRow], columns: Sequence[str] = ISSUE_COLUMNS) -> tuple[str, ...]:
    if any(r.frequency is not None for r in rows):
        return tuple(columns)
    return tuple(c for c in columns if c != _FREQUENCY_COLUMN)


def _cells(row: IssueRow, columns: Sequence[str], *, marked: bool = False) -> list[str]:
    """Plain-text cells; with *marked*, the positions carry the CSV's marks."""
    values = {
        "Ref": row.ref, "Clause": row.clause,
        "Draft position": row.draft_excerpt.marked() if marked else row.draft_position,
        "House position": row.house_excerpt.marked() if marked else row.house_position,
        _DRAFT_WORDS_COLUMN: row.draft_words, _HOUSE_WORDS_COLUMN: row.house_words,
        "Severity": str(row.severity),
        _FREQUENCY_COLUMN: row.frequency or "", "Decision": row.decision, "Note": row.note,
    }
    return [values[c] for c in columns]


def _first_term_row(rows: Sequence[IssueRow]) -> int | None:
    return next((i for i, r in enumerate(rows) if r.category == "term"), None)


def _table_notes(review: Review, rows: Sequence[IssueRow]) -> list[str]:
    """The notes under the table (.docx and HTML): what the positions quote, the "how
    common" figures (explained once, with the first row's), the renamed-terms group and what
    was left out."""
    notes = [f"Positions quote the sentence of each side's provision that holds the change (at "
             f"most {POSITION_MAX_WORDS} words; \u201c{_ELLIPSIS}\u201d marks a cut); the changed "
             "words are in bold. An added or removed provision is quoted from its start."]
    by_id = {d.id: d for d in review.deviations}
    freq = next((by_id[r.ref].frequency for r in rows
                 if r.ref in by_id and by_id[r.ref].frequency is not None), None)
    if freq is not None:
        total = max(d.frequency.total for d in review.deviations if d.frequency is not None)
        x, y = freq.matching, freq.same_type
        notes.append(
            f"How common in the precedent set: \u201c{x} of {y}\u201d means that {x} of the {y} "
            f"agreements of the precedent set that have a clause of this type take the draft's "
            f"position; the set holds {total} agreements. \u201cnone\u201d: no agreement of the set "
            "has such a clause. A word after the figure (preferred, acceptable, fallback, not "
            "acceptable) is the label the firm gave that wording.")
    if _first_term_row(rows) is not None:
        notes.append("The last rows are renamed defined terms, for information: the draft calls "
                     "a defined term differently, and the comparison reads both names as one term.")
    left = _left_out(review, rows)
    if left:
        notes.append(f"Left out: {left} difference{'s' if left != 1 else ''} of formatting, "
                     "numbering or punctuation only (an export with all differences lists them).")
    return notes


def issues_list_csv(review: Review, decisions: Sequence[Decision] = (), *,
                    include: Iterable[str] = ISSUES_DEFAULT_INCLUDE) -> str:
    """CSV (RFC 4180 quoting by the csv module): the caution on the first line, then the
    header (:data:`ISSUE_CSV_COLUMNS`, without the frequency column when no precedent set
    was used) and one row per issue.  The caution is its own single-cell row so a
    spreadsheet shows it above the table and ``csv.reader`` reads it back as one field.
    The positions mark the changed words with :data:`CSV_MARK_OPEN` / :data:`CSV_MARK_CLOSE`;
    the exact changed words have columns of their own."""
    rows = issue_rows(review, decisions, include=include)
    cols = _columns(rows, ISSUE_CSV_COLUMNS)
    buf = io.StringIO()
    writer = csv.writer(buf, lineterminator="\r\n")
    writer.writerow([CAUTION])
    writer.writerow(cols)
    for r in rows:
        writer.writerow(_cells(r, cols, marked=True))
    return buf.getvalue()


#: Relative column widths of the issues-list table, in centimetres of the landscape A4 text
#: width (24.7 cm; scaled exactly to it).  The narrow columns hold their longest word on one
#: line at 9 pt in a wide serif (DejaVu Serif, LibreOffice's stand-in when Liberation Serif is
#: missing; measured in LibreOffice's PDF of the table with pdftotext -bbox: bold "Severity"
#: 1.44 cm, "Decision" 1.53 cm, "precedent" 1.78 cm, plain "undecided" 1.67 cm, "v122"
#: 0.78 cm) plus the cell margins (2 x 0.19 cm) and some slack; the two positions get most
#: of the room.  Without the frequency column the others share its width.
ISSUE_WIDTHS_CM = {"Ref": 1.4, "Clause": 3.3, "Draft position": 5.6, "House position": 5.6,
                   "Severity": 2.0, _FREQUENCY_COLUMN: 2.2, "Decision": 2.2, "Note": 2.4}

#: The page's palette (ours): ink, secondary text, rules, header fill, the fill of the
#: renamed-terms group and the wash behind the changed words.  Black-on-pale throughout so a
#: greyscale print stays legible; the changed words are bold as well as washed.
_PALETTE = {"ink": "#1e2b29", "muted": "#56625f", "rule": "#8a9a95", "head": "#dde6e2",
            "group": "#f3f5f4", "mark": "#f3e4c0"}

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
strong {{ background: {mark}; }}
tbody.terms tr:first-child td {{ border-top: 2px solid {ink}; }}
tbody.terms td {{ background: {group}; }}
thead {{ display: table-header-group; }}
tr {{ break-inside: avoid; page-break-inside: avoid; }}
p.note {{ font-size: 0.85em; color: {muted}; margin: 0.4em 0; }}
@page {{ size: A4 landscape; margin: 12mm; }}
@media print {{ body {{ margin: 0; }} th, td, strong {{ -webkit-print-color-adjust: exact; print-color-adjust: exact; }} }}
""".format(**_PALETTE)


def _html_excerpt(excerpt: Excerpt) -> str:
    return "".join(f"<strong>{html.escape(t)}</strong>" if m else html.escape(t)
                   for t, m in excerpt.pieces())


def issues_list_html(review: Review, decisions: Sequence[Decision] = (), *,
                     date: _dt.datetime | None = None,
                     include: Iterable[str] = ISSUES_DEFAULT_INCLUDE) -> str:
    """A self-contained printable HTML page: no external resources, print CSS inline (A4
    landscape, the header row repeated on each page, no row split), the caution under the
    title, the changed words of each position in bold."""
    rows = issue_rows(review, decisions, include=include)
    cols = _columns(rows)
    e = html.escape
    title = f"Issues list: {Path(review.draft.source).name} against {Path(review.precedent.source).name}"
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
        for c, v in zip(cols, _cells(r, cols)):
            if c == "Draft position":
                cells.append(f"<td>{_html_excerpt(r.draft_excerpt)}</td>")
            elif c == "House position":
                cells.append(f"<td>{_html_excerpt(r.house_excerpt)}</td>")
            else:
                cls = ' class="num"' if c == "Severity" else ""
                cells.append(f"<td{cls}>{e(v)}</td>")
        out.append('<tr valign="top">' + "".join(cells) + "</tr>")
    out.append("</tbody></table>")
    if rows:
        out.extend(f'<p class="note">{e(n)}</p>' for n in _table_notes(review, rows))
    else:
        out.append("<p>No substantive deviation was found.</p>")
    out.append("</body></html>")
    return "\n".join(out) + "\n"


def _docx_excerpt(excerpt: Excerpt):
    from ..docx.writer import Run

    return tuple(Run(t, bold=m) for t, m in excerpt.pieces())


def issues_list_docx(review: Review, decisions: Sequence[Decision] = (), *, author: str,
                     date: _dt.datetime | None = None,
                     include: Iterable[str] = ISSUES_DEFAULT_INCLUDE) -> bytes:
    """The issues list as a Word table (ECMA-376 Part 1 §17.4) on landscape A4 pages: the
    full text width, fixed column widths, the header row repeated on each page, no row split
    across pages; the changed words of each position in bold; notes under the table."""
    from ..docx.revisions import RevisionStamp
    from ..docx.writer import Para, Run, Table, build_docx

    rows = issue_rows(review, decisions, include=include)
    cols = _columns(rows)
    stamp = RevisionStamp(author=author, date=stamp_date(date))
    title = f"Issues list: {Path(review.draft.source).name} against {Path(review.precedent.source).name}"

    def cells(r: IssueRow) -> tuple:
        out = []
        for c, v in zip(cols, _cells(r, cols)):
            if c == "Draft position":
                out.append(_docx_excerpt(r.draft_excerpt))
            elif c == "House position":
                out.append(_docx_excerpt(r.house_excerpt))
            else:
                out.append(v)
        return tuple(out)

    body: list = [
        Para((Run(title),), style="Title"),
        Para((Run(f"Written by Counterdraft {__version__} on {stamp.date[:10]}."),)),
        Para((Run(CAUTION),), style="Caution"),
        Table(tuple(cols), tuple(cells(r) for r in rows),
              widths=tuple(ISSUE_WIDTHS_CM[c] for c in cols), divider_before=_first_term_row(rows)),
    ]
    if rows:
        body.extend(Para((Run(n),), style="TableNote") for n in _table_notes(review, rows))
    else:
        body.append(Para((Run("No substantive deviation was found."),)))
    return build_docx(body, stamp=stamp, title=title, properties={CAUTION_PROPERTY: CAUTION},
                      landscape=True)


def write_issues_list(review: Review, out: str | os.PathLike[str], *,
                      decisions: Sequence[Decision] = (), author: str | None = None,
                      date: _dt.datetime | None = None, inputs: Sequence[str] = (),
                      include: Iterable[str] = ISSUES_DEFAULT_INCLUDE) -> None:
    """Write the issues list as .docx, .html or .csv (by the suffix of *out*), atomically.
    *include* names the deviation categories listed (:data:`ISSUES_DEFAULT_INCLUDE`; pass
    :data:`core.model.CATEGORIES` for every difference); decided deviations are always listed."""
    include = tuple(_included(include))
    path = check_output(out, (".docx", ".html", ".htm", ".csv"),
                         [review.draft.source, review.precedent.source, *inputs])
    suffix = path.suffix.lower()
    if suffix == ".csv":
        # A byte-order mark first: spreadsheet programs then read the file as UTF-8 rather
        # than a legacy code page, so curly quotes and ellipses survive (common practice, no
        # source).  Python reads it back with encoding="utf-8-sig".
        atomic_write_bytes(path, issues_list_csv(review, decisions, include=include).encode("utf-8-sig"))
    elif suffix in (".html", ".htm"):
        atomic_write_text(path, issues_list_html(review, decisions, date=date, include=include))
    else:
        atomic_write_bytes(path, issues_list_docx(review, decisions, author=author or default_author(),
                                                  date=date, include=include))
