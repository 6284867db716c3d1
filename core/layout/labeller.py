"""The line labeller: for each printed line, does it start a paragraph or a provision, does
it carry a number label and a heading, and at what level.

The model
---------
A maximum-entropy Markov model in the broad sense (McCallum, Freitag and Pereira, 2000): one
probabilistic classifier per answer over the line's features and its neighbours'
(:mod:`core.layout.features`), where the ``start`` answer also sees the answer given to the
line above, decoded over the whole document with the Viterbi algorithm.  The ``label``,
``heading`` and ``level`` answers are asked of the lines that start a paragraph, given
whether that line starts a provision.  Each classifier is a gradient-boosted tree ensemble
(scikit-learn's ``HistGradientBoostingClassifier``) in place of the original MEMM's logistic
regression.

Why this model: a linear-chain CRF (the usual choice for labelling sequences) is not
available here -- sklearn-crfsuite is not installed and no dependency is added for it.  A
Markov chain of per-line classifiers keeps what matters for this task: the neighbour window
(the line above and below enter every decision as features, which is what decides a
paragraph's start: how the line above ends, whether this line's first word would have fitted
there, the indent of the line below) and the chain (a line after a provision's first line is
more often its continuation); its known weakness against a CRF, label bias, is small with
three states that every line can reach.  Boosted trees rather than logistic regression
because the cues combine: "(A)" at a line's start means a new item after a line ending in
a colon or "; or", and a wrapped cross-reference after a full line ending mid-sentence; a
paragraph without space above it is a soft line break in a house style that leaves space
between paragraphs and an ordinary start in one that does not.  Compared during development
on the same features and training texts, logistic regression with hand-made feature pairs
recovered 98.0% of the provisions of the .docx reading from the PDFs of the test texts
(tests/support/layout_corpus.py ``TEST_KEYS``, two house styles) and the trees 99.8%; the
final figures, on texts kept out of development, are printed by
``benchmarks/accuracy_layout.py``.  Both train in a minute or two on CPU.  The trees are
stored as plain arrays in an ``.npz`` file (read with ``allow_pickle=False``: a model file found in a precedent set's
folder cannot run code) and evaluated with numpy alone, so reading a PDF imports no
scikit-learn; :func:`_Forest.raw` matches scikit-learn's own prediction (a test checks it).

The fixed-rule reader (:mod:`core.text_reader` and :mod:`core.structure`) stays as the
fallback when no model can be loaded, and as the baseline the model is measured against
(tests/core/layout/test_labeller_accuracy.py).

Cost: features O(lines); prediction O(lines x trees x depth) in vectorised numpy (about 0.2 s
for a 30-page agreement) and a Viterbi pass with three states, O(lines).  Training is
scikit-learn's histogram gradient boosting, linear in the training lines per tree.
"""

from __future__ import annotations

import io
import json
import zipfile
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

from .answers import CONTINUES, MAX_LEVEL, PARAGRAPH, PROVISION
from .features import FEATURE_NAMES, line_features
from .lines import Geometry, Line
from .simulate import LineAnswers

__all__ = [
    "FORMAT",
    "LineLabeller",
    "LineLabels",
    "TrainingLines",
    "labeller_from_bytes",
    "train_labeller",
]

#: Version of the stored model (a model of another version is not used).
FORMAT = "counterdraft.line-labeller/2"
#: Boosting rounds, leaves per tree and learning rate: scikit-learn's defaults for the last
#: two; 150 rounds because held-out accuracy stopped improving between 100 and 200 on the
#: development documents.  No early stopping: the same data gives the same model.
MAX_ITER = 150
MAX_LEAF_NODES = 31
LEARNING_RATE = 0.1
RANDOM_STATE = 0
#: Threads scikit-learn may use while training (see :func:`_fit`).
TRAINING_THREADS = 1
#: A line starts a heading when the model gives a heading at least this probability.
HEADING_PROBABILITY = 0.5
_STATES = (CONTINUES, PARAGRAPH, PROVISION)
_HEADS = ("start", "label", "heading", "level")


