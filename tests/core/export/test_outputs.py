"""Refusals and atomic writes shared by the three outputs (core.export): an output path that
names an input is refused in one line, and an interrupted write leaves the previous file as
it was (the temporary file and rename of core.fileio).
"""

from __future__ import annotations

import os

import pytest

from core.errors import CounterdraftError
from core.export import (
    write_counter_draft,
    write_issues_list,
    write_redline,
)
from tests.core.export.conftest import AUTHOR, DECISIONS

# --------------------------------------------------------------------------------------
# Refusals and atomic writes
# --------------------------------------------------------------------------------------


def test_an_output_path_equal_to_an_input_is_refused(scenario, tmp_path):
    before = scenario.draft_path.read_bytes()
    with pytest.raises(CounterdraftError, match="input"):
        write_counter_draft(scenario.review, DECISIONS, scenario.draft_path,
                            draft_path=str(scenario.draft_path), author=AUTHOR)
    with pytest.raises(CounterdraftError, match="input"):
        write_redline(scenario.review, scenario.precedent_path, author=AUTHOR)
    alias = scenario.draft_path.parent / "." / scenario.draft_path.name
    with pytest.raises(CounterdraftError, match="input"):
        write_issues_list(scenario.review, alias.with_suffix(".docx"))
    assert scenario.draft_path.read_bytes() == before
    with pytest.raises(CounterdraftError, match="must end in"):
        write_issues_list(scenario.review, tmp_path / "issues.pdf")


def test_an_interrupted_write_leaves_the_previous_file_intact(scenario, tmp_path, monkeypatch):
    out = tmp_path / "counter.docx"
    write_counter_draft(scenario.review, DECISIONS[:1], out, draft_path=str(scenario.draft_path), author=AUTHOR)
    previous = out.read_bytes()

    import core.fileio

    def fail(fd):
        raise OSError(28, "No space left on device")  # after part of the data is written

    monkeypatch.setattr(core.fileio.os, "fsync", fail)
    # The failure reaches the user as one line naming the file (core.fileio turns the OSError
    # into a CounterdraftError).
    with pytest.raises(CounterdraftError, match="No space left on device"):
        write_counter_draft(scenario.review, DECISIONS, out, draft_path=str(scenario.draft_path), author=AUTHOR)
    monkeypatch.undo()
    assert out.read_bytes() == previous
    assert sorted(os.listdir(tmp_path)) == ["counter.docx"]  # no temporary file left behind


