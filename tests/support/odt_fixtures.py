"""Small OpenDocument text files for tests, written by hand per ISO/IEC 26300 (ODF 1.2):
the package (``mimetype`` first and stored, ``META-INF/manifest.xml``, Part 3 §3), the body
in ``content.xml`` and the common styles (list and outline styles) in ``styles.xml``.

Inline XML uses the prefixes ``office:``, ``text:``, ``style:``, ``fo:`` and ``table:``;
:data:`NS_DECL` declares them."""

from __future__ import annotations

import io
import zipfile

__all__ = ["NS_DECL", "odt_bytes"]

NS_DECL = (
    'xmlns:office="urn:oasis:names:tc:opendocument:xmlns:office:1.0" '
    'xmlns:text="urn:oasis:names:tc:opendocument:xmlns:text:1.0" '
    'xmlns:style="urn:oasis:names:tc:opendocument:xmlns:style:1.0" '
    'xmlns:fo="urn:oasis:names:tc:opendocument:xmlns:xsl-fo-compatible:1.0" '
    'xmlns:table="urn:oasis:names:tc:opendocument:xmlns:table:1.0" '
    'xmlns:xml="http://www.w3.org/XML/1998/namespace"'
)
_MANIFEST = (
    '<?xml version="1.0" encoding="UTF-8"?>'
    '<manifest:manifest xmlns:manifest="urn:oasis:names:tc:opendocument:xmlns:manifest:1.0" manifest:version="1.2">'
    '<manifest:file-entry manifest:full-path="/" manifest:media-type="application/vnd.oasis.opendocument.text"/>'
    '<manifest:file-entry manifest:full-path="content.xml" manifest:media-type="text/xml"/>'
    '<manifest:file-entry manifest:full-path="styles.xml" manifest:media-type="text/xml"/>'
    '{extra}</manifest:manifest>'
)


def odt_bytes(body: str, *, styles: str = "", automatic: str = "", encrypted: bool = False,
              mimetype: str = "application/vnd.oasis.opendocument.text") -> bytes:
    """An .odt whose ``office:text`` holds *body*, with *styles* inside ``office:styles`` of
    styles.xml and *automatic* inside content.xml's ``office:automatic-styles``."""
    content = (f'<?xml version="1.0" encoding="UTF-8"?><office:document-content {NS_DECL} office:version="1.2">'
               f"<office:automatic-styles>{automatic}</office:automatic-styles>"
               f"<office:body><office:text>{body}</office:text></office:body></office:document-content>")
    styles_xml = (f'<?xml version="1.0" encoding="UTF-8"?><office:document-styles {NS_DECL} office:version="1.2">'
                  f"<office:styles>{styles}</office:styles></office:document-styles>")
    extra = ('<manifest:encryption-data manifest:checksum-type="SHA1/1K" manifest:checksum="x"/>'
             if encrypted else "")
    out = io.BytesIO()
    with zipfile.ZipFile(out, "w", zipfile.ZIP_DEFLATED) as zf:
        zf.writestr(zipfile.ZipInfo("mimetype"), mimetype)  # stored, first (Part 3 §3.3)
        zf.writestr("META-INF/manifest.xml", _MANIFEST.format(extra=extra))
        zf.writestr("content.xml", content)
        zf.writestr("styles.xml", styles_xml)
    return out.getvalue()
