"""Side effects at the edge: atomic writes, locks for read-modify-write, input hashing.

An atomic write goes to a hidden ``.<name>.<random>.part`` file in the target's folder, locked
(``flock``, POSIX) while it is written, then renamed over the target.  A process killed in
between leaves its ``.part`` file behind, unlocked: the next write to that folder (or
:func:`remove_orphaned_parts`) deletes every such file whose lock is free -- a live writer's
file is never touched, because its lock is held until it is renamed.

:func:`exclusive` serialises read-modify-write cycles on one file (two people recording
decisions in one review file at the same moment): it holds an exclusive lock on the file's
folder for the duration, so no cycle reads a file another is about to replace.
"""

from __future__ import annotations

import contextlib
import hashlib
import json
import os
import sys
import tempfile
from collections.abc import Iterator
from pathlib import Path

from .errors import CounterdraftError

#: POSIX file locks (fcntl); on Windows writes stay atomic but are not locked.
_LOCKS = sys.platform != "win32"
if sys.platform != "win32":
    import fcntl

__all__ = ["atomic_write_bytes", "atomic_write_text", "exclusive", "file_sha256",
           "refuse_overwrite_of_inputs", "remove_orphaned_parts", "write_json"]

#: Suffix of the temporary files atomic writes use (a hidden name in the target's folder).
PART_SUFFIX = ".part"
#: Suffix a temporary file has for the instant between its creation and its lock.
_FRESH_SUFFIX = ".new"
#: A ".new" file older than this is an orphan: a writer renames it within microseconds.
FRESH_ORPHAN_AFTER_S = 60.0


def _older_than(path: str, seconds: float) -> bool:
    import time

    try:
        return time.time() - os.stat(path).st_mtime > seconds
    except OSError:
        return False


def _try_lock(fd: int) -> bool:
    """Take an exclusive lock on *fd* without waiting; False when another process holds it."""
    if sys.platform == "win32":
        return True
    try:
        fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
    except OSError:
        return False
    return True


def remove_orphaned_parts(folder: str | os.PathLike[str]) -> int:
    """Delete the ``.part`` files a killed writer left in *folder*; returns how many.  A file
    whose lock a live writer holds is left alone (see the module's docstring)."""
    removed = 0
    try:
        names = [n for n in os.listdir(folder) if n.startswith(".")
                 and (n.endswith(PART_SUFFIX) or n.endswith(_FRESH_SUFFIX))]
    except OSError:
        return 0
    for name in names:
        path = os.path.join(folder, name)
        if name.endswith(_FRESH_SUFFIX) and not _older_than(path, FRESH_ORPHAN_AFTER_S):
            continue
        try:
            fd = os.open(path, os.O_RDONLY)
        except OSError:
            continue
        try:
            if _try_lock(fd) and _LOCKS:
                os.unlink(path)
                removed += 1
        except OSError:
            pass
        finally:
            os.close(fd)
    return removed


@contextlib.contextmanager
def exclusive(path: str | os.PathLike[str]) -> Iterator[None]:
    """Hold an exclusive lock on *path*'s folder for a read-modify-write of *path*: a second
    process doing the same waits until the first has replaced the file."""
    folder = os.path.dirname(os.path.abspath(path)) or "."
    if sys.platform == "win32":
        yield
        return
    try:
        fd = os.open(folder, os.O_RDONLY)
    except OSError as err:
        raise CounterdraftError(f"cannot lock the folder ({err.strerror or err})", path=str(path)) from None
    try:
        fcntl.flock(fd, fcntl.LOCK_EX)
        yield
    finally:
        os.close(fd)  # closing releases the lock


def atomic_write_bytes(path: str | os.PathLike[str], data: bytes) -> None:
    """Write *data* to *path* via a temporary file in the same folder, then rename.

    A reader never sees a half-written file, and an interrupted write leaves any previous
    file at *path* intact.  A symbolic link is followed (its target is replaced); a folder,
    a device or any other special file at *path* is refused rather than replaced.  Failures
    raise :class:`CounterdraftError` naming *path*.
    """
    target = Path(os.path.realpath(path))
    if target.exists() and not target.is_file():
        raise CounterdraftError("exists and is not a regular file; refusing to replace it", path=str(path))
    folder = target.parent
    if not folder.is_dir():
        raise CounterdraftError("the output folder does not exist", path=str(path))
    remove_orphaned_parts(folder)
    current = None  # the temporary file's name while it exists
    try:
        fd, current = tempfile.mkstemp(prefix=f".{target.name}.", suffix=_FRESH_SUFFIX, dir=folder)
        with os.fdopen(fd, "wb") as fh:
            # Locked before it takes the name the clean-up looks for, and held until the
            # file is renamed into place: a live writer's file is never taken for an orphan.
            _try_lock(fh.fileno())
            part = current[: -len(_FRESH_SUFFIX)] + PART_SUFFIX
            os.replace(current, part)
            current = part
            fh.write(data)
            fh.flush()
            os.fsync(fh.fileno())
            os.replace(part, target)
            current = None
    except OSError as err:
        raise CounterdraftError(f"cannot write the file ({err.strerror or err})", path=str(path)) from None
    finally:
        if current is not None:
            try:
                os.unlink(current)
            except FileNotFoundError:
                pass


def atomic_write_text(path: str | os.PathLike[str], text: str) -> None:
    atomic_write_bytes(path, text.encode("utf-8"))


def write_json(obj: object, out: str) -> None:
    """*obj* as indented JSON (non-ASCII kept) to the file *out*, written atomically, or to
    standard output when *out* is ``"-"``."""
    text = json.dumps(obj, ensure_ascii=False, indent=2) + "\n"
    if out == "-":
        sys.stdout.write(text)
    else:
        atomic_write_text(out, text)


def file_sha256(path: str | os.PathLike[str]) -> str:
    h = hashlib.sha256()
    with open(path, "rb") as fh:
        for chunk in iter(lambda: fh.read(1 << 20), b""):
            h.update(chunk)
    return h.hexdigest()


def refuse_overwrite_of_inputs(output: str | os.PathLike[str], *inputs: str | os.PathLike[str]) -> None:
    """Raise when *output* names the same file as one of *inputs*."""
    out = Path(output).resolve()
    for inp in inputs:
        if Path(inp).resolve() == out:
            raise CounterdraftError("output path is one of the input files; refusing to overwrite it",
                                    path=str(output))
