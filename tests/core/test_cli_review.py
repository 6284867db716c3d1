"""``counterdraft review`` (core.cli's review subcommand)."""

from __future__ import annotations

import json
import textwrap

import pytest

from core import CAUTION
from core.cli import main
from core.fileio import file_sha256

PRECEDENT = """
1. Payment

1.1 The Customer shall pay each invoice within thirty (30) days of receipt.

2. Notices

2.1 Notices shall be in writing.
"""
DRAFT = PRECEDENT.replace("thirty (30)", "sixty (60)").replace("shall be in", "may be in")


@pytest.fixture
def files(tmp_path):
    d = tmp_path / "draft.txt"
    p = tmp_path / "precedent.txt"
    d.write_text(textwrap.dedent(DRAFT), encoding="utf-8")
    p.write_text(textwrap.dedent(PRECEDENT), encoding="utf-8")
    return d, p


def test_table(files, capsys):
    d, p = files
    before = (file_sha256(d), file_sha256(p))
    assert main(["review", str(d), "--against", str(p)]) == 0
    out = capsys.readouterr().out
    assert max(len(line) for line in out.splitlines()) <= 100
    assert "period changed from 30 to 60 days" in out
    assert CAUTION.split()[0] in out and " ".join(out.split()).endswith(CAUTION)
    assert (file_sha256(d), file_sha256(p)) == before  # inputs never modified


def test_json_to_file_and_stdout(files, capsys, tmp_path):
    d, p = files
    out = tmp_path / "review.json"
    assert main(["review", str(d), "--against", str(p), "--json", str(out)]) == 0
    obj = json.loads(out.read_text(encoding="utf-8"))
    assert obj["schema"] == "counterdraft.review/1"
    assert [v["rank"] for v in obj["deviations"]] == list(range(1, len(obj["deviations"]) + 1))
    assert not list(tmp_path.glob("*.part"))  # written atomically, no leftovers
    assert main(["review", str(d), "--against", str(p), "--json", "-"]) == 0
    assert json.loads(capsys.readouterr().out) == obj


@pytest.mark.parametrize("case", ["missing", "suffix", "overwrite"])
def test_bad_input_is_one_line_and_exit_2(files, capsys, tmp_path, case):
    d, p = files
    before = file_sha256(p)
    if case == "missing":
        argv = ["review", str(tmp_path / "nope.docx"), "--against", str(p)]
    elif case == "suffix":
        bad = tmp_path / "draft.pdf"
        bad.write_bytes(b"%PDF-1.4")
        argv = ["review", str(bad), "--against", str(p)]
    else:
        argv = ["review", str(d), "--against", str(p), "--json", str(p)]
    assert main(argv) == 2
    err = capsys.readouterr().err.strip()
    assert err.startswith("counterdraft: ") and "\n" not in err
    assert file_sha256(p) == before


def test_documents_that_share_nothing(tmp_path, capsys):
    a = tmp_path / "a.txt"
    b = tmp_path / "b.txt"
    a.write_text("1. Harbour\n\n1.1 Lighthouse keepers rotate their watches at dawn.\n", encoding="utf-8")
    b.write_text("1. Orchard\n\n1.1 Apples are picked by hand in the autumn months.\n", encoding="utf-8")
    assert main(["review", str(a), "--against", str(b)]) == 0
    assert "share no provision" in capsys.readouterr().out
    assert main(["review", str(a), "--against", str(b), "--json", str(tmp_path / "o.json")]) == 0
    assert "share no provision" in capsys.readouterr().err


def test_against_is_required(files, capsys):
    d, _p = files
    with pytest.raises(SystemExit) as exc:
        main(["review", str(d)])
    assert exc.value.code == 2
