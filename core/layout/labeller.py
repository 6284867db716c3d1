"""The line labeller: for each printed line, does it start a paragraph or a provision, does
it carry a number label and a heading, and at what level.

The model
---------
A maximum-entropy Markov model (McCallum, Freitag and Pereira, 2000): one multinomial
logistic regression per answer over the line's features and its neighbours'
(:mod:`core.layout.features`), where the ``start`` answer also sees the answer given to the
line above, decoded over the whole document with the Viterbi algorithm.  The ``label``,
``heading`` and ``level`` answers are asked of the lines that start a paragraph, given
whether that line starts a provision.

Why this model: a linear-chain CRF (the usual choice for labelling sequences) is not
available here -- sklearn-crfsuite is not installed and no dependency is added for it.  A
MEMM keeps what matters for this task: the neighbour window (the line above and below enter
every decision as features, which is what decides a paragraph's start: how the line above
ends, whether this line's first word would have fitted there, the indent of the line below)
and the chain (a line after a provision's first line is more often its continuation).  Its
known weakness against a CRF, label bias, is small with three states that every line can
reach.  Logistic regression (scikit-learn) trains in seconds on CPU from a few hundred
documents and is stored as a few coefficient matrices in JSON: loading and applying it needs
numpy only (no pickle, so a model file found in a precedent set's folder cannot run code),
and it is deterministic.  Gradient-boosted trees were the alternative; they would need
pickled trees or a tree format of our own, for no gain on these features in a first
comparison (the features already carry the interactions that matter, see ``_PAIRS`` there).

The fixed-rule reader (:mod:`core.text_reader` and :mod:`core.structure`) stays as the
fallback when no model can be loaded, and as the baseline the model is measured against
(tests/core/layout/test_labeller_accuracy.py).

Cost: features O(lines); prediction one matrix product per answer and a Viterbi pass with
three states, O(lines).  Training (scikit-learn's lbfgs) is linear in the training lines per
iteration.
"""

from __future__ import annotations

import json
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
    "labeller_from_json",
    "train_labeller",
]

#: Version of the stored model (a model of another version is not used).
FORMAT = "counterdraft.line-labeller/1"
#: Inverse regularisation strength of each logistic regression (scikit-learn's default; a
#: sweep of 0.1-10 on the training documents moved held-out accuracy by under a point).
C = 1.0
#: Iterations of lbfgs: convergence on the default training set takes about 300.
MAX_ITER = 2000
_STATES = (CONTINUES, PARAGRAPH, PROVISION)


@dataclass(frozen=True, slots=True)
class LineLabels:
    """The labeller's answers for each line (numpy arrays, one entry per line)."""

    start: np.ndarray  # CONTINUES, PARAGRAPH or PROVISION
    label: np.ndarray  # bool
    heading: np.ndarray  # bool
    level: np.ndarray  # 0..MAX_LEVEL
    heading_p: np.ndarray  # probability of a heading (0 on lines that start nothing)


@dataclass(frozen=True, slots=True)
class _Head:
    classes: np.ndarray  # (k,) int
    coef: np.ndarray  # (k, d)  -- rows for every class, binary heads included
    intercept: np.ndarray  # (k,)

    def logits(self, X: np.ndarray) -> np.ndarray:
        return X @ self.coef.T + self.intercept

    def proba(self, X: np.ndarray) -> np.ndarray:
        z = self.logits(X)
        z -= z.max(axis=1, keepdims=True)
        e = np.exp(z)
        return e / e.sum(axis=1, keepdims=True)

    def to_json(self) -> dict[str, Any]:
        return {"classes": self.classes.tolist(), "coef": np.round(self.coef, 6).tolist(),
                "intercept": np.round(self.intercept, 6).tolist()}

    @classmethod
    def from_json(cls, data: dict[str, Any], width: int) -> _Head:
        head = cls(np.asarray(data["classes"], dtype=np.int64), np.asarray(data["coef"], dtype=np.float64),
                   np.asarray(data["intercept"], dtype=np.float64))
        if head.coef.shape != (len(head.classes), width) or head.intercept.shape != (len(head.classes),):
            raise ValueError("coefficient shapes do not match the features")
        return head


