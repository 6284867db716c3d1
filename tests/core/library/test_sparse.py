"""The review's numpy-only sparse arithmetic and in-place cache reading against their references.

Outside references:
* ``scipy.sparse`` (``csr_matrix`` construction, ``tocsc``, the sparse product ``@`` and a
  matrix-vector product): :class:`core.library.sparse.Csr`, :func:`column_hits` and the
  bucket caches' column form must give scipy's arrays and figures exactly;
* NumPy's own readers (``np.load``) and ``np.unique``: the in-place reader of .npz files
  (:mod:`core.library.npzview`) and :func:`unique_sorted`;
* Python's ``re`` with the plain alternation of a document's term forms: the term replacer's
  pattern with its first-character look-ahead; pathlib's ``relative_to``: the scan's paths.
"""

from __future__ import annotations

import io
import mmap
import re

import numpy as np
import pytest
from scipy.sparse import csr_matrix

from core.library import sparse
from core.library.bucketcache import BucketArrays, BucketColumns, assemble
from core.library.index import _scan
from core.library.normalise import TermReplacer, _forms, fold, match_tokens, shared_replacer, shingle_hashes
from core.library.npzview import stored_arrays
from core.library.sparse import Csr, column_hits, unique_sorted
from tests.support.legal_texts import license_text

SEEDS = range(6)


def _random_csr(rng: np.random.Generator, rows: int, cols: int, density: float) -> csr_matrix:
    dense = rng.uniform(-1.0, 1.0, (rows, cols)) * (rng.random((rows, cols)) < density)
    dense[rng.random(rows) < 0.2] = 0.0  # some empty rows
    return csr_matrix(dense)


def _ours(m: csr_matrix) -> Csr:
    return Csr(m.indptr, m.indices, m.data, m.shape)


@pytest.mark.parametrize("block", [1 << 20, 7, 1])
@pytest.mark.parametrize("seed", SEEDS)
def test_product_is_scipys_bit_for_bit(seed, block, monkeypatch):
    monkeypatch.setattr(sparse, "DOT_BLOCK", block)  # small blocks: rows taken a few at a time
    rng = np.random.default_rng(seed)
    n, k, m = rng.integers(1, 40, 3)
    a = _random_csr(rng, n, k, rng.uniform(0.05, 0.6))
    b = _random_csr(rng, k, m, rng.uniform(0.05, 0.6))
    # Reference: scipy's sparse product (same sums, same order: equal, not merely close).
    np.testing.assert_array_equal(_ours(a).dot(_ours(b)), (a @ b).toarray())


def test_product_of_empty_matrices_is_zero():
    a, b = Csr.empty(4), Csr(np.zeros(5, np.int32), np.zeros(0, np.int32), np.zeros(0), (4, 3))
    assert a.dot(b).shape == (0, 3)
    no_entries = Csr(np.zeros(3, np.int32), np.zeros(0, np.int32), np.zeros(0), (2, 4))
    np.testing.assert_array_equal(no_entries.dot(b), np.zeros((2, 3)))


@pytest.mark.parametrize("seed", SEEDS)
def test_transpose_and_construction_are_scipys(seed):
    rng = np.random.default_rng(seed)
    m = _random_csr(rng, *rng.integers(1, 50, 2), 0.2)
    # Reference: scipy's tocsc arrays are the transpose's CSR arrays.
    t, ref = _ours(m).transpose(), m.tocsc()
    np.testing.assert_array_equal(t.indptr, ref.indptr)
    np.testing.assert_array_equal(t.indices, ref.indices)
    np.testing.assert_array_equal(t.data, ref.data)
    assert t.shape == m.shape[::-1]
    # Reference: csr_matrix((data, (rows, cols))) from entries in row-major order.
    coo = m.tocoo()
    ours = Csr.from_entries(coo.row, coo.col, coo.data, m.shape)
    theirs = csr_matrix((coo.data, (coo.row, coo.col)), shape=m.shape)
    np.testing.assert_array_equal(ours.indptr, theirs.indptr)
    np.testing.assert_array_equal(ours.indices, theirs.indices)
    np.testing.assert_array_equal(ours.toarray(), theirs.toarray())


