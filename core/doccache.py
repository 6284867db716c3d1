"""A private cache of read documents, so that reopening a draft or a precedent skips parsing.

:func:`core.reader.read_document` with ``cache=True`` looks here first.  An entry is the
:class:`~core.model.Document` read from one file's bytes, keyed by

* the SHA-256 of the file's bytes (a changed file is another key: it misses);
* how it was read (the reader for its suffix: .docx, Markdown or plain text);
* the reading code: :data:`CACHE_FORMAT`, the program's version and the size and time of
  each module of the reading pipeline (a changed reader never serves an old entry).

The file's own name is not part of the entry: the same bytes under another name are a hit,
given back with that name as ``source``.

Where: ``$COUNTERDRAFT_CACHE_DIR`` when set (the tests point it at a temporary folder), else
the platform's cache folder -- ``$XDG_CACHE_HOME/counterdraft/documents`` (default
``~/.cache``) on Linux, ``~/Library/Caches/Counterdraft/documents`` on macOS,
``%LOCALAPPDATA%\\Counterdraft\\Cache\\documents`` on Windows.  The folder is the user's
alone (mode 0o700) and every entry mode 0o600: an entry holds the agreement's text.

Format: JSON (no pickle: loading an entry runs no code), written atomically
(:func:`core.fileio.atomic_write_bytes`).  A provision's text is left out where its
segments give it (the blocks hold the words once).  An entry that cannot be read, is not valid JSON,
has another format or key, or does not rebuild a document is ignored -- the file is parsed
again and the entry rewritten.  Nothing here ever raises for a cache problem: the cache is an
optimisation, and a folder that cannot be written just means no cache.

At most :data:`CACHE_MAX_ENTRIES` entries are kept; the least recently used go first.

Cost: hashing the file (about 1 ms per MB), then one JSON parse and one dataclass per block,
provision, segment and term -- a fraction of parsing the .docx.
"""

from __future__ import annotations

import hashlib
import json
import os
import sys
from collections.abc import Callable, Sequence
from dataclasses import fields
from pathlib import Path
from typing import Any

from . import __version__
from .model import Block, DefinedTerm, Document, Provision, Segment

__all__ = ["CACHE_ENV", "CACHE_FORMAT", "CACHE_MAX_ENTRIES", "cache_folder", "cached_document"]

#: Environment variable naming the cache folder (overrides the platform's).
CACHE_ENV = "COUNTERDRAFT_CACHE_DIR"
#: The entries' format; a new format never reads an old entry.
CACHE_FORMAT = 2  # 2: a provision's text left out where its segments give it
#: Entries kept: a reviewer's drafts and precedents of the last weeks (a 100-page agreement
#: is about 1 MB of JSON, so the folder stays within about 200 MB even for long documents).
CACHE_MAX_ENTRIES = 200
#: The modules whose code decides what a read document holds (relative to core/): a change
#: to any of them changes the cache key.
_PIPELINE = ("reader.py", "text_reader.py", "structure.py", "terms.py", "model.py", "doccache.py",
             "docx", "readers", "odf", "layout")
_SUFFIX = ".json"


def cache_folder() -> Path:
    """The cache folder (not created here)."""
    given = os.environ.get(CACHE_ENV)
    if given:
        return Path(given)
    home = Path.home()
    if sys.platform == "darwin":
        return home / "Library" / "Caches" / "Counterdraft" / "documents"
    if os.name == "nt":
        base = os.environ.get("LOCALAPPDATA") or str(home / "AppData" / "Local")
        return Path(base) / "Counterdraft" / "Cache" / "documents"
    base = os.environ.get("XDG_CACHE_HOME") or str(home / ".cache")
    return Path(base) / "counterdraft" / "documents"


_fingerprint: str | None = None


def _code_fingerprint() -> str:
    """The program's version and the size and modification time of every module of the
    reading pipeline (computed once per process; a few dozen ``stat`` calls)."""
    global _fingerprint
    if _fingerprint is None:
        core = Path(__file__).resolve().parent
        parts = [f"format {CACHE_FORMAT}", f"version {__version__}"]
        for name in _PIPELINE:
            target = core / name
            files = sorted(target.glob("*.py")) if target.is_dir() else [target]
            for f in files:
                try:
                    st = f.stat()
                except OSError:
                    continue
                parts.append(f"{f.relative_to(core)} {st.st_size} {st.st_mtime_ns}")
        _fingerprint = hashlib.sha256("\n".join(parts).encode("utf-8")).hexdigest()
    return _fingerprint


# ------------------------------------------------------------------------------------------
# Documents as JSON (every field, in declaration order)
# ------------------------------------------------------------------------------------------

