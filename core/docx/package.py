"""Safe opening of a .docx package (ECMA-376 Part 2, Open Packaging Conventions).

:func:`open_docx_package` refuses, with one readable :class:`CounterdraftError` line naming
the file, everything a user may hand us instead of a healthy .docx:

* a missing file, a folder, an empty file;
* an OLE compound file (it starts with D0 CF 11 E0 A1 B1 1A E1, [MS-CFB] §2.2): either a legacy
  binary Word document (.doc) or a password-protected .docx, which Office stores as an OLE
  container holding an ``EncryptedPackage`` stream ([MS-OFFCRYPTO] §2.3.4.4) -- the message
  tells the two apart;
* anything that is not a zip, or a corrupt or truncated zip;
* a zip without a main document part (``word/document.xml``), or whose main part is not
  WordprocessingML or has no ``w:body`` (ECMA-376 Part 1 §17.2.2: the body is optional, but
  a document without one has nothing to review);
* a zip bomb: limits on entry count, declared sizes and compression ratio are checked from
  the zip directory before anything is decompressed, and again while reading;
* any XML part with a DOCTYPE declaration (entity expansion or external entities; python-docx
  would not expand them but silently drops the text after one), and XML that is not
  well-formed.

XML is parsed with a hardened lxml parser (no entity resolution, no network, no huge trees).
The input file is only ever opened for reading.

Cost: O(size of the parts read): the main document, styles and numbering parts are read in
full; every other XML part only up to :data:`PROLOG_SCAN_BYTES` for the DOCTYPE check.
"""

from __future__ import annotations

import lzma
import os
import posixpath
import re
import stat
import struct
import zipfile
import zlib
from dataclasses import dataclass
from typing import BinaryIO

from lxml import etree

from ..errors import CounterdraftError
from ..lazyre import lazy_compile
from .styles import W_NS

__all__ = [
    "MAX_COMPRESSION_RATIO",
    "MAX_TOTAL_UNCOMPRESSED",
    "MAX_XML_PART_BYTES",
    "MAX_ZIP_ENTRIES",
    "OLE_SIGNATURE",
    "PROLOG_SCAN_BYTES",
    "RATIO_GRACE_BYTES",
    "DocxPackage",
    "hardened_parser",
    "has_doctype",
    "open_docx_package",
    "parse_xml_part",
    "check_zip_directory",
    "read_zip_entry",
    "read_zip_head",
    "zip_part_lookup",
    "ZIP_ERRORS",
]

# --------------------------------------------------------------------------------------
# Limits (zip-bomb defence).  A 100-page agreement's word/document.xml is 1-5 MB and its
# whole package a few MB; the limits leave a wide margin above real documents.
# --------------------------------------------------------------------------------------

#: Most entries a package may list.  Real .docx files hold 10-200 parts (images, headers,
#: custom XML); a central directory with more than this is hostile or broken.
MAX_ZIP_ENTRIES = 10_000

#: Largest sum of the declared uncompressed sizes of all entries (1 GiB).  Image-heavy real
#: documents reach a few hundred MB; a package claiming more is refused before reading.
MAX_TOTAL_UNCOMPRESSED = 1 << 30

#: Largest XML part we read in full (64 MiB): about twenty times the XML of a 100-page
#: agreement with heavy run formatting.  lxml needs several times the XML size in memory,
#: so this also bounds memory to well under a gigabyte.
MAX_XML_PART_BYTES = 64 << 20

#: Highest uncompressed:compressed ratio accepted for an entry larger than
#: :data:`RATIO_GRACE_BYTES`.  WordprocessingML typically deflates 5:1 to 20:1; deflate's
#: ceiling is about 1032:1, which is what zip bombs use.  Apache POI refuses Office files
#: at 100:1 by default (from memory) and legitimate, very repetitive files occasionally trip
#: that, hence 200:1.
MAX_COMPRESSION_RATIO = 200

#: Entries that expand to no more than this (1 MiB) are not ratio-checked: they cannot do
#: harm, and tiny or highly repetitive parts (settings, empty headers) have odd ratios.
RATIO_GRACE_BYTES = 1 << 20

#: How much of each XML part is read to look for a DOCTYPE declaration in its prolog.  The
#: prolog (XML declaration, comments, processing instructions) is normally under 100 bytes.
PROLOG_SCAN_BYTES = 64 << 10

_READ_CHUNK = 1 << 20

#: [MS-CFB] §2.2: the compound file header signature.
OLE_SIGNATURE = bytes.fromhex("D0CF11E0A1B11AE1")