@dataclass(frozen=True, slots=True)
class LineLabels:
    """The labeller's answers for each line (numpy arrays, one entry per line)."""

    start: np.ndarray  # CONTINUES, PARAGRAPH or PROVISION
    label: np.ndarray  # bool
    heading: np.ndarray  # bool
    level: np.ndarray  # 0..MAX_LEVEL
    heading_p: np.ndarray  # probability of a heading (0 on lines that start nothing)


@dataclass(frozen=True, slots=True)
class _Forest:
    """A boosted tree ensemble as flat arrays: node ``i`` of the concatenated trees splits on
    ``feature[i] <= threshold[i]`` (left) or is a leaf with ``value[i]``; tree ``t`` starts at
    ``roots[t]`` and adds its leaf value to class column ``tree_class[t]``."""

    classes: np.ndarray  # (k,) answers, ascending
    baseline: np.ndarray  # (k,) raw score before any tree
    feature: np.ndarray  # (N,) int
    threshold: np.ndarray  # (N,)
    left: np.ndarray  # (N,) int, global node index
    right: np.ndarray  # (N,) int
    leaf: np.ndarray  # (N,) bool
    value: np.ndarray  # (N,)
    roots: np.ndarray  # (T,) int
    tree_class: np.ndarray  # (T,) int

    def raw(self, X: np.ndarray) -> np.ndarray:
        """Raw scores (n, k): the baseline plus every tree's leaf, all trees walked at once
        (one step down every tree per loop; as many loops as the deepest tree)."""
        n = len(X)
        out = np.tile(self.baseline, (n, 1))
        if not len(self.roots):
            return out
        node = np.tile(self.roots, (n, 1))  # (n, T)
        rows = np.arange(n)[:, None]
        while True:
            inner = ~self.leaf[node]
            if not inner.any():
                break
            feat = self.feature[node]
            go_left = X[rows, feat] <= self.threshold[node]
            step = np.where(go_left, self.left[node], self.right[node])
            node = np.where(inner, step, node)
        values = self.value[node]  # (n, T)
        for k in range(len(self.classes)):
            cols = self.tree_class == k
            if cols.any():
                out[:, k] += values[:, cols].sum(axis=1)
        return out

    def log_proba(self, X: np.ndarray) -> np.ndarray:
        z = self.raw(X)
        z = z - z.max(axis=1, keepdims=True)
        out: np.ndarray = z - np.log(np.exp(z).sum(axis=1, keepdims=True))
        return out

    def proba(self, X: np.ndarray) -> np.ndarray:
        out: np.ndarray = np.exp(self.log_proba(X))
        return out

    def arrays(self, prefix: str) -> dict[str, np.ndarray]:
        """The arrays to store, in compact types (thresholds keep full precision: a feature
        equal to one must go the same way as in training)."""
        compact = {"feature": np.int16, "left": np.int32, "right": np.int32, "roots": np.int32,
                   "tree_class": np.int16, "value": np.float32}
        return {f"{prefix}.{name}": getattr(self, name).astype(compact.get(name, getattr(self, name).dtype))
                for name in self.__slots__}

    @classmethod
    def from_arrays(cls, data: Any, prefix: str, width: int) -> _Forest:
        forest = cls(**{name: np.asarray(data[f"{prefix}.{name}"]) for name in cls.__slots__})
        n = len(forest.feature)
        if not (len(forest.threshold) == len(forest.left) == len(forest.right) == len(forest.leaf)
                == len(forest.value) == n and len(forest.roots) == len(forest.tree_class)
                and forest.baseline.shape == forest.classes.shape):
            raise ValueError("damaged trees")
        inner = ~forest.leaf.astype(bool)
        if n and (np.any(forest.feature[inner] < 0) or np.any(forest.feature[inner] >= width)
                  or np.any(forest.left[inner] >= n) or np.any(forest.right[inner] >= n)
                  or np.any(forest.left[inner] < 0) or np.any(forest.right[inner] < 0)
                  or np.any(forest.roots >= n) or np.any(forest.tree_class >= len(forest.classes))):
            raise ValueError("damaged trees")
        return cls(forest.classes.astype(np.int64), forest.baseline.astype(np.float64),
                   forest.feature.astype(np.int64), forest.threshold.astype(np.float64),
                   forest.left.astype(np.int64), forest.right.astype(np.int64),
                   forest.leaf.astype(bool), forest.value.astype(np.float64),
                   forest.roots.astype(np.int64), forest.tree_class.astype(np.int64))


