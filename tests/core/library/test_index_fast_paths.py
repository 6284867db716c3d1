"""The index's shortcuts for one changed agreement give what the direct computation gives.

* The neighbour classifier's examples read up to each complete clause type's cut-off
  (``core.library.index._neighbour_examples``) against the reference: the scan of every
  typed provision in the examples' order, as the index chose them before it kept cut-offs
  (``_reference_examples`` below), after each step of random sequences of agreements added,
  changed (to another agreement's content: two files with one SHA-256, FIPS 180-4 via
  ``hashlib``) and removed, on both stores.

* Variants' ordinals moved by ranges (``_ordinal_runs``, ``shift_ordinals``) against a
  statement per variant: a simulation of the statements' meaning on random rankings, and
  the stores after random sequences, on both stores.
* The buckets' variants computed in a helper thread while the next bucket is read and the
  previous one written (``core.library.index._bucket_plans``) against the same builds with
  steps beside each other switched off (``COUNTERDRAFT_PARALLEL=0``, every bucket read,
  computed and written in turn): the same rows in every table, row ids included, and the
  same bytes in every bucket cache, after each step of the same sequences.

Outside references: the demo generator's record (demo_agreements/scenario.json) for the
agreements the sequences move about; ``hashlib.blake2b`` (RFC 7693) for the fingerprint.
"""

from __future__ import annotations

import hashlib
import random
import shutil
import threading
from collections import defaultdict
from functools import partial
from pathlib import Path

import numpy as np
import pytest

import core.library.clausetypes as clausetypes_module
import core.library.index as index_module
from core import parallel

from .conftest import DEMO, Backend

SET = DEMO / "precedent_set"
#: Steps per random sequence, and the sequences' seeds.
STEPS = 7
SEEDS = (3, 11)


def _reference_examples(store) -> tuple[list[tuple[str, int]], list[tuple[str, str]], str]:
    """The examples (type and provision, type and text) and fingerprint as a scan of every
    typed provision finds them (the code the index ran before it kept cut-offs)."""
    limit = clausetypes_module.MAX_EXAMPLES_PER_TYPE
    chosen: dict[str, dict[str, int]] = defaultdict(dict)
    for tid, h, pid, _doc in store.typed_examples(exclude_hash=hashlib.blake2b(b"", digest_size=16).hexdigest()):
        if len(chosen[tid]) < limit and h not in chosen[tid]:
            chosen[tid][h] = pid
    norms = store.provision_column("norm", [pid for per in chosen.values() for pid in per.values()])
    digest = hashlib.blake2b(digest_size=16)
    examples, texts = [], []
    for tid in sorted(chosen):
        for h in sorted(chosen[tid]):
            examples.append((tid, chosen[tid][h]))
            texts.append((norms[chosen[tid][h]], tid))
            digest.update(f"{tid}:{h}\n".encode())
    return examples, texts, digest.hexdigest()


def _random_step(rng: random.Random, folder: Path) -> str:
    """Add a missing demo agreement, remove one, or give one another's content."""
    present = sorted(p.name for p in folder.glob("*.docx"))
    missing = sorted(p.name for p in SET.glob("*.docx") if p.name not in present)
    move = rng.choice(["add", "change", "remove"] if missing and len(present) > 3 else
                      ["change", "remove"] if len(present) > 3 else ["add"])
    if move == "add":
        name = rng.choice(missing)
        shutil.copy(SET / name, folder / name)
    elif move == "remove":
        name = rng.choice(present)
        (folder / name).unlink()
    else:
        name = rng.choice(present)
        source = rng.choice([*sorted(SET.glob("*.docx")), DEMO / "draft.docx"])
        (folder / name).write_bytes(source.read_bytes())
    return f"{move} {name}"


