"""Settings and fixtures every test shares: a throw-away parsed-document cache, and a
PostgreSQL server of the session's own."""

from __future__ import annotations

import os
import shutil
import tempfile
from collections.abc import Iterator

import pytest

from tests.support.pgserver import PostgresServer, start_server

_CACHE = tempfile.mkdtemp(prefix="counterdraft-test-cache-")
# The parsed-document cache (core.doccache) of the tests lives in a throw-away folder, never
# in the user's cache folder; commands run as child processes inherit it.
os.environ["COUNTERDRAFT_CACHE_DIR"] = _CACHE


def pytest_unconfigure(config) -> None:
    shutil.rmtree(_CACHE, ignore_errors=True)


@pytest.fixture(scope="session")
def pg_server() -> Iterator[PostgresServer]:
    """A throwaway PostgreSQL server (tests/support/pgserver.py), stopped at the session's
    end.  A machine without PostgreSQL fails here, like one without LibreOffice: ``make
    test`` installs it."""
    try:
        server = start_server()
    except RuntimeError as err:
        pytest.fail(f"cannot start a PostgreSQL server for the tests: {err}", pytrace=False)
    yield server
    server.stop()
