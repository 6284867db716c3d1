"""Where line models live, and which one reads a document.

* The **shipped default** (``resources/layout_model.json``) was trained by
  ``scripts/train_layout_model.py`` on open texts: licence and EULA texts of the PyPI package
  ``licensedcode-data`` (the ScanCode licence database) written to .docx with real Word
  auto-numbering, the licence keys listed in the model's ``trained_on`` field.  It serves when
  there is no precedent set.
* A **precedent set's model** (``<set>/.counterdraft/layout/model.json``) is trained on the
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
import json
import os
from pathlib import Path
from typing import Any

from .labeller import LineLabeller, labeller_from_json

__all__ = ["DEFAULT_MODEL_PATH", "default_labeller", "load_labeller", "save_labeller"]

DEFAULT_MODEL_PATH = Path(__file__).resolve().parents[2] / "resources" / "layout_model.json"
#: Largest model file read: the default is about 40 KB; a set's model has the same shape.
MAX_MODEL_BYTES = 4 << 20


def load_labeller(path: str | os.PathLike[str]) -> LineLabeller | None:
    """The model stored at *path*, or None when it is missing or not usable."""
    p = Path(path)
    try:
        if p.stat().st_size > MAX_MODEL_BYTES:
            return None
        data: Any = json.loads(p.read_text(encoding="utf-8"))
        return labeller_from_json(data)
    except (OSError, ValueError, KeyError, TypeError):
        return None


def save_labeller(model: LineLabeller, path: str | os.PathLike[str]) -> None:
    """Write *model* to *path* atomically."""
    from ..fileio import atomic_write_text

    atomic_write_text(str(path), model.dumps() + "\n")


@functools.cache
def default_labeller() -> LineLabeller | None:
    """The shipped default model (read once), or None when it cannot be loaded."""
    return load_labeller(DEFAULT_MODEL_PATH)
