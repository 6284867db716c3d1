"""Benchmark: the speed and memory ratios of start-up, hostile inputs, size, the precedent set
and the window, measured side by side in one run.

    python benchmarks/bench_ratios.py [--quick] [--slow] [--skip PART ...] [--json OUT]
                                      [--before JSON]

Every figure is printed with its target and PASS or MISS.  Whole-process figures run
``python -m core.cli ...`` in a fresh interpreter (start-up, imports and reading the files
included), the best of a few runs; their peak memory is the child's peak resident set size
(``os.wait4``).  Each review process gets an empty parsed-document cache of its own
(``COUNTERDRAFT_CACHE_DIR``), so it reads and parses both files -- the cost of a first look
at a draft; the same review with the cache filled by an earlier run is printed beside it.
Child processes run as an installed program does: compiled modules are cached
(``PYTHONDONTWRITEBYTECODE`` is unset for them), and nothing is written to the user's own
cache folder.

Parts (``--skip`` takes their names):

* ``startup``: a 3-page review against ``python -c "import docx"`` (the unavoidable cost of
  reading .docx): at most 2.5 times;
* ``hostile``: a fully rewritten 10,000-word provision, and two unrelated agreements of the
  same kind, each against the same-size pair with ordinary edits: at most 2 times (whole
  process, and the engine alone in this process);
* ``size``: 25-, 100- and 500-page reviews: growth exponent between 100 and 500 pages at most
  1.1 (``log(t500 / t100) / log 5``; 1.0 is linear), peak memory at 500 pages at most 300 MB,
  and the 100-page review at most a quarter of the time of the standard library's word-level
  ``difflib.SequenceMatcher`` on the same plain texts (one paragraph per line);
* ``library``: a precedent set of 1,000 generated ~10-page agreements (10,000 with
  ``--slow``; ``benchmarks/bench_library.py`` measures it): no-change rebuild <= 1 % and a
  one-file rebuild <= 2 % of the first build, ``review --library`` <= 1.3 x ``review``, index
  size and peak memory per 1,000 agreements;
* ``window``: the window's first review of the demo (``benchmarks/bench_gui.py``) against its
  target.

``--quick`` takes fewer repeats and skips the 500-page review (for a smoke run).  ``--json
OUT`` writes the figures; ``--before JSON`` prints an earlier run's figures beside them
(``benchmarks/baselines/bench_ratios_before.json`` holds the run before the start-up,
bounded-diff, cache and window work, on the 2-core development machine).
"""

from __future__ import annotations

import dataclasses
import difflib
import json
import math
import os
import random
import statistics
import subprocess
import sys
import tempfile
import time
from collections.abc import Callable, Sequence
from pathlib import Path
from types import SimpleNamespace

from _corpus import AGREEMENT_LISTS, _sentence, make_agreement_paragraphs

# _measure first: importing it puts the repository root and benchmarks/ on sys.path.
from _measure import argument_parser

from core.docx.compose import ComposeParagraph, compose_docx

REPO = Path(__file__).resolve().parents[1]
#: The parsed-document cache's folder variable (core.doccache.CACHE_ENV; named here so that the
#: benchmark also runs against code that has no cache).
CACHE_ENV = "COUNTERDRAFT_CACHE_DIR"

#: Targets of the start-up and scaling issue (2-core machine).
TARGET_STARTUP_RATIO = 2.5  # 3-page review over `python -c "import docx"`
TARGET_HOSTILE_RATIO = 2.0  # rewritten or unrelated over ordinary edits, same size
TARGET_GROWTH_EXPONENT = 1.1  # between 100 and 500 pages
TARGET_PEAK_500_MB = 300.0
TARGET_DIFFLIB_RATIO = 0.25  # 100-page review over difflib's word-level diff
#: Words of the hostile provision.
PROVISION_WORDS = 10_000
#: Pages of the two unrelated agreements (and of their ordinary-edit counterpart).
UNRELATED_PAGES = 50
#: Planted edits in the ordinary-edit provision (one word replaced each).
PROVISION_EDITS = 30
SIZES = (25, 100, 500)
#: A run longer than this is not repeated (its best of several would change nothing that
#: matters, and the slow case before the bounded diff took minutes).
LONG_RUN_S = 20.0


