"""Where line models live, and which one reads a document.

* The **shipped default** (``resources/layout_model.npz``) was trained by
  ``scripts/train_layout_model.py`` on open texts: licence and EULA texts of the PyPI package
  ``licensedcode-data`` (the ScanCode licence database) written to .docx with real Word
  auto-numbering, the licence keys listed in the model's ``trained_on`` field.  It serves when
  there is no precedent set.
* A **precedent set's model** (``<set>/.counterdraft/layout/model.npz``) is trained on the
  firm's own formatted agreements (.docx and .odt files of the set, whose styles and
  numbering give the answers) by :func:`refresh_set_model`, which the precedent-set build
  calls: each agreement's training lines are kept beside the model (one file per agreement,
  by its SHA-256), so a build that adds, changes or removes agreements lays out only those and
  trains again from the kept lines; a build that changes none keeps the model.

A model file that is missing, damaged or of another version is not used: the default then
serves (and without it, the fixed rules), with a note.
"""

from __future__ import annotations

import functools
import hashlib
import io
import json
import os
from collections.abc import Sequence
from pathlib import Path
from typing import Any

import numpy as np

from ..errors import CounterdraftError
from .labeller import LineLabeller, TrainingLines, labeller_from_bytes

__all__ = ["DEFAULT_MODEL_PATH", "MIN_SET_DOCUMENTS", "default_labeller", "load_labeller",
           "refresh_set_labeller", "save_labeller", "structure_for"]

DEFAULT_MODEL_PATH = Path(__file__).resolve().parents[2] / "resources" / "layout_model.npz"
#: Largest model file read: the default is about 1 MB; a set's model has the same shape.
MAX_MODEL_BYTES = 32 << 20


def load_labeller(path: str | os.PathLike[str]) -> LineLabeller | None:
    """The model stored at *path*, or None when it is missing or not usable."""
    p = Path(path)
    try:
        if p.stat().st_size > MAX_MODEL_BYTES:
            return None
        return labeller_from_bytes(p.read_bytes())
    except (OSError, ValueError, TypeError):
        return None


def save_labeller(model: LineLabeller, path: str | os.PathLike[str]) -> None:
    """Write *model* to *path* atomically."""
    from ..fileio import atomic_write_bytes

    atomic_write_bytes(str(path), model.to_bytes())


@functools.cache
def default_labeller() -> LineLabeller | None:
    """The shipped default model (read once), or None when it cannot be loaded."""
    return load_labeller(DEFAULT_MODEL_PATH)


# ----------------------------------------------------------------------------------------
# The precedent set's model
# ----------------------------------------------------------------------------------------

#: Folder of the set's model and training lines, inside the index folder (.counterdraft).
SET_DIRNAME = "layout"
SET_MODEL = "model.npz"
SET_STATE = "state.json"
#: A set with fewer formatted agreements than this gets no model of its own (the default,
#: trained on ninety documents, reads better than a model of two or three).
MIN_SET_DOCUMENTS = 5


def _set_formats() -> tuple[str, ...]:
    from ..readers import FORMATS

    return tuple(s for f in FORMATS if f.structure == "file" for s in f.suffixes)


def _document_lines(path: Path, sha: str) -> Any:
    """The training lines of one agreement of the set (laid out in simulated house styles)."""
    from ..readers import read_document
    from .simulate import training_examples

    doc = read_document(str(path))
    return TrainingLines.of(training_examples(doc, seed=int(sha[:8], 16)))


