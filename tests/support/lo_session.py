"""The venv side of the LibreOffice UNO helper (``tests/support/lo_uno.py``).

LibreOffice headless (Debian's ``libreoffice-writer``) is the outside word processor that
accepts or rejects our tracked changes (ECMA-376 Part 1 §17.13) and converts to PDF.  The
``uno`` module imports only under Debian's ``/usr/bin/python3``, so the UNO side runs as a
separate long-lived process -- one per test process, started on first use and stopped at
exit -- and we talk to it in JSON lines.

A test that cannot find LibreOffice fails (:class:`LibreOfficeUnavailable` is an
``AssertionError``), never skips: ``make test`` installs it, and a skipped reference check would
hide a broken machine.
"""

from __future__ import annotations

import atexit
import json
import os
import shutil
import subprocess
import threading
from dataclasses import dataclass
from pathlib import Path

__all__ = ["LibreOfficeUnavailable", "OfficeView", "libreoffice", "body_paragraphs"]

SYSTEM_PYTHON = "/usr/bin/python3"
SCRIPT = Path(__file__).with_name("lo_uno.py")
#: Seconds one request may take (load + accept/reject + PDF of a small document takes
#: 0.5-3 s on the 2-core test machine; the first request also waits for soffice to start).
REQUEST_TIMEOUT_S = 240


class LibreOfficeUnavailable(AssertionError):
    """LibreOffice or its UNO bridge is missing or broken on this machine."""


@dataclass(frozen=True)
class OfficeView:
    """What LibreOffice saw in one document (after the requested accept/reject)."""

    redlines_before: int
    redlines_after: int
    redlines: list[dict]
    body: list[dict]
    comments: list[dict]
    user_properties: dict[str, str]
    pdf_bytes: int | None

    @property
    def paragraphs(self) -> list[str]:
        """Body paragraphs outside tables, in order."""
        return body_paragraphs(self.body)


def body_paragraphs(body: list[dict]) -> list[str]:
    return [el["text"] for el in body if el["type"] == "paragraph"]


class _Office:
    def __init__(self) -> None:
        if not (os.access(SYSTEM_PYTHON, os.X_OK)):
            raise LibreOfficeUnavailable(f"{SYSTEM_PYTHON} not found (Debian's python3 with python3-uno)")
        if shutil.which("soffice") is None and not os.access("/usr/bin/soffice", os.X_OK):
            raise LibreOfficeUnavailable(
                "LibreOffice (soffice) is not installed; `make test` installs libreoffice-writer")
        env = {k: v for k, v in os.environ.items() if k not in ("PYTHONPATH", "PYTHONHOME", "VIRTUAL_ENV")}
        self.proc = subprocess.Popen(
            [SYSTEM_PYTHON, str(SCRIPT)], stdin=subprocess.PIPE, stdout=subprocess.PIPE,
            stderr=subprocess.PIPE, text=True, env=env, bufsize=1,
        )
        self.lock = threading.Lock()
        hello = self._read()
        if not hello.get("ready"):
            raise LibreOfficeUnavailable(f"LibreOffice UNO helper did not start: {hello}")

    def _read(self) -> dict:
        assert self.proc.stdout is not None
        result: list[str] = []

        def reader() -> None:
            result.append(self.proc.stdout.readline())  # type: ignore[union-attr]

        t = threading.Thread(target=reader, daemon=True)
        t.start()
        t.join(REQUEST_TIMEOUT_S)
        if not result or not result[0]:
            err = ""
            if self.proc.poll() is not None and self.proc.stderr is not None:
                err = self.proc.stderr.read()[-2000:]
            raise LibreOfficeUnavailable(f"LibreOffice UNO helper gave no answer. {err}".strip())
        return json.loads(result[0])

    def inspect(self, path: str | os.PathLike[str], *, action: str = "none",
                pdf: str | os.PathLike[str] | None = None,
                save_as: str | os.PathLike[str] | None = None) -> OfficeView:
        """Load a private copy of *path*, accept or reject all its tracked changes
        (``action``), and report what LibreOffice sees; optionally convert the result to PDF
        (*pdf*) and save it as .docx (*save_as*)."""
        with self.lock:
            assert self.proc.stdin is not None
            req = {"op": "inspect", "path": str(Path(path).resolve()), "action": action,
                   "pdf": str(Path(pdf).resolve()) if pdf else None,
                   "save_as": str(Path(save_as).resolve()) if save_as else None}
            self.proc.stdin.write(json.dumps(req) + "\n")
            self.proc.stdin.flush()
            reply = self._read()
        if not reply.get("ok"):
            raise AssertionError(f"LibreOffice failed on {Path(path).name}: {reply.get('error')}\n"
                                 f"{reply.get('trace', '')}")
        return OfficeView(
            redlines_before=reply["redlines_before"], redlines_after=reply["redlines_after"],
            redlines=reply["redlines"], body=reply["body"], comments=reply["comments"],
            user_properties=reply["user_properties"], pdf_bytes=reply["pdf_bytes"],
        )

    def close(self) -> None:
        try:
            if self.proc.poll() is None and self.proc.stdin is not None:
                self.proc.stdin.write(json.dumps({"op": "quit"}) + "\n")
                self.proc.stdin.flush()
                self.proc.wait(timeout=60)
        except (OSError, subprocess.TimeoutExpired, ValueError):
            self.proc.kill()
            self.proc.wait()


_office: _Office | None = None
_office_lock = threading.Lock()


def libreoffice() -> _Office:
    """The one LibreOffice of this test process (started on first use)."""
    global _office
    with _office_lock:
        if _office is None or _office.proc.poll() is not None:
            _office = _Office()
            atexit.register(_office.close)
        return _office
