"""Bad .docx inputs (issue 2, point 8), each with the words its one-line error must contain.

Shared by the package tests (``core.docx.package``) and the command-line tests.  Formats:
ZIP per the PKWARE APPNOTE (local header §4.3.7, central directory §4.3.12); OLE compound
files per [MS-CFB] §2.2 (header), §2.3 (FAT sectors), §2.6 (directory entries); an encrypted
Office document is a compound file holding "EncryptionInfo" and "EncryptedPackage" streams
([MS-OFFCRYPTO] §2.3.4, from memory of the section number).
"""

from __future__ import annotations

import io
import struct
import zipfile
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

from tests.support.docx_fixtures import docx_bytes

__all__ = ["BAD_INPUTS", "BadInput", "compound_file", "healthy_docx", "rezip"]

_FREESECT = 0xFFFFFFFF
_ENDOFCHAIN = 0xFFFFFFFE
_FATSECT = 0xFFFFFFFD
_NOSTREAM = 0xFFFFFFFF


def healthy_docx() -> bytes:
    body = ("<w:p><w:r><w:t>1. The Supplier shall supply the Goods.</w:t></w:r></w:p>"
            "<w:p><w:r><w:t>2. The Customer shall pay the Price.</w:t></w:r></w:p>")
    return docx_bytes(body)


def rezip(data: bytes, *, replace: dict[str, bytes] | None = None,
          drop: tuple[str, ...] = (), compresslevel: int = 6) -> bytes:
    """Copy the zip *data*, replacing or dropping entries."""
    replace = dict(replace or {})
    out = io.BytesIO()
    with zipfile.ZipFile(io.BytesIO(data)) as src, zipfile.ZipFile(
        out, "w", zipfile.ZIP_DEFLATED, compresslevel=compresslevel
    ) as dst:
        for info in src.infolist():
            if info.filename in drop:
                continue
            payload = replace.pop(info.filename, None)
            dst.writestr(info.filename, payload if payload is not None else src.read(info))
        for name, payload in replace.items():
            dst.writestr(name, payload)
    return out.getvalue()


def _dir_entry(name: str, kind: int, *, child: int = _NOSTREAM, right: int = _NOSTREAM) -> bytes:
    """One 128-byte directory entry ([MS-CFB] §2.6.1)."""
    encoded = name.encode("utf-16-le") + b"\x00\x00"
    return struct.pack(
        "<64sHBBIII16sIQQIQ",
        encoded, len(encoded), kind, 1, _NOSTREAM, right, child, b"\x00" * 16, 0, 0, 0,
        _ENDOFCHAIN, 0,
    )


def compound_file(streams: list[str]) -> bytes:
    """A minimal version-3 compound file: header, one FAT sector, one directory sector holding
    the root storage and empty streams named *streams* (at most 3)."""
    assert len(streams) <= 3
    header = bytearray(512)
    header[0:8] = bytes.fromhex("D0CF11E0A1B11AE1")  # §2.2 Header Signature
    struct.pack_into("<HHHHH", header, 24, 0x003E, 0x0003, 0xFFFE, 9, 6)  # versions, order, shifts
    struct.pack_into("<IIIIIIIII", header, 40,
                     0,  # number of directory sectors (0 for version 3)
                     1,  # number of FAT sectors
                     1,  # first directory sector
                     0,  # transaction signature
                     0x1000,  # mini stream cutoff
                     _ENDOFCHAIN, 0,  # mini FAT: none
                     _ENDOFCHAIN, 0)  # DIFAT sectors: none
    difat = [0] + [_FREESECT] * 108  # the FAT lives in sector 0
    struct.pack_into("<109I", header, 76, *difat)
    fat = struct.pack("<128I", _FATSECT, _ENDOFCHAIN, *([_FREESECT] * 126))
    entries = [_dir_entry("Root Entry", 5, child=1 if streams else _NOSTREAM)]
    for i, name in enumerate(streams, start=1):
        entries.append(_dir_entry(name, 2, right=i + 1 if i < len(streams) else _NOSTREAM))
    directory = b"".join(entries).ljust(512, b"\x00")
    return bytes(header) + fat + directory


def _zip_bomb() -> bytes:
    # 4 MiB of spaces inside well-formed XML deflate about 1000:1.
    bomb = (b'<?xml version="1.0" encoding="UTF-8"?><w:document xmlns:w="http://schemas.'
            b'openxmlformats.org/wordprocessingml/2006/main"><w:body>' + b" " * (4 << 20)
            + b"</w:body></w:document>")
    return rezip(healthy_docx(), replace={"word/document.xml": bomb}, compresslevel=9)


def _lying_directory() -> bytes:
    """A bomb whose local header and central directory both claim 1000 bytes."""
    data = bytearray(_zip_bomb())
    with zipfile.ZipFile(io.BytesIO(bytes(data))) as zf:
        info = zf.getinfo("word/document.xml")
    struct.pack_into("<I", data, info.header_offset + 22, 1000)  # local header: uncompressed size
    pos = data.find(b"PK\x01\x02")
    while pos != -1:
        name_len = struct.unpack_from("<H", data, pos + 28)[0]
        if data[pos + 46: pos + 46 + name_len] == b"word/document.xml":
            struct.pack_into("<I", data, pos + 24, 1000)  # central directory: uncompressed size
            break
        pos = data.find(b"PK\x01\x02", pos + 4)
    assert pos != -1
    return bytes(data)