def _onehot(values: np.ndarray, states: Sequence[int]) -> np.ndarray:
    out = np.zeros((len(values), len(states)))
    for k, s in enumerate(states):
        out[:, k] = values == s
    return out


@dataclass(frozen=True, slots=True)
class LineLabeller:
    """A trained labeller (see the module docstring).  Build with :func:`train_labeller` or
    :func:`labeller_from_json`."""

    mean: np.ndarray
    scale: np.ndarray
    start_head: _Head  # features + previous state (3)
    label_head: _Head  # features + own state (3)
    heading_head: _Head
    level_head: _Head
    #: What it was trained on, in words (shown by ``counterdraft inspect``'s notes).
    trained_on: str = ""
    documents: int = 0
    lines: int = 0

    def _scaled(self, X: np.ndarray) -> np.ndarray:
        return (X - self.mean) / self.scale

    def _decode_start(self, Z: np.ndarray) -> np.ndarray:
        """Viterbi over the three start states; the first line always starts a paragraph."""
        n = len(Z)
        d = Z.shape[1]
        W = self.start_head.coef
        base = Z @ W[:, :d].T + self.start_head.intercept  # (n, k)
        trans = W[:, d:]  # (k classes, 3 previous states)
        classes = list(self.start_head.classes)
        order = [classes.index(s) for s in _STATES]

        def log_softmax(z: np.ndarray) -> np.ndarray:
            z = z - z.max(axis=-1, keepdims=True)
            return z - np.log(np.exp(z).sum(axis=-1, keepdims=True))

        score = log_softmax(base[0])[order].copy()
        score[0] = -np.inf
        back = np.zeros((n, 3), dtype=np.int64)
        for i in range(1, n):
            # cand[p, c]: best path ending in state p at i-1, then state c at i.
            logp = log_softmax(base[i][None, :] + trans.T[:, :])[:, order]  # (3 prev, 3 cur)
            cand = score[:, None] + logp
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
        Z = self._scaled(line_features(lines, g))
        start = self._decode_start(Z)
        prev = np.concatenate([[-1], start[:-1]])
        own = _onehot(start, _STATES)
        Xo = np.hstack([Z, own, _onehot(prev, _STATES)])
        starts = start != CONTINUES
        label = np.zeros(n, dtype=bool)
        heading = np.zeros(n, dtype=bool)
        heading_p = np.zeros(n)
        level = np.zeros(n, dtype=np.int64)
        if starts.any():
            rows = Xo[starts]
            label[starts] = self.label_head.classes[self.label_head.proba(rows).argmax(axis=1)] == 1
            hp = self.heading_head.proba(rows)
            col = list(self.heading_head.classes).index(1) if 1 in self.heading_head.classes else None
            if col is not None:
                heading_p[starts] = hp[:, col]
                heading[starts] = hp[:, col] > 0.5
            level[starts] = self.level_head.classes[self.level_head.proba(rows).argmax(axis=1)]
        level[start != PROVISION] = 0
        return LineLabels(start, label, heading, level, heading_p)

    def to_json(self) -> dict[str, Any]:
        return {
            "format": FORMAT, "features": list(FEATURE_NAMES),
            "trained_on": self.trained_on, "documents": self.documents, "lines": self.lines,
            "mean": np.round(self.mean, 6).tolist(), "scale": np.round(self.scale, 6).tolist(),
            "heads": {"start": self.start_head.to_json(), "label": self.label_head.to_json(),
                      "heading": self.heading_head.to_json(), "level": self.level_head.to_json()},
        }

    def dumps(self) -> str:
        return json.dumps(self.to_json(), separators=(",", ":"))


