"""Decisions and the review file (core.decisions), and the ``decide``/``export`` commands.

The review file is JSON read back with the standard library's ``json`` module and validated
against resources/schemas/review-file.schema.json with the ``jsonschema`` package's Draft
2020-12 validator; documents are hashed with ``hashlib.sha256`` as the reference.  Reopening
re-runs the real review engine (core.review) on the hand-made agreements of
tests/support/handmade.py.
"""

from __future__ import annotations

import dataclasses
import hashlib
import json
import shutil
from pathlib import Path

import jsonschema
import pytest
from referencing import Registry, Resource

from core.cli import main
from core.decisions import (
    REVIEW_FILE_SCHEMA,
    Decision,
    decide,
    load_review_file,
    new_review_file,
    save_review_file,
)
from core.docx.compose import ComposeParagraph as CP
from core.docx.compose import compose_docx
from core.errors import CounterdraftError
from core.review.termmap import TermOverride
from tests.support.handmade import DRAFT, PRECEDENT, build_scenario

SCHEMAS = Path(__file__).resolve().parents[2] / "resources" / "schemas"


def _validator() -> jsonschema.Draft202012Validator:
    schemas = {name: json.loads((SCHEMAS / name).read_text(encoding="utf-8"))
               for name in ("review-file.schema.json", "review.schema.json", "document.schema.json")}
    registry = Registry().with_resources([(s["$id"], Resource.from_contents(s)) for s in schemas.values()])
    top = schemas["review-file.schema.json"]
    jsonschema.Draft202012Validator.check_schema(top)
    return jsonschema.Draft202012Validator(top, registry=registry)


@pytest.fixture()
def scenario(tmp_path):
    return build_scenario(tmp_path)


def _dev(review, change, **where):
    """The deviation of *change* whose draft or precedent words contain the given text."""
    for d in review.deviations:
        if d.change != change:
            continue
        if all(v in getattr(d, k) for k, v in where.items()):
            return d
    raise AssertionError(f"no {change} deviation with {where}")


def test_decide_records_and_replaces_decisions(scenario):
    rf = new_review_file(scenario.draft_path, scenario.precedent_path)
    pay = _dev(rf.review, "replace", draft_text="sixty")
    rf = decide(rf, pay.id, "revert", note="Thirty days.")
    rf = decide(rf, pay.id, "amend", text="forty-five (45) days")
    (only,) = rf.decisions
    assert (only.deviation, only.action, only.text, only.note) == (pay.id, "amend", "forty-five (45) days", None)
    assert only.match["draft_text"] == pay.draft_text and only.match["change"] == "replace"


@pytest.mark.parametrize(("args", "message"), [
    (("v999", "accept"), "no deviation"),
    (("PAY", "approve"), "unknown decision"),
    (("PAY", "amend"), "amend needs the new wording"),
    (("PAY", "revert", "text"), "--text goes with amend"),
])
def test_bad_decisions_are_refused_with_one_line(scenario, args, message):
    rf = new_review_file(scenario.draft_path, scenario.precedent_path)
    pay = _dev(rf.review, "replace", draft_text="sixty")
    dev_id = pay.id if args[0] == "PAY" else args[0]
    with pytest.raises(CounterdraftError, match=message) as err:
        decide(rf, dev_id, args[1], text=args[2] if len(args) > 2 else None)
    assert "\n" not in str(err.value)


def test_moves_and_renamed_terms_can_only_be_accepted(scenario):
    rf = new_review_file(scenario.draft_path, scenario.precedent_path)
    move = next(d for d in rf.review.deviations if d.change == "move")
    term = next(d for d in rf.review.deviations if d.category == "term")
    for d in (move, term):
        # the message names the deviation by the number the user sees (its rank)
        with pytest.raises(CounterdraftError, match=rf"^deviation {d.rank} \(.*\) is a "):
            decide(rf, d.id, "revert")
        assert decide(rf, d.id, "accept").decisions[-1].action == "accept"


