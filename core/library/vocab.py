"""The precedent set's vocabulary model: gensim Word2Vec trained on the library's own text.

Every use of a defined term is one token keeping its capitals ("Additional_Services"), so the
model learns where the firm's agreements use "Customer" and where the counterparty's use
"Client"; the term mapper of the review engine asks it how close two term names are
(:class:`LibraryVocabulary` implements ``core.review.termmap.VocabularyModel``).  Frequent
multi-word expressions of the ordinary words ("reasonable_endeavours", "force_majeure") are
joined first by gensim ``Phrases``; defined-term tokens are never joined with their
neighbours.

Deterministic: one worker thread and a fixed seed (gensim's documented condition for
reproducible training; Word2Vec in gensim 4 seeds its vectors from ``seed``, checked across
PYTHONHASHSEED values).  Small: 32 dimensions, skip-gram (better than CBOW on small corpora:
on gensim's Lee corpus it is the difference between a WordSim-353 Spearman near 0 and about
0.27 -- measured, see tests/core/library/test_vocab.py).

Cost: O(words * epochs * window) for training; the number of epochs falls as the corpus grows
(``TARGET_WORD_EPOCHS``) and the corpus is capped at ``MAX_TRAINING_WORDS`` distinct-provision
words, so training takes seconds at any library size.
"""

from __future__ import annotations

import io
import os
import sqlite3
from collections.abc import Sequence
from pathlib import Path

import numpy as np

from .normalise import TermReplacer, vocab_tokens

__all__ = [
    "MAX_EPOCHS",
    "MAX_TRAINING_WORDS",
    "MIN_COUNT",
    "MIN_EPOCHS",
    "PHRASES_MIN_COUNT",
    "PHRASES_THRESHOLD",
    "SEED",
    "SKIP_GRAM",
    "TARGET_WORD_EPOCHS",
    "VECTOR_SIZE",
    "WINDOW",
    "LibraryVocabulary",
    "library_sentences",
    "train_library_vocabulary",
    "train_vectors",
]

#: Small vectors train fast; 32 dimensions are enough for a vocabulary of a few thousand words
#: (gensim's tutorials use 100 for general English; measured here on the Lee corpus: 32 and 64
#: give the same WordSim-353 correlation).
VECTOR_SIZE = 32
#: Context words on each side (gensim's default).
WINDOW = 5
#: A word seen once has no reliable vector (gensim's default is 5; 2 keeps the rarer defined
#: terms of a small library).
MIN_COUNT = 2
#: 1 = skip-gram (see the module docstring).
SKIP_GRAM = 1
#: Fixed seed for reproducible vectors.
SEED = 20_24
#: Words x epochs to aim for: small corpora get more passes (capped by MAX_EPOCHS), large ones
#: fewer (at least MIN_EPOCHS).  2.5 million word-epochs train in about 4 s on one core.
#: 40 passes is what the Lee-corpus WordSim-353 check was measured with (61,000 words); 3
#: passes keep a large library's vectors from being a single noisy pass (from memory:
#: gensim's default is 5).
TARGET_WORD_EPOCHS = 2_500_000
MIN_EPOCHS = 3
MAX_EPOCHS = 40
#: Words of distinct provisions used for training at most (keeps a 1,000-agreement library's
#: training to seconds; boilerplate repeated across agreements counts once anyway).
MAX_TRAINING_WORDS = 600_000
#: gensim Phrases: a bigram must occur this often and score above the threshold (gensim's
#: defaults are 5 and 10.0).
PHRASES_MIN_COUNT = 5
PHRASES_THRESHOLD = 10.0


def _is_term(token: str) -> bool:
    return token[:1].isupper()


def _segments(sentence: Sequence[str]) -> list[list[str]]:
    """Runs of ordinary words between defined-term tokens."""
    out: list[list[str]] = [[]]
    for tok in sentence:
        if _is_term(tok):
            out.append([])
        else:
            out[-1].append(tok)
    return [s for s in out if s]


def _apply_phrases(sentence: Sequence[str], phraser) -> list[str]:  # noqa: ANN001
    out: list[str] = []
    run: list[str] = []
    for tok in list(sentence) + [None]:  # type: ignore[list-item]
        if tok is None or _is_term(tok):
            if run:
                out.extend(phraser[run])
                run = []
            if tok is not None:
                out.append(tok)
        else:
            run.append(tok)
    return out


