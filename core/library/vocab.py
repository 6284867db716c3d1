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
words, so training takes seconds at any library size.  A build retrains only when the
training corpus has drifted (:func:`vocabulary_drift`, :data:`RETRAIN_DRIFT`): adding an
agreement that sorts after the documents the model was trained on changes nothing, so the
model stays the one a full build would train.  Loading and querying
(:class:`LibraryVocabulary`) use numpy alone.
"""

from __future__ import annotations

import io
import os
from collections.abc import Iterable, Sequence
from pathlib import Path
from typing import Protocol

import numpy as np

from .normalise import TermReplacer, vocab_tokens

__all__ = [
    "MAX_EPOCHS",
    "MAX_TRAINING_WORDS",
    "MIN_COUNT",
    "MIN_EPOCHS",
    "PHRASES_MIN_COUNT",
    "PHRASES_THRESHOLD",
    "RETRAIN_DRIFT",
    "SEED",
    "SKIP_GRAM",
    "SMALL_CORPUS_WORDS",
    "TARGET_WORD_EPOCHS",
    "VECTOR_SIZE",
    "WINDOW",
    "LibraryVocabulary",
    "needs_training",
    "train_model",
    "train_vectors",
    "training_sentences",
    "vocabulary_drift",
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
#: A build retrains the model once this share of the documents it was trained on has been
#: changed, removed or pushed out of the training corpus (documents are taken in path order
#: up to MAX_TRAINING_WORDS), or, when the corpus held every document, added since.  A tenth:
#: the term mapper only asks about names many agreements use, whose vectors a tenth of new
#: text barely moves (common experience with Word2Vec, no source), while retraining costs
#: seconds -- several times the budget of a one-file rebuild at 1,000 agreements.  Until
#: then a new defined term is simply unknown to the model (the mapper works without it).
RETRAIN_DRIFT = 0.10
#: Below this many training words the model is retrained after every change: that takes about
#: a second or less (2.5 million word-epochs take about 4 s), so a small library's model
#: always equals a full build's.
SMALL_CORPUS_WORDS = 100_000


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


class Phraser(Protocol):
    """The part of gensim's frozen ``Phrases`` we use: a run of words with its phrases joined."""

    def __getitem__(self, sentence: list[str]) -> list[str]: ...


class KeyedVectors(Protocol):
    """The part of gensim's ``KeyedVectors`` we keep: the words and their vectors, in order."""

    index_to_key: list[str]
    vectors: np.ndarray


def _apply_phrases(sentence: Sequence[str], phraser: Phraser) -> list[str]:
    out: list[str] = []
    run: list[str] = []
    toks: list[str | None] = [*sentence, None]
    for tok in toks:
        if tok is None or _is_term(tok):
            if run:
                out.extend(phraser[run])
                run = []
            if tok is not None:
                out.append(tok)
        else:
            run.append(tok)
    return out


def train_vectors(sentences: Sequence[Sequence[str]]) -> KeyedVectors | None:
    """Phrases, then Word2Vec, on tokenised *sentences*; the KeyedVectors, or None when the
    corpus is too small to learn anything (no word seen MIN_COUNT times)."""
    sentences = [list(s) for s in sentences if s]
    if not sentences:
        return None
    from gensim.models import Word2Vec
    from gensim.models.phrases import ENGLISH_CONNECTOR_WORDS, Phrases

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
    vectors: KeyedVectors = model.wv
    return vectors