# ------------------------------------------------------------------------------------------
# Measuring
# ------------------------------------------------------------------------------------------

@dataclasses.dataclass
class Run:
    """Wall-clock seconds, processor seconds (user + system) and peak memory of a run."""

    seconds: float
    cpu: float
    peak_mb: float


def _process(argv: Sequence[str], *, env: dict[str, str] | None = None) -> Run:
    """One fresh process: its wall-clock and processor seconds and its peak resident set
    size (``os.wait4``)."""
    start = time.perf_counter()
    proc = subprocess.Popen(list(argv), cwd=REPO, env=env, stdout=subprocess.DEVNULL,
                            stderr=subprocess.PIPE)
    _pid, status, usage = os.wait4(proc.pid, 0)
    seconds = time.perf_counter() - start
    proc.returncode = os.waitstatus_to_exitcode(status)
    err = proc.stderr.read().decode("utf-8", "replace") if proc.stderr else ""
    if proc.returncode != 0:
        raise SystemExit(f"{' '.join(argv)} failed ({proc.returncode}):\n{err[-2000:]}")
    return Run(seconds, usage.ru_utime + usage.ru_stime, usage.ru_maxrss / 1024)


def _env(cache: Path) -> dict[str, str]:
    env = dict(os.environ)
    env["PYTHONPATH"] = str(REPO)
    env[CACHE_ENV] = str(cache)
    return env


def _repeat(fn: Callable[[], Run], repeats: int) -> Run:
    """Best times (and highest peak) of up to *repeats* runs; a long run is not repeated."""
    runs = [fn()]
    while len(runs) < repeats and runs[-1].seconds < LONG_RUN_S:
        runs.append(fn())
    return Run(min(r.seconds for r in runs), min(r.cpu for r in runs), max(r.peak_mb for r in runs))


class Reviews:
    """Whole ``counterdraft review`` processes, each with an empty parsed-document cache
    (cold) or with the cache an earlier run filled (warm)."""

    def __init__(self, scratch: Path) -> None:
        self.scratch = scratch
        self.n = 0
        self.warm_cache = scratch / "warm-cache"

    def _fresh_cache(self) -> Path:
        self.n += 1
        return self.scratch / f"cache-{self.n}"

    def cold(self, draft: Path, precedent: Path, *, repeats: int) -> Run:
        argv = [sys.executable, "-m", "core.cli", "review", str(draft), "--against", str(precedent)]
        return _repeat(lambda: _process(argv, env=_env(self._fresh_cache())), repeats)

    def inspect(self, path: Path, *, repeats: int) -> Run:
        argv = [sys.executable, "-m", "core.cli", "inspect", str(path)]
        return _repeat(lambda: _process(argv, env=_env(self._fresh_cache())), repeats)

    def warm(self, draft: Path, precedent: Path, *, repeats: int) -> Run:
        argv = [sys.executable, "-m", "core.cli", "review", str(draft), "--against", str(precedent)]
        _process(argv, env=_env(self.warm_cache))  # fills the cache
        return _repeat(lambda: _process(argv, env=_env(self.warm_cache)), repeats)


def _in_process(draft: Path, precedent: Path, *, repeats: int) -> Run:
    """The engine alone (run_review on documents read beforehand), best of *repeats*."""
    from core.reader import read_document
    from core.review import clear_caches, run_review

    d, p = read_document(str(draft)), read_document(str(precedent))

    def once() -> Run:
        clear_caches()
        start, cpu = time.perf_counter(), time.process_time()
        run_review(d, p)
        return Run(time.perf_counter() - start, time.process_time() - cpu, 0.0)

    return _repeat(once, repeats)


def _put(out: dict[str, float], key: str, run: Run) -> Run:
    out[key + "_s"] = run.seconds
    out[key + "_cpu_s"] = run.cpu
    return run


def _ratio(out: dict[str, float], key: str, num: str, den: str) -> None:
    """*key* = num / den, by wall-clock time and (``key_cpu``) by processor time."""
    out[key] = out[num + "_s"] / out[den + "_s"]
    out[key + "_cpu"] = out[num + "_cpu_s"] / out[den + "_cpu_s"]


# ------------------------------------------------------------------------------------------
# Inputs
# ------------------------------------------------------------------------------------------

