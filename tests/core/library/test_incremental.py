"""Incremental builds: adding, changing or removing one agreement gives what a fresh build of
the same folder gives.

Outside references:
* a fresh full build of the same files is the reference for every incremental build; its
  clustering is checked against scipy's ``linkage`` + ``fcluster`` and scikit-learn's
  ``AgglomerativeClustering`` in test_variants.py, so equality here carries those references
  over to the incremental path;
* the demo generator's record (demo_agreements/scenario.json): the demo precedent set whose
  files are added, changed and removed;
* ``hashlib.sha256`` (FIPS 180-4) via the index's stored file hashes (a changed file is
  re-read).

What is compared: every provision's clause type, how it was typed, its bucket and normalised
wording; every variant's wordings (the partition), ordinal, counts, sample provision and the
reviewer's position; every bucket's frequency cache (wordings in order, counts, samples, the
documents using each wording, shingle and word sets, variants); the frequency figures of
the demo review; the negotiation patterns.  Row ids are not compared: they record insertion
order, which a fresh build and an incremental one need not share.
"""

from __future__ import annotations

import importlib.util
import shutil
import sqlite3
from pathlib import Path

import pytest

import core.library.index as index_module
from core.library.commands import review_options
from core.library.frequency import apply_frequency
from core.library.index import build_library, open_library, read_bucket
from core.library.patterns import negotiation_patterns
from core.reader import read_document
from core.review import run_review

from .conftest import DEMO, ROOT

SET = DEMO / "precedent_set"
ADDED = "07-caddow-fenn-biosciences.docx"
CHANGED = "03-saltreach-water-services.docx"
REMOVED = "11-hollin-vree-energy.docx"
LABELLED = ("05-vantry-and-loame-manufacturing.docx", "7.1")  # a payment clause


def _provisions(lib) -> list[tuple]:
    return sorted(r[2:8] for r in lib.store.provision_rows())


def _members(lib) -> dict[int | None, set[str]]:
    """The wordings of each variant id."""
    members: dict[int | None, set[str]] = {}
    for *_r, h, vid in lib.store.provision_rows():
        members.setdefault(vid, set()).add(h)
    return members


def _variants(lib) -> list[tuple]:
    """Each variant as (bucket, ordinal, its wordings, counts, sample path and provision, position)."""
    members = _members(lib)
    refs = lib.provision_refs([v.sample for v in lib.variants() if v.sample is not None])
    places = {r[0]: (r[2], r[3]) for r in lib.store.provision_rows()}
    out = []
    for v in lib.variants():
        out.append((v.bucket, v.ordinal, frozenset(members[v.id]), v.wordings, v.provisions, v.documents,
                    places[v.sample], refs[v.sample], v.position))
    assert None not in members  # every provision has a variant
    return sorted(out, key=lambda t: (t[0], t[1]))


def _caches(lib) -> dict[str, tuple]:
    """Each bucket's cache with ids turned into what they name (paths, provision ids, wordings)."""
    rows = lib.store.provision_rows()
    paths = {r[1]: r[2] for r in rows}
    pids = {r[0]: f"{r[2]}#{r[3]}" for r in rows}
    wordings = _members(lib)
    out = {}
    for name in lib.bucket_names():
        a = read_bucket(lib.store, name)
        rows = []
        for i, sh, wd in zip(range(a.rows), a.shingle_sets(), _word_sets(a)):
            docs = frozenset(paths[d] for d in a.docs[a.docptr[i]:a.docptr[i + 1]].tolist())
            rows.append((a.hashes[i].decode(), int(a.count[i]), pids[int(a.sample[i])], docs,
                         tuple(sh.tolist()), tuple(wd.tolist()), frozenset(wordings[int(a.variant[i])])))
        out[name] = tuple(rows)
    return out


def _word_sets(a) -> list:
    return [a.wcols[a.windices[a.windptr[i]:a.windptr[i + 1]]] for i in range(a.rows)]


def _frequencies(lib, pair: tuple[Path, Path] = (DEMO / "draft.docx", DEMO / "precedent.docx")) -> tuple:
    draft = read_document(str(pair[0]))
    prec = read_document(str(pair[1]))
    review = apply_frequency(run_review(draft, prec, **review_options(lib)), lib)
    return (tuple(p.frequency for p in review.pairs), tuple(d.frequency for d in review.deviations),
            tuple((d.rank, d.severity) for d in review.deviations))


def _snapshot(root: Path, *, patterns: bool = False, pair: tuple[Path, Path] | None = None,
              backend=None) -> dict:
    with (backend.open(root) if backend is not None else open_library(root, refresh=False)) as lib:
        snap = {"total": lib.total, "provisions": _provisions(lib), "variants": _variants(lib),
                "caches": _caches(lib), "frequencies": _frequencies(lib, *([pair] if pair else []))}
        if patterns:
            snap["patterns"] = negotiation_patterns(lib, read_document(str(DEMO / "precedent.docx")))
    return snap


