"""Real legal texts from outside the project, for the reader tests.

Source: the PyPI package ``licensedcode-data`` (the ScanCode license database, installed
with the test extra): ``licensedcode/data/licenses/<name>.LICENSE``.  Each file is a YAML
front-matter block (ScanCode's metadata) followed by the license text as published.
"""

from __future__ import annotations

import importlib.resources
import re
from functools import cache

__all__ = ["license_text"]


@cache
def license_text(name: str) -> str:
    """The text of licensedcode-data's ``<name>.LICENSE`` (e.g. "apache-2.0"), without
    the front matter."""
    path = importlib.resources.files("licensedcode") / "data" / "licenses" / f"{name}.LICENSE"
    raw = path.read_text(encoding="utf-8")
    m = re.match(r"---\n.*?\n---\n", raw, re.DOTALL)
    if m is None:
        raise AssertionError(f"{name}.LICENSE: expected a YAML front-matter block first")
    return raw[m.end():]
