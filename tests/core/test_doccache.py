"""The parsed-document cache (core.doccache, core.reader.read_document(cache=True)).

References: the document parsed afresh (``read_document`` without the cache) -- a cached
document must equal it field for field; the file's bytes (a changed byte is another entry).
"""

from __future__ import annotations

import json
import os
import stat
import sys
from pathlib import Path

import pytest

from core import doccache
from core.reader import read_document

DEMO = Path(__file__).resolve().parents[2] / "demo_agreements"


@pytest.fixture
def cache(tmp_path, monkeypatch) -> Path:
    folder = tmp_path / "cache"
    monkeypatch.setenv(doccache.CACHE_ENV, str(folder))
    return folder


def _entries(folder: Path) -> list[Path]:
    return sorted(folder.glob("*.json")) if folder.exists() else []


def _forbid_parsing(monkeypatch) -> None:
    import core.readers

    def refuse(*_a, **_k):
        raise AssertionError("parsed again although the cache holds the document")

    monkeypatch.setattr(core.readers, "read_blocks", refuse)


@pytest.mark.parametrize("name", ["draft.docx", "precedent.docx"])
def test_cached_document_equals_a_fresh_parse(cache, monkeypatch, tmp_path, name) -> None:
    src = tmp_path / name
    src.write_bytes((DEMO / name).read_bytes())
    fresh = read_document(str(src))
    first = read_document(str(src), cache=True)
    assert first == fresh
    assert len(_entries(cache)) == 1
    _forbid_parsing(monkeypatch)
    again = read_document(str(src), cache=True)
    assert again == fresh  # every block, provision, segment, term and warning
    assert again.blocks and again.provisions and again.terms


def test_text_and_markdown_are_cached_apart(cache, tmp_path) -> None:
    body = "1. Payment\nThe Customer shall pay within thirty (30) days.\n"
    txt, md = tmp_path / "a.txt", tmp_path / "a.md"
    txt.write_text(body, encoding="utf-8")
    md.write_text(body, encoding="utf-8")
    assert read_document(str(txt), cache=True) == read_document(str(txt))
    assert read_document(str(md), cache=True) == read_document(str(md))
    assert len(_entries(cache)) == 2  # same bytes, two readers


def test_same_bytes_under_another_name_is_a_hit_with_that_name(cache, monkeypatch, tmp_path) -> None:
    a, b = tmp_path / "one.docx", tmp_path / "two.docx"
    a.write_bytes((DEMO / "draft.docx").read_bytes())
    b.write_bytes(a.read_bytes())
    read_document(str(a), cache=True)
    _forbid_parsing(monkeypatch)
    got = read_document(str(b), cache=True)
    assert got.source == str(b)


def test_a_changed_file_misses_the_cache(cache, tmp_path) -> None:
    src = tmp_path / "terms.txt"
    src.write_text("1. Payment\nThe Customer shall pay within thirty (30) days.\n", encoding="utf-8")
    first = read_document(str(src), cache=True)
    src.write_text("1. Payment\nThe Customer shall pay within sixty (60) days.\n", encoding="utf-8")
    second = read_document(str(src), cache=True)
    assert second == read_document(str(src))
    assert second != first
    assert "sixty" in second.provisions[-1].text
    assert len(_entries(cache)) == 2


@pytest.mark.parametrize("damage", [b"", b"{not json", b"[1, 2]", b'{"format": 1, "key": "x"}',
                                    b'{"format": 1, "key": "KEY", "document": {"blocks": [[1]]}}'])
def test_a_corrupt_entry_is_ignored_and_rewritten(cache, tmp_path, damage) -> None:
    src = tmp_path / "a.txt"
    src.write_text("1. Term\nThis Agreement starts on the date it is signed.\n", encoding="utf-8")
    fresh = read_document(str(src))
    read_document(str(src), cache=True)
    (entry,) = _entries(cache)
    key = json.loads(entry.read_bytes())["key"]
    entry.write_bytes(damage.replace(b"KEY", key.encode()))
    assert read_document(str(src), cache=True) == fresh
    assert json.loads(entry.read_bytes())["key"] == key  # rewritten whole