@pytest.mark.parametrize("per_type", [2, 5])
@pytest.mark.parametrize("seed", SEEDS)
def test_examples_read_up_to_the_cutoffs_equal_a_scan_of_every_typed_provision(tmp_path, monkeypatch, backend,
                                                                               seed, per_type):
    monkeypatch.setattr(clausetypes_module, "MAX_EXAMPLES_PER_TYPE", per_type)  # types complete early
    real = index_module._neighbour_examples
    real_within = index_module._examples_before_cutoffs
    seen: list[tuple[tuple, tuple]] = []
    shortcuts: list[bool] = []

    def checked(store):
        got = real(store)
        seen.append(((got[0], index_module._example_texts(store, got[0]), got[1]), _reference_examples(store)))
        return got

    def within(store, documents, rank):
        found = real_within(store, documents, rank)
        shortcuts.append(found is not None)
        return found

    monkeypatch.setattr(index_module, "_neighbour_examples", checked)
    monkeypatch.setattr(index_module, "_examples_before_cutoffs", within)
    folder = tmp_path / "library"
    shutil.copytree(SET, folder, ignore=shutil.ignore_patterns(".counterdraft"))
    rng = random.Random(seed)
    backend.build(folder)
    steps = ["first build"]
    for _ in range(STEPS):
        steps.append(_random_step(rng, folder))
        backend.build(folder)
    assert len(seen) == len(steps)
    for step, (got, want) in zip(steps, seen, strict=True):
        assert got == want, step
        assert want[0], step  # there are examples to choose
    assert True in shortcuts  # the cut-offs were used ...
    assert False in shortcuts[1:]  # ... and found out of date at least once (a scan followed)


def _stored(backend, folder: Path) -> dict:
    """Everything the build stored: every table row through the database engine's own driver
    (ids included) and every bucket cache's bytes."""
    tables = {t: backend.query(folder, f"SELECT * FROM {t} ORDER BY 1") for t in ("variants", "bucket_state", "dirty")}
    tables["provisions"] = backend.query(folder, "SELECT * FROM provisions ORDER BY id")
    tables["documents"] = backend.query(folder, "SELECT id, path, sha256, provisions FROM documents ORDER BY id")
    with backend.open(folder) as lib:
        caches = {name: lib.store.read_blob(index_module.bucket_blob(name)) for name in lib.bucket_names()}
    return {"tables": tables, "caches": caches}


def _same_stores(tmp_path: Path, backend, seed: int, ways: dict) -> None:
    """Build copies of the demo set through the same random steps, each copy set up by its
    own function of *ways* before each build; after each step their stores hold the same."""
    folders = {name: tmp_path / name / "library" for name in ways}
    for folder in folders.values():
        shutil.copytree(SET, folder, ignore=shutil.ignore_patterns(".counterdraft"))
    for n in range(STEPS):
        if n:
            for folder in folders.values():  # the same step in every copy
                _random_step(random.Random(seed * 100 + n), folder)
        for name, folder in folders.items():
            ways[name]()
            backend.build(folder)
        first, *others = (_stored(backend, folder) for folder in folders.values())
        assert all(other == first for other in others), n


@pytest.mark.parametrize("seed", SEEDS)
def test_buckets_computed_beside_reading_and_writing_equal_them_in_turn(tmp_path, monkeypatch, backend, seed):
    monkeypatch.setattr(index_module, "ALWAYS_FULL_WORDINGS", 0)  # regroup too, not only full clusterings
    threads: list[str] = []
    real = index_module._compute_bucket
    monkeypatch.setattr(index_module, "_compute_bucket",
                        lambda given, config: threads.append(threading.current_thread().name) or real(given, config))
    _same_stores(tmp_path, backend, seed, {f"parallel-{mode}": partial(monkeypatch.setenv, parallel.PARALLEL_ENV, mode)
                                           for mode in ("1", "0")})
    assert any(name.startswith("counterdraft-variants") for name in threads)  # the helper thread ran
    assert threading.main_thread().name in threads  # and the in-turn path


@pytest.mark.parametrize("seed", SEEDS)
def test_ordinals_moved_by_ranges_equal_them_moved_one_by_one(tmp_path, monkeypatch, backend, seed):
    ranges: list[tuple] = []
    real = index_module._ordinal_runs
    monkeypatch.setattr(index_module, "_ordinal_runs", lambda *a: (found := real(*a), ranges.extend(found[0]))[0])
    _same_stores(tmp_path, backend, seed, {
        "ranges": partial(monkeypatch.setattr, index_module, "MIN_SHIFT_RUN", 1),
        "one-by-one": partial(monkeypatch.setattr, index_module, "MIN_SHIFT_RUN", 10**9)})
    assert ranges  # the ranges were used


