"""The .docx reader (ECMA-376 WordprocessingML): paragraphs, auto-numbering labels, styles
and emphasis as the file gives them, through :func:`core.docx.blocks.read_docx_blocks`."""

from __future__ import annotations

from typing import Any

from ..model import Block

__all__ = ["read_blocks"]


def read_blocks(path: str, *, fmt: Any = None, structure: Any = None
                ) -> tuple[tuple[Block, ...], tuple[str, ...]]:
    """(blocks, warnings) of the .docx at *path*; its structure is the file's own."""
    del fmt, structure  # the file carries its structure
    from ..docx.blocks import read_docx_blocks

    return read_docx_blocks(path)