def test_formatting_punctuation_and_numbering_can_only_be_accepted(tmp_path):
    """The counter-draft keeps the draft's own layout, punctuation and numbering: restoring
    them is refused in one line that names the deviation by its number."""
    precedent, draft = tmp_path / "precedent.docx", tmp_path / "draft.docx"
    precedent.write_bytes(compose_docx(PRECEDENT))
    changed = [CP(p.text.replace("Late payments carry", "LATE PAYMENTS carry").replace(
        " a year above", " a year, above"), level=p.level, bold=p.bold, style=p.style) for p in PRECEDENT]
    draft.write_bytes(compose_docx(changed))
    rf = new_review_file(draft, precedent)
    kinds = {d.category: d for d in rf.review.deviations}
    assert {"formatting", "punctuation"} <= set(kinds)
    for dev in (kinds["formatting"], kinds["punctuation"]):
        for action, text in (("revert", None), ("amend", "whatever")):
            with pytest.raises(CounterdraftError, match=rf"deviation {dev.rank}\b.*{dev.category} difference") as err:
                decide(rf, dev.id, action, text=text)
            assert "\n" not in str(err.value)
        assert decide(rf, dev.id, "accept", note="Fine.").decisions[-1].action == "accept"


@pytest.mark.parametrize(("text", "message"), [
    ("forty\x07five days", r"control character \(U\+0007\)"),
    ("forty-five\x00 days", r"control character \(U\+0000\)"),
    ("forty-five days\nand more", "line break"),
    ("x" * 100_001, "at most 100,000"),
])
def test_amend_wording_is_checked_on_entry(scenario, text, message):
    """ECMA-376 parts are XML 1.0, which cannot carry C0 controls other than tab and line
    ends (XML 1.0 §2.2); a line break starts a paragraph only when asked for."""
    rf = new_review_file(scenario.draft_path, scenario.precedent_path)
    pay = _dev(rf.review, "replace", draft_text="sixty")
    with pytest.raises(CounterdraftError, match=message) as err:
        decide(rf, pay.id, "amend", text=text)
    assert "\n" not in str(err.value)


def test_line_breaks_in_amend_wording_are_taken_when_asked_for(scenario):
    rf = new_review_file(scenario.draft_path, scenario.precedent_path)
    pay = _dev(rf.review, "replace", draft_text="sixty")
    rf = decide(rf, pay.id, "amend", text="forty-five (45) days\r\nTime is of the essence.\n",
                paragraphs=True)
    assert rf.decisions[-1].text == "forty-five (45) days\nTime is of the essence."


def test_a_hand_edited_decision_with_a_control_character_is_refused_on_load(scenario, tmp_path):
    rf = new_review_file(scenario.draft_path, scenario.precedent_path)
    pay = _dev(rf.review, "replace", draft_text="sixty")
    path = tmp_path / "review.json"
    save_review_file(path, decide(rf, pay.id, "amend", text="forty-five (45) days"))
    data = json.loads(path.read_text(encoding="utf-8"))
    data["decisions"][0]["text"] = "forty\u0007five"
    path.write_text(json.dumps(data), encoding="utf-8")
    with pytest.raises(CounterdraftError, match="damaged review file.*not plain text") as err:
        load_review_file(path)
    assert "\n" not in str(err.value)


def test_review_file_round_trip(scenario, tmp_path):
    overrides = (TermOverride(draft="Client", precedent="Customer", action="confirm"),)
    rf = new_review_file(scenario.draft_path, scenario.precedent_path, overrides=overrides)
    pay = _dev(rf.review, "replace", draft_text="sixty")
    added = _dev(rf.review, "add-provision", draft_text="set off")
    rf = decide(rf, pay.id, "revert", note="Thirty days is the house term.")
    rf = decide(rf, added.id, "accept")
    path = tmp_path / "review.json"
    save_review_file(path, rf)

    data = json.loads(path.read_text(encoding="utf-8"))
    _validator().validate(data)  # JSON Schema 2020-12, resources/schemas/review-file.schema.json
    assert data["schema"] == REVIEW_FILE_SCHEMA
    assert data["draft"]["path"] == "draft.docx"  # relative to the review file's folder
    assert data["draft"]["sha256"] == hashlib.sha256(scenario.draft_path.read_bytes()).hexdigest()
    assert data["precedent"]["sha256"] == hashlib.sha256(scenario.precedent_path.read_bytes()).hexdigest()
    assert data["overrides"] == [{"draft": "Client", "precedent": "Customer", "action": "confirm"}]
    assert {d["id"] for d in data["deviations"]} == {d.id for d in rf.review.deviations}
    assert [(d["deviation"], d["action"], d["note"]) for d in data["decisions"]] == [
        (pay.id, "revert", "Thirty days is the house term."), (added.id, "accept", None)]

    seen = {}

    def runner(draft, precedent, *, overrides=(), acting_for=None):
        from core.review import run_review

        seen["overrides"] = tuple(overrides)
        return run_review(draft, precedent, overrides=overrides, acting_for=acting_for)

    again = load_review_file(path, runner=runner)
    assert again.notes == ()  # nothing changed
    assert seen["overrides"] == overrides
    assert again.decisions == rf.decisions
    assert [d.id for d in again.review.deviations] == [d.id for d in rf.review.deviations]


