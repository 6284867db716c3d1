"""Every exit of the command line is clean: one line on stderr, a non-zero status, the file
named -- also when standard output is a full disk or a pipe closed early.

Outside references: Linux's ``/dev/full`` (every write fails with ENOSPC, see full(4)) and a
real pipe whose reading end is closed (EPIPE, pipe(7)).
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "demo_agreements"
REVIEW = ["review", str(DEMO / "draft.docx"), "--against", str(DEMO / "precedent.docx"), "--show", "all"]


def _cli(args, **kwargs) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "core.cli", *args], cwd=ROOT, timeout=300,
                          env={**os.environ, "PYTHONPATH": str(ROOT)}, **kwargs)


def _one_line(stderr: bytes) -> str:
    lines = stderr.decode("utf-8").strip().splitlines()
    assert len(lines) == 1 and "Traceback" not in lines[0], lines
    return lines[0]


def test_a_full_disk_on_standard_output_is_one_line():
    with open("/dev/full", "wb") as full:  # full(4): writes fail with ENOSPC
        done = _cli(REVIEW, stdout=full, stderr=subprocess.PIPE)
    assert done.returncode != 0
    assert "No space left on device" in _one_line(done.stderr)


def test_a_pipe_closed_early_is_one_line():
    proc = subprocess.Popen([sys.executable, "-m", "core.cli", *REVIEW], cwd=ROOT, stdout=subprocess.PIPE,
                            stderr=subprocess.PIPE, env={**os.environ, "PYTHONPATH": str(ROOT)})
    proc.stdout.close()  # the reader goes away before the review is printed (EPIPE, pipe(7))
    err = proc.stderr.read()
    proc.stderr.close()
    assert proc.wait(timeout=300) != 0
    assert "closed" in _one_line(err)


@pytest.mark.parametrize("case", ["decide-missing", "export-missing", "export-no-folder", "build-a-file",
                                  "stats-no-index", "review-missing-precedent", "decide-bad-number"])
def test_every_refusal_names_the_file(tmp_path, case):
    missing = tmp_path / "missing.json"
    draft = str(DEMO / "draft.docx")
    saved = tmp_path / "review.json"
    if case in ("export-no-folder", "decide-bad-number"):
        assert _cli(["review", draft, "--against", str(DEMO / "precedent.docx"), "--save", str(saved)],
                    capture_output=True).returncode == 0
    args, named = {
        "decide-missing": (["decide", str(missing), "1", "accept"], missing),
        "export-missing": (["export", str(missing), "--issues-list", str(tmp_path / "i.csv")], missing),
        "export-no-folder": (["export", str(saved), "--issues-list", str(tmp_path / "no" / "i.csv")],
                             tmp_path / "no" / "i.csv"),
        "build-a-file": (["library", "build", draft], draft),
        "stats-no-index": (["library", "stats", str(tmp_path)], tmp_path),
        "review-missing-precedent": (["review", draft, "--against", str(missing)], missing),
        "decide-bad-number": (["decide", str(saved), "9999", "accept"], saved),
    }[case]
    done = _cli(args, capture_output=True)
    assert done.returncode == 2
    assert str(named) in _one_line(done.stderr)
