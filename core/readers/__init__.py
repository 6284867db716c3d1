"""The readers registry: one module per file format, one way to pick the reader of a file.

Every agreement that enters Counterdraft -- on the command line, in the window, in the
precedent set -- goes through :func:`read_document` (or :func:`read_blocks`), which picks a
reader with :func:`identify`:

1. **by content** when the first bytes say what the file is, whatever its name: a PDF
   (``%PDF-`` at the start, or within the first KiB of a file named .pdf; ISO 32000-1
   §7.5.2), an OpenDocument text (a zip whose
   ``mimetype`` member reads ``application/vnd.oasis.opendocument.text``, ISO/IEC 26300
   Part 3 §3.3) or a WordprocessingML package (a zip holding ``word/document.xml`` or naming
   a ``wordprocessingml`` main part in ``[Content_Types].xml``, ECMA-376 Part 2);
2. **by suffix** otherwise: that reader then says, in one line, what is wrong with the file
   (a ``.docx`` that is no zip, a truncated zip, a ``.txt`` with binary data...).

A file read as another format than its name says gets a warning naming both.

Formats (:data:`FORMATS`) and what each carries:

=========  =========================================  ========================================
format     module                                      structure
=========  =========================================  ========================================
docx       :mod:`core.readers.docx`                    given by the file (styles, numbering)
odt        :mod:`core.readers.odt`                     given by the file (styles, numbering)
pdf        :mod:`core.readers.pdf`                     inferred from the page (a model)
text       :mod:`core.readers.text` (.txt)             inferred from the text (fixed rules)
markdown   :mod:`core.readers.text` (.md)              inferred from Markdown markup
=========  =========================================  ========================================

Reader modules are imported only when a file of their format is read (pdfplumber costs a
second to import).  Each exposes ``read_blocks(path, *, structure) -> (blocks, warnings)``
where *structure* is the line-structure model a PDF reader uses (:mod:`core.layout`);
readers of formats that carry their structure ignore it.
"""

from __future__ import annotations

import importlib
import os
import zipfile
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any, Literal

from ..errors import CounterdraftError
from ..model import Block, Document

__all__ = [
    "FORMATS",
    "PRECEDENT_SET_SUFFIXES",
    "SUPPORTED_SUFFIXES",
    "Format",
    "accepts_name",
    "dialog_filter",
    "document_from_blocks",
    "format_named",
    "formats_summary",
    "identify",
    "learns_layout",
    "read_blocks",
    "read_document",
    "read_text",
]


@dataclass(frozen=True, slots=True)
class Format:
    """One readable file format."""

    name: str
    title: str  # shown in file dialogs and messages
    noun: str  # in a sentence: "a PDF"
    suffixes: tuple[str, ...]  # lower case, with the dot; the first is the usual one
    module: str  # the reader module, imported on first use
    #: "file": paragraphs, numbering and headings come from the file's own markup (the
    #: layout model may learn from such a file); "inferred": they are recovered from the text
    #: or the page.
    structure: Literal["file", "inferred"]
    #: What a review of a file of this format cannot see (README lists these).
    loses: str
    #: Indexed in a precedent set (the firm's own agreements, kept in editable form).
    in_precedent_set: bool = True


FORMATS: tuple[Format, ...] = (
    Format("docx", "Word document", "a Word document", (".docx",), "core.readers.docx", "file",
           "nothing Counterdraft uses: existing tracked changes are read as accepted and "
           "noted, comments are left in place"),
    Format("odt", "OpenDocument text", "an OpenDocument text", (".odt",), "core.readers.odt", "file",
           "its existing tracked changes are read as accepted (with a note) and its comments "
           "are not shown; the counter-draft is a new .docx"),
    Format("pdf", "PDF (with a text layer)", "a PDF", (".pdf",), "core.readers.pdf", "inferred",
           "existing tracked changes and comments (a PDF has none), styles, and any text "
           "that is only an image (no OCR); paragraphs, headings and numbering are "
           "recovered from the page; the counter-draft is a new .docx",
           in_precedent_set=False),
    Format("text", "plain text", "a plain-text file", (".txt",), "core.readers.text", "inferred",
           "all formatting: paragraphs and headings are recovered from line breaks and "
           "capitals; the counter-draft is a new .docx"),
    Format("markdown", "Markdown", "a Markdown file", (".md", ".markdown"), "core.readers.text",
           "inferred",
           "formatting beyond Markdown's headings, bold, lists and tables; the "
           "counter-draft is a new .docx"),
)

#: Every suffix some reader reads (case-insensitive).
SUPPORTED_SUFFIXES: tuple[str, ...] = tuple(s for f in FORMATS for s in f.suffixes)
#: The suffixes a precedent-set build reads.
PRECEDENT_SET_SUFFIXES: tuple[str, ...] = tuple(s for f in FORMATS if f.in_precedent_set
                                                for s in f.suffixes)

