"""Write output files atomically and never overwrite silently.

The bytes go to a temporary file in the destination's folder, are flushed to
disk, and only then take the destination's name. Without ``force`` the final
step is a hard link, which fails if the destination appeared meanwhile, so an
existing file is never replaced by accident and a crash never leaves half a
file behind.
"""

from __future__ import annotations

import contextlib
import os
import sys
import tempfile
import time
from collections.abc import Iterator, Sequence
from pathlib import Path

from .errors import OutputExistsError, OutputPathError

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


def check_writable(dest: Path, force: bool) -> None:
    """Refuse, before anything is written, an output that cannot be written as asked.

    Raises:
        OutputPathError: ``dest`` is a folder, or its folder does not exist.
        OutputExistsError: ``dest`` exists and ``force`` is False.
    """
    if dest.is_dir():
        raise OutputPathError(f"{dest} is a folder; give a file name")
    if not dest.parent.is_dir():
        raise OutputPathError(f"{dest}: there is no folder {dest.parent}")
    if dest.exists() and not force:
        raise OutputExistsError(str(dest))


# A patient's plan is readable by its owner only; a generic trolley sheet by everyone,
# so that it can go to a shared print folder.
PRIVATE, SHARED = 0o600, 0o644


def write_atomic(
    path: str | Path,
    data: bytes,
    force: bool = False,
    sweep_stale: bool = True,
    mode: int = PRIVATE,
) -> Path:
    """Write ``data`` to ``path`` in one step.

    ``sweep_stale=False`` skips looking for old temporaries of this file: for a
    caller that has swept the whole folder already (a clinic list), since the look
    reads the folder and would make a long list slow in its square.

    Raises:
        OutputPathError: ``path`` is a folder, or its folder does not exist.
        OutputExistsError: ``path`` exists and ``force`` is False.
        OSError: the folder cannot be written.
    """
    dest = Path(path)
    check_writable(dest, force)
    if sweep_stale:
        remove_stale_temporaries(dest)
    fd, tmp = tempfile.mkstemp(prefix=f".{dest.name}.", suffix=".tmp", dir=dest.parent or ".")
    try:
        with os.fdopen(fd, "wb") as handle:
            os.fchmod(handle.fileno(), mode)
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
        if isinstance(exc, OSError) and exc.filename != str(dest):
            # Name the file the user asked for, never the temporary (a full disk says
            # only "No space left", a failed rename names the temporary).
            raise OSError(exc.errno, exc.strerror or str(exc), str(dest)) from exc
        raise
    return dest


def _sync_all(fds: list[int]) -> None:
    """Flush these open files to disk: one ``syncfs`` on Linux (one journal commit for
    the lot), else ``fsync`` each."""
    if sys.platform.startswith("linux"):
        import ctypes

        libc = ctypes.CDLL(None, use_errno=True)
        syncfs = getattr(libc, "syncfs", None)
        if syncfs is not None and syncfs(fds[0]) == 0:
            return
    for fd in fds:
        os.fsync(fd)


LOCK_NAME = ".airway-run.lock"


class FolderBusyError(OutputExistsError):
    """Another run is writing into the same output folder."""


@contextlib.contextmanager
def folder_lock(folder: Path) -> Iterator[None]:
    """Hold ``folder`` for one run: a second run into it is refused (exit 2) rather than
    mixing its files with this one's. The lock is a file holding the owner's process id;
    one left by a run that no longer exists is taken over."""
    lock = folder / LOCK_NAME
    for _attempt in range(2):
        try:
            fd = os.open(lock, os.O_CREAT | os.O_EXCL | os.O_WRONLY, 0o644)
        except FileExistsError:
            if _owner_alive(lock):
                raise FolderBusyError(
                    str(folder),
                    f"{folder} is being written by another airway run; wait for it to "
                    f"finish or choose another folder (its lock is {LOCK_NAME})",
                ) from None
            lock.unlink(missing_ok=True)
            continue
        with os.fdopen(fd, "w") as handle:
            handle.write(str(os.getpid()))
        break
    try:
        yield
    finally:
        lock.unlink(missing_ok=True)


def _owner_alive(lock: Path) -> bool:
    try:
        pid = int(lock.read_text().strip() or "0")
    except (OSError, ValueError):
        return False  # unreadable or half-written: treated as left behind
    if pid <= 0:
        return False
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except PermissionError:
        return True  # someone else's live process
    return True


def write_group_atomic(files: Sequence[tuple[Path, bytes]], tag: str = "") -> None:
    """Write several files in one step each, replacing any file of the same name.

    For many small files (a clinic list): every file's bytes go to a temporary in its
    destination's folder, all are flushed to disk together, and only then does each
    take its name, so a crash leaves each file either absent, as it was, or complete.
    The caller has swept old temporaries already (see ``sweep_stale``); ``tag`` marks
    this run's temporaries as its own (``.NAME.TAG.*.tmp``).

    Raises:
        OSError: a folder cannot be written (naming the file).
    """
    open_fds: list[int] = []
    made: list[tuple[str, Path]] = []  # (temporary, destination)
    try:
        for dest, data in files:
            prefix = f".{dest.name}.{tag}." if tag else f".{dest.name}."
            fd, tmp = tempfile.mkstemp(prefix=prefix, suffix=".tmp", dir=dest.parent)
            open_fds.append(fd)
            made.append((tmp, dest))
            view = memoryview(data)
            while view:
                view = view[os.write(fd, view) :]
        if open_fds:
            _sync_all(open_fds)
        while open_fds:
            os.close(open_fds.pop())
        for tmp, dest in made:
            os.replace(tmp, dest)
    except BaseException as exc:
        for fd in open_fds:
            os.close(fd)
        for tmp, _dest in made:
            if os.path.exists(tmp):
                os.unlink(tmp)
        temporaries = {tmp for tmp, _dest in made}
        if isinstance(exc, OSError) and made and (not exc.filename or exc.filename in temporaries):
            dest = next((d for t, d in made if t == exc.filename), made[-1][1])
            raise OSError(exc.errno, exc.strerror or str(exc), str(dest)) from exc
        raise
