"""Settings every test shares."""

from __future__ import annotations

import os
import shutil
import tempfile

_CACHE = tempfile.mkdtemp(prefix="counterdraft-test-cache-")
# The parsed-document cache (core.doccache) of the tests lives in a throw-away folder, never
# in the user's cache folder; commands run as child processes inherit it.
os.environ["COUNTERDRAFT_CACHE_DIR"] = _CACHE


def pytest_unconfigure(config) -> None:  # noqa: ANN001 - pytest's Config
    shutil.rmtree(_CACHE, ignore_errors=True)