#: Formats refused by name, with what to do instead.
_REFUSED_SUFFIXES = {
    ".doc": "a legacy binary Word .doc file is not supported; save it as .docx",
    ".dot": "a legacy binary Word template is not supported; save it as .docx",
    ".docm": "a macro-enabled .docm file is not supported; save it as .docx",
    ".dotx": "a Word template (.dotx) is not an agreement; save it as .docx",
    ".rtf": "an RTF file is not supported; save it as .docx",
    ".ott": "an OpenDocument template (.ott) is not an agreement; save it as .odt",
    ".fodt": "a flat OpenDocument file (.fodt) is not supported; save it as .odt",
}

#: ISO 32000-1 §7.5.2 puts the header on the first line; readers accept it within the first
#: 1024 bytes (a widespread tolerance of PDF readers, from memory).
PDF_HEADER_WINDOW = 1024
#: The ODF ``mimetype`` member is a few dozen bytes (ISO/IEC 26300-3 §3.3); a larger one is
#: not read.
MAX_MIMETYPE_BYTES = 200
#: ``[Content_Types].xml`` of a real package is a few KiB; a larger one is not read here.
MAX_CONTENT_TYPES_BYTES = 1 << 20
#: The content type of a WordprocessingML main document part (ECMA-376 Part 1 §11.3.10).
_WORDML_MAIN = b"wordprocessingml.document.main+xml"
_ODF_TEXT = "application/vnd.oasis.opendocument.text"
_ODF_PREFIX = "application/vnd.oasis.opendocument."
_ODF_OTHER = {
    "spreadsheet": "an OpenDocument spreadsheet, not a text document",
    "presentation": "an OpenDocument presentation, not a text document",
    "graphics": "an OpenDocument drawing, not a text document",
    "text-template": "an OpenDocument template (.ott); save it as .odt",
    "text-master": "an OpenDocument master document; save it as .odt",
}


def format_named(name: str) -> Format:
    """The format called *name* ("docx", "pdf", ...)."""
    for f in FORMATS:
        if f.name == name:
            return f
    raise KeyError(name)


def _known(name: str) -> Format | None:
    """The format called *name* when Counterdraft reads it, else None."""
    return next((f for f in FORMATS if f.name == name), None)


def _by_suffix(suffix: str) -> Format | None:
    return next((f for f in FORMATS if suffix in f.suffixes), None)


def accepts_name(path: str | os.PathLike[str]) -> bool:
    """Does the file's name end in a suffix some reader reads (for drag and drop)?"""
    return Path(path).suffix.lower() in SUPPORTED_SUFFIXES


def dialog_filter() -> str:
    """The file-dialog filter of the readable formats, e.g. ``"Agreements (*.docx ...)"``."""
    patterns = " ".join(f"*{s}" for s in SUPPORTED_SUFFIXES)
    return f"Agreements ({patterns});;All files (*)"


def formats_summary(*, last: str = "and") -> str:
    """".docx, .txt and .md": the usual suffix of each format, for messages (*last* joins
    the last two)."""
    names = [f.suffixes[0] for f in FORMATS]
    return ", ".join(names[:-1]) + f" {last} " + names[-1]


# ----------------------------------------------------------------------------------------
# Picking a reader
# ----------------------------------------------------------------------------------------


def _zip_format(path: str, *, path_for_errors: str) -> Format | None:
    """The format a zip package declares, or None when it declares none we know (the
    reader picked by suffix then explains).  Raises for another OpenDocument type."""
    try:
        with zipfile.ZipFile(path) as zf:
            names = set(zf.namelist())
            if "mimetype" in names:
                info = zf.getinfo("mimetype")
                if info.file_size <= MAX_MIMETYPE_BYTES:
                    mime = zf.read(info).decode("ascii", "replace").strip()
                    if mime == _ODF_TEXT:
                        return _known("odt")
                    if mime.startswith(_ODF_PREFIX):
                        kind = mime[len(_ODF_PREFIX):]
                        raise CounterdraftError(
                            f"the file is {_ODF_OTHER.get(kind, f'an OpenDocument {kind} file')}",
                            path=path_for_errors)
            lowered = {n.lower(): n for n in names}
            if "word/document.xml" in lowered:
                return format_named("docx")
            types = lowered.get("[content_types].xml")
            if (types is not None and zf.getinfo(types).file_size <= MAX_CONTENT_TYPES_BYTES
                    and _WORDML_MAIN in zf.read(types)):
                return format_named("docx")
    except CounterdraftError:
        raise
    except (zipfile.BadZipFile, OSError, ValueError, EOFError, NotImplementedError, RuntimeError):
        return None
    return None


