"""Minimal PDF files built by hand for the PDF reader's refusals.

Structure per ISO 32000-1 §7.5 (header, body of indirect objects, cross-reference table,
trailer with /Root and /Size, ``startxref``, ``%%EOF``); a page per §7.7.3.3 with a
/MediaBox and an optional content stream (§7.8.2) drawing text (§9.4: BT, Tf, Td, Tj, ET) or
a filled rectangle standing for a scanned image (§8.5.3: re, f).
"""

from __future__ import annotations

__all__ = ["pdf_bytes"]


def pdf_bytes(*, content: str = "", font: bool = False) -> bytes:
    """A one-page US-letter PDF whose page draws *content* (PDF operators)."""
    stream = content.encode("latin-1")
    resources = "/Resources << /Font << /F1 5 0 R >> >>" if font else "/Resources << >>"
    objects = [
        b"<< /Type /Catalog /Pages 2 0 R >>",
        b"<< /Type /Pages /Kids [3 0 R] /Count 1 >>",
        f"<< /Type /Page /Parent 2 0 R /MediaBox [0 0 612 792] /Contents 4 0 R {resources} >>".encode(),
        b"<< /Length " + str(len(stream)).encode() + b" >>\nstream\n" + stream + b"\nendstream",
    ]
    if font:
        objects.append(b"<< /Type /Font /Subtype /Type1 /BaseFont /Helvetica >>")
    out = bytearray(b"%PDF-1.4\n")
    offsets = []
    for i, body in enumerate(objects, start=1):
        offsets.append(len(out))
        out += f"{i} 0 obj\n".encode() + body + b"\nendobj\n"
    xref = len(out)
    out += f"xref\n0 {len(objects) + 1}\n".encode() + b"0000000000 65535 f \n"
    for off in offsets:
        out += f"{off:010d} 00000 n \n".encode()
    out += f"trailer\n<< /Size {len(objects) + 1} /Root 1 0 R >>\nstartxref\n{xref}\n%%EOF\n".encode()
    return bytes(out)