def labeller_from_json(data: Any) -> LineLabeller:
    """The labeller stored as *data* (parsed JSON).  Raises ValueError when *data* is not a
    model of this version over these features."""
    if not isinstance(data, dict) or data.get("format") != FORMAT:
        raise ValueError("not a line-labeller model of this version")
    if tuple(data.get("features", ())) != FEATURE_NAMES:
        raise ValueError("the model was trained on other features")
    d = len(FEATURE_NAMES)
    heads = data["heads"]
    mean = np.asarray(data["mean"], dtype=np.float64)
    scale = np.asarray(data["scale"], dtype=np.float64)
    if mean.shape != (d,) or scale.shape != (d,) or not np.all(scale > 0):
        raise ValueError("damaged scaling")
    return LineLabeller(
        mean=mean, scale=scale,
        start_head=_Head.from_json(heads["start"], d + 3),
        label_head=_Head.from_json(heads["label"], d + 6),
        heading_head=_Head.from_json(heads["heading"], d + 6),
        level_head=_Head.from_json(heads["level"], d + 6),
        trained_on=str(data.get("trained_on", "")), documents=int(data.get("documents", 0)),
        lines=int(data.get("lines", 0)),
    )


# ----------------------------------------------------------------------------------------
# Training
# ----------------------------------------------------------------------------------------


def _fit(X: np.ndarray, y: np.ndarray) -> _Head:
    from sklearn.linear_model import LogisticRegression

    classes = np.unique(y)
    if len(classes) == 1:  # one answer only: a constant head
        k = int(classes[0])
        return _Head(np.asarray([k, k + 1]), np.zeros((2, X.shape[1])), np.asarray([10.0, -10.0]))
    model = LogisticRegression(C=C, max_iter=MAX_ITER)
    model.fit(X, y)
    coef = model.coef_
    intercept = model.intercept_
    if len(classes) == 2:  # scikit-learn keeps one row for two classes: make it two
        coef = np.vstack([np.zeros_like(coef[0]), coef[0]])
        intercept = np.asarray([0.0, intercept[0]])
    return _Head(model.classes_.astype(np.int64), coef, intercept)


def train_labeller(examples: Sequence[tuple[Sequence[Line], LineAnswers]], *,
                   trained_on: str = "", documents: int | None = None) -> LineLabeller:
    """A labeller trained on *examples*: (the lines of one laid-out document, their answers)."""
    Xs, starts, prevs, labels, headings, levels = [], [], [], [], [], []
    for lines, ans in examples:
        if not lines:
            continue
        Xs.append(line_features(lines))
        s = np.asarray(ans.start, dtype=np.int64)
        starts.append(s)
        prevs.append(np.concatenate([[-1], s[:-1]]))
        labels.append(np.asarray(ans.label, dtype=np.int64))
        headings.append(np.asarray(ans.heading, dtype=np.int64))
        levels.append(np.minimum(np.asarray(ans.level, dtype=np.int64), MAX_LEVEL))
    if not Xs:
        raise ValueError("no training lines")
    X = np.vstack(Xs)
    start = np.concatenate(starts)
    prev = np.concatenate(prevs)
    mean = X.mean(axis=0)
    scale = X.std(axis=0)
    scale[scale < 1e-9] = 1.0
    Z = (X - mean) / scale
    start_head = _fit(np.hstack([Z, _onehot(prev, _STATES)]), start)
    rows = start != CONTINUES
    Xo = np.hstack([Z, _onehot(start, _STATES), _onehot(prev, _STATES)])[rows]
    label_head = _fit(Xo, np.concatenate(labels)[rows])
    heading_head = _fit(Xo, np.concatenate(headings)[rows])
    level_head = _fit(Xo, np.concatenate(levels)[rows])
    return LineLabeller(mean, scale, start_head, label_head, heading_head, level_head,
                        trained_on=trained_on, documents=documents if documents is not None else len(Xs),
                        lines=int(len(X)))