def identify(path: str | os.PathLike[str]) -> Format:
    """The format of the file at *path*: by content when its first bytes tell, else by
    suffix (see the module docstring).  Raises CounterdraftError for a missing file, a
    folder, and a suffix no reader reads."""
    p = Path(path)
    shown = str(path)
    if not p.exists():
        raise CounterdraftError("no such file", path=shown)
    if not p.is_file():
        raise CounterdraftError("not a file (a folder or device)", path=shown)
    try:
        with open(p, "rb") as fh:
            head = fh.read(PDF_HEADER_WINDOW)
    except OSError as err:
        raise CounterdraftError(f"cannot read the file ({err.strerror or err})", path=shown) from None
    found: Format | None = None
    if head.lstrip().startswith(b"%PDF-") or (b"%PDF-" in head and p.suffix.lower() == ".pdf"):
        found = _known("pdf")
    elif head.startswith(b"PK\x03\x04"):
        found = _zip_format(str(p), path_for_errors=shown)
    if found is not None:
        return found
    suffix = p.suffix.lower()
    fmt = _by_suffix(suffix)
    if fmt is not None:
        return fmt
    if suffix in _REFUSED_SUFFIXES:
        raise CounterdraftError(_REFUSED_SUFFIXES[suffix], path=shown)
    named = f"'{p.suffix}'" if p.suffix else "(no suffix)"
    raise CounterdraftError(f"unsupported file type {named}; Counterdraft reads {formats_summary()}",
                            path=shown)


def _reader(fmt: Format) -> Any:
    return importlib.import_module(fmt.module)


def read_blocks(path: str | os.PathLike[str], *, structure: Any = None
                ) -> tuple[tuple[Block, ...], tuple[str, ...], Format]:
    """The paragraphs of the agreement at *path*: (blocks, warnings, format).

    *structure* is the line-structure model for formats whose structure is inferred from the
    page (:class:`core.layout.labeller.LineLabeller`; None: the shipped default).  The file
    is only read, never modified.
    """
    fmt = identify(path)
    blocks, warnings = _reader(fmt).read_blocks(str(path), fmt=fmt, structure=structure)
    suffix = Path(path).suffix.lower()
    if suffix not in fmt.suffixes:
        named = f"ends in {Path(path).suffix}" if suffix else "has no suffix"
        warnings = (f"the file is {fmt.noun} although its name {named}; it was read as one",
                    *warnings)
    if not any(b.text.strip() for b in blocks):
        raise CounterdraftError("the document has no text", path=str(path))
    return tuple(blocks), tuple(warnings), fmt


def document_from_blocks(blocks: Sequence[Block], *, source: str,
                         warnings: Sequence[str] = ()) -> Document:
    """The document whose paragraphs are *blocks* (provisions and terms inferred)."""
    from ..structure import split_provisions
    from ..terms import find_terms

    blocks = tuple(blocks)
    provisions = split_provisions(blocks, source=source)
    return Document(source=source, provisions=provisions, terms=find_terms(provisions, blocks=blocks),
                    blocks=blocks, warnings=tuple(warnings))


def learns_layout(path: str | os.PathLike[str], library: str | os.PathLike[str] | None) -> bool:
    """True when the file at *path* is read with a precedent set's own line model: a page
    format (PDF) reviewed with a precedent set.  Cheap (the first bytes), so the model's
    modules are imported only then."""
    return bool(library) and identify(path).name == "pdf"


def read_document(path: str | os.PathLike[str], *, structure: Any = None, cache: bool = False) -> Document:
    """Read the agreement at *path* (any format of :data:`FORMATS`, picked by
    :func:`identify`); *structure* as for :func:`read_blocks`.

    With *cache*, a document read before from the same bytes by the same reader comes from
    the parsed-document cache (:mod:`core.doccache`), and a newly parsed one is stored there:
    the command line and the window use it; the precedent-set index keeps its own record and
    does not.  A page read with a precedent set's own line model (*structure*) is not cached:
    the model is part of the reading."""
    def parse() -> Document:
        blocks, warnings, _fmt = read_blocks(path, structure=structure)
        return document_from_blocks(blocks, source=str(path), warnings=warnings)

    if not cache or structure is not None:
        return parse()
    fmt = identify(path)
    try:
        content = Path(path).read_bytes()
    except OSError:
        return parse()  # the reader names the problem
    from ..doccache import cached_document

    return cached_document(str(path), content, fmt.name, parse)


def read_text(text: str, *, source: str = "text.txt", markdown: bool = False) -> Document:
    """Read an agreement held in memory as plain text (or Markdown)."""
    from ..text_reader import read_text_blocks

    blocks = read_text_blocks(text, markdown=markdown)
    if not blocks:
        raise CounterdraftError("the text is empty", path=source)
    return document_from_blocks(blocks, source=source)


def content_size(path: str | os.PathLike[str]) -> int:
    """About how much there is to parse in the file at *path*, in bytes: a zip package's
    parts uncompressed (from its directory, nothing inflated), any other file as it is; 0
    when it cannot be read (the reader will say why)."""
    try:
        if zipfile.is_zipfile(path):
            with zipfile.ZipFile(path) as zf:
                return sum(info.file_size for info in zf.infolist())
        return os.path.getsize(path)
    except (zipfile.BadZipFile, OSError, ValueError, EOFError, NotImplementedError, RuntimeError):
        return 0
