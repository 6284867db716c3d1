"""The one exception type the engine raises for anything a user can fix."""

from __future__ import annotations

__all__ = ["CounterdraftError"]


class CounterdraftError(Exception):
    """A problem the user can understand and fix; ``str(err)`` is one readable line.

    The CLI prints it on stderr and exits with status 2; the desktop app shows it in a dialog.
    Build it with the file it concerns so the message names that file::

        raise CounterdraftError("not a .docx file (legacy binary .doc)", path=path)
    """

    def __init__(self, problem: str, *, path: str | None = None) -> None:
        self.problem = problem
        self.path = path
        super().__init__(f"{path}: {problem}" if path else problem)