def test_the_folder_can_be_moved_as_a_whole(scenario, tmp_path):
    rf = new_review_file(scenario.draft_path, scenario.precedent_path)
    rf = decide(rf, _dev(rf.review, "replace", draft_text="sixty").id, "revert")
    save_review_file(tmp_path / "review.json", rf)
    moved = tmp_path.parent / (tmp_path.name + "-moved")
    shutil.copytree(tmp_path, moved)
    for name in ("draft.docx", "precedent.docx"):
        (tmp_path / name).unlink()
    again = load_review_file(moved / "review.json")
    assert again.draft.path == str((moved / "draft.docx").resolve())
    assert len(again.decisions) == 1


def test_reopening_after_the_draft_changed_keeps_the_decisions_that_still_apply(scenario, tmp_path):
    rf = new_review_file(scenario.draft_path, scenario.precedent_path)
    pay = _dev(rf.review, "replace", draft_text="sixty")
    liab = _dev(rf.review, "insert", draft_text="death")
    rf = decide(rf, pay.id, "revert", note="House term.")
    rf = decide(rf, liab.id, "revert")
    path = tmp_path / "review.json"
    save_review_file(path, rf)

    # The counterparty sends a new turn: a new clause early on (every later provision id
    # shifts), the payment words unchanged, the liability words different.
    new_turn = list(DRAFT)
    new_turn.insert(2, CP("This Agreement binds the parties' successors.", level=1))
    new_turn = [CP(p.text.replace("fraud or death", "fraud or personal injury"), level=p.level,
                   style=p.style, bold=p.bold) for p in new_turn]
    scenario.draft_path.write_bytes(compose_docx(new_turn))

    again = load_review_file(path)
    assert any("draft.docx changed since the review was saved" in n for n in again.notes)
    (kept,) = again.decisions
    new_pay = _dev(again.review, "replace", draft_text="sixty")
    assert kept.deviation == new_pay.id and kept.action == "revert" and kept.note == "House term."
    assert new_pay.draft_provision != pay.draft_provision  # ids shifted; matched by words
    liab_clause = kept_clause = None
    for n in again.notes:  # named by clause (the saved ids mean nothing to the reader)
        if "no longer applies" in n:
            liab_clause = n
        if "now applies to deviation" in n:
            kept_clause = n
    assert liab_clause == "decision 'revert' on 4.1 no longer applies: those words changed; decide again"
    assert kept_clause == (f"decision 'revert' on 2.1 now applies to deviation {new_pay.rank}"
                           if new_pay.id != pay.id else None)


def test_broken_review_files_are_refused_with_one_line(scenario, tmp_path):
    bad = tmp_path / "bad.json"
    for content, message in [
        ("{not json", "invalid JSON"),
        (json.dumps({"schema": "something/1"}), "not a counterdraft.review-file/1"),
        (json.dumps({"schema": REVIEW_FILE_SCHEMA}), "damaged review file"),
        (json.dumps({"schema": REVIEW_FILE_SCHEMA, "draft": {"path": "nowhere.docx"},
                     "precedent": {"path": "precedent.docx"}}),
         r"damaged review file \(top level: .* is a required property"),
        (json.dumps({"schema": "counterdraft.review-file/7"}), "another version of Counterdraft"),
    ]:
        bad.write_text(content, encoding="utf-8")
        with pytest.raises(CounterdraftError, match=message) as err:
            load_review_file(bad)
        assert "\n" not in str(err.value)
    with pytest.raises(CounterdraftError, match="not found"):
        load_review_file(tmp_path / "missing.json")


