"""Desktop tests drive the real window on Qt's offscreen platform: no display needed."""

from __future__ import annotations

import os
import shutil
from pathlib import Path

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import pytest
from PySide6.QtCore import QSettings, QThreadPool
from PySide6.QtWidgets import QApplication, QMessageBox


@pytest.fixture
def settings(tmp_path) -> QSettings:
    """A throw-away settings file: the tests never touch the user's settings."""
    return QSettings(str(tmp_path / "counterdraft-settings.ini"), QSettings.Format.IniFormat)


@pytest.fixture
def make_window(qtbot, settings):
    """Build MainWindow instances with temporary settings; close them without asking."""
    from desktop.window import MainWindow

    made = []

    def make(**kw):
        pool = QThreadPool()
        w = MainWindow(settings=kw.pop("settings", settings), pool=pool, **kw)
        w.ask_before_closing = False
        qtbot.addWidget(w)
        made.append(w)
        return w

    yield make
    for w in made:
        w.wait_for_background(30000)


def message_boxes() -> list[QMessageBox]:
    """Open message boxes (the window opens them with open(), so nothing blocks)."""
    return [w for w in QApplication.topLevelWidgets() if isinstance(w, QMessageBox) and w.isVisible()]


def close_message_boxes() -> None:
    for box in message_boxes():
        box.close()


DEMO = Path(__file__).resolve().parents[2] / "demo_agreements"


@pytest.fixture(scope="session")
def demo_copy(tmp_path_factory) -> dict[str, str]:
    """The demo draft, precedent and precedent set copied to a temporary folder, so the
    precedent set's index is built there and never inside the repository."""
    root = tmp_path_factory.mktemp("demo")
    shutil.copy(DEMO / "draft.docx", root / "draft.docx")
    shutil.copy(DEMO / "precedent.docx", root / "precedent.docx")
    (root / "precedent_set").mkdir()
    for f in sorted((DEMO / "precedent_set").glob("*.docx")):
        shutil.copy(f, root / "precedent_set" / f.name)
    return {"draft": str(root / "draft.docx"), "precedent": str(root / "precedent.docx"),
            "library": str(root / "precedent_set"), "folder": str(root)}


def wait_for_outcome(qtbot, window, *, timeout: int = 60000) -> str:
    """Wait until the window's running operation ends; returns the first of "shown",
    "written", "failed: <line>", "cancelled" or "finished"."""
    outcome: list[str] = []
    window.reviewShown.connect(lambda: outcome.append("shown"))
    window.fileWritten.connect(lambda p: outcome.append("written"))
    window.operationFailed.connect(lambda line: outcome.append("failed: " + line))
    window.operationCancelled.connect(lambda: outcome.append("cancelled"))
    window.operationFinished.connect(lambda name: outcome.append("finished"))
    qtbot.waitUntil(lambda: bool(outcome), timeout=timeout)
    return outcome[0]