def train_vectors(sentences: Sequence[Sequence[str]]):  # noqa: ANN201 - gensim KeyedVectors | None
    """Phrases, then Word2Vec, on tokenised *sentences*; the KeyedVectors, or None when the
    corpus is too small to learn anything (no word seen MIN_COUNT times)."""
    from gensim.models import Word2Vec
    from gensim.models.phrases import ENGLISH_CONNECTOR_WORDS, Phrases

    sentences = [list(s) for s in sentences if s]
    if not sentences:
        return None
    phrases = Phrases((seg for s in sentences for seg in _segments(s)), min_count=PHRASES_MIN_COUNT,
                      threshold=PHRASES_THRESHOLD, connector_words=ENGLISH_CONNECTOR_WORDS)
    frozen = phrases.freeze()
    corpus = [_apply_phrases(s, frozen) for s in sentences]
    words = sum(len(s) for s in corpus)
    epochs = int(min(MAX_EPOCHS, max(MIN_EPOCHS, round(TARGET_WORD_EPOCHS / max(words, 1)))))
    model = Word2Vec(vector_size=VECTOR_SIZE, window=WINDOW, min_count=MIN_COUNT, sg=SKIP_GRAM,
                     workers=1, seed=SEED)
    model.build_vocab(corpus)
    if len(model.wv) == 0:
        return None
    model.train(corpus, total_examples=len(corpus), epochs=epochs)
    return model.wv


class LibraryVocabulary:
    """Word vectors of the precedent set; ``similarity(a, b)`` is the cosine of two words or
    defined-term names, None when either is unknown (the ``VocabularyModel`` protocol)."""

    def __init__(self, vectors) -> None:  # noqa: ANN001 - gensim KeyedVectors
        self.vectors = vectors

    def key(self, name: str) -> str | None:
        """The model's token for a term name or word, or None."""
        name = name.strip()
        candidates = ["_".join(name.split()), name.lower(), "_".join(name.lower().split())]
        for c in candidates:
            if c in self.vectors.key_to_index:
                return c
        return None

    def similarity(self, a: str, b: str) -> float | None:
        ka, kb = self.key(a), self.key(b)
        if ka is None or kb is None:
            return None
        return float(self.vectors.similarity(ka, kb))

    def to_npz_bytes(self) -> bytes:
        buf = io.BytesIO()
        np.savez(buf, words=np.array(self.vectors.index_to_key, dtype=str),
                 vectors=self.vectors.vectors.astype(np.float32))
        return buf.getvalue()

    @classmethod
    def from_npz_bytes(cls, data: bytes) -> LibraryVocabulary:
        from gensim.models import KeyedVectors

        with np.load(io.BytesIO(data), allow_pickle=False) as a:
            vectors = a["vectors"]
            kv = KeyedVectors(vector_size=int(vectors.shape[1]) if vectors.ndim == 2 else VECTOR_SIZE)
            kv.add_vectors(a["words"].tolist(), vectors)
        return cls(kv)

    @classmethod
    def load(cls, path: str | os.PathLike[str]) -> LibraryVocabulary:
        return cls.from_npz_bytes(Path(path).read_bytes())


def library_sentences(conn: sqlite3.Connection, *, max_words: int = MAX_TRAINING_WORDS) -> list[list[str]]:
    """Training sentences from the index: one per distinct provision wording (by normalised
    hash), documents in index order, each document's own defined terms joined into tokens;
    at most *max_words* words."""
    seen: set[str] = set()
    out: list[list[str]] = []
    words = 0
    for (doc_id,) in conn.execute("SELECT id FROM documents ORDER BY path").fetchall():
        terms = [t for (t,) in conn.execute("SELECT term FROM terms WHERE document_id = ?", (doc_id,))]
        replacer = TermReplacer({t: t for t in terms})
        for text, h in conn.execute("SELECT text, norm_hash FROM provisions WHERE document_id = ? "
                                    "ORDER BY ordinal", (doc_id,)):
            if h in seen:
                continue
            seen.add(h)
            toks = vocab_tokens(text, terms=replacer)
            if not toks:
                continue
            out.append(toks)
            words += len(toks)
            if words >= max_words:
                return out
    return out


def train_library_vocabulary(conn: sqlite3.Connection, path: Path) -> LibraryVocabulary | None:
    """Train on the index and save to *path* (mode 0o600); remove *path* if nothing to learn."""
    from .index import _write_private

    vectors = train_vectors(library_sentences(conn))
    if vectors is None:
        try:
            os.unlink(path)
        except FileNotFoundError:
            pass
        return None
    vocab = LibraryVocabulary(vectors)
    _write_private(path, vocab.to_npz_bytes())
    return vocab
