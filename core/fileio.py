"""Side effects at the edge: atomic writes and input hashing."""

from __future__ import annotations

import hashlib
import os
import tempfile
from pathlib import Path

from .errors import CounterdraftError

__all__ = ["atomic_write_bytes", "atomic_write_text", "file_sha256", "refuse_overwrite_of_inputs"]


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
    tmp = None
    try:
        fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".part", dir=folder)
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
            fh.flush()
            os.fsync(fh.fileno())
        os.replace(tmp, target)
        tmp = None
    except OSError as err:
        raise CounterdraftError(f"cannot write the file ({err.strerror or err})", path=str(path)) from None
    finally:
        if tmp is not None:
            try:
                os.unlink(tmp)
            except FileNotFoundError:
                pass


def atomic_write_text(path: str | os.PathLike[str], text: str) -> None:
    atomic_write_bytes(path, text.encode("utf-8"))


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
