"""Safe opening of an OpenDocument text package (ISO/IEC 26300-3, ODF packages).

:func:`open_odt_package` refuses, in one line naming the file: an empty file, a file that is
no zip or a damaged zip, a package whose ``mimetype`` is not an ODF text document
(ISO/IEC 26300-3 §3.3), a password-protected package (its manifest lists encryption data for
``content.xml``, §4.8), a package without ``content.xml``, and the zip bombs and DOCTYPE
declarations the .docx opener refuses (the same limits and hardened parser,
:mod:`core.docx.package`).  The file is only read.
"""

from __future__ import annotations

import os
import zipfile
from dataclasses import dataclass

from lxml import etree

from ..docx.package import (
    MAX_XML_PART_BYTES,
    PROLOG_SCAN_BYTES,
    ZIP_ERRORS,
    check_zip_directory,
    has_doctype,
    parse_xml_part,
    read_zip_entry,
    read_zip_head,
)
from ..errors import CounterdraftError
from .namespaces import MANIFEST, OFFICE, TEXT, q

__all__ = ["OdtPackage", "open_odt_package"]

_WHAT = ".odt"
_TEXT_MIME = "application/vnd.oasis.opendocument.text"
#: The ``mimetype`` member holds a few dozen bytes.
_MAX_MIME_BYTES = 200


@dataclass(frozen=True, slots=True)
class OdtPackage:
    """The parts of an .odt the reader needs, parsed.  Lives only inside ``core.odf``."""

    path: str
    content: etree._Element
    styles: etree._Element | None
    #: Tracked changes the document holds (ODF ``text:changed-region``), read as accepted.
    tracked_changes: int


def _fail(problem: str, path: str) -> CounterdraftError:
    return CounterdraftError(problem, path=path)


def open_odt_package(path: str | os.PathLike[str]) -> OdtPackage:
    """Open *path* read-only, check it and parse ``content.xml`` and ``styles.xml``."""
    path = os.fspath(path)
    try:
        size = os.path.getsize(path)
    except OSError as err:
        raise _fail(f"cannot read the file ({err.strerror or err})", path) from None
    if size == 0:
        raise _fail("the file is empty (0 bytes)", path)
    try:
        zf = zipfile.ZipFile(path)
    except ZIP_ERRORS:
        raise _fail("not an OpenDocument file (it is not a zip package, or its zip directory "
                    "is damaged)", path) from None
    with zf:
        check_zip_directory(zf, path)
        names = {info.filename: info for info in zf.infolist() if not info.is_dir()}
        mime = names.get("mimetype")
        if mime is not None and mime.file_size <= _MAX_MIME_BYTES:
            kind = read_zip_entry(zf, mime, path, limit=_MAX_MIME_BYTES, what=_WHAT).decode("ascii", "replace").strip()
            if kind != _TEXT_MIME:
                raise _fail(f"not an OpenDocument text document (its type is {kind[:80]!r})", path)
        for name, info in names.items():
            if (name.endswith((".xml", ".rdf"))
                    and has_doctype(read_zip_head(zf, info, path, what=_WHAT)[:PROLOG_SCAN_BYTES])):
                raise _fail(f"refused: part {name} contains a DOCTYPE declaration, which an .odt "
                            "never needs (it can hide entity expansion or external entities)", path)
        manifest = names.get("META-INF/manifest.xml")
        if manifest is not None:
            data = read_zip_entry(zf, manifest, path, limit=MAX_XML_PART_BYTES, what=_WHAT)
            root = parse_xml_part(data, part="META-INF/manifest.xml", path=path, what=_WHAT)
            if root.find(f".//{q(MANIFEST, 'encryption-data')}") is not None:
                raise _fail("password-protected (encrypted) .odt; save it without a password "
                            "and try again", path)
        if "content.xml" not in names:
            raise _fail("not an OpenDocument text: the package has no content.xml", path)
        content = parse_xml_part(read_zip_entry(zf, names["content.xml"], path, limit=MAX_XML_PART_BYTES,
                                                what=_WHAT), part="content.xml", path=path, what=_WHAT)
        styles = None
        if "styles.xml" in names:
            styles = parse_xml_part(read_zip_entry(zf, names["styles.xml"], path, limit=MAX_XML_PART_BYTES,
                                                   what=_WHAT), part="styles.xml", path=path, what=_WHAT)
    if content.tag != q(OFFICE, "document-content") or content.find(
            f"{q(OFFICE, 'body')}/{q(OFFICE, 'text')}") is None:
        raise _fail("not an OpenDocument text: content.xml has no text body (office:text)", path)
    changes = len(content.findall(f".//{q(TEXT, 'changed-region')}"))
    return OdtPackage(path=path, content=content, styles=styles, tracked_changes=changes)