#: A block's fields (all plain values), in declaration order.
_BLOCK_FIELDS = tuple(f.name for f in fields(Block))


def _segments_text(segments: Sequence[Segment], blocks: Sequence[Block]) -> str | None:
    """The text *segments* locate in *blocks* (a provision's text, as the structure reader
    builds it: the segments joined by line breaks), or None when one is out of range."""
    if not all(0 <= s.block < len(blocks) and blocks[s.block].index == s.block for s in segments):
        return None
    return "\n".join(blocks[s.block].text[s.start:s.end] for s in segments)


def _encode(doc: Document) -> dict[str, Any]:
    """Every field; a provision's text as null when its segments give it (nearly always: it
    is half the entry, and a third of the time to write one)."""
    blocks = doc.blocks
    return {
        "provisions": [[p.id, p.kind, p.number, p.heading, p.level, p.parent,
                        None if _segments_text(p.segments, blocks) == p.text else p.text, p.term,
                        [[s.block, s.start, s.end] for s in p.segments]] for p in doc.provisions],
        "terms": [[t.term, t.definition, t.provision, t.uses, list(t.aliases),
                   list(t.span) if t.span is not None else None] for t in doc.terms],
        "blocks": [[getattr(b, f) for f in _BLOCK_FIELDS] for b in doc.blocks],
        "warnings": list(doc.warnings),
    }


def _decode(data: dict[str, Any], source: str) -> Document:
    blocks = tuple(Block(*b) for b in data["blocks"])
    provisions = []
    for i, k, n, h, lv, par, text, term, segs in data["provisions"]:
        segments = tuple(Segment(*s) for s in segs)
        if text is None:
            text = _segments_text(segments, blocks)
            if text is None:
                raise ValueError("a segment outside the blocks")
        provisions.append(Provision(i, k, n, h, lv, par, text, term, segments))
    terms = tuple(DefinedTerm(t, d, p, u, tuple(a), tuple(sp) if sp is not None else None)
                  for t, d, p, u, a, sp in data["terms"])
    return Document(source, tuple(provisions), terms, blocks, tuple(data["warnings"]))


# ------------------------------------------------------------------------------------------
# The cache
# ------------------------------------------------------------------------------------------

def _key(content: bytes, reader: str) -> str:
    h = hashlib.sha256(content)
    h.update(b"\0" + reader.encode("utf-8") + b"\0" + _code_fingerprint().encode("ascii"))
    return h.hexdigest()


def _load(entry: Path, key: str, source: str) -> Document | None:
    try:
        data = json.loads(entry.read_bytes())
        if not isinstance(data, dict) or data.get("format") != CACHE_FORMAT or data.get("key") != key:
            return None
        doc = _decode(data["document"], source)
    except (OSError, ValueError, TypeError, KeyError, IndexError):
        return None
    try:
        os.utime(entry)  # most recently used
    except OSError:
        pass
    return doc


def _store(folder: Path, entry: Path, key: str, doc: Document) -> None:
    from .fileio import atomic_write_bytes

    try:
        folder.mkdir(mode=0o700, parents=True, exist_ok=True)
        data = json.dumps({"format": CACHE_FORMAT, "key": key, "document": _encode(doc)},
                          ensure_ascii=False, separators=(",", ":")).encode("utf-8")
        old = os.umask(0o077)  # the entry is created 0o600
        try:
            atomic_write_bytes(entry, data)
        finally:
            os.umask(old)
        _prune(folder)
    except Exception:
        return


def _prune(folder: Path) -> None:
    """Remove the least recently used entries beyond CACHE_MAX_ENTRIES."""
    entries = []
    for f in folder.glob("*" + _SUFFIX):
        try:
            entries.append((f.stat().st_mtime_ns, f))
        except OSError:
            continue
    entries.sort(reverse=True)
    for _t, f in entries[CACHE_MAX_ENTRIES:]:
        try:
            f.unlink()
        except OSError:
            pass


def cached_document(path: str, content: bytes, reader: str, read: Callable[[], Document]) -> Document:
    """The document *read* gives for the file at *path* whose bytes are *content*, read by
    *reader* (a name for how its suffix is read): from the cache when an entry matches, else
    from *read*, then stored.  Errors of *read* (a file the reader refuses) propagate and
    nothing is stored."""
    key = _key(content, reader)
    folder = cache_folder()
    entry = folder / (key + _SUFFIX)
    doc = _load(entry, key, str(path))
    if doc is not None:
        return doc
    doc = read()
    _store(folder, entry, key, doc)
    return doc
