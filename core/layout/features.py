"""Features of a line and its neighbours, for the line labeller (:mod:`core.layout.labeller`).

Every feature is relative to the document's own measures (:func:`core.layout.lines.geometry`):
indents and gaps in body font sizes, line ends as a share of the column, font size as a ratio
to the body size.  So a model learnt on one layout (a firm's .docx agreements laid out by
:mod:`core.layout.simulate`) reads another (a PDF from another firm, a plain text).

Groups (names in :data:`FEATURE_NAMES`):

* the line itself: indentation, how full it is, length, a number label at its start and of
  what kind (dotted decimal and its depth, "(a)", "(i)", "Article", "Schedule"), a tab after
  its first word, capitals and title case, its first character, how it ends, bold, italic
  and size where fonts are known, a definition's start (``"X" means``), centring;
* the line above: its end (sentence, colon, semicolon, comma, hyphen, a word), how full it
  is, the vertical gap between the two (and whether the document leaves space between its
  paragraphs at all: then no gap means the same paragraph), a change of page, a change of indent, font or size,
  and whether this line's first word would have fitted at the end of the line above (a
  line-breaking program moves a word down only when it does not fit: a word that would have
  fitted means the line above ended its paragraph);
* the line below: its indent against this one (a hanging indent makes a paragraph's first
  line stand out), the gap to it, and whether it starts with a label or in lower case.

Plain text has no fonts: the font features are 0 and ``fonts`` says they are unknown.

Cost: O(lines) with a few regular-expression matches per line.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence

import numpy as np

from ..lazyre import compile_pattern
from ..structure import definition_start, is_title_case, parse_label
from .lines import Geometry, Line, geometry

__all__ = ["FEATURE_NAMES", "line_features"]

#: Clip ranges, in body font sizes (ems) or shares: values beyond them say nothing more.
MAX_INDENT_EM = 12.0
MAX_DELTA_EM = 6.0
MAX_GAP_PITCHES = 4.0
MAX_WORDS = 40
#: The first word "fits" on the line above when it ends within this share of an em past the
#: right edge (justified and ragged columns end a little before or after it).
FIT_TOLERANCE_EM = 0.3
#: Indents that differ by less than this many ems are the same indent.
SAME_INDENT_EM = 0.4
#: A document "leaves space between paragraphs" when at least this share of its line
#: transitions has a gap (a paragraph of under ten lines on average gives well above it).
GAPPED_SHARE = 0.08
#: A gap of more than this many line pitches beyond the usual line distance is a gap.
GAP_PITCHES = 0.3
#: Lines whose margins differ by less than this many ems, with an indent of at least
#: CENTRE_MIN_INDENT_EM, are centred.
CENTRE_BALANCE_EM = 2.0
CENTRE_MIN_INDENT_EM = 3.0

_END_CLASSES = ("period", "colon", "semicolon", "comma", "hyphen", "word", "other")
_LABEL_KINDS = ("dec1", "dec2", "dec3", "dec4", "letter", "roman", "digit", "upper", "kw", "sched")

_OWN = (
    "indent", "fill", "words", "short", "one_word", "long_line",
    *(f"label_{k}" for k in _LABEL_KINDS), "label_any", "label_paren", "label_tab",
    "starts_upper", "starts_lower", "starts_digit", "starts_quote", "starts_paren", "starts_bullet",
    "all_caps", "title_case", "has_digit",
    *(f"end_{k}" for k in _END_CLASSES), "end_and_or",
    "fonts", "bold", "all_bold", "bold_prefix", "italic", "size_up", "size_down",
    "definition", "centred", "table",
)
_PREV = (
    "first", "page_break", "gap_prev", "gap_prev_big", "no_gap", "doc_gapped",
    "prev_fill", "fits_prev", "fits_prev_end",
    *(f"prev_end_{k}" for k in _END_CLASSES), "prev_end_and_or",
    "indent_more_prev", "indent_less_prev", "indent_same_prev", "delta_prev",
    "prev_bold", "bold_change_prev", "size_change_prev", "prev_short", "prev_long", "prev_label",
    "prev_table",
    "prev_all_caps",
)
_NEXT = (
    "last", "gap_next", "gap_next_big", "delta_next", "next_more", "next_less", "next_same",
    "next_label", "next_lower", "next_table", "next_bold_change",
)
#: Products of two features that a linear model cannot form itself.
_PAIRS = (
    ("prev_end_period", "fits_prev"), ("prev_end_colon", "fits_prev"),
    ("prev_end_semicolon", "label_any"), ("prev_end_word", "label_any"),
    ("label_any", "indent_less_prev"), ("label_any", "next_more"),
    ("gap_prev_big", "label_any"), ("all_bold", "short"), ("fits_prev", "starts_upper"),
    ("prev_short", "starts_upper"), ("page_break", "starts_lower"), ("prev_end_hyphen", "starts_lower"),
    ("doc_gapped", "no_gap"), ("doc_gapped", "gap_prev_big"), ("doc_gapped", "label_any"),
    ("page_break", "label_any"), ("page_break", "fits_prev"), ("page_break", "starts_upper"),
    ("page_break", "prev_end_period"), ("label_any", "indent_same_prev"),
    ("label_any", "prev_long"), ("label_paren", "prev_end_word"), ("label_paren", "fits_prev"),
)

FEATURE_NAMES: tuple[str, ...] = (
    *_OWN, *_PREV, *_NEXT, *(f"{a}*{b}" for a, b in _PAIRS),
)
_INDEX = {name: i for i, name in enumerate(FEATURE_NAMES)}

_BULLETS = "•◦▪‣●–-*·"
_QUOTES = "\"“‘'«"
_AND_OR_RE = compile_pattern(r"[;,]\s*(?:and|or|and/or)$")


def _end_class(text: str) -> str:
    t = text.rstrip("\"”’')]")
    if not t:
        return "other"
    last = t[-1]
    if last in ".!?":
        return "period"
    if last == ":":
        return "colon"
    if last == ";":
        return "semicolon"
    if last == ",":
        return "comma"
    if last in "-\u00ad" and len(t) > 1 and t[-2].isalpha():
        return "hyphen"
    if last.isalnum():
        return "word"
    return "other"


def _label_kind(text: str) -> tuple[str | None, bool, bool]:
    """(kind, in brackets, tab after) of the number label the line starts with."""
    label = parse_label(text)
    if label is None:
        return None, False, False
    after_tab = "\t" in text[:label.end + 1]
    paren = label.text.lstrip().startswith("(")
    if label.family == "dec":
        depth = min(len(label.comps or (1,)), 4)
        return f"dec{depth}", paren, after_tab
    if label.family == "kw":
        return "kw", paren, after_tab
    if label.family == "sched":
        return "sched", paren, after_tab
    scheme = label.scheme
    if scheme.endswith("digit"):
        return "digit", paren, after_tab
    if "upper" in scheme:
        return "upper", paren, after_tab
    if scheme.endswith("roman") or (label.alt_scheme is not None and label.value and label.value > 8):
        return "roman", paren, after_tab
    return "letter", paren, after_tab


def _is_caps(text: str) -> bool:
    letters = [c for c in text if c.isalpha()]
    return len(letters) >= 2 and all(c.isupper() for c in letters)


def _own(line: Line, g: Geometry) -> dict[str, float]:
    text = line.text.strip()
    words = text.split()
    f: dict[str, float] = {}
    width = max(g.right - g.left, g.em)
    f["indent"] = min(max((line.x0 - g.left) / g.em, 0.0), MAX_INDENT_EM) / MAX_INDENT_EM
    f["fill"] = min(max((line.x1 - g.left) / width, 0.0), 1.2)
    f["words"] = min(len(words), MAX_WORDS) / MAX_WORDS
    f["short"] = float(len(words) <= 4)
    f["one_word"] = float(len(words) == 1)
    f["long_line"] = float((line.x1 - g.left) / width > 0.85)
    kind, paren, tab = _label_kind(line.text)
    for k in _LABEL_KINDS:
        f[f"label_{k}"] = float(kind == k)
    f["label_any"] = float(kind is not None)
    f["label_paren"] = float(paren)
    f["label_tab"] = float(tab)
    first = text[:1]
    f["starts_upper"] = float(first.isupper())
    f["starts_lower"] = float(first.islower())
    f["starts_digit"] = float(first.isdigit())
    f["starts_quote"] = float(first in _QUOTES)
    f["starts_paren"] = float(first in "([")
    f["starts_bullet"] = float(first in _BULLETS and text[1:2] == " ")
    f["all_caps"] = float(_is_caps(text))
    f["title_case"] = float(len(words) <= 12 and is_title_case(words))
    f["has_digit"] = float(any(c.isdigit() for c in text))
    end = _end_class(text)
    for k in _END_CLASSES:
        f[f"end_{k}"] = float(end == k)
    f["end_and_or"] = float(_AND_OR_RE.search(text) is not None)
    fonts = line.has_fonts
    f["fonts"] = float(fonts)
    bold = line.bold if line.bold is not None else 0.0
    f["bold"] = bold
    f["all_bold"] = float(fonts and bold > 0.9)
    f["bold_prefix"] = float(fonts and 0 < line.bold_prefix < len(line.text) and bold < 0.9)
    f["italic"] = line.italic or 0.0
    ratio = line.size / g.em if fonts and line.size > 0 and g.em > 0 else 1.0
    f["size_up"] = float(ratio > 1.08)
    f["size_down"] = float(ratio < 0.92)
    f["definition"] = float(definition_start(line.text) is not None)
    left_margin = line.x0 - g.left
    right_margin = g.right - line.x1
    f["centred"] = float(left_margin > CENTRE_MIN_INDENT_EM * g.em
                         and abs(left_margin - right_margin) < CENTRE_BALANCE_EM * g.em)
    f["table"] = float(line.cells is not None)
    return f


def _clip(v: float, lim: float) -> float:
    return min(max(v, -lim), lim) / lim


def _prev_features(f: dict[str, float], ln: Line, prev: Line, po: Mapping[str, float], g: Geometry, *,
                   gapped: float) -> None:
    """Set in *f* the features of line *ln* that compare it with the line before, *prev*
    (whose own features are *po*)."""
    same_page = prev.page == ln.page
    f["page_break"] = float(not same_page)
    gap = (ln.top - prev.top) / g.pitch - 1.0 if same_page else 0.0
    f["gap_prev"] = _clip(gap, MAX_GAP_PITCHES)
    f["gap_prev_big"] = float(gap > GAP_PITCHES)
    f["no_gap"] = float(same_page and gap <= GAP_PITCHES)
    f["doc_gapped"] = gapped
    f["prev_fill"] = po["fill"]
    fit_end = prev.x1 + prev.space + ln.first_word
    f["fits_prev"] = float(fit_end <= g.right + FIT_TOLERANCE_EM * g.em)
    f["fits_prev_end"] = _clip((g.right - fit_end) / g.em, MAX_DELTA_EM)
    for k in _END_CLASSES:
        f[f"prev_end_{k}"] = po[f"end_{k}"]
    f["prev_end_and_or"] = po["end_and_or"]
    delta = (ln.x0 - prev.x0) / g.em
    f["indent_more_prev"] = float(delta > SAME_INDENT_EM)
    f["indent_less_prev"] = float(delta < -SAME_INDENT_EM)
    f["indent_same_prev"] = float(abs(delta) <= SAME_INDENT_EM)
    f["delta_prev"] = _clip(delta, MAX_DELTA_EM)
    f["prev_bold"] = po["all_bold"]
    f["bold_change_prev"] = float(abs(po["bold"] - f["bold"]) > 0.5)
    f["size_change_prev"] = float(abs(prev.size - ln.size) > 0.08 * g.em) if g.fonts else 0.0
    f["prev_short"] = po["short"]
    f["prev_long"] = po["long_line"]
    f["prev_label"] = po["label_any"]
    f["prev_table"] = po["table"]
    f["prev_all_caps"] = po["all_caps"]


def _next_features(f: dict[str, float], ln: Line, nxt: Line, no: Mapping[str, float], g: Geometry) -> None:
    """Set in *f* the features of line *ln* that compare it with the line after, *nxt*
    (whose own features are *no*)."""
    same_page = nxt.page == ln.page
    gap = (nxt.top - ln.top) / g.pitch - 1.0 if same_page else 0.0
    f["gap_next"] = _clip(gap, MAX_GAP_PITCHES)
    f["gap_next_big"] = float(gap > GAP_PITCHES)
    delta = (nxt.x0 - ln.x0) / g.em
    f["delta_next"] = _clip(delta, MAX_DELTA_EM)
    f["next_more"] = float(delta > SAME_INDENT_EM)
    f["next_less"] = float(delta < -SAME_INDENT_EM)
    f["next_same"] = float(abs(delta) <= SAME_INDENT_EM)
    f["next_label"] = no["label_any"]
    f["next_lower"] = no["starts_lower"]
    f["next_table"] = no["table"]
    f["next_bold_change"] = float(abs(no["bold"] - f["bold"]) > 0.5)


def line_features(lines: Sequence[Line], g: Geometry | None = None) -> np.ndarray:
    """The feature matrix of *lines* (one row per line, columns :data:`FEATURE_NAMES`)."""
    g = g if g is not None else geometry(lines)
    own = [_own(ln, g) for ln in lines]
    n = len(lines)
    steps = [(b.top - a.top) / g.pitch - 1.0 for a, b in zip(lines, lines[1:]) if a.page == b.page]
    gapped = float(bool(steps) and sum(s > GAP_PITCHES for s in steps) >= GAPPED_SHARE * len(steps))
    X = np.zeros((n, len(FEATURE_NAMES)), dtype=np.float64)
    for i, ln in enumerate(lines):
        f = dict(own[i])
        prev = lines[i - 1] if i > 0 else None
        nxt = lines[i + 1] if i + 1 < n else None
        f["first"] = float(prev is None)
        if prev is not None:
            _prev_features(f, ln, prev, own[i - 1], g, gapped=gapped)
        f["last"] = float(nxt is None)
        if nxt is not None:
            _next_features(f, ln, nxt, own[i + 1], g)
        for a, b in _PAIRS:
            f[f"{a}*{b}"] = f.get(a, 0.0) * f.get(b, 0.0)
        row = X[i]
        for name, value in f.items():
            row[_INDEX[name]] = value
    return X
