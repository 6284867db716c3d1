"""Where the command line writes: how wide the terminal is, and JSON to standard output or
to a file.

A module of its own, with nothing but the standard library (and the atomic writer), so that
a command that only reads a document (``counterdraft inspect``) does not import the review
engine to learn it.
"""

from __future__ import annotations

import json
import shutil
import sys

from .fileio import atomic_write_text

__all__ = ["DEFAULT_WIDTH", "terminal_width", "write_json"]

#: Columns when standard output is not a terminal and ``COLUMNS`` is not set: the width the
#: tables always had.
DEFAULT_WIDTH = 100


def terminal_width() -> int:
    """Columns to fill: ``COLUMNS`` when set to a number, else the size of the terminal on
    standard output, else :data:`DEFAULT_WIDTH` (:func:`shutil.get_terminal_size` in that
    order)."""
    return shutil.get_terminal_size((DEFAULT_WIDTH, 24)).columns


def write_json(obj: object, out: str) -> None:
    """*obj* as indented UTF-8 JSON to standard output (*out* ``"-"``) or, atomically, to the
    file *out*."""
    text = json.dumps(obj, ensure_ascii=False, indent=2) + "\n"
    if out == "-":
        sys.stdout.write(text)
    else:
        atomic_write_text(out, text)
