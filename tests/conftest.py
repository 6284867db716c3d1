"""Fixtures every test folder may use: a PostgreSQL server of the session's own."""

from __future__ import annotations

from collections.abc import Iterator

import pytest

from tests.support.pgserver import PostgresServer, start_server


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
