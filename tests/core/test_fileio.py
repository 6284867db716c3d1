"""Outputs are written atomically and never replace an input or a special file."""

import os
import stat
from pathlib import Path

import pytest

from core.cli import main
from core.errors import CounterdraftError
from core.fileio import atomic_write_bytes

DEMO_DRAFT = os.path.join(os.path.dirname(__file__), "..", "..", "demo_agreements", "draft.docx")


def test_atomic_write_replaces_a_file_and_leaves_no_temporary(tmp_path):
    out = tmp_path / "out.txt"
    out.write_bytes(b"old")
    atomic_write_bytes(out, b"new")
    assert out.read_bytes() == b"new"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["out.txt"]


def test_atomic_write_follows_a_symbolic_link(tmp_path):
    real = tmp_path / "real.txt"
    real.write_bytes(b"old")
    link = tmp_path / "link.txt"
    link.symlink_to(real)
    atomic_write_bytes(link, b"new")
    assert link.is_symlink() and real.read_bytes() == b"new"


def test_a_folder_or_special_file_is_refused_not_replaced(tmp_path):
    with pytest.raises(CounterdraftError, match="not a regular file"):
        atomic_write_bytes(tmp_path, b"x")
    fifo = tmp_path / "pipe"
    os.mkfifo(fifo)
    with pytest.raises(CounterdraftError, match="not a regular file"):
        atomic_write_bytes(fifo, b"x")
    assert stat.S_ISFIFO(os.stat(fifo).st_mode)


def test_a_write_error_is_one_line_and_keeps_the_previous_file(tmp_path, monkeypatch):
    out = tmp_path / "out.txt"
    out.write_bytes(b"previous")

    def disk_full(*_args):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(os, "replace", disk_full)
    with pytest.raises(CounterdraftError, match="cannot write the file .No space left") as err:
        atomic_write_bytes(out, b"new")
    assert str(out) in str(err.value)
    assert out.read_bytes() == b"previous"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["out.txt"]


def test_inspect_refuses_to_write_its_json_over_the_input(tmp_path, capsys):
    src = tmp_path / "draft.docx"
    src.write_bytes(Path(DEMO_DRAFT).read_bytes())
    before = src.read_bytes()
    assert main(["inspect", str(src), "--json", str(src)]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and "input" in err[0] and str(src) in err[0]
    assert src.read_bytes() == before


def test_review_refuses_json_and_save_on_one_path(tmp_path, capsys):
    out = tmp_path / "same.json"
    assert main(["review", DEMO_DRAFT, "--against", DEMO_DRAFT, "--json", str(out), "--save", str(out)]) == 2
    assert "same file" in capsys.readouterr().err
    assert not out.exists()


def test_json_to_a_folder_is_one_line(tmp_path, capsys):
    assert main(["inspect", DEMO_DRAFT, "--json", str(tmp_path)]) == 2
    err = capsys.readouterr().err
    assert "Traceback" not in err and len(err.strip().splitlines()) == 1
