"""Dialogs: choosing the files to compare, the key list, and the about box.

None of them blocks the caller: each is shown with ``show()`` or ``open()`` and reports back
through signals, so the window (and the offscreen tests) never sit in a nested event loop.
"""

from __future__ import annotations

import os
import platform
import sys
from collections.abc import Callable, Sequence
from importlib import metadata

from PySide6 import __version__ as pyside_version
from PySide6.QtCore import Qt, Signal, qVersion
from PySide6.QtWidgets import (
    QComboBox,
    QDialog,
    QDialogButtonBox,
    QFileDialog,
    QGridLayout,
    QHBoxLayout,
    QLabel,
    QLineEdit,
    QMessageBox,
    QPushButton,
    QTableWidget,
    QTableWidgetItem,
    QVBoxLayout,
    QWidget,
)

import core
from core.readers import dialog_filter

from .decision import KEYS

__all__ = ["AGREEMENT_FILTER", "KEY_LIST", "NO_PARTY", "REVIEW_FILTER", "OpenDialog", "about_text", "show_about",
           "show_keys"]

#: The readable formats, from the readers registry (the command line reads the same ones).
AGREEMENT_FILTER = dialog_filter()
REVIEW_FILTER = "Counterdraft review files (*.json);;All files (*)"

#: Packages whose versions the about box lists (the engine's main dependencies).
ABOUT_PACKAGES = ("python-docx", "lxml", "diff-match-patch", "rapidfuzz", "scipy", "scikit-learn", "gensim", "numpy")


#: The "acting for" choice that judges no direction.
NO_PARTY = "No one (directions not judged)"


class OpenDialog(QDialog):
    """Pick the draft, the precedent, (optionally) the precedent set -- a folder, or the
    address of a store the team shares -- and the party the reviewer acts for: one of the
    precedent's party terms (*parties(path)* lists them), preset to the one chosen last with
    that precedent (*remembered(path)*)."""

    chosen = Signal(str, str, str)  # draft, precedent, library ("" for none)

    def __init__(self, parent: QWidget | None = None, *, draft: str = "", precedent: str = "", library: str = "",
                 parties: Callable[[str], Sequence[str]] | None = None,
                 remembered: Callable[[str], str | None] | None = None) -> None:
        super().__init__(parent)
        self.setObjectName("openDialog")
        self.setWindowTitle("Compare a draft with the precedent")
        self._parties = parties or (lambda _path: ())
        self._remembered = remembered or (lambda _path: None)
        self._parties_of = ""
        self.draft = QLineEdit(draft, self)
        self.precedent = QLineEdit(precedent, self)
        self.library = QLineEdit(library, self)
        self.library.setPlaceholderText("optional: a folder of past agreements, or a shared store's address "
                                        "(postgresql://user@host/database)")
        self.acting_for = QComboBox(self)
        self.acting_for.setObjectName("actingFor")
        self.acting_for.setToolTip("The party you act for, by the precedent's name for it: each "
                                   "deviation is then marked adverse, favourable, neutral or unclear for it")
        grid = QGridLayout()
        rows = (
            ("Counterparty's draft", self.draft, self._pick_draft),
            ("House precedent", self.precedent, self._pick_precedent),
            ("Precedent set", self.library, self._pick_library),
        )
        for i, (label, edit, pick) in enumerate(rows):
            grid.addWidget(QLabel(label, self), i, 0)
            grid.addWidget(edit, i, 1)
            b = QPushButton("Browse\u2026", self)
            b.clicked.connect(pick)
            grid.addWidget(b, i, 2)
        grid.addWidget(QLabel("Acting for", self), len(rows), 0)
        grid.addWidget(self.acting_for, len(rows), 1)
        self.precedent.editingFinished.connect(self._fill_parties)
        self._fill_parties()
        swap = QPushButton("Swap draft and precedent", self)
        swap.clicked.connect(self._swap)
        self.buttons = QDialogButtonBox(QDialogButtonBox.StandardButton.Cancel, self)
        self.compare = self.buttons.addButton("Compare", QDialogButtonBox.ButtonRole.AcceptRole)
        self.buttons.accepted.connect(self._accept)
        self.buttons.rejected.connect(self.reject)
        for e in (self.draft, self.precedent):
            e.textChanged.connect(self._update)
        bottom = QHBoxLayout()
        bottom.addWidget(swap)
        bottom.addStretch(1)
        bottom.addWidget(self.buttons)
        lay = QVBoxLayout(self)
        lay.addLayout(grid)
        lay.addLayout(bottom)
        self.resize(720, self.sizeHint().height())
        self._update()

    def _update(self) -> None:
        self.compare.setEnabled(bool(self.draft.text().strip() and self.precedent.text().strip()))

    def _pick(self, edit: QLineEdit, title: str) -> None:
        path, _ = QFileDialog.getOpenFileName(self, title, edit.text(), AGREEMENT_FILTER)
        if path:
            edit.setText(path)

    def _pick_draft(self) -> None:
        self._pick(self.draft, "The counterparty's draft")

    def _pick_precedent(self) -> None:
        self._pick(self.precedent, "The house precedent")
        self._fill_parties()

    def _fill_parties(self) -> None:
        """The precedent's party terms as the choices, the one chosen last preset."""
        path = self.precedent.text().strip()
        if path == self._parties_of:
            return
        self._parties_of = path
        names = list(self._parties(path)) if path and os.path.isfile(path) else []
        self.acting_for.clear()
        self.acting_for.addItem(NO_PARTY, "")
        for n in names:
            self.acting_for.addItem(n, n)
        last = self._remembered(path) if path else None
        at = self.acting_for.findData(last) if last else -1
        self.acting_for.setCurrentIndex(max(at, 0))

    def party(self) -> str:
        """The party chosen ("" for none)."""
        return str(self.acting_for.currentData() or "")

    def _pick_library(self) -> None:
        path = QFileDialog.getExistingDirectory(self, "Folder of past agreements", self.library.text())
        if path:
            self.library.setText(path)

    def _swap(self) -> None:
        d, p = self.draft.text(), self.precedent.text()
        self.draft.setText(p)
        self.precedent.setText(d)

    def _accept(self) -> None:
        self.chosen.emit(self.draft.text().strip(), self.precedent.text().strip(), self.library.text().strip())
        self.accept()


