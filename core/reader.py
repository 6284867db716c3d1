"""The earlier home of the reader: kept so that ``from core.reader import read_document``
still works.  Readers live in :mod:`core.readers` (one module per format)."""

from __future__ import annotations

from .readers import SUPPORTED_SUFFIXES, document_from_blocks, read_document, read_text

__all__ = ["SUPPORTED_SUFFIXES", "document_from_blocks", "read_document", "read_text"]