def _write(path: Path, paras: list[ComposeParagraph]) -> Path:
    path.write_bytes(compose_docx(paras, lists=AGREEMENT_LISTS))
    return path


#: Below this many pages the draft gets a few word edits instead of bench_review's plan (which
#: moves a section ten sections on, and a short agreement has fewer).
PLANT_MIN_PAGES = 50
#: Word edits of a short draft: (precedent words, draft words), applied to every
#: SHORT_EDIT_EVERY-th clause.
SHORT_EDITS = (("thirty (30)", "sixty (60)"), ("ten (10)", "twenty (20)"),
               ("shall provide", "may provide"), ("shall maintain", "shall not maintain"))
SHORT_EDIT_EVERY = 5


def _planted_pair(folder: Path, pages: int, seed: int = 7) -> tuple[Path, Path]:
    """A precedent of *pages* pages and a draft with ordinary edits: bench_review.plant's 30
    planted edits, a moved section and a renamed term; below PLANT_MIN_PAGES, SHORT_EDITS."""
    paras = make_agreement_paragraphs(pages=pages, seed=seed)
    if pages >= PLANT_MIN_PAGES:
        from bench_review import plant

        draft = plant(paras, seed=seed + 1).draft
    else:
        draft = []
        for i, p in enumerate(paras):
            if p.level == 1 and i % SHORT_EDIT_EVERY == 0:
                text = p.text
                for old, new in SHORT_EDITS:
                    text = text.replace(old, new)
                p = dataclasses.replace(p, text=text)
            draft.append(p)
    return (_write(folder / f"draft-{pages}p-{seed}.docx", draft),
            _write(folder / f"precedent-{pages}p-{seed}.docx", paras))


def _provision_text(seed: int, words: int = PROVISION_WORDS) -> str:
    rng = random.Random(seed)
    parts: list[str] = []
    count = 0
    while count < words:
        s = _sentence(rng)
        parts.append(s)
        count += len(s.split())
    return " ".join(parts)


def _one_provision(text: str) -> list[ComposeParagraph]:
    return [ComposeParagraph("SERVICES AGREEMENT", style="Title"),
            ComposeParagraph("Services", level=0, style="Heading 1"),
            ComposeParagraph(text, level=1)]


def _provision_pairs(folder: Path) -> dict[str, tuple[Path, Path]]:
    """The 10,000-word provision, with ordinary edits and rewritten from scratch (the same
    kind of sentences, drawn with another seed)."""
    base = _provision_text(1)
    words = base.split(" ")
    rng = random.Random(5)
    for _ in range(PROVISION_EDITS):
        i = rng.randrange(len(words))
        words[i] = rng.choice(["promptly", "not", "thirty", "may", "reasonable"])
    prec = _write(folder / "provision.docx", _one_provision(base))
    return {"edited": (_write(folder / "provision-edited.docx", _one_provision(" ".join(words))), prec),
            "rewritten": (_write(folder / "provision-rewritten.docx", _one_provision(_provision_text(2))), prec)}


def _plain_text(path: Path) -> str:
    from core.reader import read_document

    return "\n".join(b.text for b in read_document(str(path)).blocks) + "\n"


# ------------------------------------------------------------------------------------------
# Parts
# ------------------------------------------------------------------------------------------

def part_startup(work: Path, reviews: Reviews, repeats: int) -> dict[str, float]:
    out: dict[str, float] = {}
    draft, prec = _planted_pair(work, 3)
    _put(out, "import_docx", _repeat(lambda: _process([sys.executable, "-c", "import docx"]), repeats))
    _put(out, "review3", reviews.cold(draft, prec, repeats=repeats))
    _put(out, "review3_warm", reviews.warm(draft, prec, repeats=repeats))
    _put(out, "inspect3", reviews.inspect(prec, repeats=repeats))
    _ratio(out, "startup_ratio", "review3", "import_docx")
    _ratio(out, "startup_ratio_warm", "review3_warm", "import_docx")
    return out


