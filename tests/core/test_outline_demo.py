"""The printed outline of ``counterdraft inspect`` on the demo agreements shows every clause
with the number and heading the demo generator recorded (foundation issue, "Done when").

Outside reference: the generator's record ``demo_agreements/scenario.json`` (its outline's
numbers are the labels LibreOffice renders for the same files, checked in
``tests/test_demo_scenario.py``).  ``tests/test_demo_scenario.py`` compares the reader's
provisions with the record; this file checks the text a user actually sees in the terminal.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from core.cli import main
from core.outline import ELLIPSIS, display_width
from core.reader import read_document

DEMO = Path(__file__).resolve().parents[2] / "demo_agreements"
RECORD = json.loads((DEMO / "scenario.json").read_text(encoding="utf-8"))


def _shows(shown: str, heading: str) -> bool:
    """*shown* starts with *heading*, or with the part of it that fitted before the cut."""
    if shown.startswith(heading):
        return True
    cut = shown.split(" \u2014 ", 1)[0]
    return cut.endswith(ELLIPSIS) and heading.startswith(cut[: -len(ELLIPSIS)].rstrip())


@pytest.mark.parametrize("side", ["precedent", "draft"])
def test_printed_outline_shows_every_recorded_clause_number_and_heading(side, capsys):
    path = DEMO / RECORD[side]["file"]
    assert main(["inspect", str(path)]) == 0
    lines = capsys.readouterr().out.rstrip("\n").split("\n")
    assert all(display_width(line) <= 100 for line in lines)  # fits a 100-column terminal
    # One outline line per provision, in document order, after the header line.
    doc = read_document(str(path))
    clause_lines = [line for line, p in zip(lines[1:], doc.provisions) if p.kind == "clause"]
    recorded = [e for e in RECORD[side]["outline"] if e["kind"] == "clause"]
    assert len(clause_lines) == len(recorded) > 25
    for entry, line in zip(recorded, clause_lines):
        shown = line.lstrip(" ")
        number = entry["number"]
        assert shown.startswith(number + " "), (entry, line)
        rest = shown[len(number):].lstrip(" ")
        if entry["heading"]:
            assert _shows(rest, entry["heading"]), (entry, line)
