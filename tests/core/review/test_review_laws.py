"""Laws of the review's own shortcuts (core.review), each against the direct computation:
the features of a text that both documents hold are computed once for the two sides, and
must equal those each side computes on its own -- also where the term map renames a term
used in the text, whose keys then differ between the sides; a pair of equal texts gets its
one equal hunk without a word diff, and the review is the one that diffs every pair.  Real
texts: licence texts of the PyPI package ``licensedcode-data`` (keys named below), and the
demo pair."""

from __future__ import annotations

from pathlib import Path

import pytest

import core.review as review_module
from core.docinfo import build_docinfo
from core.reader import read_document

from .helpers import doc, licence_text


def _sides(draft_text: str, precedent_text: str, to_key: dict[str, str]):
    di, pi = build_docinfo(doc(draft_text)), build_docinfo(doc(precedent_text))
    names = list(dict.fromkeys([*di.all_names, *pi.all_names]))
    dside, pside, _uses = review_module._sides(di, pi, names)
    dside.to_key = to_key
    dside.plain = pside.plain = frozenset(n for n in names if n not in to_key and n not in to_key.values())
    return dside, pside


@pytest.mark.parametrize("key, old, new, to_key", [
    ("apache-2.0", "Licensor", "Grantor", {"Grantor": "Licensor"}),  # a renamed term
    ("mpl-2.0", "Contributor", "Author", {"Author": "Contributor"}),
    ("apache-2.0", "", "", {"Licensor": "Contributor"}),  # a term map that re-keys shared texts
])
def test_features_shared_between_the_sides_equal_each_sides_own(key: str, old: str, new: str,
                                                                 to_key: dict[str, str]) -> None:
    precedent = licence_text(key)
    draft = precedent.replace(old, new) if old else precedent
    dside, pside = _sides(draft, precedent, to_key)
    shared: dict = {}
    together = (review_module._features(dside, shared), review_module._features(pside, shared))
    apart = (review_module._features(dside, {}), review_module._features(pside, {}))
    assert shared  # the sides did share texts
    assert together == apart


def _pairs() -> list[tuple[object, object, str | None]]:
    demo = Path(__file__).resolve().parents[3] / "demo_agreements"
    apache = licence_text("apache-2.0")
    edited = apache.replace("Licensor", "Grantor").replace("perpetual, worldwide", "worldwide", 1)
    return [(read_document(str(demo / "draft.docx")), read_document(str(demo / "precedent.docx")), "Customer"),
            (doc(edited), doc(apache), None)]


@pytest.mark.parametrize("k", [0, 1])
def test_equal_texts_skip_the_word_diff_and_the_review_is_the_same(monkeypatch, k: int) -> None:
    draft, precedent, side = _pairs()[k]
    fast = review_module.run_review(draft, precedent, acting_for=side)
    monkeypatch.setattr(review_module._Builder, "_same_words", lambda self, g: False)
    assert review_module.run_review(draft, precedent, acting_for=side) == fast
