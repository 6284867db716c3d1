"""Remembered window state: size, splitter positions, recent files, the last precedent set
(a folder or a shared store's address, never with a password), the party acted for with each
precedent (QSettings).

The window takes its :class:`QSettings` from the caller, so tests use a temporary INI file
and never touch the user's settings.
"""

from __future__ import annotations

import json
from dataclasses import dataclass

from PySide6.QtCore import QByteArray, QSettings

__all__ = ["RECENT_LIMIT", "Recent", "WindowSettings", "default_settings"]

#: How many recent comparisons and review files the File menu lists.
RECENT_LIMIT = 8


@dataclass(frozen=True, slots=True)
class Recent:
    """A recent comparison (draft, precedent, optional precedent set) or a review file."""

    draft: str = ""
    precedent: str = ""
    library: str = ""
    review_file: str = ""

    def key(self) -> tuple[str, str, str, str]:
        return (self.draft, self.precedent, self.library, self.review_file)


def _key(path: str) -> str:
    """A settings key for a file path (QSettings keys treat "/" and "\\" as groups)."""
    import hashlib
    import os

    return hashlib.sha256(os.path.abspath(str(path)).encode("utf-8")).hexdigest()[:24]


def default_settings() -> QSettings:
    return QSettings("Counterdraft", "Counterdraft")


class WindowSettings:
    """Typed access to the few values the window remembers."""

    def __init__(self, qsettings: QSettings) -> None:
        self.q = qsettings

    def geometry(self) -> QByteArray | None:
        v = self.q.value("window/geometry")
        return v if isinstance(v, QByteArray) and not v.isEmpty() else None

    def set_geometry(self, data: QByteArray) -> None:
        self.q.setValue("window/geometry", data)

    def splitter(self, name: str) -> QByteArray | None:
        v = self.q.value(f"splitters/{name}")
        return v if isinstance(v, QByteArray) and not v.isEmpty() else None

    def set_splitter(self, name: str, data: QByteArray) -> None:
        self.q.setValue(f"splitters/{name}", data)

    def last_library(self) -> str:
        """The precedent set last used: a folder, or a shared store's address ("" if none)."""
        return str(self.q.value("library/last", "") or "")

    def set_last_library(self, library: str) -> None:
        """Remember *library*; a store's address is kept without any password."""
        from core.library.store import shown_address

        self.q.setValue("library/last", shown_address(library) if library else "")

    def recent(self) -> list[Recent]:
        raw = self.q.value("recent/entries", "[]")
        try:
            items = json.loads(str(raw))
        except json.JSONDecodeError:
            return []
        out = []
        for it in items if isinstance(items, list) else []:
            if isinstance(it, dict):
                out.append(Recent(**{k: str(it.get(k, "")) for k in ("draft", "precedent", "library", "review_file")}))
        return out[:RECENT_LIMIT]

    def add_recent(self, entry: Recent) -> list[Recent]:
        items = [entry] + [r for r in self.recent() if r.key() != entry.key()]
        items = items[:RECENT_LIMIT]
        self.q.setValue(
            "recent/entries",
            json.dumps([{"draft": r.draft, "precedent": r.precedent, "library": r.library,
                         "review_file": r.review_file} for r in items]),
        )
        return items

    def acting_for(self, precedent: str) -> str | None:
        """The party the reviewer last acted for with this precedent (None: none yet)."""
        v = self.q.value(f"acting_for/{_key(precedent)}")
        return str(v) if v else None

    def set_acting_for(self, precedent: str, party: str | None) -> None:
        self.q.setValue(f"acting_for/{_key(precedent)}", party or "")

    def sync(self) -> None:
        self.q.sync()
