"""Shared, session-wide fixtures of the core tests: real texts printed by LibreOffice once per
test session (a conversion takes seconds; every reader test then reads the same files)."""

from __future__ import annotations

from pathlib import Path

import pytest

from tests.support.layout_corpus import TEST_KEYS
from tests.support.printed import STYLES, print_licences

#: The texts the default run prints (those of the counter-draft tests); the slow run prints
#: every test text.
QUICK_KEYS = ("mpl-2.0", "gpl-3.0", "apache-2.0", "altova-eula")


def _printed(factory: pytest.TempPathFactory, keys: tuple[str, ...], name: str) -> dict[tuple[str, str], Path]:
    root = factory.mktemp(name)
    out = {}
    for style in STYLES:
        for key, path in print_licences(root / style, keys, style=style).items():
            out[(key, style)] = path
    return out


@pytest.fixture(scope="session")
def printed_licences(tmp_path_factory) -> dict[tuple[str, str], Path]:
    """(key, style) -> .docx, with its .pdf and .odt beside it: QUICK_KEYS in every style."""
    return _printed(tmp_path_factory, QUICK_KEYS, "printed")


@pytest.fixture(scope="session")
def printed_licences_all(tmp_path_factory) -> dict[tuple[str, str], Path]:
    """The same for every test text (tests/support/layout_corpus.py ``TEST_KEYS``)."""
    return _printed(tmp_path_factory, TEST_KEYS, "printed-all")