def part_hostile(work: Path, reviews: Reviews, repeats: int) -> dict[str, float]:
    out: dict[str, float] = {}
    for name, (d, p) in _provision_pairs(work).items():
        _put(out, f"provision_{name}", reviews.cold(d, p, repeats=repeats))
        _put(out, f"provision_{name}_engine", _in_process(d, p, repeats=repeats))
    a = _write(work / "unrelated-a.docx", make_agreement_paragraphs(pages=UNRELATED_PAGES, seed=1))
    b = _write(work / "unrelated-b.docx", make_agreement_paragraphs(pages=UNRELATED_PAGES, seed=99))
    ed, ep = _planted_pair(work, UNRELATED_PAGES, seed=1)
    _put(out, "unrelated", reviews.cold(b, a, repeats=repeats))
    _put(out, "unrelated_engine", _in_process(b, a, repeats=repeats))
    _put(out, "ordinary", reviews.cold(ed, ep, repeats=repeats))
    _put(out, "ordinary_engine", _in_process(ed, ep, repeats=repeats))
    _ratio(out, "rewritten_ratio", "provision_rewritten", "provision_edited")
    _ratio(out, "rewritten_engine_ratio", "provision_rewritten_engine", "provision_edited_engine")
    _ratio(out, "unrelated_ratio", "unrelated", "ordinary")
    _ratio(out, "unrelated_engine_ratio", "unrelated_engine", "ordinary_engine")
    return out


def part_size(work: Path, reviews: Reviews, repeats: int, *, quick: bool) -> dict[str, float]:
    out: dict[str, float] = {}
    for pages in SIZES:
        if quick and pages == 500:
            continue
        d, p = _planted_pair(work, pages)
        run = _put(out, f"review{pages}", reviews.cold(d, p, repeats=2 if pages == 500 else repeats))
        out[f"review{pages}_peak_mb"] = run.peak_mb
        if pages == 100:
            _put(out, "review100_warm", reviews.warm(d, p, repeats=repeats))
            _put(out, "review100_engine", _in_process(d, p, repeats=repeats))
            aw, bw = _plain_text(p).split(), _plain_text(d).split()
            start, cpu = time.perf_counter(), time.process_time()
            difflib.SequenceMatcher(None, aw, bw).get_opcodes()
            _put(out, "difflib100", Run(time.perf_counter() - start, time.process_time() - cpu, 0.0))
            _ratio(out, "difflib_ratio", "review100", "difflib100")
    if "review500_s" in out:
        out["growth_exponent"] = math.log(out["review500_s"] / out["review100_s"]) / math.log(5)
        out["growth_exponent_cpu"] = math.log(out["review500_cpu_s"] / out["review100_cpu_s"]) / math.log(5)
    return out


def part_library(slow: bool) -> dict[str, float]:
    import bench_library as bl

    args = SimpleNamespace(documents=bl.LARGE_DOCUMENTS if slow else 1000, pages=10,
                           review_pages=100, workers=2)
    figures = bl._run(args)
    figures.update(bl._derived(figures))
    return {f"library_{k}": v for k, v in figures.items()}


def part_window(runs: int) -> dict[str, float]:
    import shutil

    import bench_gui as bg

    demo = REPO / "demo_agreements"
    with tempfile.TemporaryDirectory(prefix="cd-bench-window-") as tmp:
        shutil.copy(demo / "draft.docx", tmp)
        shutil.copy(demo / "precedent.docx", tmp)
        shutil.copytree(demo / "precedent_set", Path(tmp) / "precedent_set",
                        ignore=shutil.ignore_patterns(".counterdraft"))
        saved = os.environ.get(CACHE_ENV)
        os.environ[CACHE_ENV] = str(Path(tmp) / "cache")  # the child processes inherit it
        try:
            first = bg._run(tmp)
            warm = [bg._run(tmp) for _ in range(runs)]
        finally:
            if saved is None:
                os.environ.pop(CACHE_ENV, None)
            else:
                os.environ[CACHE_ENV] = saved
    return {"window_open_s": statistics.median([r["open"] for r in [first, *warm]]),
            "window_first_review_s": first["review"],
            "window_review_s": statistics.median([r["review"] for r in warm])}


# ------------------------------------------------------------------------------------------
# Report
# ------------------------------------------------------------------------------------------