def test_the_review_file_never_overwrites_a_document(scenario):
    rf = new_review_file(scenario.draft_path, scenario.precedent_path)
    before = scenario.draft_path.read_bytes()
    with pytest.raises(CounterdraftError, match="input"):
        save_review_file(scenario.draft_path, rf)
    assert scenario.draft_path.read_bytes() == before


# --------------------------------------------------------------------------------------
# The commands
# --------------------------------------------------------------------------------------


def test_review_save_decide_export_from_the_command_line(scenario, tmp_path, capsys):
    review_file = tmp_path / "r.json"
    assert main(["review", str(scenario.draft_path), "--against", str(scenario.precedent_path),
                 "--save", str(review_file)]) == 0
    data = json.loads(review_file.read_text(encoding="utf-8"))
    pay = next(d for d in data["deviations"] if "sixty" in d["draft_text"])
    capsys.readouterr()
    # By the internal id (saved scripts use it) and by the number the table shows (the rank);
    # the answer names the deviation by its number.
    assert main(["decide", str(review_file), pay["id"], "revert", "--note", "Thirty days."]) == 0
    assert capsys.readouterr().out.startswith(f"Deviation {pay['rank']}, 2.1 Payment: revert recorded in ")
    top = next(d for d in data["deviations"] if d["rank"] == 1)
    assert main(["decide", str(review_file), "1", "accept"]) == 0
    assert capsys.readouterr().out.startswith("Deviation 1, ")
    assert main(["decide", str(review_file), pay["id"], "amend"]) == 2  # one line, exit 2
    err = capsys.readouterr().err
    assert "amend needs the new wording" in err and "Traceback" not in err
    n = len(data["deviations"])
    for unknown in (str(n + 1), "v999"):
        assert main(["decide", str(review_file), unknown, "accept"]) == 2
        err = capsys.readouterr().err
        assert f"no deviation {unknown} (numbers run 1 to {n})" in err and err.count("\n") == 1
    decisions = json.loads(review_file.read_text(encoding="utf-8"))["decisions"]
    assert {d["deviation"] for d in decisions} == {pay["id"], top["id"]}  # the file keeps ids

    out = tmp_path / "counter.docx"
    issues = tmp_path / "issues.csv"
    assert main(["export", str(review_file), "--counter-draft", str(out), "--issues-list", str(issues),
                 "--author", "Ines Testwright"]) == 0
    assert out.is_file() and issues.is_file()
    captured = capsys.readouterr()
    from core import CAUTION

    assert CAUTION in captured.err
    # Outputs may not overwrite an input, the review file included.
    assert main(["export", str(review_file), "--redline", str(scenario.draft_path)]) == 2
    assert main(["export", str(review_file), "--issues-list", str(review_file)]) == 2
    assert main(["export", str(review_file)]) == 2
    assert "nothing to export" in capsys.readouterr().err


def test_decisions_are_plain_frozen_data():
    d = Decision("v1", "accept")
    with pytest.raises(AttributeError):
        d.action = "revert"  # type: ignore[misc]


# --------------------------------------------------------------------------------------
# Several people on one review file
# --------------------------------------------------------------------------------------


def _decide_in_process(path: str, dev_id: str, note: str, start) -> None:
    """One reviewer recording a decision (a separate process, as two people would be)."""
    from core.decisions import decide, update_review_file

    start.wait()
    update_review_file(path, lambda rf: decide(rf, dev_id, "accept", note=note))


def test_decisions_recorded_at_the_same_moment_all_land(scenario, tmp_path):
    """50 pairs of simultaneous decisions by two processes on one review file: every one
    is in the file afterwards (the read-modify-write runs under an exclusive lock)."""
    import multiprocessing

    rf = new_review_file(scenario.draft_path, scenario.precedent_path)
    ids = [d.id for d in rf.review.deviations[:2]]
    path = tmp_path / "review.json"
    ctx = multiprocessing.get_context("fork")
    for trial in range(50):
        save_review_file(path, rf)  # no decision yet
        start = ctx.Event()
        workers = [ctx.Process(target=_decide_in_process, args=(str(path), dev_id, f"trial {trial}", start))
                   for dev_id in ids]
        for w in workers:
            w.start()
        start.set()
        for w in workers:
            w.join(timeout=120)
            assert w.exitcode == 0
        saved = json.loads(path.read_text(encoding="utf-8"))
        assert sorted(d["deviation"] for d in saved["decisions"]) == sorted(ids), f"trial {trial}"


