"""Negotiation patterns: what counterparties usually change in the house precedent.

Every agreement of the precedent set is reviewed against the house precedent with the same
engine (:func:`core.review.run_review`, with the library's clause typing and vocabulary), and
its substantive deviations are counted per clause type and per *move*:

* a figure changed, with its direction: "amount raised", "percentage lowered", "period
  longer", "period shorter", "figure raised" (figures found by the review engine's
  ``find_quantities``; the first figure of each kind that differs decides);
* "obligation weakened" / "obligation strengthened", "negation added" / "negation removed",
  "qualifier added" / "qualifier removed" / "qualifier changed" (from the engine's reasons);
* otherwise by the kind of change: "provision added", "provision removed", "words added",
  "words removed", "wording changed".

Each agreement counts once per move.  A move's examples quote up to ``MAX_EXAMPLES``
distinct wordings ("100% -> 200%" for figures).  Output for the terminal is
:func:`format_patterns`, e.g. ``Limitation of liability: percentage raised  7 of 24``.

Cost: one read and one review per agreement (spread over ``workers`` processes).
"""

from __future__ import annotations

import multiprocessing
from collections import defaultdict
from collections.abc import Callable, Sequence
from concurrent.futures import ProcessPoolExecutor
from dataclasses import dataclass
from typing import Any

from ..errors import CounterdraftError
from ..model import Deviation, Document
from .clausetypes import load_taxonomy
from .index import POOL_MIN_FILES, Library, _cancelled

__all__ = [
    "MAX_EXAMPLES",
    "PatternGroup",
    "PatternMove",
    "format_patterns",
    "negotiation_patterns",
    "patterns_to_dict",
]

#: Distinct examples kept per move: a few show the move's range; more repeat it (a product
#: choice, no source).
MAX_EXAMPLES = 3


@dataclass(frozen=True, slots=True)
class PatternMove:
    description: str  # e.g. "percentage raised"
    count: int  # agreements making the move
    total: int  # agreements reviewed
    examples: tuple[str, ...] = ()


@dataclass(frozen=True, slots=True)
class PatternGroup:
    clause_type: str
    title: str
    agreements: int  # agreements reviewed that have a provision of this type
    moves: tuple[PatternMove, ...]


_REASON_MOVES = (
    ("obligation weakened", "obligation weakened"),
    ("obligation strengthened", "obligation strengthened"),
    ("negation added", "negation added"),
    ("negation removed", "negation removed"),
    ("qualifier added", "qualifier added"),
    ("qualifier removed", "qualifier removed"),
    ("qualifier changed", "qualifier changed"),
)
_KIND_NOUN = {"amount": "amount", "percentage": "percentage", "duration": "period", "number": "figure"}


def _short(text: str, limit: int = 80) -> str:
    t = " ".join(text.split())
    return t if len(t) <= limit else t[:limit - 1].rstrip() + "\u2026"


def _fills_a_blank(dev: Deviation) -> bool:
    """A blank of the form ("[CUSTOMER NAME]") filled in: every signed copy differs from the
    precedent there, so it is no negotiation move (common practice, no source).  The review
    engine files it under ``completion``, or, when figures fill it (made substantive by the
    figures guard), keeps the reason :data:`core.review.classify.BLANK_FILLED` among its
    reasons."""
    from ..review.classify import BLANK_FILLED

    return dev.category == "completion" or any(r.startswith(BLANK_FILLED) for r in dev.reasons)


def _moves_of(dev: Deviation) -> list[tuple[str, str]]:
    """(move description, example) of one substantive deviation."""
    if dev.change == "add-provision":
        return [("provision added", _short(dev.draft_text))]
    if dev.change == "remove-provision":
        return [("provision removed", _short(dev.precedent_text))]
    from ..review.severity import find_quantities

    old = find_quantities(dev.precedent_text)
    new = find_quantities(dev.draft_text)
    for kind in ("amount", "percentage", "duration", "number"):
        a = [q for q in old if q.kind == kind]
        b = [q for q in new if q.kind == kind]
        for qa, qb in zip(a, b):
            if qa.value != qb.value and qa.unit == qb.unit:
                if kind == "duration":
                    word = "longer" if qb.value > qa.value else "shorter"
                else:
                    word = "raised" if qb.value > qa.value else "lowered"
                return [(f"{_KIND_NOUN[kind]} {word}", f"{qa.display()} \u2192 {qb.display()}")]
    for reason in dev.reasons:
        low = reason.lower()
        for prefix, move in _REASON_MOVES:
            if low.startswith(prefix):
                return [(move, _short(dev.draft_text or dev.precedent_text))]
    what = {"insert": "words added", "delete": "words removed"}.get(dev.change, "wording changed")
    return [(what, _short(dev.draft_text if dev.change != "delete" else dev.precedent_text))]


@dataclass(frozen=True, slots=True)
class _DocResult:
    path: str
    ok: bool
    types: tuple[str, ...]  # clause types present in the agreement
    moves: tuple[tuple[str, str, str], ...]  # (clause type, move, example)


_WORKER: dict[str, Any] = {}


def _init_worker(address: str, root: str | None, precedent: Document) -> None:
    from .index import Library

    _WORKER["library"] = Library(address, root=root)
    _WORKER["precedent"] = precedent


def _review_one(path: str) -> _DocResult:
    return _review_with(_WORKER["library"], _WORKER["precedent"], path)