def _onehot(values: np.ndarray, states: Sequence[int]) -> np.ndarray:
    out = np.zeros((len(values), len(states)))
    for k, s in enumerate(states):
        out[:, k] = values == s
    return out


@dataclass(frozen=True, slots=True)
class LineLabeller:
    """A trained labeller (see the module docstring).  Build with :func:`train_labeller` or
    :func:`labeller_from_bytes`."""

    start_head: _Forest  # features + previous state (3)
    label_head: _Forest  # features + own state (3) + previous state (3)
    heading_head: _Forest
    level_head: _Forest
    #: What it was trained on, in words.
    trained_on: str = ""
    documents: int = 0
    lines: int = 0

    def _decode_start(self, X: np.ndarray) -> np.ndarray:
        """Viterbi over the three start states; the first line always starts a paragraph.
        A state the training lines never showed has probability 0."""
        n = len(X)
        classes = list(self.start_head.classes)

        def in_state_order(logp: np.ndarray) -> np.ndarray:
            out = np.full((len(logp), len(_STATES)), -np.inf)
            for k, state in enumerate(_STATES):
                if state in classes:
                    out[:, k] = logp[:, classes.index(state)]
            return out

        # logp[p][i, c]: log P(state c at line i | state p at line i-1, features of line i)
        logp = []
        for p in range(len(_STATES)):
            prev = np.zeros((n, len(_STATES)))
            prev[:, p] = 1.0
            logp.append(in_state_order(self.start_head.log_proba(np.hstack([X, prev]))))
        first = in_state_order(self.start_head.log_proba(np.hstack([X[:1], np.zeros((1, len(_STATES)))])))[0]
        score = first.copy()
        score[0] = -np.inf
        back = np.zeros((n, len(_STATES)), dtype=np.int64)
        stacked = np.stack(logp, axis=1)  # (n, prev, cur)
        for i in range(1, n):
            cand = score[:, None] + stacked[i]
            back[i] = cand.argmax(axis=0)
            score = cand.max(axis=0)
        path = np.zeros(n, dtype=np.int64)
        path[-1] = int(score.argmax())
        for i in range(n - 1, 0, -1):
            path[i - 1] = back[i, path[i]]
        return np.asarray([_STATES[k] for k in path], dtype=np.int64)

    def label(self, lines: Sequence[Line], g: Geometry | None = None) -> LineLabels:
        """The answers for *lines* (a whole document, in reading order)."""
        n = len(lines)
        if n == 0:
            empty = np.zeros(0, dtype=np.int64)
            return LineLabels(empty, empty.astype(bool), empty.astype(bool), empty, np.zeros(0))
        X = line_features(lines, g)
        start = self._decode_start(X)
        prev = np.concatenate([[-1], start[:-1]])
        starts = start != CONTINUES
        label = np.zeros(n, dtype=bool)
        heading = np.zeros(n, dtype=bool)
        heading_p = np.zeros(n)
        level = np.zeros(n, dtype=np.int64)
        if starts.any():
            rows = np.hstack([X, _onehot(start, _STATES), _onehot(prev, _STATES)])[starts]
            label[starts] = self.label_head.classes[self.label_head.raw(rows).argmax(axis=1)] == 1
            classes = list(self.heading_head.classes)
            if 1 in classes:
                heading_p[starts] = self.heading_head.proba(rows)[:, classes.index(1)]
                heading[starts] = heading_p[starts] >= HEADING_PROBABILITY
            level[starts] = self.level_head.classes[self.level_head.raw(rows).argmax(axis=1)]
        level[start != PROVISION] = 0
        return LineLabels(start, label, heading, level, heading_p)

    def to_bytes(self) -> bytes:
        """The model as an ``.npz`` file's bytes (arrays only, no pickled objects)."""
        meta = {"format": FORMAT, "features": list(FEATURE_NAMES), "trained_on": self.trained_on,
                "documents": self.documents, "lines": self.lines}
        arrays: dict[str, np.ndarray] = {"meta": np.asarray(json.dumps(meta))}
        for name in _HEADS:
            arrays.update(getattr(self, f"{name}_head").arrays(name))
        buf = io.BytesIO()
        np.savez_compressed(buf, **arrays)  # type: ignore[arg-type]  # numpy stubs: keyword arrays
        return buf.getvalue()


