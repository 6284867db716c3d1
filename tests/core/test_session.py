"""The session facade (:mod:`core.session`), against the command line's own output.

The reference for "the same review" is the ``counterdraft review --json`` object of the
bundled demo pair (the documented ``counterdraft.review/1`` output): the facade's review must
serialise to exactly that object, with and without a precedent set.  Progress and cancelling
are checked on the stage messages the facade reports (a progress display naming each step
is common practice, no source).
"""

from __future__ import annotations

import json
import shutil
from pathlib import Path

import pytest

from core import session
from core.cli import main
from core.review import review_to_dict

DEMO = Path(__file__).resolve().parents[2] / "demo_agreements"
DRAFT, PRECEDENT = DEMO / "draft.docx", DEMO / "precedent.docx"
#: Past agreements copied into a test's precedent set: enough for frequencies, quick to index.
SET_FILES = 3


@pytest.fixture
def precedent_set(tmp_path: Path) -> Path:
    """A small precedent set: the first agreements of the demo's, in a folder of the test's
    own (the index is written inside it)."""
    folder = tmp_path / "set"
    folder.mkdir()
    for f in sorted((DEMO / "precedent_set").glob("*.docx"))[:SET_FILES]:
        shutil.copy(f, folder / f.name)
    return folder


def _cli_json(tmp_path: Path, *extra: str) -> object:
    out = tmp_path / "cli.json"
    assert main(["review", str(DRAFT), "--against", str(PRECEDENT), "--json", str(out), *extra]) == 0
    return json.loads(out.read_text(encoding="utf-8"))


def _as_json(obj: object) -> object:
    return json.loads(json.dumps(obj, ensure_ascii=False))


def test_the_facades_review_is_what_the_command_line_prints(tmp_path: Path) -> None:
    docs = session.read_documents(DRAFT, PRECEDENT)
    review = session.review(docs.draft, docs.precedent, acting_for="Supplier")
    assert review.deviations  # the demo pair differs: the comparison is not vacuous
    assert _as_json(review_to_dict(review)) == _cli_json(tmp_path, "--acting-for", "Supplier")


def test_with_a_precedent_set_too(tmp_path: Path, precedent_set: Path) -> None:
    expected = _cli_json(tmp_path, "--library", str(precedent_set))
    docs = session.read_documents(DRAFT, PRECEDENT, library=str(precedent_set))
    with session.open_library(str(precedent_set)) as library:
        assert library.total == SET_FILES
        review = session.review(docs.draft, docs.precedent, library=library)
    assert any(d.frequency is not None for d in review.deviations)  # the set's figures are in
    assert _as_json(review_to_dict(review)) == expected


def _full_run(folder: Path, report: session.Report, cancelled: session.IsCancelled) -> None:
    docs = session.read_documents(DRAFT, PRECEDENT, library=str(folder), report=report,
                                  cancelled=cancelled)
    with session.open_library(str(folder), report=report, cancelled=cancelled) as library:
        session.review(docs.draft, docs.precedent, library=library, report=report,
                       cancelled=cancelled)


#: The stages of a review with a precedent set, in order, as their first message starts.
STAGES = ("Reading draft.docx and precedent.docx", "Indexing the precedent set",
          "Comparing provisions", "Counting wordings in the precedent set")


def test_progress_names_every_stage_in_order(precedent_set: Path) -> None:
    seen: list[tuple[int, int | None, str]] = []
    _full_run(precedent_set, lambda d, t, m: seen.append((d, t, m)), session.never_cancelled)
    firsts = [next(i for i, (_d, _t, m) in enumerate(seen) if m.startswith(stage)) for stage in STAGES]
    assert firsts == sorted(firsts)
    counted = [(d, t) for d, t, m in seen if m.endswith(" files")]
    assert counted == [(k, SET_FILES) for k in range(1, SET_FILES + 1)]  # every file counted


@pytest.mark.parametrize("stage", STAGES)
def test_cancelling_stops_at_the_next_stage_boundary(precedent_set: Path, stage: str) -> None:
    """Cancel is pressed while *stage* runs: the run raises Cancelled and no later stage
    starts."""
    seen: list[str] = []
    state = {"cancel": False}

    def report(_done: int, _total: int | None, message: str) -> None:
        seen.append(message)
        if message.startswith(stage):
            state["cancel"] = True

    with pytest.raises(session.Cancelled):
        _full_run(precedent_set, report, lambda: state["cancel"])
    later = STAGES[STAGES.index(stage) + 1:]
    assert not [m for m in seen if m.startswith(later)]


def test_a_review_file_round_trip_keeps_the_decision(tmp_path: Path) -> None:
    docs = session.read_documents(DRAFT, PRECEDENT)
    record = session.new_review_file(DRAFT, PRECEDENT,
                                     review=session.review(docs.draft, docs.precedent))
    first = record.review.deviations[0]
    record = session.decide(record, first.id, "accept", note="seen")
    path = tmp_path / "review.json"
    session.save(path, record)
    again = session.open_review_file(path)
    assert [(d.deviation, d.action, d.note) for d in again.decisions] == [(first.id, "accept", "seen")]
    assert session.undecide(again, first.id).decisions == ()