def _corrupt_entry() -> bytes:
    data = bytearray(healthy_docx())
    with zipfile.ZipFile(io.BytesIO(bytes(data))) as zf:
        info = zf.getinfo("word/document.xml")
    name_len, extra_len = struct.unpack_from("<HH", data, info.header_offset + 26)
    start = info.header_offset + 30 + name_len + extra_len
    for i in range(start + 8, start + min(info.compress_size - 8, 200)):
        data[i] ^= 0x5A
    return bytes(data)


_BILLION_LAUGHS = (
    b'<?xml version="1.0"?>\n<!DOCTYPE w:document [\n<!ENTITY a "ha">\n'
    b'<!ENTITY b "&a;&a;&a;&a;&a;&a;&a;&a;&a;&a;">\n<!ENTITY c "&b;&b;&b;&b;&b;&b;&b;&b;&b;&b;">\n]>\n'
    b'<w:document xmlns:w="http://schemas.openxmlformats.org/wordprocessingml/2006/main">'
    b"<w:body><w:p><w:r><w:t>&c;</w:t></w:r></w:p><w:p><w:r><w:t>After the entity</w:t></w:r>"
    b"</w:p></w:body></w:document>"
)

_EXTERNAL_ENTITY = (
    b'<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n'
    b'<!DOCTYPE cp:coreProperties [<!ENTITY x SYSTEM "file:///etc/hostname">]>\n'
    b'<cp:coreProperties xmlns:cp="http://schemas.openxmlformats.org/package/2006/metadata/'
    b'core-properties" xmlns:dc="http://purl.org/dc/elements/1.1/"><dc:title>&x;</dc:title>'
    b"</cp:coreProperties>"
)


@dataclass(frozen=True)
class BadInput:
    name: str
    #: Writes the bad file (or nothing, for "missing") under the folder; returns its path.
    make: Callable[[Path], Path]
    #: Lower-case words the one-line message must contain (any one of them: the command line
    #: checks a missing file or a folder before the .docx reader does).
    problem: tuple[str, ...]

    def named_in(self, message: str) -> bool:
        return any(words in message.lower() for words in self.problem)


def _writer(filename: str, payload: Callable[[], bytes]) -> Callable[[Path], Path]:
    def make(folder: Path) -> Path:
        path = folder / filename
        path.write_bytes(payload())
        return path
    return make


def _missing(folder: Path) -> Path:
    return folder / "not-there.docx"


def _folder(folder: Path) -> Path:
    path = folder / "a-folder.docx"
    path.mkdir()
    return path


BAD_INPUTS: tuple[BadInput, ...] = (
    BadInput("missing", _missing, ("file not found", "no such file")),
    BadInput("folder", _folder, ("folder",)),
    BadInput("empty", _writer("empty.docx", lambda: b""), ("empty",)),
    BadInput("legacy-doc", _writer("old.docx", lambda: compound_file(["WordDocument", "1Table"])),
             ("legacy binary word document (.doc)",)),
    BadInput("password-protected",
             _writer("locked.docx", lambda: compound_file(["EncryptionInfo", "EncryptedPackage"])),
             ("password-protected",)),
    BadInput("not-a-zip", _writer("notes.docx", lambda: b"Just some plain text, not a package.\n"),
             ("not a zip",)),
    BadInput("truncated", _writer("cut.docx", lambda: healthy_docx()[:2000]), ("truncated",)),
    BadInput("corrupt-entry", _writer("corrupt.docx", _corrupt_entry), ("corrupt",)),
    BadInput("no-document-part",
             _writer("nodoc.docx", lambda: rezip(healthy_docx(), drop=("word/document.xml",))),
             ("word/document.xml",)),
    BadInput("zip-bomb", _writer("bomb.docx", _zip_bomb), ("zip bomb",)),
    BadInput("lying-zip-directory", _writer("liar.docx", _lying_directory), ("corrupt",)),
    BadInput("doctype-entities",
             _writer("laughs.docx",
                     lambda: rezip(healthy_docx(), replace={"word/document.xml": _BILLION_LAUGHS})),
             ("doctype",)),
    BadInput("doctype-external-entity",
             _writer("external.docx",
                     lambda: rezip(healthy_docx(), replace={"docProps/core.xml": _EXTERNAL_ENTITY})),
             ("doctype",)),
    BadInput("no-body",  # ECMA-376 Part 1 §17.2.2: w:body is optional, but nothing to read
             _writer("nobody.docx", lambda: rezip(healthy_docx(), replace={
                 "word/document.xml": b'<w:document xmlns:w="http://schemas.openxmlformats.org/'
                                      b'wordprocessingml/2006/main"/>'})),
             ("no body (w:body)",)),
    BadInput("malformed-xml",
             _writer("broken.docx", lambda: rezip(
                 healthy_docx(),
                 replace={"word/document.xml": b'<w:document xmlns:w="http://schemas.openxml'
                          b'formats.org/wordprocessingml/2006/main"><w:body><w:p></w:body>'})),
             ("not well-formed xml",)),
)
