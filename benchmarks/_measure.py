"""Measuring code shared by the benchmark scripts (one copy; the scripts import it).

Importing this module puts the repository root and ``benchmarks/`` on ``sys.path``, so a
script run as ``python benchmarks/bench_x.py`` can import ``core`` and ``_corpus``.
"""

from __future__ import annotations

import argparse
import resource
import sys
import time
import tracemalloc
from collections.abc import Callable
from pathlib import Path

__all__ = ["argument_parser", "best_of", "peak_rss_mb", "traced_peak_mb", "verdict"]

_HERE = Path(__file__).resolve().parent
for _folder in (_HERE, _HERE.parent):  # the repository root ends up first, as before
    if str(_folder) not in sys.path:
        sys.path.insert(0, str(_folder))


def argument_parser(doc: str, *, pages: int | None = None,
                    seed: int | None = None) -> argparse.ArgumentParser:
    """A parser described by the first line of *doc*, with ``--pages`` and ``--seed`` when
    their defaults are given (the script adds its own options after them)."""
    parser = argparse.ArgumentParser(description=doc.splitlines()[0])
    if pages is not None:
        parser.add_argument("--pages", type=int, default=pages)
    if seed is not None:
        parser.add_argument("--seed", type=int, default=seed)
    return parser


def best_of(fn: Callable[[], object], *, repeats: int) -> float:
    """The shortest wall-clock time of *repeats* calls of *fn*, in seconds."""
    best = float("inf")
    for _ in range(repeats):
        start = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - start)
    return best


def traced_peak_mb(fn: Callable[[], object]) -> float:
    """Peak Python allocations (tracemalloc) during one call of *fn*, in MB (2**20 bytes).
    tracemalloc sees Python's allocations only, not libxml2's (lxml's parsed trees)."""
    tracemalloc.start()
    try:
        fn()
        _, peak = tracemalloc.get_traced_memory()
    finally:
        tracemalloc.stop()
    return peak / 2**20


def peak_rss_mb() -> float:
    """This process's peak resident set size so far (``resource.getrusage``), in MB;
    ``ru_maxrss`` is in KiB on Linux."""
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024


def verdict(value: float, target: float) -> str:
    """``"ok"`` when *value* is within *target*, else ``"OVER TARGET"``."""
    return "ok" if value <= target else "OVER TARGET"
