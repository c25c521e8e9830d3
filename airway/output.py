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
import time
from pathlib import Path

from .errors import OutputExistsError

# A temporary left by a killed run is removed by the next write of the same file once
# it is this old; a younger one may belong to a process still writing (project rule).
STALE_TEMPORARY_S = 60.0


def temporary_pattern(name: str) -> str:
    """The glob of the temporaries :func:`write_atomic` makes for a file called ``name``."""
    return f".{name}.*.tmp"


def remove_stale_temporaries(dest: Path, older_than_s: float = STALE_TEMPORARY_S) -> None:
    now = time.time()
    for stale in dest.parent.glob(temporary_pattern(dest.name)):
        try:
            if now - stale.stat().st_mtime > older_than_s:
                stale.unlink()
        except OSError:
            pass  # gone already, or not ours to remove


def write_atomic(
    path: str | Path, data: bytes, force: bool = False, sweep_stale: bool = True
) -> Path:
    """Write ``data`` to ``path`` in one step.

    ``sweep_stale=False`` skips looking for old temporaries of this file: for a
    caller that has swept the whole folder already (a clinic list), since the look
    reads the folder and would make a long list slow in its square.

    Raises:
        OutputExistsError: ``path`` exists and ``force`` is False.
        OSError: the folder cannot be written.
    """
    dest = Path(path)
    if dest.exists() and not force:
        raise OutputExistsError(str(dest))
    if sweep_stale:
        remove_stale_temporaries(dest)
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
    except BaseException as exc:
        if os.path.exists(tmp):
            os.unlink(tmp)
        if isinstance(exc, OSError) and not exc.filename:
            # Name the file the user asked for (a full disk says only "No space left").
            raise OSError(exc.errno, exc.strerror or str(exc), str(dest)) from exc
        raise
    return dest