@pytest.mark.parametrize("seed", SEEDS)
def test_column_hits_are_scipys_matrix_vector_product(seed):
    rng = np.random.default_rng(seed)
    rows, cols = rng.integers(1, 300, 2)
    m = csr_matrix((rng.random((rows, cols)) < 0.1).astype(np.int32))
    picks = np.sort(rng.choice(cols, rng.integers(0, cols + 1), replace=False))
    indicator = np.zeros(cols, dtype=np.int64)
    indicator[picks] = 1
    by_columns = m.tocsc()
    # Reference: scipy's product of the matrix with the 0/1 vector of the picked columns.
    np.testing.assert_array_equal(column_hits(by_columns.indptr, by_columns.indices, picks, rows), m @ indicator)


@pytest.mark.parametrize("seed", SEEDS)
def test_unique_sorted_is_numpys_unique(seed):
    rng = np.random.default_rng(seed)
    values = rng.integers(0, 2**63, rng.integers(0, 200), dtype=np.uint64)
    values = np.concatenate([values, values[: values.size // 3]])
    # Reference: np.unique.
    np.testing.assert_array_equal(unique_sorted(values), np.unique(values))
    assert unique_sorted(values).dtype == values.dtype


def _bucket(rng: np.random.Generator, rows: int) -> BucketArrays:
    vocab = [f"w{i}" for i in range(60)]
    sets = {}
    for i in range(rows):
        words = list(rng.choice(vocab, rng.integers(1, 25)))
        sets[f"{i:032x}"] = (shingle_hashes(words), unique_sorted(shingle_hashes(words, size=1)))
    counts = rng.integers(1, 5, rows)
    docptr = np.concatenate([[0], np.cumsum(counts)])
    return assemble(None, hashes=list(sets), count=counts, sample=np.arange(rows), docptr=docptr,
                    docs=rng.integers(0, 50, int(docptr[-1])), new_sets=sets)


@pytest.mark.parametrize("seed", SEEDS)
def test_a_bucket_cache_keeps_scipys_column_form_and_reads_back(seed):
    rng = np.random.default_rng(seed)
    arrays = _bucket(rng, int(rng.integers(1, 40)))
    data = arrays.to_npz_bytes()
    columns = BucketColumns.from_npz_bytes(data)
    # Reference: scipy's tocsc of the build's row-major incidence matrices.
    for matrix, indptr, indices in ((arrays.shingle_matrix(), columns.cindptr, columns.cindices),
                                    (arrays.word_matrix(), columns.wcindptr, columns.wcindices)):
        ref = matrix.tocsc()
        np.testing.assert_array_equal(indptr, ref.indptr)
        np.testing.assert_array_equal(indices, ref.indices)
    # The build reads its rows back as they were written.
    again = BucketArrays.from_npz_bytes(data)
    for name in ("indptr", "indices", "windptr", "windices", "cols", "wcols", "count", "docs"):
        np.testing.assert_array_equal(getattr(again, name), getattr(arrays, name))
    # A cache written before the columns were kept (rows only) reads as the same columns,
    # turned round with numpy alone.
    buf = io.BytesIO()
    np.savez(buf, **{f: getattr(arrays, f) for f in ("hashes", "cols", "indptr", "indices", "sizes", "wcols",
                                                       "windptr", "windices", "count", "sample", "variant",
                                                       "docptr", "docs")})
    old = BucketColumns.from_npz_bytes(buf.getvalue())
    np.testing.assert_array_equal(old.cindptr, columns.cindptr)
    np.testing.assert_array_equal(old.cindices, columns.cindices)
    np.testing.assert_array_equal(old.wcindices, columns.wcindices)


def test_arrays_read_in_place_are_numpys(tmp_path):
    rng = np.random.default_rng(7)
    arrays = {"a": rng.integers(0, 9, 100), "b": rng.random((3, 4)), "c": np.array(["x", "yz"]),
              "d": np.asfortranarray(rng.random((5, 2))), "e": np.zeros(0, np.uint64)}
    buf = io.BytesIO()
    np.savez(buf, **arrays)
    data = buf.getvalue()
    path = tmp_path / "a.npz"
    path.write_bytes(data)
    with open(path, "rb") as fh:
        mapped = mmap.mmap(fh.fileno(), 0, access=mmap.ACCESS_READ)
    # Reference: np.load of the same file.
    with np.load(io.BytesIO(data)) as ref:
        for source in (data, mapped):
            got = stored_arrays(source, list(arrays))
            assert got is not None
            for name in arrays:
                np.testing.assert_array_equal(got[name], ref[name])
                assert got[name].dtype == ref[name].dtype and got[name].shape == ref[name].shape
    assert stored_arrays(data, ["a", "missing"]) is None
    compressed = io.BytesIO()
    np.savez_compressed(compressed, **arrays)
    assert stored_arrays(compressed.getvalue(), ["a"]) is None  # np.load reads those
    assert stored_arrays(b"not a zip file", ["a"]) is None


def _plain_pattern(names: list[str]) -> re.Pattern[str]:
    forms = sorted({f for n in names for f in _forms(fold(n).strip())}, key=len, reverse=True)
    return re.compile(rf"(?<![\w])(?:{'|'.join(re.escape(f) for f in forms)})(?![\w])")


@pytest.mark.parametrize("licence", ["apache-2.0", "gpl-3.0", "mpl-2.0"])
def test_term_replacement_matches_the_plain_alternation(licence):
    text = fold(license_text(licence))
    words = sorted({w for w in re.findall(r"\b[A-Z][a-z]+\b", text)})
    rng = np.random.default_rng(len(words))
    names = [str(w) for w in rng.choice(words, min(25, len(words)), replace=False)]
    names += [f"{a} {b}" for a, b in zip(names[:5], names[5:10])] + ["Work", "Licensor", "Contributor"]
    replacer = TermReplacer({n: n for n in names})
    # Reference: the plain alternation of every form, longest first, with Python's re.
    ref = _plain_pattern(names).sub("<T>", text)
    assert replacer.sub(text, lambda _c: "<T>") == ref.replace("<T>", " <T> ")


def test_a_shared_replacer_gives_the_tokens_a_fresh_one_gives():
    text = fold(license_text("apache-2.0"))
    names = {"Licensor": "Licensor", "Work": "Work", "Derivative Works": "Derivative Works"}
    shared = shared_replacer(names)
    assert shared_replacer(dict(names)) is shared
    paragraphs = [p for p in text.split("\n\n") if p.strip()][:40]
    for p in paragraphs * 2:  # the second time from its memory
        assert match_tokens(p, terms=shared) == match_tokens(p, terms=TermReplacer(names))


def test_scanned_paths_are_relative_to_the_root(tmp_path):
    root = tmp_path / "set"
    for rel in ("a.docx", "sub/b.md", "sub/deeper/c.txt", "other/d.odt", ".hidden/e.docx", "sub/~$lock.docx"):
        (root / rel).parent.mkdir(parents=True, exist_ok=True)
        (root / rel).write_text("x")
    found = _scan(root)
    # Reference: pathlib's relative_to of each file found.
    from pathlib import Path

    assert [f.rel for f in found] == [Path(f.path).relative_to(root).as_posix() for f in found]
    assert [f.rel for f in found] == ["a.docx", "other/d.odt", "sub/b.md", "sub/deeper/c.txt"]


def test_a_clause_type_model_saved_by_rows_reads_as_the_one_saved_by_terms():
    from core.library.clausetypes import NeighbourClassifier, load_taxonomy

    texts = [" ".join(match_tokens(s)) for t in load_taxonomy().types for s in t.seeds]
    clf = NeighbourClassifier.fit([(x, "payment") for x in texts[:25]])
    m = clf._matrix
    buf = io.BytesIO()  # the layout written before the matrix was kept by terms
    np.savez(buf, vocabulary=np.array(clf._terms, dtype=str), idf=clf._idf, data=m.data, indices=m.indices,
             indptr=m.indptr, shape=np.array(m.shape), labels=np.array(clf._labels, dtype=str))
    by_rows = NeighbourClassifier.from_npz_bytes(buf.getvalue())
    by_terms = NeighbourClassifier.from_npz_bytes(clf.to_npz_bytes())
    queries = texts[25:60]
    assert by_rows.predict(queries) == by_terms.predict(queries) == clf.predict(queries)
    # Reference: scipy's transpose of the rows is what is kept by terms.
    ref = csr_matrix((m.data, m.indices, m.indptr), shape=m.shape).tocsc()
    np.testing.assert_array_equal(by_terms._terms_by_example().indptr, ref.indptr)
    np.testing.assert_array_equal(by_terms._matrix.toarray(), ref.toarray())
