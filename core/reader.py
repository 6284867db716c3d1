"""Read an agreement (.docx, .txt or .md) into a :class:`~core.model.Document`.

The file is only read, never modified.  Every problem a user can fix (missing file, wrong
type, empty or binary file, a .docx the package checks refuse) is a one-line
:class:`~core.errors.CounterdraftError` naming the file.

Pipeline: blocks (``core.docx.blocks.read_docx_blocks`` or ``core.text_reader``) ->
provisions (:func:`core.structure.split_provisions`) -> defined terms
(:func:`core.terms.find_terms`).
"""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path

from .errors import CounterdraftError
from .model import Block, Document
from .structure import split_provisions
from .terms import find_terms
from .text_reader import read_text_blocks, read_text_file

__all__ = ["SUPPORTED_SUFFIXES", "document_from_blocks", "read_document", "read_text"]

#: File types read, by suffix (case-insensitive).
SUPPORTED_SUFFIXES: tuple[str, ...] = (".docx", ".txt", ".md", ".markdown")

_REFUSED_SUFFIXES = {
    ".doc": "a legacy binary Word .doc file is not supported; save it as .docx",
    ".dot": "a legacy binary Word template is not supported; save it as .docx",
    ".docm": "a macro-enabled .docm file is not supported; save it as .docx",
    ".dotx": "a Word template (.dotx) is not an agreement; save it as .docx",
    ".rtf": "an RTF file is not supported; save it as .docx",
    ".pdf": "a PDF is not supported; Counterdraft reads .docx, .txt and .md",
    ".odt": "an OpenDocument .odt file is not supported; save it as .docx",
}


def document_from_blocks(blocks: Sequence[Block], *, source: str,
                         warnings: Sequence[str] = ()) -> Document:
    """The document whose paragraphs are *blocks* (provisions and terms inferred)."""
    blocks = tuple(blocks)
    provisions = split_provisions(blocks, source=source)
    return Document(source=source, provisions=provisions, terms=find_terms(provisions, blocks=blocks),
                    blocks=blocks, warnings=tuple(warnings))


def read_document(path: str) -> Document:
    """Read the agreement at *path* (.docx, .txt or .md, by suffix)."""
    p = Path(path)
    if not p.exists():
        raise CounterdraftError("no such file", path=path)
    if not p.is_file():
        raise CounterdraftError("not a file (a folder or device)", path=path)
    suffix = p.suffix.lower()
    if suffix == ".docx":
        from .docx.blocks import read_docx_blocks

        blocks, warnings = read_docx_blocks(str(path))
    elif suffix in (".txt", ".md", ".markdown"):
        blocks, warnings = read_text_file(str(path), markdown=suffix != ".txt")
    elif suffix in _REFUSED_SUFFIXES:
        raise CounterdraftError(_REFUSED_SUFFIXES[suffix], path=path)
    else:
        shown = f"'{p.suffix}'" if p.suffix else "(no suffix)"
        raise CounterdraftError(
            f"unsupported file type {shown}; Counterdraft reads .docx, .txt and .md", path=path)
    if not any(b.text.strip() for b in blocks):
        raise CounterdraftError("the document has no text", path=path)
    return document_from_blocks(blocks, source=str(path), warnings=warnings)


def read_text(text: str, *, source: str = "text.txt", markdown: bool = False) -> Document:
    """Read an agreement held in memory as plain text (or Markdown)."""
    blocks = read_text_blocks(text, markdown=markdown)
    if not blocks:
        raise CounterdraftError("the text is empty", path=source)
    return document_from_blocks(blocks, source=source)