def _label(root: Path, backend) -> None:
    with backend.open(root) as lib:
        lib.label_variant(lib.variant_of(*LABELLED), "house wording")


def _fresh(state: Path, tmp: Path, name: str, backend) -> dict:
    """Reference: a fresh full build of a copy of *state*'s files, labelled the same way."""
    copy = tmp / name
    shutil.copytree(state, copy, ignore=shutil.ignore_patterns(".counterdraft"))
    backend.build(copy)
    _label(copy, backend)
    return _snapshot(copy, patterns=name == "after-remove", backend=backend)


@pytest.fixture(scope="module")
def references(tmp_path_factory, backend):
    """The folder's states after each step and their fresh builds' snapshots."""
    tmp = tmp_path_factory.mktemp("fresh")
    state = tmp / "state"
    shutil.copytree(SET, state, ignore=shutil.ignore_patterns(".counterdraft"))
    refs = {}
    for step in _STEPS:
        step(state)
        refs[step.__name__] = _fresh(state, tmp, step.__name__.replace("_", "-"), backend)
    return refs


def start(folder: Path) -> None:
    (folder / ADDED).unlink()


def after_add(folder: Path) -> None:
    shutil.copy(SET / ADDED, folder / ADDED)


def after_change(folder: Path) -> None:
    # The draft on the buyer's own paper: other wordings, other defined terms.
    (folder / CHANGED).write_bytes((DEMO / "draft.docx").read_bytes())


def after_remove(folder: Path) -> None:
    (folder / REMOVED).unlink()


_STEPS = (start, after_add, after_change, after_remove)


@pytest.mark.parametrize("regroup", [False, True], ids=["defaults", "regroup-every-bucket"])
def test_adding_changing_and_removing_one_agreement_equals_a_fresh_build(tmp_path, monkeypatch, references,
                                                                         regroup, backend):
    regrouped: list[int] = []
    if regroup:  # the demo's buckets are small: make every change go through regroup
        monkeypatch.setattr(index_module, "ALWAYS_FULL_WORDINGS", 0)
        monkeypatch.setattr(index_module, "CLUSTER_DRIFT", 1e9)
        real = index_module.regroup
        monkeypatch.setattr(index_module, "regroup", lambda *a, **k: regrouped.append(1) or real(*a, **k))
    folder = tmp_path / "library"
    shutil.copytree(SET, folder, ignore=shutil.ignore_patterns(".counterdraft"))
    for step in _STEPS:
        step(folder)
        report = backend.build(folder)
        if step is start:
            _label(folder, backend)  # labelled once; the later builds must keep the position right
            assert report.read == 11
        else:
            assert report.read + report.removed == 1  # one agreement read or dropped, no more
        got = _snapshot(folder, patterns=step is after_remove and regroup, backend=backend)
        want = references[step.__name__]
        for key in got:
            assert got[key] == want[key], (step.__name__, key)
    assert (len(regrouped) > 10) == regroup  # the path under test did run


def test_a_no_change_build_touches_nothing(tmp_path):
    folder = tmp_path / "library"
    shutil.copytree(SET, folder, ignore=shutil.ignore_patterns(".counterdraft"))
    build_library(folder)
    before = {p: p.stat().st_mtime_ns for p in (folder / ".counterdraft").rglob("*") if p.is_file()}
    again = build_library(folder)
    assert (again.read, again.removed) == (0, 0)
    after = {p: p.stat().st_mtime_ns for p in (folder / ".counterdraft").rglob("*") if p.is_file()}
    derived = {p: t for p, t in after.items() if p.suffix == ".npz"}
    assert derived == {p: before[p] for p in derived}  # no derived file rewritten


def _generated_corpus(folder: Path, count: int) -> None:
    """Agreements from the benchmarks' deterministic generator (benchmarks/_corpus.py)."""
    spec = importlib.util.spec_from_file_location("_bench_corpus", ROOT / "benchmarks" / "_corpus.py")
    corpus = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(corpus)
    folder.mkdir(parents=True)
    for i in range(count):
        (folder / f"g{i:03d}.docx").write_bytes(corpus.make_agreement_docx(pages=GENERATED_PAGES, seed=500 + i))
    (folder.parent / "pair").mkdir()
    for name, seed in (("draft", 7), ("precedent", 8)):
        (folder.parent / "pair" / f"{name}.docx").write_bytes(
            corpus.make_agreement_docx(pages=GENERATED_PAGES, seed=seed))


GENERATED = 30
GENERATED_PAGES = 4


