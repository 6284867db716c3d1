"""LibreOffice headless (Debian's ``soffice``) as an outside reference for tests.

``docx_to_text`` asks LibreOffice to export a .docx as UTF-8 text.  LibreOffice writes each
auto-number label into the text the way it renders it, which lets a test compare our labels
with an independent implementation of ECMA-376 Part 1 §17.9.

Facts about the export (checked on Debian's LibreOffice 7.4 on this machine type):

* the exit status is 0 even when loading failed, so the output file must be checked;
* the output starts with a UTF-8 byte-order mark;
* a numbered paragraph is written as 4 spaces of indent per list level, the label, one space,
  then the paragraph text;
* concurrent runs sharing one user profile block each other, so every run gets its own
  profile directory.

A test that cannot find ``soffice`` fails (``LibreOfficeMissing``): LibreOffice is installed by
``make test`` and a skipped reference check would hide a broken machine.
"""

from __future__ import annotations

import os
import re
import shutil
import subprocess
import tempfile
from pathlib import Path

__all__ = [
    "LibreOfficeFailed",
    "LibreOfficeMissing",
    "convert",
    "docx_to_text",
    "find_soffice",
    "soffice_version",
]

#: Loading and exporting a small document takes 2-5 s on the 2-core test machine; the first
#: run with a fresh profile is the slowest.  Generous, so a loaded machine does not flake.
SOFFICE_TIMEOUT_S = 180

#: The byte-order mark LibreOffice writes at the start of "Text (encoded):UTF8" output.
UTF8_BOM = "\ufeff"


class LibreOfficeMissing(AssertionError):
    """Raised (as a test failure, not a skip) when ``soffice`` cannot be found."""


class LibreOfficeFailed(AssertionError):
    """Raised when LibreOffice ran but produced no output."""


def find_soffice() -> str:
    """Path of the ``soffice`` executable, or raise :class:`LibreOfficeMissing`."""
    found = shutil.which("soffice") or shutil.which("libreoffice")
    if found is None:
        for candidate in ("/usr/bin/soffice", "/usr/lib/libreoffice/program/soffice"):
            if os.access(candidate, os.X_OK):
                return candidate
        raise LibreOfficeMissing(
            "LibreOffice (soffice) is not installed; `make test` installs libreoffice-writer"
        )
    return found


def soffice_version() -> tuple[int, ...]:
    """LibreOffice's version, e.g. (7, 4, 7, 2), from ``soffice --version``."""
    proc = subprocess.run([find_soffice(), "--version"], capture_output=True, text=True,
                          timeout=SOFFICE_TIMEOUT_S, check=False)
    match = re.search(r"LibreOffice (\d+(?:\.\d+)*)", proc.stdout)
    if match is None:
        raise LibreOfficeFailed(f"cannot read the LibreOffice version from {proc.stdout!r}")
    return tuple(int(x) for x in match.group(1).split("."))


def convert(
    source: str | os.PathLike[str],
    *,
    target: str,
    suffix: str,
    outdir: str | os.PathLike[str],
) -> Path:
    """Convert *source* with ``soffice --convert-to TARGET`` into *outdir*; return the file.

    Each call uses a fresh user-profile directory (removed afterwards).  Raises
    :class:`LibreOfficeFailed` when no output appears (the exit status is 0 even when loading
    failed, so only the output file tells).
    """
    soffice = find_soffice()
    src = Path(source).resolve()
    target_dir = Path(outdir)
    target_dir.mkdir(parents=True, exist_ok=True)
    out = target_dir / (src.stem + suffix)
    if out.exists():  # never mistake an earlier run's file for this run's output
        out.unlink()
    with tempfile.TemporaryDirectory(prefix="cd-lo-profile-") as work:
        profile = Path(work) / "profile"
        cmd = [
            soffice,
            f"-env:UserInstallation={profile.as_uri()}",
            "--headless",
            "--norestore",
            "--convert-to",
            target,
            "--outdir",
            str(target_dir),
            str(src),
        ]
        env = dict(os.environ)
        env.pop("DISPLAY", None)
        proc = subprocess.run(
            cmd, capture_output=True, text=True, timeout=SOFFICE_TIMEOUT_S, env=env, check=False
        )
    if not out.is_file():
        raise LibreOfficeFailed(
            f"LibreOffice wrote no {suffix} file for {src.name} (exit {proc.returncode}): "
            f"{proc.stderr.strip() or proc.stdout.strip()}"
        )
    return out


def docx_to_text(docx: str | os.PathLike[str]) -> str:
    """Export *docx* as UTF-8 text with LibreOffice; return it without the byte-order mark."""
    with tempfile.TemporaryDirectory(prefix="cd-lo-out-") as work:
        out = convert(docx, target="txt:Text (encoded):UTF8", suffix=".txt", outdir=work)
        text = out.read_text(encoding="utf-8")
    if text.startswith(UTF8_BOM):
        text = text[len(UTF8_BOM):]
    return text
