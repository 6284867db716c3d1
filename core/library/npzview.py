"""Arrays of a .npz file read in place.

``np.load`` copies each array of a .npz file out of the archive and checks its CRC-32: for
the precedent set's caches (some 20 MB for 1,000 agreements) that is most of what reading
them costs a review.  :func:`stored_arrays` reads the same arrays as read-only views of the
file's bytes instead.
"""

from __future__ import annotations

import io
import math
import mmap
import struct
import zipfile
from collections.abc import Sequence
from typing import IO, cast

import numpy as np

__all__ = ["stored_arrays"]


def stored_arrays(data: bytes | mmap.mmap, names: Sequence[str]) -> dict[str, np.ndarray] | None:
    """The arrays *names* of the .npz file *data* (its bytes, or the file mapped into
    memory), as read-only views of *data*: each member is a .npy file (NumPy's format:
    magic, header, then the array's bytes) stored uncompressed, as ``np.savez`` writes it,
    so there is nothing to copy or to check (a review reads some 20 MB of a large set's
    caches: a few milliseconds instead of some twenty).  None when a member is missing or
    not stored that way (np.load reads those)."""
    out: dict[str, np.ndarray] = {}
    try:
        # A mapped file is read where it is (BytesIO would copy it; it shares bytes).
        source = cast(IO[bytes], data) if isinstance(data, mmap.mmap) else io.BytesIO(data)  # mmap: file-like
        with zipfile.ZipFile(source) as archive:
            for name in names:
                info = archive.getinfo(f"{name}.npy")
                if info.compress_type != zipfile.ZIP_STORED:
                    return None
                # The member's local header: 30 bytes, then its name and extra field.
                start = info.header_offset
                name_len, extra_len = struct.unpack("<HH", data[start + 26:start + 30])
                body = start + 30 + name_len + extra_len
                header = io.BytesIO(data[body:body + min(info.file_size, _NPY_HEADER_MAX)])
                version = np.lib.format.read_magic(header)
                if version not in ((1, 0), (2, 0)):
                    return None
                read_header = (np.lib.format.read_array_header_1_0 if version == (1, 0)
                               else np.lib.format.read_array_header_2_0)
                shape, fortran, dtype = read_header(header)
                if dtype.hasobject:
                    return None
                flat = np.frombuffer(data, dtype=dtype, count=math.prod(shape), offset=body + header.tell())
                out[name] = flat.reshape(shape, order="F" if fortran else "C")
    except (KeyError, ValueError, zipfile.BadZipFile, struct.error):
        return None
    return out


#: Enough bytes for any .npy header (NumPy's format: at most 65,535 bytes in version 1,
#: and the caches' arrays have one dimension: their headers are well under 200 bytes).
_NPY_HEADER_MAX = 65_536 + 16
