"""Shared fixtures: the demo precedent set (demo_agreements/precedent_set), indexed once."""

from __future__ import annotations

import json
import shutil
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[3]
DEMO = ROOT / "demo_agreements"


@pytest.fixture(scope="session")
def scenario() -> dict:
    """The demo generator's record (demo_agreements/scenario.json)."""
    return json.loads((DEMO / "scenario.json").read_text(encoding="utf-8"))


@pytest.fixture(scope="session")
def demo_set(tmp_path_factory, scenario) -> Path:
    """A copy of the demo precedent set, indexed (the copy keeps the repository clean).  A
    local ``.counterdraft`` index left in the demo folder (``make demo``) is not copied: the
    index is always built fresh here."""
    from core.library.index import build_library

    folder = tmp_path_factory.mktemp("demo-set") / "precedent_set"
    shutil.copytree(DEMO / scenario["precedent_set"]["folder"], folder,
                    ignore=shutil.ignore_patterns(".counterdraft"))
    report = build_library(folder)
    assert report.failures == ()
    assert report.read == scenario["precedent_set"]["total"] and report.unchanged == 0
    return folder


@pytest.fixture()
def demo_library(demo_set):
    from core.library.index import open_library

    lib = open_library(demo_set, refresh=False)
    yield lib
    lib.close()


def find_departure(review, dep: dict):
    """The substantive deviation of *review* that is the demo generator's departure *dep*
    (an entry of ``scenario.json``'s ``departures``): same change, provision numbers and words."""
    dn = {p.id: p for p in review.draft.provisions}
    pn = {p.id: p for p in review.precedent.provisions}
    hits = []
    for v in review.deviations:
        if v.category != "substantive" or v.change != dep["change"]:
            continue
        if dep["precedent_number"] is not None and (
                v.precedent_provision is None or pn[v.precedent_provision].number != dep["precedent_number"]):
            continue
        if dep["draft_number"] is not None and (
                v.draft_provision is None or dn[v.draft_provision].number != dep["draft_number"]):
            continue
        if dep["draft_words"] and dep["draft_words"] not in v.draft_text:
            continue
        if dep["precedent_words"] and dep["precedent_words"] not in v.precedent_text:
            continue
        hits.append(v)
    assert len(hits) == 1, (dep["id"], hits)
    return hits[0]
