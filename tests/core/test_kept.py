"""Kept compiled results (:mod:`core.kept`): record types whose methods come from the kept
file behave as the standard library's ``dataclasses`` makes them without it (the reference),
and a damaged or read-only store costs nothing but time."""

from __future__ import annotations

import dataclasses
import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

from core import kept
from core.kept import KeptStore, dataclass_methods_kept

ROOT = Path(__file__).resolve().parents[2]


def _make(frozen: bool):
    @dataclasses.dataclass(frozen=frozen, slots=True, order=True)
    class Clause:
        number: str
        heading: str = ""
        words: tuple[str, ...] = dataclasses.field(default=())

    return Clause


def _behaviour(cls) -> dict[str, object]:
    a, b = cls("1.2", "Fees"), cls("1.10", "Term", ("pay",))
    out: dict[str, object] = {
        "repr": repr(a), "eq": a == cls("1.2", "Fees"), "ne": a != b, "lt": a < b,
        "fields": [f.name for f in dataclasses.fields(cls)], "replace": repr(dataclasses.replace(a, heading="Price")),
        "hash": hash(a) == hash(cls("1.2", "Fees")) if cls.__hash__ is not None else None,
        "match_args": cls.__match_args__, "init_annotations": sorted(cls.__init__.__annotations__),
    }
    try:
        a.heading = "x"
        out["assign"] = "allowed"
    except dataclasses.FrozenInstanceError:
        out["assign"] = "frozen"
    return out


@pytest.mark.parametrize("frozen", [False, True])
def test_kept_methods_behave_as_freshly_compiled_ones(tmp_path, monkeypatch, frozen) -> None:
    # reference: the standard library's dataclasses compiling the methods itself
    assert dataclass_methods_kept()
    monkeypatch.setattr(sys, "dont_write_bytecode", False)
    store = KeptStore(str(tmp_path / "methods.bin"), limit=100)
    monkeypatch.setitem(kept._STORES, "dataclass-methods", store)
    first = _behaviour(_make(frozen))  # compiled and put in the store
    store.save()
    again = KeptStore(str(tmp_path / "methods.bin"), limit=100)
    monkeypatch.setitem(kept._STORES, "dataclass-methods", again)
    from_file = _behaviour(_make(frozen))
    assert again.added == 0  # every method came from the file
    monkeypatch.delattr(dataclasses, "exec")  # the library on its own
    reference = _behaviour(_make(frozen))
    assert first == from_file == reference


def test_a_damaged_store_is_ignored(tmp_path, monkeypatch) -> None:
    path = tmp_path / "methods.bin"
    path.write_bytes(b"\x00not marshal")
    monkeypatch.setitem(kept._STORES, "dataclass-methods", KeptStore(str(path), limit=100))
    monkeypatch.setattr(sys, "dont_write_bytecode", True)
    assert _behaviour(_make(True))["assign"] == "frozen"


def test_the_limit_keeps_what_this_process_used(tmp_path, monkeypatch) -> None:
    monkeypatch.setattr(sys, "dont_write_bytecode", False)
    path = str(tmp_path / "s.bin")
    old = KeptStore(path, limit=10)
    for k in range(10):
        old.put(f"old {k}", k)
    old.save()
    new = KeptStore(path, limit=10)
    assert new.get("old 3") == 3
    new.put("new", 99)
    new.save()
    assert KeptStore(path, limit=10)._read() == {"old 3": 3, "new": 99}


_FRESH = """
import json, sys
from core import kept
from core.model import Provision
import core.review
print(json.dumps({"kept": kept.dataclass_methods_kept(),
                  "added": kept.kept_store("dataclass-methods", limit=kept.MAX_METHODS).added}))
"""


def test_a_second_process_compiles_no_method(tmp_path) -> None:
    """With bytecode written (as an installed program runs), the first process keeps every
    method it compiles and the next one compiles none."""
    env = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}
    env["PYTHONPATH"] = str(ROOT)
    runs = [json.loads(subprocess.run([sys.executable, "-c", _FRESH], env=env, cwd=ROOT, capture_output=True,
                                      text=True, check=True).stdout) for _ in range(2)]
    assert runs[0]["kept"] and runs[1]["added"] == 0
