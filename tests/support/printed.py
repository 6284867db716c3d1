"""Real texts printed to PDF and saved as .odt by LibreOffice headless: the drafts the PDF
and OpenDocument readers are checked on.

Source of the words: licence and EULA texts of the PyPI package ``licensedcode-data`` (the
ScanCode licence database), written to .docx with real Word auto-numbering
(:func:`tests.support.licence_docx.licence_docx`, roughened as edited files are) in one of two
house styles (:data:`STYLES`), then converted by Debian's LibreOffice
(``soffice --headless --convert-to pdf`` and ``odt``), one LibreOffice run per folder and
format, with its own profile.  The .docx reading (ECMA-376 auto-numbering) is the reference
each converted file is scored against.
"""

from __future__ import annotations

import os
import subprocess
import tempfile
from collections.abc import Iterable, Mapping
from pathlib import Path

from tests.support.libreoffice import SOFFICE_TIMEOUT_S, LibreOfficeFailed, find_soffice
from tests.support.licence_docx import house_style, licence_docx

__all__ = ["STYLES", "convert_all", "print_licences"]

#: The house styles the drafts are set in: the composer's own (space after each paragraph),
#: and a second house's (no space between paragraphs, a running header, a footer with
#: "Page N of M", justified text in a sans-serif face).
STYLES: Mapping[str, Mapping[str, object]] = {
    "spaced": {},
    "dense": {"spacing_after": 0, "header": "Licence terms (draft for review)",
              "footer": "Confidential", "page_numbers": True, "font": "DejaVu Sans", "size": 20,
              "justify": True},
}


def convert_all(folder: Path, target: str) -> None:
    """Convert every .docx in *folder* to *target* ("pdf", "odt") with one LibreOffice run;
    raise LibreOfficeFailed when an output is missing (the exit status says nothing)."""
    todo = [p for p in sorted(folder.glob("*.docx")) if not p.with_suffix(f".{target}").exists()]
    if not todo:
        return
    with tempfile.TemporaryDirectory(prefix="cd-lo-profile-") as profile:
        env = {k: v for k, v in os.environ.items() if k != "DISPLAY"}
        proc = subprocess.run(
            [find_soffice(), f"-env:UserInstallation={Path(profile).as_uri()}", "--headless",
             "--norestore", "--convert-to", target, "--outdir", str(folder), *map(str, todo)],
            capture_output=True, text=True, timeout=SOFFICE_TIMEOUT_S * 4, env=env, check=False)
    missing = [p.name for p in todo if not p.with_suffix(f".{target}").exists()]
    if missing:
        raise LibreOfficeFailed(f"LibreOffice wrote no .{target} for {missing[:3]}: {proc.stderr[-500:]}")


def print_licences(folder: Path, keys: Iterable[str], *, style: str, texts: Mapping[str, str] | None = None,
                   seed: int = 300) -> dict[str, Path]:
    """key -> the .docx of licensedcode-data's text *key* (or ``texts[key]``, an edited copy)
    in house style *style*, with its .pdf and .odt beside it."""
    folder.mkdir(parents=True, exist_ok=True)
    out = {}
    for i, key in enumerate(keys):
        path = folder / f"{key}.docx"
        if not path.exists():
            text = texts.get(key) if texts else None
            data = licence_docx(key, text=text, seed=seed + i)
            path.write_bytes(house_style(data, **STYLES[style]) if STYLES[style] else data)
        out[key] = path
    convert_all(folder, "pdf")
    convert_all(folder, "odt")
    return out