def test_a_generated_corpus_built_incrementally_equals_a_fresh_build(tmp_path, monkeypatch):
    """The generated agreements share sentence parts, so near-duplicate wordings abound and
    variants hold several wordings: regroup works on real clusters here (its buckets are
    regrouped, not clustered in full, once past 20 wordings)."""
    monkeypatch.setattr(index_module, "ALWAYS_FULL_WORDINGS", 20)
    source = tmp_path / "source" / "set"
    _generated_corpus(source, GENERATED + 1)
    pair = (source.parent / "pair" / "draft.docx", source.parent / "pair" / "precedent.docx")
    folder = tmp_path / "library"
    shutil.copytree(source, folder)
    extra = folder / f"g{GENERATED:03d}.docx"
    extra.unlink()
    build_library(folder)
    regrouped: list[int] = []
    real = index_module.regroup
    monkeypatch.setattr(index_module, "regroup", lambda *a, **k: regrouped.append(1) or real(*a, **k))
    steps = (lambda: shutil.copy(source / extra.name, extra),
             lambda: (folder / "g005.docx").write_bytes((source / "g017.docx").read_bytes()),
             lambda: (folder / "g011.docx").unlink())
    for n, step in enumerate(steps):
        step()
        report = build_library(folder)
        assert report.read + report.removed == 1
        copy = tmp_path / f"fresh{n}"
        shutil.copytree(folder, copy, ignore=shutil.ignore_patterns(".counterdraft"))
        build_library(copy)
        # Reference: a fresh full build of the same files.
        want, got = _snapshot(copy, pair=pair), _snapshot(folder, pair=pair)
        for key in want:
            assert got[key] == want[key], (n, key)
        assert any(len(v[2]) > 1 for v in got["variants"])  # variants of several wordings exist
    assert regrouped  # the incremental path ran


def test_a_build_killed_between_a_cache_file_and_its_commit_is_repaired_by_the_next(tmp_path, monkeypatch,
                                                                                  backend):
    """A build that dies after rewriting some bucket caches but before committing their
    variants (simulated by an error on the third cache) leaves the next build to finish the
    job; the result is a fresh build's.  (On SQLite the caches are files written before the
    commit; a server store keeps the build in one transaction, so the error undoes it all.)"""
    monkeypatch.setattr(index_module, "ALWAYS_FULL_WORDINGS", 0)  # regroup every bucket
    folder = tmp_path / "library"
    shutil.copytree(SET, folder, ignore=shutil.ignore_patterns(".counterdraft"))
    (folder / ADDED).unlink()
    backend.build(folder)
    shutil.copy(SET / ADDED, folder / ADDED)
    real = index_module._write_blob
    written: list[str] = []

    def failing(store, name: str, data: bytes) -> None:
        if name.startswith(index_module.BUCKETS_DIRNAME + "/"):
            written.append(name)
            if len(written) == 3:
                raise OSError("simulated end of the process")
        real(store, name, data)

    monkeypatch.setattr(index_module, "_write_blob", failing)
    with pytest.raises(OSError, match="simulated"):
        backend.build(folder)
    monkeypatch.setattr(index_module, "_write_blob", real)
    backend.build(folder)
    # Reference: a fresh full build of the same files.
    copy = tmp_path / "fresh"
    shutil.copytree(folder, copy, ignore=shutil.ignore_patterns(".counterdraft"))
    backend.build(copy)
    want, got = _snapshot(copy, backend=backend), _snapshot(folder, backend=backend)
    for key in want:
        assert got[key] == want[key], key


def test_an_index_with_the_earlier_derived_layout_gets_it_anew(tmp_path):
    """An index whose derived files have the earlier layout (one variants.npz, no bucket
    files) is brought up to date by the next build, with no file re-read."""
    folder = tmp_path / "library"
    shutil.copytree(SET, folder, ignore=shutil.ignore_patterns(".counterdraft"))
    build_library(folder)
    want = _snapshot(folder)
    index = folder / ".counterdraft"
    shutil.rmtree(index / index_module.BUCKETS_DIRNAME)
    (index / index_module.CACHE_FILENAME).write_bytes(b"an earlier cache")
    with sqlite3.connect(index / index_module.DB_FILENAME) as conn:
        conn.execute("DELETE FROM meta WHERE key IN ('derived', 'vocabulary', 'neighbour_examples')")
        conn.execute("DELETE FROM bucket_state")
    conn.close()
    report = build_library(folder)
    assert (report.read, report.removed) == (0, 0)
    assert not (index / index_module.CACHE_FILENAME).exists()
    got = _snapshot(folder)
    for key in want:
        assert got[key] == want[key], key


def test_bucket_files_left_beside_a_new_database_are_not_taken_for_its_own(tmp_path):
    """The database removed (or set aside as damaged) while the bucket files stay: the new
    index reuses their content-derived arrays but stores every variant anew."""
    folder = tmp_path / "library"
    shutil.copytree(SET, folder, ignore=shutil.ignore_patterns(".counterdraft"))
    build_library(folder)
    want = _snapshot(folder)
    (folder / ".counterdraft" / index_module.DB_FILENAME).unlink()
    build_library(folder)
    got = _snapshot(folder)
    for key in want:
        assert got[key] == want[key], key