def test_a_refused_file_stores_nothing(cache, tmp_path) -> None:
    from core.errors import CounterdraftError

    src = tmp_path / "empty.txt"
    src.write_text("   \n", encoding="utf-8")
    with pytest.raises(CounterdraftError):
        read_document(str(src), cache=True)
    assert _entries(cache) == []


@pytest.mark.skipif(os.name != "posix", reason="POSIX modes")
def test_the_cache_is_private(cache, tmp_path) -> None:
    src = tmp_path / "a.txt"
    src.write_text("1. Term\nThis Agreement starts on the date it is signed.\n", encoding="utf-8")
    read_document(str(src), cache=True)
    assert stat.S_IMODE(cache.stat().st_mode) == 0o700
    (entry,) = _entries(cache)
    assert stat.S_IMODE(entry.stat().st_mode) == 0o600


def test_an_unwritable_cache_folder_only_means_no_cache(tmp_path, monkeypatch) -> None:
    blocker = tmp_path / "a-file"
    blocker.write_text("not a folder", encoding="utf-8")
    monkeypatch.setenv(doccache.CACHE_ENV, str(blocker / "cache"))
    src = tmp_path / "a.txt"
    src.write_text("1. Term\nThis Agreement starts on the date it is signed.\n", encoding="utf-8")
    assert read_document(str(src), cache=True) == read_document(str(src))


def test_old_entries_beyond_the_limit_are_removed(cache, tmp_path, monkeypatch) -> None:
    monkeypatch.setattr(doccache, "CACHE_MAX_ENTRIES", 3)
    for i in range(5):
        src = tmp_path / f"a{i}.txt"
        src.write_text(f"1. Term\nThis Agreement lasts {i} years.\n", encoding="utf-8")
        read_document(str(src), cache=True)
    assert len(_entries(cache)) == 3


def test_platform_folders(monkeypatch, tmp_path) -> None:
    """The XDG Base Directory Specification's $XDG_CACHE_HOME (default ~/.cache) on Linux;
    the override first."""
    monkeypatch.delenv(doccache.CACHE_ENV, raising=False)
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "xdg"))
    if sys.platform.startswith("linux"):
        assert doccache.cache_folder() == tmp_path / "xdg" / "counterdraft" / "documents"
    monkeypatch.setenv(doccache.CACHE_ENV, str(tmp_path / "mine"))
    assert doccache.cache_folder() == tmp_path / "mine"


def test_provision_texts_are_left_out_only_where_their_segments_give_them(cache) -> None:
    # The reference: the provisions as read; a provision whose text is not what its segments
    # locate (a hand-made document) keeps its text in the entry and comes back unchanged.
    import dataclasses

    doc = read_document(str(DEMO / "draft.docx"))
    data = doccache._encode(doc)
    assert all(p[6] is None for p in data["provisions"])  # the structure reader's texts
    assert doccache._decode(json.loads(json.dumps(data)), doc.source) == doc
    odd = dataclasses.replace(doc, provisions=(
        dataclasses.replace(doc.provisions[0], text=doc.provisions[0].text + " (edited)"),
        *doc.provisions[1:]))
    data = doccache._encode(odd)
    assert data["provisions"][0][6] == odd.provisions[0].text
    assert doccache._decode(json.loads(json.dumps(data)), odd.source) == odd


def test_an_entry_whose_segments_leave_the_blocks_is_parsed_again(cache, tmp_path) -> None:
    src = tmp_path / "draft.docx"
    src.write_bytes((DEMO / "draft.docx").read_bytes())
    fresh = read_document(str(src), cache=True)
    [entry] = _entries(cache)
    data = json.loads(entry.read_bytes())
    data["document"]["provisions"][0][8] = [[10 ** 6, 0, 1]]  # a block the entry lacks
    entry.write_bytes(json.dumps(data).encode("utf-8"))
    assert read_document(str(src), cache=True) == fresh