def labeller_from_bytes(data: bytes) -> LineLabeller:
    """The labeller stored in *data* (:meth:`LineLabeller.to_bytes`).  Raises ValueError when
    *data* is not a model of this version over these features."""
    try:
        with np.load(io.BytesIO(data), allow_pickle=False) as npz:
            meta = json.loads(str(npz["meta"]))
            if not isinstance(meta, dict) or meta.get("format") != FORMAT:
                raise ValueError("not a line-labeller model of this version")
            if tuple(meta.get("features", ())) != FEATURE_NAMES:
                raise ValueError("the model was trained on other features")
            d = len(FEATURE_NAMES)
            widths = {"start": d + 3, "label": d + 6, "heading": d + 6, "level": d + 6}
            heads = {name: _Forest.from_arrays(npz, name, widths[name]) for name in _HEADS}
    except (OSError, KeyError, EOFError, zipfile.BadZipFile) as err:
        raise ValueError(f"not a model file ({err})") from None
    return LineLabeller(heads["start"], heads["label"], heads["heading"], heads["level"],
                        trained_on=str(meta.get("trained_on", "")),
                        documents=int(meta.get("documents", 0)), lines=int(meta.get("lines", 0)))


# ----------------------------------------------------------------------------------------
# Training
# ----------------------------------------------------------------------------------------


def forest_from_sklearn(model: Any) -> _Forest:
    """The trees of a fitted ``HistGradientBoostingClassifier`` as a :class:`_Forest`."""
    classes = np.asarray(model.classes_, dtype=np.int64)
    baseline = np.asarray(model._baseline_prediction, dtype=np.float64).ravel()
    binary = len(classes) == 2
    feature, threshold, left, right, leaf, value, roots, tree_class = [], [], [], [], [], [], [], []
    offset = 0
    for iteration in model._predictors:
        for k, tree in enumerate(iteration):
            nodes = tree.nodes
            if np.any(nodes["is_categorical"][~nodes["is_leaf"].astype(bool)]):
                raise ValueError("categorical splits are not used")
            roots.append(offset)
            tree_class.append(1 if binary else k)
            feature.append(nodes["feature_idx"])
            threshold.append(nodes["num_threshold"])
            left.append(nodes["left"].astype(np.int64) + offset)
            right.append(nodes["right"].astype(np.int64) + offset)
            leaf.append(nodes["is_leaf"].astype(bool))
            value.append(nodes["value"])
            offset += len(nodes)
    if binary:  # one raw score, for class 1: class 0 scores 0 (softmax = the logistic)
        baseline = np.asarray([0.0, baseline[0]])
    cat = np.concatenate
    return _Forest(classes, baseline, cat(feature).astype(np.int64), cat(threshold), cat(left), cat(right),
                   cat(leaf), cat(value), np.asarray(roots, dtype=np.int64), np.asarray(tree_class, dtype=np.int64))