@pytest.mark.parametrize("mode", ["1", "0"], ids=["beside", "in-turn"])
def test_a_cache_whose_matrices_are_damaged_counts_as_missing(tmp_path, monkeypatch, mode):
    """A bucket cache that reads as a file but whose matrices scipy refuses (a column pointer
    array one short: ``scipy.sparse.csc_matrix`` raises ValueError) is rebuilt as if it were
    missing.  Reference: the same build after deleting the caches instead."""
    monkeypatch.setenv(parallel.PARALLEL_ENV, mode)
    added = sorted(SET.glob("*.docx"))[6]
    damaged, missing = tmp_path / "damaged" / "library", tmp_path / "missing" / "library"
    shutil.copytree(SET, damaged, ignore=shutil.ignore_patterns(".counterdraft", added.name))
    index_module.build_library(damaged)
    shutil.copytree(damaged, missing)
    for cache in sorted((damaged / ".counterdraft" / index_module.BUCKETS_DIRNAME).glob("*.npz")):
        with np.load(cache) as stored:
            arrays = {name: stored[name] for name in stored.files}
        arrays["cindptr"] = arrays["cindptr"][:-1]
        with open(cache, "wb") as out:
            np.savez(out, **arrays)
    shutil.rmtree(missing / ".counterdraft" / index_module.BUCKETS_DIRNAME)
    again: list[str] = []
    real = index_module._read_bucket_input
    monkeypatch.setattr(index_module, "_read_bucket_input",
                        lambda store, bucket, **kw: (again.append(bucket) if kw.get("cache") is False else None)
                        or real(store, bucket, **kw))
    for folder in (damaged, missing):
        shutil.copy(added, folder / added.name)
        index_module.build_library(folder)
    want = _stored(Backend(), missing)
    got = _stored(Backend(), damaged)
    assert got["tables"] == want["tables"]
    rebuilt = {name: data for name, data in want["caches"].items() if data is not None}
    assert rebuilt and {name: got["caches"][name] for name in rebuilt} == rebuilt
    assert again  # the damaged caches were found so, and their buckets read again without them


def _apply(table: dict[int, list[int]], runs, rows, deleted) -> dict[int, list[int]]:
    """What the SQL of shift_ordinals, update_variants and delete_variants does to a bucket's
    variants ``{id: figures}`` (the statements' meaning, applied in Python, in their order)."""
    out = {vid: list(f) for vid, f in table.items()}
    for first, last, step in runs:
        for f in out.values():
            if first <= f[0] <= last:
                f[0] += step
    for *figures, vid in rows:
        out[vid] = list(figures)
    for vid in deleted:
        del out[vid]
    return out


@pytest.mark.parametrize("seed", range(40))
def test_ordinal_ranges_update_what_a_statement_per_variant_updates(monkeypatch, seed):
    """Random rankings before and after (variants dropped, new ones put in, a few moved or
    given other counts): ranges plus the remaining rows give every kept variant its new
    figures, as a statement per changed variant does."""
    monkeypatch.setattr(index_module, "MIN_SHIFT_RUN", int(np.random.default_rng(seed).integers(1, 6)))
    rng = np.random.default_rng(seed)
    n = int(rng.integers(1, 60))
    ranking = list(range(100, 100 + n))  # variant ids by ordinal before
    before = {vid: [k + 1, 1, 1, 1, vid] for k, vid in enumerate(ranking)}
    after_rank = [vid for vid in ranking if rng.random() > 0.1]  # some dropped
    for new in range(1000, 1000 + int(rng.integers(0, 4))):  # new variants put in anywhere
        after_rank.insert(int(rng.integers(0, len(after_rank) + 1)), new)
    if len(after_rank) > 2 and rng.random() < 0.5:  # one moved
        after_rank.insert(int(rng.integers(0, len(after_rank))), after_rank.pop(int(rng.integers(0, len(after_rank)))))
    after = {vid: [k + 1, 1, 1 + int(rng.random() < 0.05), 1, vid] for k, vid in enumerate(after_rank)}
    kept = [vid for vid in ranking if vid in after]
    b = np.array([before[v] for v in kept], dtype=np.int64).reshape(-1, 5)
    a = np.array([after[v] for v in kept], dtype=np.int64).reshape(-1, 5)
    changed = (a != b).any(axis=1)
    runs, shifted = index_module._ordinal_runs(b, a, changed)
    rows = [(*a[k].tolist(), kept[k]) for k in np.flatnonzero(changed & ~shifted).tolist()]
    deleted = [v for v in ranking if v not in after]
    want = _apply(before, [], [(*a[k].tolist(), kept[k]) for k in np.flatnonzero(changed).tolist()], deleted)
    assert _apply(before, runs, rows, deleted) == want == {v: after[v] for v in kept}