_REL_NS = "http://schemas.openxmlformats.org/package/2006/relationships"
_OFFICE_DOCUMENT_TYPES = (
    "http://schemas.openxmlformats.org/officeDocument/2006/relationships/officeDocument",
    "http://purl.oclc.org/ooxml/officeDocument/relationships/officeDocument",
)
_STYLES_TYPE = "http://schemas.openxmlformats.org/officeDocument/2006/relationships/styles"
_NUMBERING_TYPE = "http://schemas.openxmlformats.org/officeDocument/2006/relationships/numbering"
_STRICT_W_NS = "http://purl.oclc.org/ooxml/wordprocessingml/main"
_XML_SUFFIXES = (".xml", ".rels", ".vml")


@dataclass(frozen=True, slots=True)
class DocxPackage:
    """The parts of a .docx the reader needs, parsed.  Lives only inside ``core.docx``."""

    path: str
    #: Name of the main document part in the zip, normally "word/document.xml".
    main_part: str
    document: etree._Element
    styles: etree._Element | None
    numbering: etree._Element | None


def hardened_parser() -> etree.XMLParser:
    """An lxml parser that resolves no entities, never touches the network and refuses
    huge trees (libxml2's default depth and text-node limits stay on)."""
    return etree.XMLParser(
        resolve_entities=False,
        no_network=True,
        huge_tree=False,
        load_dtd=False,
        dtd_validation=False,
    )


def _fail(problem: str, path: str) -> CounterdraftError:
    return CounterdraftError(problem, path=path)


def _mb(n: int) -> str:
    return f"{n / (1 << 20):.0f} MB"


# --------------------------------------------------------------------------------------
# OLE compound files: legacy .doc or encrypted .docx
# --------------------------------------------------------------------------------------

_ENDOFCHAIN = 0xFFFFFFFE
_MAX_REGULAR_SECTOR = 0xFFFFFFFA


def _u16(data: bytes, offset: int) -> int:
    return int.from_bytes(data[offset:offset + 2], "little")


def _u32(data: bytes, offset: int) -> int:
    return int.from_bytes(data[offset:offset + 4], "little")


@dataclass(frozen=True, slots=True)
class _Sectors:
    """The sectors of a compound file: reading one is bounded by the file's size."""

    fh: BinaryIO
    size: int
    #: Sectors the file can hold (at least one): the bound of every loop over sectors.
    count: int

    def read(self, n: int) -> bytes:
        if n > _MAX_REGULAR_SECTOR or n >= self.count:
            raise ValueError("sector out of range")
        self.fh.seek((n + 1) * self.size)
        data = self.fh.read(self.size)
        if len(data) < self.size:
            raise ValueError("truncated sector")
        return data


def _fat_sectors(sectors: _Sectors, header: bytes) -> list[int]:
    """The sectors holding the FAT: the header's 109 DIFAT entries, then the DIFAT chain's."""
    fat = [s for s in struct.unpack_from("<109I", header, 76) if s <= _MAX_REGULAR_SECTOR]
    difat = _u32(header, 68)
    per_sector = sectors.size // 4
    for _ in range(min(_u32(header, 72), sectors.count)):
        if difat > _MAX_REGULAR_SECTOR:
            break
        entries = struct.unpack_from(f"<{per_sector}I", sectors.read(difat))
        fat.extend(s for s in entries[:-1] if s <= _MAX_REGULAR_SECTOR)
        difat = entries[-1]
    return fat[: max(_u32(header, 44), 0) or len(fat)]