def _fit(X: np.ndarray, y: np.ndarray) -> _Forest:
    classes = np.unique(y)
    if len(classes) == 1:  # one answer only: a constant head
        k = int(classes[0])
        empty_i = np.zeros(0, dtype=np.int64)
        return _Forest(np.asarray([k, k + 1]), np.asarray([0.0, -30.0]), empty_i, np.zeros(0),
                       empty_i, empty_i, np.zeros(0, dtype=bool), np.zeros(0), empty_i, empty_i)
    from sklearn.ensemble import HistGradientBoostingClassifier
    from threadpoolctl import threadpool_limits

    model = HistGradientBoostingClassifier(max_iter=MAX_ITER, max_leaf_nodes=MAX_LEAF_NODES,
                                           learning_rate=LEARNING_RATE, early_stopping=False,
                                           random_state=RANDOM_STATE)
    # One thread: on a shared two-core machine OpenMP's threads wait on each other (a fit
    # took 3.5 times longer with them on the test machine under load).
    with threadpool_limits(limits=TRAINING_THREADS):
        model.fit(X, y)
    return forest_from_sklearn(model)


@dataclass(frozen=True, slots=True)
class TrainingLines:
    """Training lines as arrays: features and answers of each line, and the answer given
    to the line above (-1 for a document's first line)."""

    X: np.ndarray
    start: np.ndarray
    prev: np.ndarray
    label: np.ndarray
    heading: np.ndarray
    level: np.ndarray

    @classmethod
    def of(cls, examples: Sequence[tuple[Sequence[Line], LineAnswers]]) -> TrainingLines:
        """The arrays of *examples*: (the lines of one laid-out document, their answers)."""
        parts = []
        for lines, ans in examples:
            if not lines:
                continue
            s = np.asarray(ans.start, dtype=np.int64)
            parts.append(cls(line_features(lines), s, np.concatenate([[-1], s[:-1]]),
                             np.asarray(ans.label, dtype=np.int64), np.asarray(ans.heading, dtype=np.int64),
                             np.minimum(np.asarray(ans.level, dtype=np.int64), MAX_LEVEL)))
        return cls.concat(parts)

    @classmethod
    def concat(cls, parts: Sequence[TrainingLines]) -> TrainingLines:
        if not parts:
            return cls(np.zeros((0, len(FEATURE_NAMES))), *(np.zeros(0, dtype=np.int64) for _ in range(5)))
        return cls(*(np.concatenate([getattr(p, name) for p in parts]) for name in cls.__slots__))

    def arrays(self) -> dict[str, np.ndarray]:
        return {name: getattr(self, name) for name in self.__slots__}

    @classmethod
    def from_arrays(cls, data: Any) -> TrainingLines:
        out = cls(*(np.asarray(data[name]) for name in cls.__slots__))
        n = len(out.start)
        if out.X.shape != (n, len(FEATURE_NAMES)) or any(len(getattr(out, k)) != n for k in cls.__slots__):
            raise ValueError("damaged training lines")
        return out


def train_labeller(examples: Sequence[tuple[Sequence[Line], LineAnswers]] | TrainingLines, *,
                   trained_on: str = "", documents: int | None = None) -> LineLabeller:
    """A labeller trained on *examples* (pairs of a laid-out document's lines and their
    answers, or :class:`TrainingLines`)."""
    data = examples if isinstance(examples, TrainingLines) else TrainingLines.of(examples)
    if not len(data.start):
        raise ValueError("no training lines")
    X, start, prev = data.X.astype(np.float64), data.start, data.prev
    start_head = _fit(np.hstack([X, _onehot(prev, _STATES)]), start)
    rows = start != CONTINUES
    Xo = np.hstack([X, _onehot(start, _STATES), _onehot(prev, _STATES)])[rows]
    label_head = _fit(Xo, data.label[rows])
    heading_head = _fit(Xo, data.heading[rows])
    level_head = _fit(Xo, data.level[rows])
    return LineLabeller(start_head, label_head, heading_head, level_head, trained_on=trained_on,
                        documents=documents if documents is not None else int(np.sum(prev == -1)),
                        lines=int(len(X)))
