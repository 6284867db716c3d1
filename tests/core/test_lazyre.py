"""Patterns built from their kept programs (:mod:`core.lazyre`) against the standard library's
``re.compile`` of the same text and flags (the reference): the same pattern, flags and groups,
and the same matches, for every fixed pattern of the program and for the kept file read back;
and caseless patterns, searched in the lower-cased text, against ``re.IGNORECASE`` on the text
itself.
"""

from __future__ import annotations

import importlib
import pkgutil
import re
import sys
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import core
from core import lazyre
from core.kept import KeptStore
from core.lazyre import CaselessPattern, LazyPattern, compile_pattern

DEMO = Path(__file__).resolve().parents[2] / "demo_agreements"
#: Texts the patterns are run on: the demo agreements' words, and a few odd characters.
_ODD = "Section 2.1(a) \u201cSupplier\u201d shall not, as defined below, pay \u00a3100 (GBP) \u2013 30 days' notice.\n"


def _sample_text() -> str:
    from core.reader import read_document

    doc = read_document(str(DEMO / "precedent.docx"))
    return "\n".join(b.text for b in doc.blocks) + "\n" + _ODD


def _program_patterns() -> list[re.Pattern[str]]:
    """Every compiled pattern a module of core/ holds at module level (imported here)."""
    found: dict[tuple[str, int], re.Pattern[str]] = {}
    for info in pkgutil.walk_packages(core.__path__, "core."):
        if info.name.startswith("core.review.vocab") or info.name.endswith("__main__"):
            continue
        try:
            mod = importlib.import_module(info.name)
        except ImportError:  # an optional reader whose library is absent
            continue
        for value in vars(mod).values():
            if isinstance(value, LazyPattern):
                value = value.compiled()
            if isinstance(value, re.Pattern) and isinstance(value.pattern, str):
                found[(value.pattern, value.flags)] = value
    return list(found.values())


def _same(got: re.Pattern[str], ref: re.Pattern[str], text: str) -> None:
    assert (got.pattern, got.flags, got.groups, dict(got.groupindex)) == \
        (ref.pattern, ref.flags, ref.groups, dict(ref.groupindex))
    assert [(m.span(), m.groups()) for m in got.finditer(text)] == \
        [(m.span(), m.groups()) for m in ref.finditer(text)]


def test_every_fixed_pattern_matches_as_re_compile_does() -> None:
    # reference: the standard library's re.compile of the same text and flags
    text = _sample_text()
    patterns = _program_patterns()
    assert len(patterns) > 100  # the checks, severity, cross-reference and reader patterns
    for p in patterns:
        ref = re.compile(p.pattern, p.flags & ~re.UNICODE)
        _same(p, ref, text)
        _same(compile_pattern(p.pattern, p.flags & ~re.UNICODE), ref, text)


def test_kept_programs_read_back_build_the_same_patterns(tmp_path, monkeypatch) -> None:
    monkeypatch.setattr(sys, "dont_write_bytecode", False)
    path = str(tmp_path / "patterns.bin")
    sources = [(r"(?P<num>\d+(?:\.\d+)*)\s+(?P<head>[A-Z][a-z]+)", 0), (r"\bshall\s+not\b", re.IGNORECASE),
               (r"(?m)^[ \t]*\(([a-z]{1,3})\)", 0), (r"[\u2018\u2019']s\b|(?<=s)'", 0)]
    first = KeptStore(path, limit=100)
    monkeypatch.setattr(lazyre, "_store", lambda: first)
    for src, flags in sources:
        compile_pattern(src, flags)
    first.save()
    assert Path(path).exists() and first.added == 0
    second = KeptStore(path, limit=100)
    monkeypatch.setattr(lazyre, "_store", lambda: second)
    for src, flags in sources:
        text = "2.1 Fees shall NOT (ab) the Parties' rights " + _ODD
        _same(compile_pattern(src, flags), re.compile(src, flags), text)
    assert second.added == 0  # every one was built from the file


