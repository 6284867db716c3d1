"""Structure recovered from PDF, .odt and plain-text drafts, against the .docx reading.

Texts: licence and EULA texts of the PyPI package ``licensedcode-data``, written to .docx with
real auto-numbering in two house styles and converted to PDF and .odt by LibreOffice headless
(``tests/support/printed.py``).  Three sets (``tests/support/layout_corpus.py``), none trained
on: ``test`` (the texts the tests use), ``fresh`` (a held-out set scored once during
development) and ``held-out`` (scored only for the final figures).
For each document prints the share of provisions (number, heading, level, words) the PDF
and the .odt reading recover, and, on the PDF's text layer as plain text, the share the
fixed rules (core.text_reader) and the line model recover; then the totals.  Also prints the
time to read each PDF.

    PYTHONPATH=. python benchmarks/accuracy_layout.py [--set test|fresh] [--keep DIR]
"""

from __future__ import annotations

import argparse
import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from core.layout.assemble import blocks_from_lines, lines_as_text
from core.layout.cleanup import drop_running
from core.layout.lines import lines_from_text
from core.readers import document_from_blocks, read_document, read_text
from core.readers.pdf import pdf_lines
from tests.support.layout_corpus import TEST_KEYS, fresh_keys, held_out_keys
from tests.support.printed import STYLES, print_licences
from tests.support.structure_match import match_provisions


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--set", choices=("test", "fresh", "held-out"), default="test")
    ap.add_argument("--keep", help="folder for the printed files (reused when present)")
    args = ap.parse_args()
    keys = {"test": TEST_KEYS, "fresh": fresh_keys(), "held-out": held_out_keys()}[args.set]
    totals = {name: [0, 0] for name in ("pdf", "odt", "rules", "model")}
    seconds = 0.0
    pages = 0
    with tempfile.TemporaryDirectory() as work:
        root = Path(args.keep or work)
        print(f"{'document':34} {'style':7} {'PDF':>7} {'.odt':>7} {'rules':>7} {'model':>7}")
        for style in STYLES:
            for key, docx in print_licences(root / style, keys, style=style).items():
                reference = read_document(str(docx))
                started = time.perf_counter()
                pdf = read_document(str(docx.with_suffix(".pdf")))
                seconds += time.perf_counter() - started
                lines, _ = pdf_lines(str(docx.with_suffix(".pdf")))
                pages += len({ln.page for ln in lines})
                text = lines_as_text(drop_running(lines)[0])
                blocks, _ = blocks_from_lines(lines_from_text(text))
                scores = {
                    "pdf": match_provisions(reference, pdf),
                    "odt": match_provisions(reference, read_document(str(docx.with_suffix(".odt")))),
                    "rules": match_provisions(reference, read_text(text, source="plain.txt")),
                    "model": match_provisions(reference, document_from_blocks(blocks, source="plain.txt")),
                }
                for name, m in scores.items():
                    totals[name][0] += m.matched
                    totals[name][1] += m.total
                print(f"{key:34} {style:7} " + " ".join(f"{scores[n].share:7.3f}" for n in totals))
    print("total" + " " * 37 + " ".join(f"{m / t:7.4f}" for m, t in totals.values()))
    for name, (m, t) in totals.items():
        print(f"  {name:5}: {m}/{t} provisions")
    print(f"PDF reading: {seconds:.1f} s for {pages} pages ({seconds / max(pages, 1):.2f} s a page)")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
