"""A throwaway PostgreSQL server for the tests: ``initdb`` and ``pg_ctl`` on a free port, with
a private socket folder, started once per test session and stopped (its files removed) at
the end.  No server set up by hand, no network beyond 127.0.0.1.

Binaries: ``initdb``, ``pg_ctl`` and ``postgres`` from PATH, else from Debian's
``/usr/lib/postgresql/<version>/bin`` (newest first); ``make test`` installs Debian's
``postgresql`` package.  Run as root (CI containers), initdb refuses to start (PostgreSQL's
own rule: the server never runs as root), so the server's commands run as an unprivileged
account -- ``postgres`` when Debian's package made one, else ``nobody`` -- through
``runuser`` (util-linux), or ``setpriv`` where runuser is missing; its folder is made theirs.

The cluster's default collation is ICU's ``en-US`` when the server supports ICU (Debian's
does): a language's order, unlike the code point order the store must use, so a query that
forgot ``COLLATE "C"`` gives different answers here than on SQLite.

Authentication: ``trust`` on the private socket (only this machine's users who can reach
the folder), ``scram-sha-256`` over TCP on 127.0.0.1 -- the tests of bad credentials use
that.
"""

from __future__ import annotations

import glob
import os
import pwd
import shutil
import socket
import subprocess
import tempfile
import time
from dataclasses import dataclass, field
from pathlib import Path

__all__ = ["PostgresServer", "find_binaries", "start_server"]

SUPERUSER = "cdtest"
#: Seconds pg_ctl waits for the server to start or stop.
WAIT_S = 60
#: The cluster lives in memory (/dev/shm) when that has this much room: every test database is
#: a copy of a ~8 MB template, and a session makes a few dozen.  Docker's default /dev/shm is
#: 64 MB, too small: then the system's temporary folder.
SHM_MIN_FREE = 2 * 1024**3

#: Server settings for a throwaway cluster: durability off (its data dies with the test
#: run), few connections.  fsync=off and friends: PostgreSQL's documented settings for data
#: that can be recreated ("Non-Durable Settings", server docs 14.5).
SETTINGS = ("fsync=off", "synchronous_commit=off", "full_page_writes=off", "max_connections=60",
            "shared_buffers=32MB", "unix_socket_permissions=0700")


def find_binaries() -> Path | None:
    """The folder holding initdb, pg_ctl and postgres: PATH first, then Debian's folders."""
    names = ("initdb", "pg_ctl", "postgres")
    on_path = [shutil.which(n) for n in names]
    if all(on_path):
        return Path(os.path.realpath(on_path[0])).parent  # type: ignore[arg-type]
    candidates = sorted(glob.glob("/usr/lib/postgresql/*/bin"), key=lambda p: int(Path(p).parent.name)
                        if Path(p).parent.name.isdigit() else 0, reverse=True)
    for folder in candidates:
        if all((Path(folder) / n).is_file() for n in names):
            return Path(folder)
    return None


def _free_port() -> int:
    with socket.socket(socket.AF_INET, socket.SOCK_STREAM) as s:
        s.bind(("127.0.0.1", 0))
        return int(s.getsockname()[1])


def _scratch_folder() -> str | None:
    """/dev/shm when it has room (SHM_MIN_FREE), else None (the system's temporary folder)."""
    try:
        st = os.statvfs("/dev/shm")
    except OSError:
        return None
    return "/dev/shm" if st.f_bavail * st.f_frsize >= SHM_MIN_FREE and os.access("/dev/shm", os.W_OK) else None


def _unprivileged_account() -> pwd.struct_passwd:
    for name in ("postgres", "nobody"):
        try:
            return pwd.getpwnam(name)
        except KeyError:
            continue
    raise RuntimeError("running as root and no unprivileged account (postgres, nobody) to run PostgreSQL as")


