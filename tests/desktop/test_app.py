"""desktop.app: the command line of the window, and what it does without a display."""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import core
from desktop.app import build_parser, demo_inputs, has_display, no_display_message

ROOT = Path(__file__).resolve().parents[2]


def test_display_detection_follows_the_environment_on_linux_only():
    assert not has_display({}, platform="linux")
    assert has_display({"DISPLAY": ":0"}, platform="linux")
    assert has_display({"WAYLAND_DISPLAY": "wayland-0"}, platform="linux")
    assert has_display({"QT_QPA_PLATFORM": "offscreen"}, platform="linux")
    assert has_display({}, platform="win32")
    assert has_display({}, platform="darwin")


def test_without_a_display_the_demo_prints_how_to_run_it_and_exits_0():
    env = {k: v for k, v in os.environ.items() if k not in ("DISPLAY", "WAYLAND_DISPLAY", "QT_QPA_PLATFORM")}
    out = subprocess.run([sys.executable, "-m", "desktop", "--demo"], cwd=ROOT, env=env,
                         capture_output=True, text=True, timeout=60)
    assert out.returncode == 0
    assert "needs a display" in out.stdout
    assert "xvfb-run -a python -m desktop --demo" in out.stdout
    assert ("counterdraft review demo_agreements/draft.docx --against demo_agreements/precedent.docx "
            "--library demo_agreements/precedent_set") in out.stdout
    assert core.CAUTION in out.stdout
    assert out.stderr == ""


def test_the_message_without_demo_shows_the_general_command():
    text = no_display_message(demo=False)
    assert "python -m desktop DRAFT PRECEDENT" in text
    assert "counterdraft review DRAFT --against PRECEDENT [--library DIR]" in text


def test_arguments_match_the_documented_usage():
    args = build_parser().parse_args(["d.docx", "p.docx", "--library", "set"])
    assert (args.draft, args.precedent, args.library, args.demo) == ("d.docx", "p.docx", "set", False)
    assert build_parser().parse_args(["--demo"]).demo
    draft, precedent, library = demo_inputs()
    assert Path(draft).name == "draft.docx" and Path(precedent).name == "precedent.docx"
    assert Path(library).name == "precedent_set"