#: (key, label, format, target or None); a row is printed when its key was measured.
ROWS: tuple[tuple[str, str, str, float | None], ...] = (
    ("import_docx_s", "python -c 'import docx'", "{:.2f} s", None),
    ("inspect3_s", "inspect, 3 pages", "{:.2f} s", None),
    ("review3_s", "review, 3 pages", "{:.2f} s", None),
    ("startup_ratio", "  / import docx", "{:.2f} x", TARGET_STARTUP_RATIO),
    ("startup_ratio_cpu", "  / import docx, processor time", "{:.2f} x", TARGET_STARTUP_RATIO),
    ("review3_warm_s", "review, 3 pages, cache filled", "{:.2f} s", None),
    ("startup_ratio_warm", "  / import docx", "{:.2f} x", TARGET_STARTUP_RATIO),
    ("startup_ratio_warm_cpu", "  / import docx, processor time", "{:.2f} x", TARGET_STARTUP_RATIO),
    ("provision_edited_s", "10,000-word provision, edited", "{:.2f} s", None),
    ("provision_rewritten_s", "  rewritten from scratch", "{:.2f} s", None),
    ("rewritten_ratio", "  rewritten / edited", "{:.2f} x", TARGET_HOSTILE_RATIO),
    ("rewritten_ratio_cpu", "  rewritten / edited, processor", "{:.2f} x", TARGET_HOSTILE_RATIO),
    ("provision_edited_engine_s", "  engine alone, edited", "{:.3f} s", None),
    ("provision_rewritten_engine_s", "  engine alone, rewritten", "{:.3f} s", None),
    ("rewritten_engine_ratio", "  engine: rewritten / edited", "{:.2f} x", TARGET_HOSTILE_RATIO),
    ("rewritten_engine_ratio_cpu", "  engine, processor time", "{:.2f} x", TARGET_HOSTILE_RATIO),
    ("ordinary_s", f"{UNRELATED_PAGES} pages, ordinary edits", "{:.2f} s", None),
    ("unrelated_s", f"{UNRELATED_PAGES} pages, unrelated agreements", "{:.2f} s", None),
    ("unrelated_ratio", "  unrelated / ordinary", "{:.2f} x", TARGET_HOSTILE_RATIO),
    ("unrelated_ratio_cpu", "  unrelated / ordinary, processor", "{:.2f} x", TARGET_HOSTILE_RATIO),
    ("ordinary_engine_s", "  engine alone, ordinary", "{:.3f} s", None),
    ("unrelated_engine_s", "  engine alone, unrelated", "{:.3f} s", None),
    ("unrelated_engine_ratio", "  engine: unrelated / ordinary", "{:.2f} x", TARGET_HOSTILE_RATIO),
    ("unrelated_engine_ratio_cpu", "  engine, processor time", "{:.2f} x", TARGET_HOSTILE_RATIO),
    ("review25_s", "review, 25 pages", "{:.2f} s", None),
    ("review100_s", "review, 100 pages", "{:.2f} s", None),
    ("review100_warm_s", "review, 100 pages, cache filled", "{:.2f} s", None),
    ("review100_engine_s", "  engine alone", "{:.2f} s", None),
    ("review500_s", "review, 500 pages", "{:.2f} s", None),
    ("growth_exponent", "  growth exponent 100 -> 500", "{:.2f}", TARGET_GROWTH_EXPONENT),
    ("growth_exponent_cpu", "  growth exponent, processor time", "{:.2f}", TARGET_GROWTH_EXPONENT),
    ("review500_peak_mb", "  peak memory at 500 pages", "{:.0f} MB", TARGET_PEAK_500_MB),
    ("difflib100_s", "difflib word diff, 100 pages", "{:.2f} s", None),
    ("difflib_ratio", "  review 100 pages / difflib", "{:.2f} x", TARGET_DIFFLIB_RATIO),
    ("difflib_ratio_cpu", "  / difflib, processor time", "{:.2f} x", TARGET_DIFFLIB_RATIO),
    ("library_documents", "precedent set: agreements", "{:,.0f}", None),
    ("library_first_build_s", "  first build", "{:.1f} s", None),
    ("library_no_change_share", "  no-change rebuild / first", "{:.2%}", 0.01),
    ("library_add_one_share", "  add one / first", "{:.2%}", 0.02),
    ("library_change_one_share", "  change one / first", "{:.2%}", 0.02),
    ("library_remove_one_share", "  remove one / first", "{:.2%}", 0.02),
    ("library_review_s", "  review (100 pages)", "{:.2f} s", None),
    ("library_review_library_s", "  review --library", "{:.2f} s", None),
    ("library_review_ratio", "  review --library / review", "{:.2f} x", 1.3),
    ("library_index_mb_per_1000", "  index per 1,000 agreements", "{:.1f} MB", 100.0),
    ("library_peak_mb_per_1000", "  peak memory per 1,000", "{:.0f} MB", 450.0),
    ("window_open_s", "window open", "{:.2f} s", 2.0),
    ("window_first_review_s", "window first review (index built)", "{:.2f} s", 4.0),
    ("window_review_s", "window first review (index ready)", "{:.2f} s", 4.0),
)


