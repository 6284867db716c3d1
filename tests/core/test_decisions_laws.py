"""Law of the review file (core.decisions): whatever the reviewer records -- any choice of
deviations, any permitted action, any wording and note in any script -- saving and reopening
gives the same decisions, and the saved file is valid JSON (the standard library's ``json``
reads it) that the published schema accepts (``jsonschema``'s Draft 2020-12 validator,
resources/schemas/review-file.schema.json).  The agreements are the hand-made scenario of
tests/support/handmade.py (invented parties)."""

from __future__ import annotations

import json

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from core.decisions import ACTIONS, decide, load_review_file, new_review_file, save_review_file
from core.errors import CounterdraftError
from tests.support.handmade import build_scenario

from .test_decisions import _validator

#: Words and notes as a reviewer may type them: any printable character of any script,
#: spaces and (in notes) line breaks; control characters are refused on entry by design.
_PRINTABLE = st.characters(blacklist_categories=("Cc", "Cs", "Co", "Cn"))
_WORDING = st.text(_PRINTABLE, min_size=1, max_size=40).filter(str.strip)
_NOTE = st.one_of(st.none(), st.text(_PRINTABLE, max_size=60))


@pytest.fixture(scope="module")
def fresh(tmp_path_factory):
    scenario = build_scenario(tmp_path_factory.mktemp("laws"))
    return scenario, new_review_file(scenario.draft_path, scenario.precedent_path)


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(st.data())
def test_any_recorded_decisions_survive_save_and_reopen(fresh, tmp_path, data):
    scenario, rf = fresh
    ids = [d.id for d in rf.review.deviations]
    chosen = data.draw(st.lists(st.sampled_from(ids), unique=True, max_size=len(ids)))
    for dev_id in chosen:
        action = data.draw(st.sampled_from(ACTIONS))
        text = data.draw(_WORDING) if action == "amend" else None
        try:
            rf = decide(rf, dev_id, action, text=text, note=data.draw(_NOTE))
        except CounterdraftError:
            continue  # an action this kind of deviation does not take (refused by design)
    path = scenario.draft_path.parent / "laws-review.json"
    save_review_file(path, rf)
    _validator().validate(json.loads(path.read_text(encoding="utf-8")))
    again = load_review_file(path)
    assert again.decisions == rf.decisions
    assert again.notes == ()
