"""desktop.app: the command line of the window, and what it does without a display.

Outside references: the X server Xvfb (Debian's xvfb package, through its ``xvfb-run``
wrapper) runs the window; ``xwininfo`` (Debian's x11-utils) lists the windows on it.  Both
are installed by the Makefile; a test that cannot find them fails rather than skips.
"""

from __future__ import annotations

import os
import re
import shlex
import shutil
import subprocess
import sys
from pathlib import Path

import core
from desktop.app import build_parser, demo_inputs, has_display, no_display_message
from desktop.window import FIT_SCREEN

ROOT = Path(__file__).resolve().parents[2]
#: Longest wait for the demo window to come up with its review on the virtual screen (it
#: indexes the demo precedent set first: some seconds on this machine).
WINDOW_WAIT_S = 240
#: Runs the window command given as arguments in the background, waits until a top-level
#: window titled with the demo's comparison appears on the X display, prints xwininfo's line
#: for it and stops the window.  Exit 3: the window program ended first; 4: no window in time.
WATCH = r"""
"$@" & app=$!
i=0
while [ $i -lt $((WAIT * 2)) ]; do
  if xwininfo -root -tree | grep 'against precedent.docx'; then kill $app; wait $app; exit 0; fi
  kill -0 $app 2>/dev/null || exit 3
  sleep 0.5; i=$((i + 1))
done
kill $app; exit 4
"""


def _headless_env(tmp_path: Path) -> dict[str, str]:
    """This environment without a display, with throw-away settings folders."""
    env = {k: v for k, v in os.environ.items() if k not in ("DISPLAY", "WAYLAND_DISPLAY", "QT_QPA_PLATFORM")}
    env.update(HOME=str(tmp_path), XDG_CONFIG_HOME=str(tmp_path / "config"))
    return env


def test_display_detection_follows_the_environment_on_linux_only():
    assert not has_display({}, platform="linux")
    assert has_display({"DISPLAY": ":0"}, platform="linux")
    assert has_display({"WAYLAND_DISPLAY": "wayland-0"}, platform="linux")
    assert has_display({"QT_QPA_PLATFORM": "offscreen"}, platform="linux")
    assert has_display({}, platform="win32")
    assert has_display({}, platform="darwin")


def _printed_commands(tmp_path: Path) -> list[list[str]]:
    """The commands ``python -m desktop --demo`` prints without a display, split as a shell
    would (each indented command line of its message)."""
    out = subprocess.run([sys.executable, "-m", "desktop", "--demo"], cwd=ROOT, env=_headless_env(tmp_path),
                         capture_output=True, text=True, timeout=60)
    assert out.returncode == 0 and out.stderr == ""
    assert "needs a display" in out.stdout and core.CAUTION in out.stdout
    return [shlex.split(line) for line in out.stdout.splitlines()
            if line.startswith("    ") and not line.strip().startswith(("-", "("))]


def test_without_a_display_the_demo_prints_commands_whose_parts_exist(tmp_path):
    commands = _printed_commands(tmp_path)
    window, virtual, review = commands
    # the window: this very interpreter (not a bare "python"), on the demo
    assert window[1:] == ["-m", "desktop", "--demo"]
    assert Path(ROOT, window[0]).resolve() == Path(sys.executable).resolve()
    # the same on a virtual screen of the size the window is designed for
    assert virtual[:4] == ["xvfb-run", "-a", "-s", f"-screen 0 {FIT_SCREEN[0]}x{FIT_SCREEN[1]}x24"]
    assert virtual[4:] == window
    assert shutil.which("xvfb-run") and shutil.which("xauth"), "the Makefile installs xvfb and xauth"
    # the command-line review: an existing program and the demo's own files
    assert os.access(Path(ROOT, review[0]), os.X_OK)
    assert review[1:3] == ["review", "demo_agreements/draft.docx"]
    for path in (review[2], review[4], review[6]):
        assert (ROOT / path).exists()


def test_the_printed_virtual_screen_command_opens_the_demo_window(tmp_path):
    """Runs the printed xvfb-run command, as printed, with a watcher beside the window on the
    same virtual screen: the demo window comes up, titled with the comparison once its
    review is shown, and fits the screen."""
    virtual = _printed_commands(tmp_path)[1]
    assert shutil.which("xwininfo"), "the Makefile installs x11-utils (xwininfo)"
    xvfb_options, window = virtual[:4], virtual[4:]
    env = _headless_env(tmp_path) | {"WAIT": str(WINDOW_WAIT_S)}
    run = subprocess.run([*xvfb_options, "sh", "-c", WATCH, "sh", *window], cwd=ROOT, env=env,
                         capture_output=True, text=True, timeout=WINDOW_WAIT_S + 60)
    assert run.returncode == 0, (run.returncode, run.stdout, run.stderr[-2000:])
    # xwininfo -tree: '0x... "draft.docx against precedent.docx ... Counterdraft": (...)  WxH+X+Y'
    line = next(line for line in run.stdout.splitlines() if "against precedent.docx" in line)
    w, h = map(int, re.search(r"\)\s+(\d+)x(\d+)\+", line).groups())
    assert w <= FIT_SCREEN[0] and h <= FIT_SCREEN[1]


def test_the_message_without_demo_shows_the_general_command():
    text = no_display_message(demo=False)
    assert "-m desktop DRAFT PRECEDENT" in text
    assert "review DRAFT --against PRECEDENT [--library DIR]" in text


def test_arguments_match_the_documented_usage():
    args = build_parser().parse_args(["d.docx", "p.docx", "--library", "set"])
    assert (args.draft, args.precedent, args.library, args.demo) == ("d.docx", "p.docx", "set", False)
    assert build_parser().parse_args(["--demo"]).demo
    draft, precedent, library = demo_inputs()
    assert Path(draft).name == "draft.docx" and Path(precedent).name == "precedent.docx"
    assert Path(library).name == "precedent_set"