def test_nothing_is_written_when_bytecode_is_not(tmp_path, monkeypatch) -> None:
    monkeypatch.setattr(sys, "dont_write_bytecode", True)
    store = KeptStore(str(tmp_path / "patterns.bin"), limit=100)
    monkeypatch.setattr(lazyre, "_store", lambda: store)
    compile_pattern(r"\bindemnif(?:y|ies)\b")
    store.save()
    assert not (tmp_path / "patterns.bin").exists()


@pytest.mark.parametrize("junk", [b"", b"not marshal at all", b"\xe9\x00\x01"])
def test_a_damaged_file_falls_back_to_re_compile(tmp_path, monkeypatch, junk) -> None:
    path = tmp_path / "patterns.bin"
    path.write_bytes(junk)
    store = KeptStore(str(path), limit=100)
    monkeypatch.setattr(lazyre, "_store", lambda: store)
    _same(compile_pattern(r"(?i)\bterminat(?:e|ion)\b"), re.compile(r"(?i)\bterminat(?:e|ion)\b"),
          "Termination: either party may terminate.")


def test_a_bad_pattern_raises_as_re_compile_does() -> None:
    with pytest.raises(re.error):
        re.compile("(unclosed")
    with pytest.raises(re.error):
        compile_pattern("(unclosed")


_USED = """
import contextlib, io, json, sys
from core import lazyre
from core.cli import main
with contextlib.redirect_stdout(io.StringIO()):
    main(["review", sys.argv[1], "--against", sys.argv[2], "--acting-for", "Customer"])
print(json.dumps(sorted(p for p, _f in lazyre._store().used)))
"""


def test_every_process_asks_for_the_same_pattern_texts(tmp_path) -> None:
    """A kept program is found again only if the pattern's text is the same in the next
    process: no pattern may be built in the order of a set (which changes with the string
    hash seed of each interpreter)."""
    import json
    import os
    import subprocess

    root = Path(__file__).resolve().parents[2]
    used = []
    for seed in ("1", "2"):
        env = dict(os.environ, PYTHONHASHSEED=seed, PYTHONPATH=str(root), COUNTERDRAFT_PARALLEL="0",
                   COUNTERDRAFT_CACHE_DIR=str(tmp_path / seed))
        out = subprocess.run([sys.executable, "-c", _USED, str(DEMO / "draft.docx"), str(DEMO / "precedent.docx")],
                             env=env, cwd=root, capture_output=True, text=True, check=True)
        used.append(json.loads(out.stdout.strip().splitlines()[-1]))
    assert len(used[0]) > 100
    assert used[0] == used[1]


def _spans(matches) -> list[tuple[int, int]]:
    return [m.span() for m in matches]


_SOURCES = [r"(?<![\w'])(?:shall\s+not|shall|must|may)(?![\w])", r"\bsk(?:y|ies)\b", r"works?\b"]


@settings(max_examples=500, deadline=None)
@given(st.sampled_from(_SOURCES),
       st.text(alphabet="ShalNoTMustmaySKkyWorK\u0131\u017f\u0130\u212a\u00c9' \n", max_size=40))
def test_caseless_matches_are_those_of_re_ignoring_case(source: str, text: str) -> None:
    # dotless i, long s, capital I with a dot and the kelvin sign: the letters whose case
    # Python's re and str.lower() treat differently
    assert _spans(CaselessPattern(source).finditer(text)) == _spans(re.finditer(source, text, re.IGNORECASE))


def test_caseless_on_real_text_and_with_other_letters() -> None:
    text = _sample_text()
    for source in _SOURCES:
        assert _spans(CaselessPattern(source).finditer(text)) == _spans(re.finditer(source, text, re.IGNORECASE))
    upper = CaselessPattern(r"GBP|Supplier", compile=re.compile)  # capitals: searched ignoring case
    assert _spans(upper.finditer(text)) == _spans(re.finditer(r"GBP|Supplier", text, re.IGNORECASE))
