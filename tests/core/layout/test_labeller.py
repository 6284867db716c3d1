"""The line labeller: its trees walked with numpy give scikit-learn's own predictions, its
file round-trips, a damaged file is not used, and the shipped model was trained on none of
the test texts.

Outside reference: scikit-learn's ``HistGradientBoostingClassifier.predict_proba`` (the
library that trained the trees) on the same inputs."""

from __future__ import annotations

import numpy as np
import pytest
from sklearn.ensemble import HistGradientBoostingClassifier

from core.layout.labeller import LineLabeller, forest_from_sklearn, labeller_from_bytes, train_labeller
from core.layout.store import DEFAULT_MODEL_PATH, default_labeller, load_labeller
from tests.support.layout_corpus import TEST_KEYS, family


def _data(seed: int, classes: int):
    rng = np.random.default_rng(seed)
    X = rng.normal(size=(600, 7))
    X[:, 3] = rng.integers(0, 2, 600)  # a binary feature, as most line features are
    y = (X[:, 0] + X[:, 3] > 0.5).astype(int) + (classes == 3) * (X[:, 1] > 1).astype(int)
    return X, y


@pytest.mark.parametrize("classes", [2, 3])
def test_numpy_trees_equal_scikit_learn(classes):
    X, y = _data(classes, classes)
    model = HistGradientBoostingClassifier(max_iter=30, max_leaf_nodes=15, early_stopping=False,
                                           random_state=0).fit(X, y)
    forest = forest_from_sklearn(model)
    test = np.random.default_rng(99).normal(size=(200, 7))
    test[:, 3] = (test[:, 3] > 0).astype(float)
    np.testing.assert_allclose(forest.proba(test), model.predict_proba(test), rtol=1e-9, atol=1e-12)


def test_the_shipped_model_loads_and_names_its_training_texts():
    model = default_labeller()
    assert isinstance(model, LineLabeller)
    assert model.documents >= 50 and model.lines > 10_000
    trained = model.trained_on.split(": ", 1)[1].split(", ")
    assert not {family(k) for k in trained} & {family(k) for k in TEST_KEYS}


def test_the_model_file_round_trips_and_a_damaged_one_is_not_used(tmp_path):
    model = default_labeller()
    again = labeller_from_bytes(model.to_bytes())
    X = np.random.default_rng(1).normal(size=(50, model.start_head.feature.max() + 4))
    # leaf values are stored as 32-bit floats: equal to about seven digits
    np.testing.assert_allclose(again.start_head.raw(X), model.start_head.raw(X), atol=1e-5)
    broken = tmp_path / "model.npz"
    broken.write_bytes(DEFAULT_MODEL_PATH.read_bytes()[:5000])
    assert load_labeller(broken) is None
    broken.write_bytes(b"not a model")
    assert load_labeller(broken) is None


def test_training_learns_a_simple_rule_of_line_starts():
    """Lines after a line ending in a full stop start a paragraph; the rest continue: a
    model trained on such lines says so on new ones."""
    from core.layout.lines import Line
    from core.layout.simulate import LineAnswers

    def doc(n: int):
        lines, start = [], []
        for i in range(n):
            end = "." if i % 3 == 2 else ""
            lines.append(Line(text=f"Words of line {i}{end}", page=0, x0=72, x1=500, top=14.0 * i,
                              bottom=14.0 * i + 11, size=11, bold=0.0, italic=0.0, first_word=30))
            start.append(1 if i == 0 or i % 3 == 0 else 0)
        return tuple(lines), LineAnswers(tuple(start), (False,) * n, (False,) * n, (0,) * n)

    model = train_labeller([doc(60), doc(45)])
    lines, answers = doc(30)
    assert list(model.label(lines).start != 0) == [s != 0 for s in answers.start]