def report(now: dict[str, float], before: dict[str, float] | None) -> int:
    """Print the table; the number of targets missed."""
    missed = 0
    print(f"\n{'figure':<36}{'now':>12}{'before' if before else '':>12}  target")
    for key, label, fmt, target in ROWS:
        if key not in now:
            continue
        line = f"{label:<36}{fmt.format(now[key]):>12}"
        line += f"{fmt.format(before[key]) if before and key in before else '':>12}"
        if target is not None:
            ok = now[key] <= target
            missed += not ok
            line += f"  <= {fmt.format(target)}  {'PASS' if ok else 'MISS'}"
        print(line)
    return missed


def main(argv: list[str] | None = None) -> int:
    parser = argument_parser(__doc__)
    parser.add_argument("--quick", action="store_true", help="fewer repeats, no 500-page review")
    parser.add_argument("--slow", action="store_true", help="10,000 agreements in the precedent set")
    parser.add_argument("--skip", nargs="*", default=[],
                        choices=("startup", "hostile", "size", "library", "window"))
    parser.add_argument("--json", metavar="OUT", help="write the figures as JSON")
    parser.add_argument("--before", metavar="JSON", help="an earlier run's figures, printed beside")
    parser.add_argument("--repeats", type=int, default=None,
                        help="runs per whole-process figure (default 3, --quick 2; the best counts)")
    args = parser.parse_args(argv)
    repeats = args.repeats or (2 if args.quick else 3)
    now: dict[str, float] = {}
    os.environ.pop("PYTHONDONTWRITEBYTECODE", None)  # children cache compiled modules
    load_start = os.getloadavg()[0]
    with tempfile.TemporaryDirectory(prefix="cd-bench-ratios-") as tmp:
        work = Path(tmp)
        os.environ[CACHE_ENV] = str(work / "shared-cache")  # never the user's cache folder
        reviews = Reviews(work)
        steps: list[tuple[str, Callable[[], dict[str, float]]]] = [
            ("startup", lambda: part_startup(work, reviews, repeats + 2)),
            ("hostile", lambda: part_hostile(work, reviews, repeats)),
            ("size", lambda: part_size(work, reviews, repeats, quick=args.quick)),
            ("library", lambda: part_library(args.slow)),
            ("window", lambda: part_window(repeats)),
        ]
        for name, step in steps:
            if name in args.skip:
                continue
            start = time.perf_counter()
            print(f"measuring {name} ...", file=sys.stderr, flush=True)
            now.update(step())
            print(f"  {name}: {time.perf_counter() - start:.0f} s", file=sys.stderr, flush=True)
    now["load_start"], now["load_end"] = load_start, os.getloadavg()[0]
    print(f"\nload average (1 min) at start {load_start:.1f}, at end {now['load_end']:.1f} on "
          f"{os.cpu_count()} cores: wall-clock figures count other processes' use of the "
          "machine; processor-time figures do not")
    before = None
    if args.before:
        before = {k: v for k, v in json.loads(Path(args.before).read_text(encoding="utf-8")).items()
                  if not k.startswith("_")}
    missed = report(now, before)
    if args.json:
        Path(args.json).write_text(json.dumps(now, indent=2) + "\n", encoding="utf-8")
    print(f"\n{missed} target{'s' * (missed != 1)} missed" if missed else "\nevery target met")
    return 1 if missed else 0


if __name__ == "__main__":
    sys.exit(main())
