"""Train the shipped default line model (resources/layout_model.npz) on open texts.

Texts: licence and EULA texts of the PyPI package ``licensedcode-data`` (the ScanCode licence
database), the keys chosen by :func:`tests.support.layout_corpus.training_keys` (no family of a
test document; the keys are stored in the model's ``trained_on``), each written to .docx with
real Word auto-numbering (:func:`tests.support.licence_docx.licence_docx`) and read back with
the .docx reader, whose provisions give the answers.  Each document gives two kinds of
training lines:

* laid out in three simulated house styles (:func:`core.layout.simulate.training_examples`),
  the same way a precedent set's model is trained;
* printed to PDF by LibreOffice headless in two of four house styles
  (:data:`HOUSE_STYLES`, applied by :func:`tests.support.licence_docx.house_style`), read by
  the PDF reader and given the answers of the paragraphs they fall in
  (:func:`tests.support.line_answers.line_answers`): real printed pages.

Deterministic: the same package versions give the same model.

    PYTHONPATH=. .venv/bin/python scripts/train_layout_model.py [--out PATH] [--documents DIR]
"""

from __future__ import annotations

import argparse
import hashlib
import os
import pickle
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from core.layout.cleanup import drop_running  # noqa: E402
from core.layout.labeller import train_labeller  # noqa: E402
from core.layout.simulate import training_examples  # noqa: E402
from core.layout.store import DEFAULT_MODEL_PATH, save_labeller  # noqa: E402
from core.readers import read_document  # noqa: E402
from core.readers.pdf import pdf_lines  # noqa: E402
from tests.support.layout_corpus import training_keys  # noqa: E402
from tests.support.libreoffice import SOFFICE_TIMEOUT_S, find_soffice  # noqa: E402
from tests.support.licence_docx import house_style, licence_docx  # noqa: E402
from tests.support.line_answers import MIN_ALIGNED, line_answers  # noqa: E402

#: The house styles the training documents are printed in (keyword arguments of
#: house_style): the composer's own (space after paragraphs), none between paragraphs with a
#: running header and a page-numbered footer, justified sans-serif without space, and a
#: condensed face with a little space and a footer.
HOUSE_STYLES: tuple[dict, ...] = (
    {},
    {"spacing_after": 0, "header": "Licence terms", "footer": "Confidential", "page_numbers": True},
    {"spacing_after": 0, "font": "DejaVu Sans", "size": 20, "justify": True},
    {"spacing_after": 120, "font": "DejaVu Serif Condensed", "size": 24, "justify": True,
     "footer": "Page", "page_numbers": True},
)
#: Each document is printed in this many of the styles (turn by turn).
PRINTS_PER_DOCUMENT = 2


def _print_all(folder: Path) -> None:
    """Convert every .docx in *folder* to PDF with one LibreOffice run (own profile)."""
    todo = [p for p in sorted(folder.glob("*.docx")) if not p.with_suffix(".pdf").exists()]
    if not todo:
        return
    with tempfile.TemporaryDirectory() as profile:
        env = {k: v for k, v in os.environ.items() if k != "DISPLAY"}
        subprocess.run([find_soffice(), f"-env:UserInstallation=file://{profile}", "--headless",
                        "--norestore", "--convert-to", "pdf", "--outdir", str(folder),
                        *[str(p) for p in todo]], capture_output=True, timeout=SOFFICE_TIMEOUT_S * 4,
                       env=env, check=False)


def _printed_lines(pdf: Path) -> tuple:
    """The PDF's lines without running headers and footers (kept beside it for a next run:
    reading the PDFs is most of the script's time)."""
    cache = pdf.with_suffix(".lines.pickle")
    if cache.exists() and cache.stat().st_mtime >= pdf.stat().st_mtime:
        with open(cache, "rb") as fh:
            return pickle.load(fh)
    lines, _ = pdf_lines(str(pdf))
    lines, _ = drop_running(lines)
    with open(cache, "wb") as fh:
        pickle.dump(lines, fh)
    return lines


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--out", default=str(DEFAULT_MODEL_PATH))
    parser.add_argument("--documents", metavar="DIR",
                        help="keep the training .docx and .pdf files here and reuse them")
    args = parser.parse_args()
    started = time.perf_counter()
    keys = training_keys()
    examples = []
    printed = skipped = 0
    with tempfile.TemporaryDirectory() as work:
        root = Path(args.documents or work)
        styled = [root / f"style{k}" for k in range(len(HOUSE_STYLES))]
        for folder in (root, *styled):
            folder.mkdir(parents=True, exist_ok=True)
        for i, key in enumerate(keys):
            path = root / f"{key}.docx"
            if not path.exists():
                path.write_bytes(licence_docx(key))
            doc = read_document(str(path))
            seed = int(hashlib.sha256(key.encode()).hexdigest()[:8], 16)
            examples.extend(training_examples(doc, seed=seed))
            for k in range(PRINTS_PER_DOCUMENT):
                s = (i + k * 2) % len(HOUSE_STYLES)
                target = styled[s] / f"{key}.docx"
                if not target.exists():
                    target.write_bytes(house_style(path.read_bytes(), **HOUSE_STYLES[s]))
        print(f"laid out in {time.perf_counter() - started:.1f} s")
        for folder in styled:
            _print_all(folder)
        for folder in styled:
            for pdf in sorted(folder.glob("*.pdf")):
                doc = read_document(str(pdf.with_suffix(".docx")))
                lines = _printed_lines(pdf)
                answers, share = line_answers(lines, doc)
                if share < MIN_ALIGNED:
                    skipped += 1
                    continue
                examples.append((lines, answers))
                printed += 1
    print(f"printed and read in {time.perf_counter() - started:.1f} s ({printed} PDFs, {skipped} not aligned)")
    described = ("licensedcode-data licence texts written to .docx (laid out in simulated house "
                 "styles and printed to PDF by LibreOffice): " + ", ".join(keys))
    model = train_labeller(examples, trained_on=described, documents=len(keys))
    save_labeller(model, args.out)
    print(f"trained on {len(keys)} documents, {model.lines} lines, in "
          f"{time.perf_counter() - started:.1f} s -> {args.out}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
