"""Train the shipped default line model (resources/layout_model.json) on open texts.

Texts: licence and EULA texts of the PyPI package ``licensedcode-data`` (the ScanCode licence
database), the keys chosen by :func:`tests.support.layout_corpus.training_keys` (no family of a
test document), each written to .docx with real Word auto-numbering
(:func:`tests.support.licence_docx.licence_docx`), read back with the .docx reader (whose
provisions give the answers) and laid out in three house styles
(:func:`core.layout.simulate.training_examples`).  Deterministic: the same package version
gives the same model.

    PYTHONPATH=. .venv/bin/python scripts/train_layout_model.py [--out PATH]
"""

from __future__ import annotations

import argparse
import hashlib
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from core.layout.labeller import train_labeller  # noqa: E402
from core.layout.simulate import training_examples  # noqa: E402
from core.layout.store import DEFAULT_MODEL_PATH, save_labeller  # noqa: E402
from core.readers import read_document  # noqa: E402
from tests.support.layout_corpus import training_keys  # noqa: E402
from tests.support.licence_docx import licence_docx  # noqa: E402


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--out", default=str(DEFAULT_MODEL_PATH))
    parser.add_argument("--documents", metavar="DIR",
                        help="keep the training .docx files here and reuse them (for repeated runs)")
    args = parser.parse_args()
    started = time.perf_counter()
    keys = training_keys()
    examples = []
    with tempfile.TemporaryDirectory() as work:
        folder = Path(args.documents or work)
        folder.mkdir(parents=True, exist_ok=True)
        for key in keys:
            path = folder / f"{key}.docx"
            if not path.exists():
                path.write_bytes(licence_docx(key))
            doc = read_document(str(path))
            seed = int(hashlib.sha256(key.encode()).hexdigest()[:8], 16)
            examples.extend(training_examples(doc, seed=seed))
    print(f"laid out in {time.perf_counter() - started:.1f} s")
    described = ("licensedcode-data licence texts written to .docx: " + ", ".join(keys))
    model = train_labeller(examples, trained_on=described, documents=len(keys))
    save_labeller(model, args.out)
    print(f"trained on {len(keys)} documents, {model.lines} lines, in "
          f"{time.perf_counter() - started:.1f} s -> {args.out}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