@pytest.mark.parametrize("damage", ["truncated", "decisions-not-a-list", "action-a-number",
                                    "unknown-id", "text-a-list", "bad-hash", "extra-field"])
def test_a_hand_edited_review_file_gives_one_line_from_decide_and_export(scenario, tmp_path, capsys, damage):
    """A review file edited by hand: refused in one line naming the file and the field (its
    JSON Schema, resources/schemas/review-file.schema.json, checked with the jsonschema
    package), or -- an id no deviation has -- the decision found again by its words."""
    path = tmp_path / "review.json"
    rf = new_review_file(scenario.draft_path, scenario.precedent_path)
    save_review_file(path, decide(rf, rf.review.deviations[0].id, "accept", note="Fine."))
    data = json.loads(path.read_text(encoding="utf-8"))
    text = path.read_text(encoding="utf-8")
    if damage == "truncated":
        text = text[: len(text) // 2]
    else:
        dec = data["decisions"][0]
        if damage == "decisions-not-a-list":
            data["decisions"] = {"v1": "accept"}
        elif damage == "action-a-number":
            dec["action"] = 3
        elif damage == "unknown-id":
            dec["deviation"] = "v999"  # the match key still finds its deviation
        elif damage == "text-a-list":
            dec["text"] = ["forty"]
        elif damage == "bad-hash":
            data["draft"]["sha256"] = "not-a-hash"
        else:
            data["surprise"] = True
        text = json.dumps(data)
    path.write_text(text, encoding="utf-8")
    for argv in (["decide", str(path), "1", "accept"],
                 ["export", str(path), "--issues-list", str(tmp_path / "issues.csv")]):
        status = main(argv)
        err = capsys.readouterr().err.strip().splitlines()
        if damage == "unknown-id":
            assert status == 0 and not any("Traceback" in line for line in err)
            continue
        assert status == 2 and len(err) == 1 and str(path) in err[0], err
        assert "Traceback" not in err[0]


def test_saving_a_window_review_keeps_what_others_recorded_meanwhile(scenario, tmp_path):
    """Three-way merge by deviation: what this session changed since it read the file wins
    (a cleared decision stays cleared); everything else is the file's."""
    from core.decisions import save_review_file_merged, update_review_file

    path = tmp_path / "review.json"
    rf = new_review_file(scenario.draft_path, scenario.precedent_path)
    a, b, c = (d.id for d in rf.review.deviations[:3])
    rf = decide(rf, c, "accept", note="Was agreed.")
    save_review_file(path, rf)
    base = rf.decisions  # what the window read
    # someone else records a decision on a, and changes the note on c
    update_review_file(path, lambda other: decide(decide(other, a, "accept", note="Theirs."),
                                                  c, "accept", note="Changed by them."))
    # meanwhile this session decides b and clears nothing
    mine = decide(rf, b, "accept", note="Mine.")
    saved = save_review_file_merged(path, mine, base=base)
    notes = {d.deviation: d.note for d in saved.decisions}
    assert notes == {a: "Theirs.", b: "Mine.", c: "Changed by them."}
    assert {d["deviation"]: d["note"] for d in json.loads(path.read_text(encoding="utf-8"))["decisions"]} == notes
    # a decision this session clears stays cleared
    cleared = dataclasses.replace(saved, decisions=tuple(d for d in saved.decisions if d.deviation != b))
    again = save_review_file_merged(path, cleared, base=saved.decisions)
    assert {d.deviation for d in again.decisions} == {a, c}


def test_the_party_acted_for_is_kept_in_the_review_file(scenario, tmp_path, capsys):
    """``review --acting-for`` judges each deviation for the party and the review file keeps
    the party: every re-run (decide, export) judges for it again.  The hand-made scenario
    (tests/support/handmade.py): the draft gives the Customer ("Client") sixty days to pay
    instead of thirty and a right of set-off, and drops the Supplier's duty to keep records."""
    review_file = tmp_path / "r.json"
    assert main(["review", str(scenario.draft_path), "--against", str(scenario.precedent_path),
                 "--acting-for", "customer", "--save", str(review_file), "--width", "120"]) == 0
    table = capsys.readouterr().out
    assert "Direction" in table and "favourable" in table and "adverse" in table
    data = json.loads(review_file.read_text(encoding="utf-8"))
    _validator().validate(data)
    assert data["acting_for"] == "Customer"
    by_words = {d["draft_text"] or d["precedent_text"]: d["direction"] for d in data["deviations"]
                if d["category"] == "substantive"}
    assert by_words["sixty (60) days"] == "favourable"  # more time for the Customer to pay
    assert next(v for k, v in by_words.items() if "set off" in k) == "favourable"  # a right of its own
    assert next(v for k, v in by_words.items() if "keep complete records" in k) == "adverse"  # the Supplier's duty gone
    pay = next(d for d in data["deviations"] if d["draft_text"] == "sixty (60) days")
    assert main(["decide", str(review_file), pay["id"], "accept"]) == 0
    again = json.loads(review_file.read_text(encoding="utf-8"))
    assert again["acting_for"] == "Customer"

    def directions(review: dict) -> list[tuple[str, str]]:
        return [(d["id"], d["direction"]) for d in review["deviations"]]

    assert directions(again) == directions(data)

    # an unknown party: one line naming the party terms found, exit 2, nothing written
    capsys.readouterr()
    assert main(["review", str(scenario.draft_path), "--against", str(scenario.precedent_path),
                 "--acting-for", "Lessor"]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "precedent.docx" in err and "party terms found: Customer, Supplier" in err


def test_a_review_file_of_the_earlier_version_loads_and_is_converted(scenario, tmp_path):
    """A review file written before the party acted for and the stances' new names existed:
    no "acting_for", no "direction", a stance under its former name.  It loads (the schema's
    new fields are optional, the former names accepted) and saving it again writes the
    current shape."""
    rf = new_review_file(scenario.draft_path, scenario.precedent_path)
    path = tmp_path / "old.json"
    save_review_file(path, rf)
    data = json.loads(path.read_text(encoding="utf-8"))
    del data["acting_for"]
    for d in data["deviations"]:
        del d["direction"]
    data["deviations"][0]["frequency"] = {"same_type": 3, "matching": 1, "total": 4, "closest": [],
                                          "containing": None, "position": "not acceptable"}
    path.write_text(json.dumps(data), encoding="utf-8")
    _validator().validate(data)

    old = load_review_file(path)
    assert old.review.acting_for is None and {d.direction for d in old.review.deviations} == {"unclear"}
    save_review_file(path, old)
    data = json.loads(path.read_text(encoding="utf-8"))
    _validator().validate(data)
    assert data["acting_for"] is None and all(d["direction"] == "unclear" for d in data["deviations"])
    assert "not acceptable" not in path.read_text(encoding="utf-8")


def test_drafting_checks_are_saved_and_files_without_them_still_load(scenario, tmp_path):
    """The review file carries the drafting checks (JSON Schema 2020-12,
    resources/schemas/review-file.schema.json); a file written before they existed (no
    "checks") still validates and loads, the checks recomputed by the review."""
    from core.review.checks import Check

    rf = new_review_file(scenario.draft_path, scenario.precedent_path)
    prov = rf.review.draft.provisions[-1]
    check = Check(kind="dangling-reference", document="draft", provision=prov.id, text=prov.text[:5],
                  message="a planted check", span=(0, 5), term="9")
    rf = dataclasses.replace(rf, review=dataclasses.replace(rf.review, checks=(check,)))
    path = tmp_path / "review.json"
    save_review_file(path, rf)
    data = json.loads(path.read_text(encoding="utf-8"))
    _validator().validate(data)
    assert data["checks"][0]["kind"] == "dangling-reference" and data["checks"][0]["span"] == [0, 5]
    del data["checks"]
    _validator().validate(data)
    path.write_text(json.dumps(data), encoding="utf-8")
    again = load_review_file(path)
    assert again.review.checks == new_review_file(scenario.draft_path, scenario.precedent_path).review.checks
