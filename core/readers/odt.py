"""The OpenDocument text reader (.odt, ISO/IEC 26300): paragraphs, list labels, headings and
emphasis as the file gives them, through :func:`core.odf.blocks.read_odt_blocks`."""

from __future__ import annotations

from typing import Any

from ..model import Block

__all__ = ["read_blocks"]


def read_blocks(path: str, *, fmt: Any = None, structure: Any = None
                ) -> tuple[tuple[Block, ...], tuple[str, ...]]:
    """(blocks, warnings) of the .odt at *path*; its structure is the file's own."""
    del fmt, structure  # the file carries its structure
    from ..odf.blocks import read_odt_blocks

    return read_odt_blocks(path)
