"""``python -m desktop``: start the window, optionally on two files or on the demo.

    python -m desktop                              # empty window
    python -m desktop DRAFT PRECEDENT [--library DIR]
    python -m desktop --review REVIEW.json
    python -m desktop --demo                       # the bundled demo agreements

Without a display (no DISPLAY, no WAYLAND_DISPLAY and no QT_QPA_PLATFORM on Linux) it prints
how to run it and the command-line alternative, and exits with status 0.
"""

from __future__ import annotations

import argparse
import os
import shlex
import shutil
import sys
import traceback
from pathlib import Path
from types import TracebackType

import core
from core.readers import formats_summary

__all__ = [
    "DEMO_DIR", "XVFB_SCREEN", "build_parser", "cli_command", "demo_inputs", "has_display", "main",
    "no_display_message", "python_command", "virtual_screen_command", "window_command",
]

DEMO_DIR = Path(__file__).resolve().parent.parent / "demo_agreements"
#: The virtual screen xvfb-run gives the window: a common laptop size (the window's design
#: size, :data:`desktop.window.FIT_SCREEN`), 24-bit colour.  Xvfb's own default is 640x480.
XVFB_SCREEN = "-screen 0 1366x768x24"


def demo_inputs() -> tuple[str, str, str]:
    """(draft, precedent, precedent-set folder) of the bundled demo."""
    return (str(DEMO_DIR / "draft.docx"), str(DEMO_DIR / "precedent.docx"), str(DEMO_DIR / "precedent_set"))


def has_display(environ: dict[str, str] | os._Environ[str] | None = None, *, platform: str | None = None) -> bool:
    """Whether Qt can open a window here.  Only Linux and the BSDs need a display server;
    QT_QPA_PLATFORM (e.g. ``offscreen``) counts as a deliberate choice."""
    env = os.environ if environ is None else environ
    plat = sys.platform if platform is None else platform
    if not (plat.startswith("linux") or "bsd" in plat):
        return True
    return any(env.get(k) for k in ("DISPLAY", "WAYLAND_DISPLAY", "QT_QPA_PLATFORM"))


def _shown_path(path: Path) -> str:
    """*path* relative to the current folder when it lies inside it (".venv/bin/python"),
    else absolute: a path that works when pasted here."""
    try:
        return str(path.relative_to(Path.cwd()))
    except ValueError:
        return str(path)


def python_command() -> str:
    """The interpreter running this program, as a command to paste (not a bare ``python``,
    which may be another interpreter without Counterdraft)."""
    return shlex.quote(_shown_path(Path(sys.executable).absolute()))


def cli_command() -> str:
    """The ``counterdraft`` command beside this interpreter, else ``PYTHON -m core.cli``."""
    script = Path(sys.executable).absolute().parent / "counterdraft"
    if script.is_file():
        return shlex.quote(_shown_path(script))
    return python_command() + " -m core.cli"


def window_command(*, demo: bool) -> str:
    """The command that opens the window (on the demo, or on two files)."""
    return f"{python_command()} -m desktop " + ("--demo" if demo else "DRAFT PRECEDENT")


def virtual_screen_command(*, demo: bool) -> str:
    """The same command on a virtual screen (Xvfb), for a machine without a display."""
    return f"xvfb-run -a -s {shlex.quote(XVFB_SCREEN)} {window_command(demo=demo)}"


def no_display_message(*, demo: bool) -> str:
    """What ``python -m desktop`` prints without a display: the exact commands that open the
    window elsewhere or here on a virtual screen, and the command-line alternative."""
    draft, precedent, library = (_shown_path(Path(p)) for p in demo_inputs())
    lines = [
        "Counterdraft's window needs a display, and none was found",
        "(DISPLAY, WAYLAND_DISPLAY and QT_QPA_PLATFORM are all unset).",
        "",
        "To open the window:",
        "  - on a machine with a display, in this folder:",
        f"        {window_command(demo=demo)}",
        "  - over SSH, connect with ssh -X and run the same command;",
        "  - here, on a virtual screen (it keeps running until you press Ctrl+C):",
        f"        {virtual_screen_command(demo=demo)}",
    ]
    if shutil.which("xvfb-run") is None:
        lines.append("    (xvfb-run is in Debian's xvfb package: sudo apt-get install xvfb)")
    lines += ["", "The same review on the command line:"]
    if demo:
        lines.append(f"        {cli_command()} review {draft} --against {precedent} --library {library}")
    else:
        lines.append(f"        {cli_command()} review DRAFT --against PRECEDENT [--library DIR]")
    lines += ["", core.CAUTION]
    return "\n".join(lines)


def build_parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(
        prog="python -m desktop",
        description="Counterdraft's window: compare a counterparty's draft with the house precedent. "
        + core.CAUTION,
    )
    p.add_argument("draft", nargs="?", help=f"the counterparty's draft ({formats_summary()})")
    p.add_argument("precedent", nargs="?", help=f"the house precedent ({formats_summary()})")
    p.add_argument("--library", metavar="DIR", help="folder of past agreements (the precedent set), or a shared "
                   "store's address (postgresql://USER@HOST:PORT/DB)")
    p.add_argument("--review", metavar="FILE", help="open a saved review file")
    p.add_argument("--demo", action="store_true", help="open the bundled demo agreements")
    p.add_argument("--version", action="version", version=f"Counterdraft {core.__version__}")
    return p


def main(argv: list[str] | None = None) -> int:
    parser = build_parser()
    args = parser.parse_args(argv)
    if args.draft and not args.precedent:
        parser.error("give both the draft and the precedent (or neither)")
    if not has_display():
        print(no_display_message(demo=args.demo))
        return 0

    from PySide6.QtWidgets import QApplication

    from .window import MainWindow

    app = QApplication.instance() or QApplication(["counterdraft"])  # WM_CLASS "counterdraft"
    app.setApplicationName("Counterdraft")
    app.setOrganizationName("Counterdraft")
    app.setApplicationVersion(core.__version__)
    QApplication.setStyle("Fusion")
    window = MainWindow()
    window.show()

    def unexpected(kind: type[BaseException], exc: BaseException, tb: TracebackType | None) -> None:
        # An exception escaping a slot: one line in a dialog, the window stays up.
        traceback.print_exception(kind, exc, tb)
        window.report_problem(exc)

    sys.excepthook = unexpected
    if args.demo:
        from core.cli import DEMO_ACTING_FOR

        draft, precedent, library = demo_inputs()
        window.open_comparison(draft, precedent, library=library if Path(library).is_dir() else None,
                               acting_for=DEMO_ACTING_FOR)
    elif args.review:
        window.open_review_file(args.review)
    elif args.draft:
        window.open_comparison(args.draft, args.precedent, library=args.library)
    elif args.library:
        window.open_library(args.library)
    return app.exec()
