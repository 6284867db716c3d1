"""The vocabulary model (gensim Word2Vec + Phrases).

Outside references:
* gensim's bundled Lee corpus (``gensim/test/test_data/lee_background.cor``) trained with the
  library's own training code, evaluated with ``KeyedVectors.evaluate_word_pairs`` on gensim's
  bundled WordSim-353 file (``wordsim353.tsv``; Finkelstein et al., 2002, "Placing search in
  context: the concept revisited"): human similarity judgements of 353 English word pairs.
"""

from __future__ import annotations

import os
import subprocess
import sys

import gensim
import numpy as np
import pytest

from core.library.normalise import vocab_tokens
from core.library.vocab import (
    RETRAIN_DRIFT,
    SMALL_CORPUS_WORDS,
    LibraryVocabulary,
    needs_training,
    train_vectors,
    vocabulary_drift,
)

from .conftest import ROOT

DATA = os.path.join(os.path.dirname(gensim.__file__), "test", "test_data")


@pytest.fixture(scope="module")
def lee_vectors():
    with open(os.path.join(DATA, "lee_background.cor"), encoding="utf-8") as fh:
        sentences = [vocab_tokens(line) for line in fh]
    return train_vectors(sentences), sentences


def test_wordsim353_spearman_is_positive_on_the_lee_corpus(lee_vectors):
    vectors, _ = lee_vectors
    pearson, spearman, oov = vectors.evaluate_word_pairs(os.path.join(DATA, "wordsim353.tsv"))
    # Measured with this code (gensim 4.4, 32-dim skip-gram, 40 epochs, seed 2024, one worker):
    # Spearman rho = 0.263 (p = 0.0024), Pearson r = 0.269, 62.6% of the pairs out of vocabulary
    # (the Lee corpus is 61,000 words of news).  CBOW on the same corpus gave rho near 0.
    assert spearman.statistic > 0.15
    assert spearman.pvalue < 0.05
    assert spearman.statistic == pytest.approx(0.263, abs=0.03)
    assert oov < 70.0


def test_training_is_deterministic(lee_vectors):
    _, sentences = lee_vectors
    again = train_vectors(sentences[:40])
    twice = train_vectors(sentences[:40])
    assert again.index_to_key == twice.index_to_key
    np.testing.assert_array_equal(again.vectors, twice.vectors)


def test_library_vocabulary_knows_defined_terms_and_round_trips(demo_library):
    vocab = demo_library.vocabulary
    assert vocab is not None
    # Defined terms are single tokens keeping their capitals.
    assert vocab.key("Confidential Information") == "Confidential_Information"
    assert vocab.similarity("Customer", "Supplier") is not None
    assert vocab.similarity("Customer", "Zyzzyva") is None
    s = vocab.similarity("Customer", "Supplier")
    assert -1.0 <= s <= 1.0
    again = LibraryVocabulary.from_npz_bytes(vocab.to_npz_bytes())
    assert again.similarity("Customer", "Supplier") == pytest.approx(s, abs=1e-6)


def test_nothing_to_learn_gives_no_model():
    assert train_vectors([]) is None
    assert train_vectors([["only", "once"]]) is None


def test_numpy_similarity_equals_gensims(lee_vectors):
    vectors, _ = lee_vectors
    ours = LibraryVocabulary.from_keyed_vectors(vectors)
    words = vectors.index_to_key[:60]
    for a, b in zip(words, reversed(words)):
        # Reference: gensim's KeyedVectors.similarity (cosine of the two vectors).
        assert ours.similarity(a, b) == pytest.approx(float(vectors.similarity(a, b)), abs=1e-5)
    again = LibraryVocabulary.from_npz_bytes(ours.to_npz_bytes())
    assert again.words == ours.words
    np.testing.assert_array_equal(again.vectors, ours.vectors)


def test_reading_the_model_does_not_import_gensim(demo_set, backend):
    code = ("import sys\n"
            "from core.library.index import open_library\n"
            f"lib = open_library({str(demo_set)!r}, store={backend.store(demo_set)!r}, refresh=False)\n"
            "assert lib.vocabulary.similarity('Customer', 'Supplier') is not None\n"
            "assert 'gensim' not in sys.modules and 'sklearn' not in sys.modules, sorted(sys.modules)\n")
    subprocess.run([sys.executable, "-c", code], check=True, cwd=ROOT)


def test_drift_decides_retraining():
    trained = [f"doc{i}" for i in range(100)]
    # The same first documents: nothing to retrain (training is deterministic).
    assert vocabulary_drift(trained=trained, current=trained, exhausted=False, documents=500) == 0.0
    # A document added after them changes nothing unless training used every document.
    assert vocabulary_drift(trained=trained, current=trained, exhausted=True, documents=101) == 0.01
    # Five of the first hundred replaced.
    moved = trained[:95] + ["new1", "new2", "new3", "new4", "new5"]
    assert vocabulary_drift(trained=trained, current=moved, exhausted=False, documents=500) == 0.05
    assert not needs_training(drift=0.05, words=SMALL_CORPUS_WORDS, has_model=True)
    assert needs_training(drift=RETRAIN_DRIFT + 0.01, words=SMALL_CORPUS_WORDS, has_model=True)
    assert needs_training(drift=0.01, words=SMALL_CORPUS_WORDS - 1, has_model=True)  # small: always exact
    assert needs_training(drift=0.01, words=10**6, has_model=False)
    assert not needs_training(drift=0.0, words=10, has_model=False)