def _set_lines(root: Path, folder: Path, formatted: Sequence[tuple[str, str]]) -> list[TrainingLines]:
    """The training lines of each distinct agreement of *formatted* ((relative path, SHA-256)),
    from its cache in *folder* or laid out again (and cached); caches of agreements no longer
    in the set are removed.  An agreement that cannot be read is left out."""
    from ..fileio import atomic_write_bytes

    parts = []
    seen: set[str] = set()
    for rel, sha in formatted:
        if sha in seen:
            continue
        seen.add(sha)
        cached = folder / f"{sha}.npz"
        lines = None
        try:
            with np.load(cached, allow_pickle=False) as data:
                lines = TrainingLines.from_arrays(data)
        except (OSError, ValueError, KeyError):
            lines = None
        if lines is None:
            try:
                lines = _document_lines(root / rel, sha)
            except CounterdraftError:
                continue
            buf = io.BytesIO()
            np.savez_compressed(buf, **lines.arrays())
            atomic_write_bytes(str(cached), buf.getvalue())
        parts.append(lines)
    for old in folder.glob("*.npz"):
        if old.name != SET_MODEL and old.stem not in seen:
            old.unlink(missing_ok=True)
    return parts


def refresh_set_labeller(root: str | os.PathLike[str], documents: Sequence[tuple[str, str]]
                         ) -> tuple[LineLabeller | None, tuple[str, ...]]:
    """The line model of the precedent set in *root*, whose indexed agreements are
    *documents* ((relative path, SHA-256), as :meth:`core.library.index.Library.documents`
    gives them): loaded when it was trained on exactly the set's formatted agreements (.docx,
    .odt), else trained again from their training lines (an agreement's lines are laid out
    once and kept by its SHA-256; lines of agreements no longer in the set are removed).
    None, with a note, when the set has fewer than :data:`MIN_SET_DOCUMENTS` such agreements.
    """
    from ..fileio import atomic_write_text

    folder = Path(root) / ".counterdraft" / SET_DIRNAME
    formatted = sorted((rel, sha) for rel, sha in documents if rel.lower().endswith(_set_formats()))
    shas = sorted({sha for _rel, sha in formatted})
    fingerprint = hashlib.sha256("\n".join(shas).encode()).hexdigest()
    state_path = folder / SET_STATE
    model_path = folder / SET_MODEL
    try:
        state = json.loads(state_path.read_text(encoding="utf-8"))
    except (OSError, ValueError):
        state = {}
    if len(shas) < MIN_SET_DOCUMENTS:
        return None, (f"the precedent set holds {len(shas)} formatted agreement(s) (.docx, .odt); "
                      f"at least {MIN_SET_DOCUMENTS} train a line model of its own, so the default "
                      "model reads the PDF",)
    if isinstance(state, dict) and state.get("fingerprint") == fingerprint:
        model = load_labeller(model_path)
        if model is not None:
            return model, ()
    folder.mkdir(mode=0o700, parents=True, exist_ok=True)
    parts = _set_lines(Path(root), folder, formatted)
    from .labeller import train_labeller

    model = train_labeller(TrainingLines.concat(parts), documents=len(parts),
                           trained_on=f"the precedent set's {len(parts)} formatted agreements")
    save_labeller(model, model_path)
    atomic_write_text(str(state_path), json.dumps({"fingerprint": fingerprint, "documents": len(parts)}) + "\n")
    return model, (f"the line model was trained again on the precedent set's {len(parts)} "
                   "formatted agreements",)


def structure_for(path: str | os.PathLike[str], library: str | os.PathLike[str] | None
                  ) -> tuple[LineLabeller | None, tuple[str, ...]]:
    """The line model that reads the file at *path*: the precedent set's (refreshing the set's
    index first) when *library* is given and the file's structure is inferred from its page
    (a PDF), else None (the default).  Returns the model and notes for the user."""
    if not library:
        return None, ()
    from ..library.store import is_server_address

    if is_server_address(str(library)):
        # A shared server store keeps no agreements' files beside it to learn from: the
        # shipped default model reads the page.
        return None, ()
    from ..readers import identify

    if identify(path).name != "pdf":
        return None, ()
    from ..library.index import open_library

    with open_library(library) as lib:
        documents = lib.documents()
    return refresh_set_labeller(library, documents)