def _ole_stream_names(fh: BinaryIO, size: int) -> set[str]:
    """Names of the directory entries of a compound file ([MS-CFB] §2.2, §2.6).

    Follows the FAT chain of the directory; every loop is bounded by the number of sectors
    the file can hold.  Raises ValueError on a malformed header.
    """
    fh.seek(0)
    header = fh.read(512)
    if len(header) < 512 or header[:8] != OLE_SIGNATURE:
        raise ValueError("short header")
    sector_shift = _u16(header, 30)
    if sector_shift not in (9, 12):
        raise ValueError("sector size")
    sector_size = 1 << sector_shift
    sectors = _Sectors(fh, sector_size, max(1, size // sector_size))
    fat = _fat_sectors(sectors, header)
    per_sector = sector_size // 4

    def next_sector(n: int) -> int:
        index, offset = divmod(n, per_sector)
        if index >= len(fat):
            raise ValueError("FAT too short")
        return _u32(sectors.read(fat[index]), offset * 4)

    names: set[str] = set()
    sector = _u32(header, 48)
    seen: set[int] = set()
    while sector != _ENDOFCHAIN and len(seen) < sectors.count:
        if sector in seen:
            raise ValueError("directory chain loops")
        seen.add(sector)
        data = sectors.read(sector)
        for off in range(0, sector_size, 128):
            name_len = _u16(data, off + 64)
            if 2 <= name_len <= 64 and data[off + 66] != 0:
                names.add(data[off : off + name_len - 2].decode("utf-16-le", errors="replace"))
        sector = next_sector(sector)
    return names


def _ole_problem(fh: BinaryIO, size: int) -> str:
    try:
        names = _ole_stream_names(fh, size)
    except (ValueError, struct.error, OSError):
        # Malformed directory: fall back to looking for the stream name itself.
        fh.seek(0)
        blob = fh.read(8 << 20)
        names = {n for n in ("EncryptedPackage", "WordDocument")
                 if n.encode("utf-16-le") in blob}
    if "EncryptedPackage" in names:
        return ("password-protected (encrypted) .docx; remove the password in Word, "
                "save, and try again")
    if "WordDocument" in names:
        return "legacy binary Word document (.doc), not .docx; save it as .docx and try again"
    return "an OLE compound file (a legacy Office format), not a .docx"


# --------------------------------------------------------------------------------------
# Zip handling
# --------------------------------------------------------------------------------------

_ZIP_ERRORS = (
    zipfile.BadZipFile, zlib.error, EOFError, NotImplementedError, RuntimeError, ValueError,
    lzma.LZMAError, OSError, struct.error,
)


def _check_directory(zf: zipfile.ZipFile, path: str) -> None:
    infos = zf.infolist()
    if len(infos) > MAX_ZIP_ENTRIES:
        raise _fail(f"refused: the package lists {len(infos)} entries (limit {MAX_ZIP_ENTRIES}); "
                    "this looks like a zip bomb", path)
    total = 0
    for info in infos:
        total += info.file_size
        if (info.file_size > RATIO_GRACE_BYTES
                and info.file_size > max(info.compress_size, 1) * MAX_COMPRESSION_RATIO):
            ratio = info.file_size // max(info.compress_size, 1)
            raise _fail(f"refused: part {info.filename} expands {ratio}:1 "
                        f"(limit {MAX_COMPRESSION_RATIO}:1); this looks like a zip bomb", path)
    if total > MAX_TOTAL_UNCOMPRESSED:
        raise _fail(f"refused: the package would expand to {_mb(total)} "
                    f"(limit {_mb(MAX_TOTAL_UNCOMPRESSED)}); this looks like a zip bomb", path)


def _read_entry(zf: zipfile.ZipFile, info: zipfile.ZipInfo, path: str, *, limit: int,
                what: str = ".docx") -> bytes:
    """Read one entry in full, enforcing size and ratio limits while decompressing."""
    if info.file_size > limit:
        raise _fail(f"refused: part {info.filename} would expand to {_mb(info.file_size)} "
                    f"(limit {_mb(limit)})", path)
    chunks: list[bytes] = []
    total = 0
    try:
        with zf.open(info) as fh:
            while True:
                chunk = fh.read(_READ_CHUNK)
                if not chunk:
                    break
                total += len(chunk)
                if total > limit or total > info.file_size:
                    raise _fail(f"refused: part {info.filename} expands beyond its declared "
                                "size; this looks like a zip bomb", path)
                if (total > RATIO_GRACE_BYTES
                        and total > max(info.compress_size, 1) * MAX_COMPRESSION_RATIO):
                    raise _fail(f"refused: part {info.filename} expands more than "
                                f"{MAX_COMPRESSION_RATIO}:1; this looks like a zip bomb", path)
                chunks.append(chunk)
    except CounterdraftError:
        raise
    except _ZIP_ERRORS as err:
        raise _fail(f"corrupt or truncated {what}: part {info.filename} cannot be read "
                    f"({_one_line(err)})", path) from None
    return b"".join(chunks)


def _read_head(zf: zipfile.ZipFile, info: zipfile.ZipInfo, path: str, *, what: str = ".docx") -> bytes:
    try:
        with zf.open(info) as fh:
            return fh.read(PROLOG_SCAN_BYTES)
    except _ZIP_ERRORS as err:
        raise _fail(f"corrupt or truncated {what}: part {info.filename} cannot be read "
                    f"({_one_line(err)})", path) from None


def _one_line(err: BaseException) -> str:
    text = " ".join(str(err).split())
    text = re.sub(r"\s*\(<string>, line \d+\)$", "", text)
    return text[:200] or type(err).__name__


_PROLOG_ITEM = lazy_compile(r"\s+|<\?.*?\?>|<!--.*?-->", re.DOTALL)


def _decode_head(head: bytes) -> str:
    if head.startswith((b"\xff\xfe", b"<\x00")):
        return head.decode("utf-16-le", errors="ignore")
    if head.startswith((b"\xfe\xff", b"\x00<")):
        return head.decode("utf-16-be", errors="ignore")
    if head.startswith(b"\xef\xbb\xbf"):
        head = head[3:]
    return head.decode("latin-1")


def has_doctype(head: bytes) -> bool:
    """True when the XML prolog at the start of *head* contains a DOCTYPE declaration."""
    text = _decode_head(head).lstrip("\ufeff")
    pos = 0
    while True:
        m = _PROLOG_ITEM.match(text, pos)
        if m is None or m.end() == pos:
            break
        pos = m.end()
    if text.startswith("<!DOCTYPE", pos):
        return True
    # Unterminated prolog constructs: be conservative.
    root = re.search(r"<[A-Za-z_]", text[pos:])
    prolog = text[pos : pos + root.start()] if root else text[pos:]
    return "<!DOCTYPE" in prolog


def parse_xml_part(data: bytes, *, part: str, path: str, what: str = ".docx") -> etree._Element:
    """Parse one part with the hardened parser; refuse a DOCTYPE and malformed XML.  *what*
    names the kind of file in messages (".docx", ".odt")."""
    if has_doctype(data[:PROLOG_SCAN_BYTES]):
        raise _doctype_error(part, path, what=what)
    try:
        root = etree.fromstring(data, hardened_parser())
    except etree.XMLSyntaxError as err:
        raise _fail(f"corrupt {what}: part {part} is not well-formed XML ({_one_line(err)})",
                    path) from None
    except ValueError as err:  # e.g. an unknown encoding declaration
        raise _fail(f"corrupt {what}: part {part} cannot be parsed ({_one_line(err)})",
                    path) from None
    docinfo = root.getroottree().docinfo
    if docinfo.doctype or docinfo.internalDTD is not None:
        raise _doctype_error(part, path, what=what)
    return root


def _doctype_error(part: str, path: str, *, what: str = ".docx") -> CounterdraftError:
    return _fail(f"refused: part {part} contains a DOCTYPE declaration, which a {what} never "
                 "needs (it can hide entity expansion or external entities)", path)


def check_zip_directory(zf: zipfile.ZipFile, path: str) -> None:
    """The zip-bomb checks of the directory (for other zip formats: the OpenDocument
    reader); the .docx opener calls :func:`_check_directory` itself."""
    _check_directory(zf, path)


def read_zip_entry(zf: zipfile.ZipFile, info: zipfile.ZipInfo, path: str, *, limit: int,
                   what: str) -> bytes:
    """One entry read in full under the size and ratio limits (see :func:`_read_entry`)."""
    return _read_entry(zf, info, path, limit=limit, what=what)


def read_zip_head(zf: zipfile.ZipFile, info: zipfile.ZipInfo, path: str, *, what: str) -> bytes:
    """The first :data:`PROLOG_SCAN_BYTES` of an entry (to look for a DOCTYPE)."""
    return _read_head(zf, info, path, what=what)


def zip_part_lookup(zf: zipfile.ZipFile) -> dict[str, zipfile.ZipInfo]:
    """Part name (lower case, no leading "/") -> entry."""
    return _part_lookup(zf)


ZIP_ERRORS = _ZIP_ERRORS


def _part_lookup(zf: zipfile.ZipFile) -> dict[str, zipfile.ZipInfo]:
    """Part name (lower case, no leading "/") -> entry.  OPC part names compare
    case-insensitively (ECMA-376 Part 2 §9.1.1.1)."""
    found: dict[str, zipfile.ZipInfo] = {}
    for info in zf.infolist():
        if info.is_dir():
            continue
        found.setdefault(info.filename.lstrip("/").lower(), info)
    return found


def _rels_targets(data: bytes | None, *, source_dir: str, part: str, path: str) -> dict[str, str]:
    """Relationship type -> resolved part name, from a .rels part (first of each type)."""
    if data is None:
        return {}
    root = parse_xml_part(data, part=part, path=path)
    out: dict[str, str] = {}
    for rel in root.iter(f"{{{_REL_NS}}}Relationship"):
        rtype = rel.get("Type")
        target = rel.get("Target")
        if not rtype or not target or rel.get("TargetMode") == "External":
            continue
        if target.startswith("/"):
            resolved = target.lstrip("/")
        else:
            resolved = posixpath.normpath(posixpath.join(source_dir, target))
        out.setdefault(rtype, resolved)
    return out


def _check_file(path: str) -> int:
    """Size of the regular file at *path*, or a CounterdraftError."""
    try:
        st = os.stat(path)
    except FileNotFoundError:
        raise _fail("file not found", path) from None
    except PermissionError:
        raise _fail("cannot read the file (permission denied)", path) from None
    except OSError as err:
        raise _fail(f"cannot read the file ({err.strerror or _one_line(err)})", path) from None
    if stat.S_ISDIR(st.st_mode):
        raise _fail("is a folder, not a .docx file", path)
    if not stat.S_ISREG(st.st_mode):
        raise _fail("is not a regular file", path)
    if st.st_size == 0:
        raise _fail("the file is empty (0 bytes)", path)
    return st.st_size


def _not_a_zip_problem(magic: bytes) -> str:
    if magic.startswith(b"{\\rtf"):
        return "an RTF file, not a .docx; save it as .docx and try again"
    if magic.startswith(b"%PDF"):
        return "a PDF file, not a .docx"
    if magic.startswith(b"PK"):
        return "corrupt or truncated .docx (its zip directory is missing or damaged)"
    return "not a .docx file (it is not a zip package)"


def open_docx_package(path: str | os.PathLike[str]) -> DocxPackage:
    """Open *path* read-only, check it and parse its main document, styles and numbering.

    Raises :class:`CounterdraftError` (one line naming the file) for every problem listed in
    the module docstring.
    """
    path = os.fspath(path)
    size = _check_file(path)
    try:
        fh = open(path, "rb")  # noqa: SIM115 - closed by the with below; its own error gets its own message
    except OSError as err:
        raise _fail(f"cannot read the file ({err.strerror or _one_line(err)})", path) from None
    with fh:
        magic = fh.read(8)
        if magic == OLE_SIGNATURE:
            raise _fail(_ole_problem(fh, size), path)
        fh.seek(0)
        try:
            zf = zipfile.ZipFile(fh)
        except _ZIP_ERRORS:
            raise _fail(_not_a_zip_problem(magic), path) from None
        with zf:
            return _open_zip(zf, path)


def _open_zip(zf: zipfile.ZipFile, path: str) -> DocxPackage:
    _check_directory(zf, path)
    parts = _part_lookup(zf)

    # Every XML part: no DOCTYPE anywhere in the package.
    for name, info in parts.items():
        if name.endswith(_XML_SUFFIXES) and has_doctype(_read_head(zf, info, path)):
            raise _doctype_error(info.filename, path)

    def read(name: str) -> bytes | None:
        info = parts.get(name.lower())
        if info is None:
            return None
        return _read_entry(zf, info, path, limit=MAX_XML_PART_BYTES)

    package_rels = _rels_targets(read("_rels/.rels"), source_dir="", part="_rels/.rels", path=path)
    main = next((package_rels[t] for t in _OFFICE_DOCUMENT_TYPES if t in package_rels), None)
    if main is None or main.lower() not in parts:
        main = "word/document.xml"
    main_data = read(main)
    if main_data is None:
        raise _fail("not a .docx: the package has no main document part (word/document.xml)",
                    path)
    document = parse_xml_part(main_data, part=main, path=path)
    del main_data
    if document.tag == f"{{{_STRICT_W_NS}}}document":
        raise _fail("Strict Open XML .docx is not supported; save it as a standard "
                    "Word document (.docx) and try again", path)
    if document.tag != f"{{{W_NS}}}document":
        raise _fail(f"not a Word document: its main part {main} is not WordprocessingML", path)
    if document.find(f"{{{W_NS}}}body") is None:
        raise _fail(f"no text to read: the main part {main} has no body (w:body)", path)

    main_dir, main_name = posixpath.split(main)
    rels_name = posixpath.join(main_dir, "_rels", main_name + ".rels")
    doc_rels = _rels_targets(read(rels_name), source_dir=main_dir, part=rels_name, path=path)

    def optional_part(rel_type: str, fallback: str) -> etree._Element | None:
        name = doc_rels.get(rel_type)
        if name is None or name.lower() not in parts:
            name = posixpath.join(main_dir, fallback)
        data = read(name)
        if data is None:
            return None
        return parse_xml_part(data, part=name, path=path)

    styles = optional_part(_STYLES_TYPE, "styles.xml")
    numbering = optional_part(_NUMBERING_TYPE, "numbering.xml")
    return DocxPackage(path=path, main_part=main, document=document, styles=styles,
                       numbering=numbering)
