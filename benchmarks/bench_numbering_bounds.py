"""Benchmark: hostile numbering values are refused, or labelled, quickly and in little memory.

Each case is a small .docx whose list level starts at an extreme ``w:start`` (ECMA-376 Part 1
§17.9.25); ``read_docx_blocks`` must refuse it in one line (beyond
``core.docx.numbering.MAX_LIST_START``) or label it (at the limit) well within the targets.
Before the bounds, 10^30 raised OverflowError, 10^12 MemoryError, and 2147483647 in upper
letters ran for minutes at 7.6 GB.

Targets: each case under :data:`TARGET_S` seconds and :data:`TARGET_MB` MB of Python
allocations (tracemalloc).
"""

from __future__ import annotations

import tempfile
from pathlib import Path

from _measure import argument_parser, best_of, traced_peak_mb, verdict

from core.docx.blocks import read_docx_blocks
from core.docx.numbering import MAX_LIST_START
from core.errors import CounterdraftError
from tests.support.docx_fixtures import build_docx

#: A refusal or a label costs parsing a small package: a tenth of a second on the 2-core
#: machine; a second leaves room for a loaded one.
TARGET_S = 1.0
#: A label at the limit is 1261 letters; a few MB covers python-docx-free reading of the
#: package with a wide margin.
TARGET_MB = 20.0
REPEATS = 3
#: Numbered paragraphs in each case, so a label is built many times over.
PARAGRAPHS = 200

CASES = (
    ("start 10^30, decimal", str(10**30), "decimal"),
    ("start 10^12, decimal", str(10**12), "decimal"),
    ("start 2147483647, upperLetter", "2147483647", "upperLetter"),
    (f"start {MAX_LIST_START} (the limit), upperLetter", str(MAX_LIST_START), "upperLetter"),
    (f"start {MAX_LIST_START} (the limit), chicago", str(MAX_LIST_START), "chicago"),
)


def _document(folder: Path, start: str, fmt: str) -> str:
    numbering = ('<w:abstractNum w:abstractNumId="1"><w:lvl w:ilvl="0">'
                 f'<w:start w:val="{start}"/><w:numFmt w:val="{fmt}"/><w:lvlText w:val="%1."/>'
                 '</w:lvl></w:abstractNum><w:num w:numId="1"><w:abstractNumId w:val="1"/></w:num>')
    body = ('<w:p><w:pPr><w:numPr><w:ilvl w:val="0"/><w:numId w:val="1"/></w:numPr></w:pPr>'
            "<w:r><w:t>The Supplier shall deliver the Goods.</w:t></w:r></w:p>") * PARAGRAPHS
    return build_docx(folder / f"{fmt}-{len(start)}.docx", body, numbering=numbering)


def _outcome(path: str) -> str:
    try:
        blocks, _ = read_docx_blocks(path)
    except CounterdraftError as err:
        return err.problem
    longest = max(len(b.label or "") for b in blocks)
    return f"labelled {len(blocks)} paragraphs, longest label {longest} characters"


def main() -> int:
    argument_parser(__doc__).parse_args()
    worst = 0.0
    with tempfile.TemporaryDirectory(prefix="cd-bench-bounds-") as work:
        for name, start, fmt in CASES:
            path = _document(Path(work), start, fmt)
            seconds = best_of(lambda path=path: _outcome(path), repeats=REPEATS)
            peak = traced_peak_mb(lambda path=path: _outcome(path))
            worst = max(worst, seconds)
            print(f"{name:45s} {seconds:6.3f} s {peak:6.1f} MB  "
                  f"[{verdict(seconds, TARGET_S)}/{verdict(peak, TARGET_MB)}]  {_outcome(path)}")
    print(f"slowest case: {worst:.3f} s (target {TARGET_S} s: {verdict(worst, TARGET_S)})")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
