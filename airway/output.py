"""Write output files atomically and never overwrite silently.

The bytes go to a temporary file in the destination's folder, are flushed to
disk, and only then take the destination's name. Without ``force`` the final
step is a hard link, which fails if the destination appeared meanwhile, so an
existing file is never replaced by accident and a crash never leaves half a
file behind.
"""

from __future__ import annotations

import os
import tempfile
from pathlib import Path

from .errors import OutputExistsError


def write_atomic(path: str | Path, data: bytes, force: bool = False) -> Path:
    """Write ``data`` to ``path`` in one step.

    Raises:
        OutputExistsError: ``path`` exists and ``force`` is False.
        OSError: the folder cannot be written.
    """
    dest = Path(path)
    if dest.exists() and not force:
        raise OutputExistsError(str(dest))
    fd, tmp = tempfile.mkstemp(prefix=f".{dest.name}.", suffix=".tmp", dir=dest.parent or ".")
    try:
        with os.fdopen(fd, "wb") as handle:
            handle.write(data)
            handle.flush()
            os.fsync(handle.fileno())
        if force:
            os.replace(tmp, dest)
        else:
            try:
                os.link(tmp, dest)
            except FileExistsError:
                raise OutputExistsError(str(dest)) from None
            except OSError:
                # No hard links here (some network or FAT file systems): check, then rename.
                if dest.exists():
                    raise OutputExistsError(str(dest)) from None
                os.replace(tmp, dest)
            else:
                os.unlink(tmp)
    except BaseException:
        if os.path.exists(tmp):
            os.unlink(tmp)
        raise
    return dest