def _review_with(library: Library, precedent: Document, rel: str) -> _DocResult:
    from ..readers import read_document
    from ..review import run_review
    from .frequency import clause_type_function

    try:
        with library.agreement_file(rel) as path:
            doc = read_document(path)
    except CounterdraftError:
        return _DocResult(rel, False, (), ())
    typer = clause_type_function(library)
    review = run_review(doc, precedent, vocabulary=library.vocabulary, clause_type=typer)
    present = {t for t in (typer(p, doc) for p in doc.provisions) if t}
    moves: list[tuple[str, str, str]] = []
    prec = {p.id: p for p in precedent.provisions}
    draft = {p.id: p for p in doc.provisions}
    for dev in review.deviations:
        if dev.category != "substantive" or _fills_a_blank(dev):
            continue
        ctype = None
        if dev.precedent_provision is not None:
            ctype = typer(prec[dev.precedent_provision], precedent)
        if ctype is None and dev.draft_provision is not None:
            ctype = typer(draft[dev.draft_provision], doc)
        if ctype is None:
            continue
        for move, example in _moves_of(dev):
            moves.append((ctype, move, example))
    return _DocResult(rel, True, tuple(sorted(present)), tuple(moves))


def negotiation_patterns(library: Library, precedent: Document, *,
                         progress: Callable[[int, int], None] | None = None,
                         cancel: Callable[[], bool] | Any | None = None,
                         workers: int = 1, skip: Sequence[str] = ()) -> tuple[PatternGroup, ...]:
    """Review every agreement of *library* against *precedent* and aggregate the moves per
    clause type (module docstring).  *skip* lists document paths (relative to the library's
    root) not to review, e.g. the precedent itself when it lies in the library.  Groups come
    most-negotiated first; moves by count, then description."""
    paths = [p for p in library.paths() if p not in set(skip)]
    results: list[_DocResult] = []
    total = len(paths)
    if workers > 1 and total >= POOL_MIN_FILES:
        ctx = multiprocessing.get_context("spawn")
        with ProcessPoolExecutor(max_workers=workers, mp_context=ctx, initializer=_init_worker,
                                 initargs=(library.address, None if library.root is None else str(library.root),
                                           precedent)) as pool:
            for i, res in enumerate(pool.map(_review_one, paths, chunksize=2), 1):
                results.append(res)
                if progress is not None:
                    progress(i, total)
                if _cancelled(cancel):
                    pool.shutdown(wait=True, cancel_futures=True)
                    break
    else:
        for i, rel in enumerate(paths, 1):
            if _cancelled(cancel):
                break
            results.append(_review_with(library, precedent, rel))
            if progress is not None:
                progress(i, total)
    return _aggregate(results)


def _aggregate(results: Sequence[_DocResult]) -> tuple[PatternGroup, ...]:
    tax = load_taxonomy()
    reviewed = [r for r in results if r.ok]
    n = len(reviewed)
    with_type: dict[str, int] = defaultdict(int)
    docs_moving: dict[tuple[str, str], set[str]] = defaultdict(set)
    examples: dict[tuple[str, str], list[str]] = defaultdict(list)
    for r in reviewed:
        for t in r.types:
            with_type[t] += 1
        for ctype, move, example in r.moves:
            key = (ctype, move)
            docs_moving[key].add(r.path)
            if example and example not in examples[key] and len(examples[key]) < MAX_EXAMPLES:
                examples[key].append(example)
    groups: dict[str, list[PatternMove]] = defaultdict(list)
    for (ctype, move), docs in docs_moving.items():
        groups[ctype].append(PatternMove(move, len(docs), n, tuple(examples[(ctype, move)])))
    out = []
    for ctype, moves in groups.items():
        moves.sort(key=lambda m: (-m.count, m.description))
        out.append(PatternGroup(ctype, tax.label(ctype), with_type.get(ctype, 0), tuple(moves)))
    order = {t: i for i, t in enumerate(tax.ids)}
    out.sort(key=lambda g: (-max(m.count for m in g.moves), order.get(g.clause_type, 99), g.clause_type))
    return tuple(out)


def patterns_to_dict(groups: Sequence[PatternGroup], *, total: int) -> dict[str, Any]:
    """JSON object ``counterdraft.patterns/1``."""
    return {"schema": "counterdraft.patterns/1", "total": total, "clause_types": [
        {"clause_type": g.clause_type, "title": g.title, "agreements": g.agreements,
         "moves": [{"description": m.description, "count": m.count, "total": m.total,
                    "examples": list(m.examples)} for m in g.moves]} for g in groups]}


def format_patterns(groups: Sequence[PatternGroup], *, total: int, width: int = 100) -> str:
    """The patterns as text lines that fit *width* columns."""
    if not groups:
        return f"No substantive departures from the precedent in the {total} agreements reviewed."
    lines = [f"Departures from the precedent in {total} past agreement{'s' * (total != 1)}:"]
    for g in groups:
        lines.append("")
        lines.append(f"{g.title} ({g.agreements} of {total} agreements have one)")
        for m in g.moves:
            head = f"  {m.description}: {m.count} of {m.total}"
            if m.examples:
                ex = "; ".join(m.examples)
                room = width - len(head) - 4
                if room > 10:
                    head += f"  ({ex if len(ex) <= room else ex[:room - 1] + chr(0x2026)})"
            lines.append(head[:width])
    return "\n".join(lines)
