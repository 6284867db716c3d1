"""The terminal the command line writes to: how wide it is.

A module of its own, with nothing but the standard library, so that a command that only
reads a document (``counterdraft inspect``) does not import the review engine to learn it.
"""

from __future__ import annotations

import shutil

__all__ = ["DEFAULT_WIDTH", "terminal_width"]

#: Columns when standard output is not a terminal and ``COLUMNS`` is not set: the width the
#: tables always had.
DEFAULT_WIDTH = 100


def terminal_width() -> int:
    """Columns to fill: ``COLUMNS`` when set to a number, else the size of the terminal on
    standard output, else :data:`DEFAULT_WIDTH` (:func:`shutil.get_terminal_size` in that
    order)."""
    return shutil.get_terminal_size((DEFAULT_WIDTH, 24)).columns
