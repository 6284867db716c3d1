"""The plain-text (.txt) and Markdown (.md, .markdown) reader: :mod:`core.text_reader`,
whose fixed rules find paragraphs in wrapped lines and headings in capitals or markup."""

from __future__ import annotations

from typing import Any

from ..model import Block

__all__ = ["read_blocks"]


def read_blocks(path: str, *, fmt: Any = None, structure: Any = None
                ) -> tuple[tuple[Block, ...], tuple[str, ...]]:
    """(blocks, warnings) of the text file at *path*; Markdown when *fmt* says so."""
    del structure  # plain text keeps the fixed rules (core.text_reader)
    from ..text_reader import read_text_file

    markdown = fmt is not None and fmt.name == "markdown"
    return read_text_file(path, markdown=markdown)