class LibraryVocabulary:
    """Word vectors of the precedent set; ``similarity(a, b)`` is the cosine of two words or
    defined-term names, None when either is unknown (the ``VocabularyModel`` protocol).

    Plain numpy: loading and querying never import gensim (importing it costs about a
    second, longer than the whole library side of a review; measured by
    ``benchmarks/bench_library.py``).  The cosine is gensim's ``KeyedVectors.similarity``
    (the dot product of the two unit vectors), tested against it.
    """

    def __init__(self, words: Sequence[str], vectors: np.ndarray) -> None:
        self.words = list(words)
        self.vectors = np.asarray(vectors, dtype=np.float32)
        self.key_to_index = {w: i for i, w in enumerate(self.words)}

    @classmethod
    def from_keyed_vectors(cls, kv: KeyedVectors) -> LibraryVocabulary:
        return cls(list(kv.index_to_key), kv.vectors)

    def key(self, name: str) -> str | None:
        """The model's token for a term name or word, or None."""
        name = name.strip()
        candidates = ["_".join(name.split()), name.lower(), "_".join(name.lower().split())]
        for c in candidates:
            if c in self.key_to_index:
                return c
        return None

    def similarity(self, a: str, b: str) -> float | None:
        ka, kb = self.key(a), self.key(b)
        if ka is None or kb is None:
            return None
        va = self.vectors[self.key_to_index[ka]].astype(np.float64)
        vb = self.vectors[self.key_to_index[kb]].astype(np.float64)
        na, nb = float(np.linalg.norm(va)), float(np.linalg.norm(vb))
        if na == 0.0 or nb == 0.0:
            return 0.0
        return float(np.dot(va / na, vb / nb))

    def to_npz_bytes(self) -> bytes:
        """The words as one UTF-8 text (one per line: a token never holds a line break) and
        the vectors as float32: a few bytes per word more than the vectors themselves."""
        buf = io.BytesIO()
        text = "\n".join(self.words).encode("utf-8")
        np.savez(buf, words_utf8=np.frombuffer(text, dtype=np.uint8), vectors=self.vectors)
        return buf.getvalue()

    @classmethod
    def from_npz_bytes(cls, data: bytes) -> LibraryVocabulary:
        with np.load(io.BytesIO(data), allow_pickle=False) as a:
            if "words_utf8" in a.files:
                raw = a["words_utf8"].tobytes().decode("utf-8")
                words = raw.split("\n") if raw else []
            else:  # the earlier layout: a fixed-width unicode array
                words = a["words"].tolist()
            vectors = a["vectors"]
        if vectors.ndim != 2 or vectors.shape[0] != len(words):  # not a file this code wrote
            return cls([], np.zeros((0, VECTOR_SIZE), dtype=np.float32))
        return cls(words, vectors)

    @classmethod
    def load(cls, path: str | os.PathLike[str]) -> LibraryVocabulary:
        return cls.from_npz_bytes(Path(path).read_bytes())


def training_sentences(documents: Iterable[tuple[Sequence[str], Iterable[tuple[str, str | None]]]], *,
                       max_words: int = MAX_TRAINING_WORDS) -> tuple[list[list[str]], int, int]:
    """Training sentences from *documents* -- ``(defined terms, [(provision text, normalised
    wording hash), ...])`` in the index's path order: one sentence per distinct wording, each
    document's own defined terms joined into tokens, at most *max_words* words.  Returns the
    sentences, the number of documents they came from (the last one perhaps in part) and the
    number of words."""
    seen: set[str | None] = set()
    out: list[list[str]] = []
    words = 0
    used = 0
    for terms, provisions in documents:
        used += 1
        replacer = TermReplacer({t: t for t in terms})
        for text, h in provisions:
            if h in seen:
                continue
            seen.add(h)
            toks = vocab_tokens(text, terms=replacer)
            if not toks:
                continue
            out.append(toks)
            words += len(toks)
            if words >= max_words:
                return out, used, words
    return out, used, words


def vocabulary_drift(*, trained: Sequence[str], current: Sequence[str], exhausted: bool,
                     documents: int) -> float:
    """How far the training corpus has moved since the model was trained: the share of the
    documents it was trained on (*trained*, fingerprints in path order) that are no longer
    among the first documents of the library (*current*: the first ``len(trained)``
    fingerprints now), plus, when training used every document (*exhausted*), the documents
    added since.  0.0 means the same documents give the same sentences, so retraining would
    give the same model (training is deterministic)."""
    if not trained:
        return 1.0 if documents else 0.0
    gone = len(set(trained) - set(current))
    added = max(0, documents - len(trained)) if exhausted else 0
    return (gone + added) / len(trained)


def needs_training(*, drift: float, words: int, has_model: bool) -> bool:
    """Whether a build retrains the model (see :data:`RETRAIN_DRIFT`)."""
    if drift <= 0.0:
        return False
    if not has_model or words < SMALL_CORPUS_WORDS:
        return True
    return drift > RETRAIN_DRIFT


def train_model(sentences: Sequence[Sequence[str]]) -> LibraryVocabulary | None:
    """:func:`train_vectors` as a :class:`LibraryVocabulary` (None when nothing to learn).
    Runs in a worker process during a large build, beside the variant clustering."""
    vectors = train_vectors(sentences)
    return None if vectors is None else LibraryVocabulary.from_keyed_vectors(vectors)
