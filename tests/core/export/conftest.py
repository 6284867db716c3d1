"""Shared fixtures of the export tests: the hand-made scenario and its decisions."""

from __future__ import annotations

from pathlib import Path

import pytest

from core.decisions import Decision
from tests.support.handmade import build_scenario

AUTHOR = "Ines Testwright"


@pytest.fixture(scope="module")
def scenario(tmp_path_factory):
    return build_scenario(tmp_path_factory.mktemp("handmade"))


DECISIONS = (
    Decision("v1", "revert", note="Our standard payment term is thirty days."),
    Decision("v2", "revert"),
    Decision("v3", "revert"),
    Decision("v4", "revert"),
    Decision("v5", "revert"),
    Decision("v7", "accept"),
)


def texts(doc) -> list[str]:
    return [b.text for b in doc.blocks]



DEMO = Path(__file__).resolve().parents[3] / "demo_agreements"


def no_second_diff(monkeypatch) -> None:
    """Make any word diff outside the review engine fail: the outputs must read the review's
    Pair.edits instead."""
    import core.review.worddiff as worddiff

    def refuse(*_a, **_k):
        raise AssertionError("an output diffed the texts again instead of reading Pair.edits")

    monkeypatch.setattr(worddiff, "diff_texts", refuse)



def made_deviation(dev_id, change, d, p, ptext, dtext, pspan, dspan, *, part="text"):
    from core.model import Deviation

    return Deviation(dev_id, 99, 10, "substantive", change, d, p, ptext, dtext, ("a change",),
                     None, pspan, dspan, part)
