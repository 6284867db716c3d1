"""Read an agreement (.docx, .txt or .md) into a :class:`~core.model.Document`.

The file is only read, never modified.  Every problem a user can fix (missing file, wrong
type, empty or binary file, a .docx the package checks refuse) is a one-line
:class:`~core.errors.CounterdraftError` naming the file.

Pipeline: blocks (``core.docx.blocks.read_docx_blocks`` or ``core.text_reader``) ->
provisions (:func:`core.structure.split_provisions`) -> defined terms
(:func:`core.terms.find_terms`).  The pipeline's modules are imported when a file is parsed:
a document found in the parsed-document cache (``read_document(..., cache=True)``,
:mod:`core.doccache`) needs none of them.
"""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path

from .errors import CounterdraftError
from .model import Block, Document

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
    from .structure import split_provisions
    from .terms import find_terms

    blocks = tuple(blocks)
    provisions = split_provisions(blocks, source=source)
    return Document(source=source, provisions=provisions, terms=find_terms(provisions, blocks=blocks),
                    blocks=blocks, warnings=tuple(warnings))


def read_document(path: str, *, cache: bool = False) -> Document:
    """Read the agreement at *path* (.docx, .txt or .md, by suffix).

    With *cache*, a document read before from the same bytes comes from the parsed-document
    cache (:mod:`core.doccache`), and a newly parsed one is stored there: the command line
    and the window use it; the precedent-set index keeps its own record and does not."""
    p = Path(path)
    if not p.exists():
        raise CounterdraftError("no such file", path=path)
    if not p.is_file():
        raise CounterdraftError("not a file (a folder or device)", path=path)
    suffix = p.suffix.lower()
    if suffix == ".docx":
        reader = "docx"
    elif suffix in (".txt", ".md", ".markdown"):
        reader = "text" if suffix == ".txt" else "markdown"
    elif suffix in _REFUSED_SUFFIXES:
        raise CounterdraftError(_REFUSED_SUFFIXES[suffix], path=path)
    else:
        shown = f"'{p.suffix}'" if p.suffix else "(no suffix)"
        raise CounterdraftError(
            f"unsupported file type {shown}; Counterdraft reads .docx, .txt and .md", path=path)
    if not cache:
        return _parse(path, reader)
    try:
        content = p.read_bytes()
    except OSError:
        return _parse(path, reader)  # the reader names the problem
    from .doccache import cached_document

    return cached_document(str(path), content, reader, lambda: _parse(path, reader))


def _parse(path: str, reader: str) -> Document:
    if reader == "docx":
        from .docx.blocks import read_docx_blocks

        blocks, warnings = read_docx_blocks(str(path))
    else:
        from .text_reader import read_text_file

        blocks, warnings = read_text_file(str(path), markdown=reader == "markdown")
    if not any(b.text.strip() for b in blocks):
        raise CounterdraftError("the document has no text", path=path)
    return document_from_blocks(blocks, source=str(path), warnings=warnings)


def read_text(text: str, *, source: str = "text.txt", markdown: bool = False) -> Document:
    """Read an agreement held in memory as plain text (or Markdown)."""
    from .text_reader import read_text_blocks

    blocks = read_text_blocks(text, markdown=markdown)
    if not blocks:
        raise CounterdraftError("the text is empty", path=source)
    return document_from_blocks(blocks, source=source)
