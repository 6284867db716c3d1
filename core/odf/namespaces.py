"""The OpenDocument namespaces (ISO/IEC 26300-1, ODF 1.2 Part 1 §1.5 / ODF 1.3 Part 3 §1.5)
and a helper that makes Clark-notation tag names (``{namespace}local``) for lxml."""

from __future__ import annotations

__all__ = ["DRAW", "FO", "MANIFEST", "OFFICE", "STYLE", "SVG", "TABLE", "TEXT", "XML", "q"]

OFFICE = "urn:oasis:names:tc:opendocument:xmlns:office:1.0"
TEXT = "urn:oasis:names:tc:opendocument:xmlns:text:1.0"
STYLE = "urn:oasis:names:tc:opendocument:xmlns:style:1.0"
FO = "urn:oasis:names:tc:opendocument:xmlns:xsl-fo-compatible:1.0"
TABLE = "urn:oasis:names:tc:opendocument:xmlns:table:1.0"
DRAW = "urn:oasis:names:tc:opendocument:xmlns:drawing:1.0"
SVG = "urn:oasis:names:tc:opendocument:xmlns:svg-compatible:1.0"
MANIFEST = "urn:oasis:names:tc:opendocument:xmlns:manifest:1.0"
XML = "http://www.w3.org/XML/1998/namespace"


def q(namespace: str, local: str) -> str:
    """``{namespace}local``: the name lxml gives an element or attribute."""
    return f"{{{namespace}}}{local}"
