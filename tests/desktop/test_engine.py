"""desktop.engine: the adapters hand the reviewer's calls to the engine unchanged."""

from __future__ import annotations

import pytest

from core.errors import CounterdraftError
from core.review import TermOverride
from desktop import engine

from .fixtures import make_record


def test_a_new_call_on_a_draft_term_replaces_the_earlier_one():
    o = engine.add_override((), "confirm", "Client", "Customer")
    o = engine.add_override(o, "reject", "Client", "Customer")
    o = engine.add_override(o, "add", "Vendor", "Supplier")
    assert o == (TermOverride("Client", "Customer", "reject"), TermOverride("Vendor", "Supplier", "add"))
    with pytest.raises(CounterdraftError):  # the engine's own check: one line for the dialog
        engine.add_override(o, "add", "Buyer", "")


def test_decisions_go_through_the_engine_and_can_be_cleared():
    rec = make_record()
    rec = engine.decide(rec, "v2", "amend", text="within 45 days", note="halfway")
    rec = engine.decide(rec, "v1", "accept", text="ignored for accept")
    assert [(d.deviation, d.action, d.text) for d in rec.decisions] == [
        ("v1", "accept", None), ("v2", "amend", "within 45 days")]
    assert engine.decision_view(rec.decisions[1]) == ("amend", "halfway", "within 45 days")
    rec = engine.undecide(rec, "v1")
    assert [d.deviation for d in rec.decisions] == ["v2"]
    with pytest.raises(CounterdraftError):
        engine.decide(rec, "v7", "revert")  # a move cannot be reverted: the engine says so


def test_term_status_labels_each_mapping_from_the_overrides():
    status, rejected = engine.term_status((TermOverride("Client", "Customer", "confirm"),
                                           TermOverride("Vendor", None, "reject")))
    m = make_record().review.term_map[0]
    assert status(m) == "confirmed"
    assert rejected == [("Vendor", "")]


def test_a_damaged_index_is_rebuilt_and_the_review_says_so(tmp_path):
    """Garbage in place of the precedent set's index: the review still runs with
    frequencies, and its notes say the index was moved aside and rebuilt."""
    import shutil

    from desktop.state import Inputs

    from .conftest import DEMO

    folder = tmp_path / "set"
    folder.mkdir()
    for f in sorted((DEMO / "precedent_set").glob("*.docx"))[:3]:
        shutil.copy(f, folder / f.name)
    (folder / ".counterdraft").mkdir(mode=0o700)
    (folder / ".counterdraft" / "library.sqlite").write_bytes(bytes(range(256)) * 64)
    out = engine.load_and_review(Inputs(str(DEMO / "draft.docx"), str(DEMO / "precedent.docx"), str(folder)),
                                 lambda *_: None, lambda: False)
    try:
        assert out.library_total == 3
        rebuilt = [n for n in out.notes if "rebuilt from the agreements" in n]
        assert len(rebuilt) == 1 and rebuilt[0].startswith("The index was not usable")
    finally:
        engine.close_library(out.library)


def test_every_long_step_says_what_it_is_doing(tmp_path):
    """The progress bar's messages for a first review with a precedent set: each document
    read, every file indexed with its count, then each later indexing step and each step of
    the comparison named (common practice for a progress display, no source).  A second
    review finds the index up to date: no indexing step after the files."""
    import shutil

    from desktop.state import Inputs

    from .conftest import DEMO

    folder = tmp_path / "set"
    folder.mkdir()
    for f in sorted((DEMO / "precedent_set").glob("*.docx"))[:3]:
        shutil.copy(f, folder / f.name)
    inputs = Inputs(str(DEMO / "draft.docx"), str(DEMO / "precedent.docx"), str(folder))
    for run in ("first", "second"):
        seen: list[tuple[int, int | None, str]] = []
        out = engine.load_and_review(inputs, lambda d, t, m, seen=seen: seen.append((d, t, m)), lambda: False)
        engine.close_library(out.library)
        messages = [m for _d, _t, m in seen]
        assert messages[0] == "Reading draft.docx and precedent.docx"
        counted = [(d, t) for d, t, m in seen if m.endswith(" files")]
        assert counted == [(k, 3) for k in range(1, 4)]
        steps = [m.split(": ", 1)[1] for m in messages if m.startswith("Indexing the precedent set: ")
                 and not m.endswith(" files")]
        if run == "first":
            assert steps[:3] == ["normalising the wordings", "typing the clauses",
                                 "grouping the wording variants"]
        else:
            assert steps == []
        comparing = [m for m in messages if m.startswith("Comparing provisions: ")]
        assert comparing[0].endswith("reading the words and defined terms")
        assert any("paired provisions" in m for m in comparing)
        assert messages[-1] == "Counting wordings in the precedent set"


def test_the_window_reviews_as_the_command_line_does_with_a_precedent_set(tmp_path):
    """The window and ``counterdraft review --library --json`` give the same review of the
    demo pair (both go through core.session: the set's vocabulary, clause typing and
    frequencies).  The reference is the command line's documented JSON output."""
    import json
    import shutil

    from core.cli import main
    from core.review import review_to_dict
    from desktop.state import Inputs

    from .conftest import DEMO

    folder = tmp_path / "set"
    folder.mkdir()
    for f in sorted((DEMO / "precedent_set").glob("*.docx"))[:3]:
        shutil.copy(f, folder / f.name)
    draft, precedent = str(DEMO / "draft.docx"), str(DEMO / "precedent.docx")
    out = tmp_path / "cli.json"
    assert main(["review", draft, "--against", precedent, "--library", str(folder),
                 "--acting-for", "Supplier", "--json", str(out)]) == 0
    got = engine.load_and_review(Inputs(draft, precedent, str(folder), "Supplier"), lambda *_: None, lambda: False)
    try:
        window = json.loads(json.dumps(review_to_dict(got.review), ensure_ascii=False))
        assert window == json.loads(out.read_text(encoding="utf-8"))
    finally:
        engine.close_library(got.library)