@dataclass
class PostgresServer:
    """A running throwaway server (see the module docstring)."""

    bin: Path
    base: Path  # the cluster's private folder (data, socket, log)
    port: int
    account: pwd.struct_passwd | None  # who runs the server when we are root
    _dbs: int = field(default=0, repr=False)

    @property
    def socket_dir(self) -> Path:
        return self.base / "socket"

    @property
    def data(self) -> Path:
        return self.base / "data"

    def _run(self, *args: str) -> subprocess.CompletedProcess[str]:
        cmd = [str(self.bin / args[0]), *args[1:]]
        if self.account is not None:
            if shutil.which("runuser"):
                cmd = ["runuser", "-u", self.account.pw_name, "--", *cmd]
            else:
                cmd = ["setpriv", f"--reuid={self.account.pw_uid}", f"--regid={self.account.pw_gid}",
                       "--clear-groups", *cmd]
        return subprocess.run(cmd, capture_output=True, text=True, timeout=WAIT_S + 30, check=False,
                              env={**os.environ, "LC_ALL": "C.UTF-8"})

    def url(self, database: str = "postgres", *, user: str = SUPERUSER, tcp: bool = False) -> str:
        """An address of *database*: over the private socket, or over TCP on 127.0.0.1."""
        if tcp:
            return f"postgresql://{user}@127.0.0.1:{self.port}/{database}"
        return f"postgresql://{user}@/{database}?host={self.socket_dir}&port={self.port}"

    def admin(self, sql: str, *, database: str = "postgres") -> list[tuple]:
        """Run *sql* as the superuser (autocommit); its rows, if any."""
        import psycopg

        with psycopg.connect(self.url(database), autocommit=True) as conn:
            cur = conn.execute(sql)
            return cur.fetchall() if cur.description else []

    def create_database(self, prefix: str = "store", *, template: str | None = None) -> str:
        """A new empty database (a copy of *template* when given); its name."""
        self._dbs += 1
        name = f"{prefix}_{self._dbs}"
        self.admin(f'CREATE DATABASE "{name}"' + (f' TEMPLATE "{template}"' if template else ""))
        return name

    def stop(self) -> None:
        """Stop the server (mode "immediate": its data is thrown away, so no shutdown
        checkpoint is worth waiting for) and remove its folder."""
        if self.data.is_dir():
            self._run("pg_ctl", "stop", "-D", str(self.data), "-m", "immediate", "-w", "-t", str(WAIT_S))
        shutil.rmtree(self.base, ignore_errors=True)


def start_server() -> PostgresServer:
    """Start a throwaway server (module docstring); raises RuntimeError saying why it cannot."""
    binaries = find_binaries()
    if binaries is None:
        raise RuntimeError("PostgreSQL's initdb, pg_ctl and postgres are neither on PATH nor in "
                           "/usr/lib/postgresql/*/bin: install Debian's 'postgresql' package ('make test' does)")
    account = _unprivileged_account() if os.geteuid() == 0 else None
    # Not under pytest's tmp_path: that folder is root's own (0o700) when the tests run as
    # root, and the server's account must reach its files.
    base = Path(tempfile.mkdtemp(prefix="counterdraft-pg-", dir=_scratch_folder()))
    if account is not None:
        os.chown(base, account.pw_uid, account.pw_gid)
    server = PostgresServer(binaries, base, _free_port(), account)
    try:
        _init_and_start(server)
    except BaseException:
        server.stop()
        raise
    return server


def _init_and_start(server: PostgresServer) -> None:
    init = ["initdb", "-D", str(server.data), "-U", SUPERUSER, "-E", "UTF8", "--locale=C.UTF-8",
            "--auth-local=trust", "--auth-host=scram-sha-256"]
    result = server._run(*init, "--locale-provider=icu", "--icu-locale=en-US")
    if result.returncode != 0:  # a server without ICU: the C.UTF-8 locale alone
        shutil.rmtree(server.data, ignore_errors=True)
        result = server._run(*init)
    if result.returncode != 0:
        raise RuntimeError(f"initdb failed: {(result.stderr or result.stdout).strip()[-500:]}")
    server.socket_dir.mkdir(mode=0o700)
    if server.account is not None:
        os.chown(server.socket_dir, server.account.pw_uid, server.account.pw_gid)
    options = " ".join([f"-p {server.port}", f"-k {server.socket_dir}", "-c listen_addresses=127.0.0.1",
                        *(f"-c {s}" for s in SETTINGS)])
    for _attempt in range(3):
        result = server._run("pg_ctl", "start", "-D", str(server.data), "-w", "-t", str(WAIT_S),
                             "-l", str(server.base / "server.log"), "-o", options)
        if result.returncode == 0:
            return
        time.sleep(0.5)  # the port was taken meanwhile: another one
        server.port = _free_port()
        options = options.replace(options.split()[1], str(server.port), 1)
    log_file = server.base / "server.log"
    log = log_file.read_text(errors="replace")[-800:] if log_file.exists() else ""
    raise RuntimeError(f"the PostgreSQL server did not start: {result.stderr.strip()[-300:]} {log}")