KEY_LIST = (
    (KEYS["next"], "Next deviation in the list"),
    (KEYS["previous"], "Previous deviation in the list"),
    (KEYS["accept"], "Accept the draft's words"),
    (KEYS["revert"], "Restore the precedent's words"),
    (KEYS["amend"], "Amend: write your own words"),
    (KEYS["note"], "Write a note on the selected deviation"),
    (KEYS["clear"], "Clear the decision"),
    ("Ctrl+O", "Compare a draft with the precedent"),
    ("Ctrl+S", "Save the review file"),
    ("Ctrl+Shift+E", "Export the counter-draft"),
    ("Ctrl+F", "Filter the deviation list"),
    ("Esc", "Cancel the running operation"),
    (KEYS["help"], "This list"),
)


def show_keys(parent: QWidget) -> QDialog:
    dlg = QDialog(parent)
    dlg.setObjectName("keysDialog")
    dlg.setWindowTitle("Keys")
    dlg.setAttribute(Qt.WidgetAttribute.WA_DeleteOnClose)
    table = QTableWidget(len(KEY_LIST), 2, dlg)
    table.setHorizontalHeaderLabels(["Key", "Does"])
    table.verticalHeader().hide()
    table.verticalHeader().setDefaultSectionSize(24)
    table.setEditTriggers(QTableWidget.EditTrigger.NoEditTriggers)
    table.setSelectionMode(QTableWidget.SelectionMode.NoSelection)
    for i, (k, what) in enumerate(KEY_LIST):
        table.setItem(i, 0, QTableWidgetItem(k))
        table.setItem(i, 1, QTableWidgetItem(what))
    table.resizeColumnsToContents()
    table.horizontalHeader().setStretchLastSection(True)
    note = QLabel("The single-letter keys work whenever the cursor is not in a text field.", dlg)
    note.setWordWrap(True)
    box = QDialogButtonBox(QDialogButtonBox.StandardButton.Close, dlg)
    box.rejected.connect(dlg.close)
    lay = QVBoxLayout(dlg)
    lay.addWidget(table)
    lay.addWidget(note)
    lay.addWidget(box)
    dlg.resize(460, 120 + 24 * len(KEY_LIST))
    dlg.show()
    return dlg


def _version(dist: str) -> str:
    try:
        return metadata.version(dist)
    except metadata.PackageNotFoundError:
        return "not installed"


def about_text() -> str:
    libs = ", ".join(f"{name} {_version(name)}" for name in ABOUT_PACKAGES)
    return (
        f"<h3>Counterdraft {core.__version__}</h3>"
        "<p>Compares a counterparty's draft with the house precedent, ranks the deviations, "
        "says how common each wording is in the firm's past agreements, and writes a "
        "counter-draft with tracked changes.</p>"
        f"<p><b>Caution.</b> {core.CAUTION}</p>"
        f"<p>Python {platform.python_version()} ({sys.platform}) \u00b7 Qt {qVersion()} \u00b7 "
        f"PySide6 {pyside_version}<br>{libs}</p>"
    )


def show_about(parent: QWidget) -> QMessageBox:
    box = QMessageBox(parent)
    box.setObjectName("aboutBox")
    box.setWindowTitle("About Counterdraft")
    box.setTextFormat(Qt.TextFormat.RichText)
    box.setText(about_text())
    box.setAttribute(Qt.WidgetAttribute.WA_DeleteOnClose)
    box.open()
    return box
