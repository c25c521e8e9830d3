"""Faults survived: a kill mid-write, a full disk, missing unit files, two writers at once."""

from __future__ import annotations

import errno
import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from airway import output
from airway.cli import app
from airway.output import write_atomic


def test_killed_while_writing_leaves_the_old_file_and_no_stray_temporary(tmp_path: Path) -> None:
    """A real SIGKILL while the new bytes are being flushed: the old file stays whole;
    the next write of the same file removes the stale temporary."""
    dest = tmp_path / "plan.json"
    dest.write_text("the old, complete plan")
    code = (
        "import os, sys, time\n"
        "from airway import output\n"
        "real = os.fsync\n"
        "def slow(fd):\n"
        "    print('writing', flush=True); time.sleep(30); real(fd)\n"
        "output.os.fsync = slow\n"
        f"output.write_atomic({str(dest)!r}, b'x' * 100000, force=True)\n"
    )
    proc = subprocess.Popen([sys.executable, "-c", code], stdout=subprocess.PIPE)
    assert proc.stdout is not None and proc.stdout.readline().strip() == b"writing"
    os.kill(proc.pid, signal.SIGKILL)
    proc.wait(timeout=20)
    proc.stdout.close()
    assert dest.read_text() == "the old, complete plan"
    (stale,) = tmp_path.glob(".plan.json.*.tmp")
    old = time.time() - 2 * output.STALE_TEMPORARY_S
    os.utime(stale, (old, old))
    write_atomic(dest, b"the new plan", force=True)
    assert dest.read_bytes() == b"the new plan"
    assert not list(tmp_path.glob(".*.tmp"))


def test_interrupted_write_cleans_up_after_itself(tmp_path: Path, monkeypatch) -> None:
    dest = tmp_path / "plan.pdf"
    dest.write_bytes(b"old")

    def interrupted(_fd: int) -> None:
        raise KeyboardInterrupt

    monkeypatch.setattr(output.os, "fsync", interrupted)
    with pytest.raises(KeyboardInterrupt):
        write_atomic(dest, b"new", force=True)
    assert dest.read_bytes() == b"old" and [p.name for p in tmp_path.iterdir()] == ["plan.pdf"]


class _FullDisk:
    """A file object on a disk with no space left."""

    def __init__(self, fd: int, _mode: str) -> None:
        self.fd = fd

    def __enter__(self) -> _FullDisk:
        return self

    def __exit__(self, *_exc: object) -> None:
        os.close(self.fd)

    def write(self, _data: bytes) -> int:
        raise OSError(errno.ENOSPC, "No space left on device")

    def flush(self) -> None:
        pass

    def fileno(self) -> int:
        return self.fd


@pytest.mark.parametrize("args", [["-f", "json", "-o"], ["--pdf"]])
def test_full_disk_exit_1_clear_message_old_file_intact(runner, tmp_path, monkeypatch, args):
    dest = tmp_path / "out"
    dest.write_text("yesterday's plan")
    monkeypatch.setattr(output.os, "fdopen", _FullDisk)
    r = runner.invoke(app, ["plan", "--demo", *args, str(dest), "--force"])
    assert r.exit_code == 1
    assert f"airway: {dest}: No space left on device" in r.stderr and "Traceback" not in r.output
    assert dest.read_text() == "yesterday's plan"
    assert [p.name for p in tmp_path.iterdir()] == ["out"]


@pytest.mark.parametrize(
    ("option", "name"),
    [("--catalogue", "cat.toml"), ("--config", "unit.toml"), ("--checklists", "lists")],
)
def test_missing_unit_file_exit_2_naming_it(runner, tmp_path: Path, option: str, name: str):
    missing = tmp_path / name
    r = runner.invoke(app, ["plan", "--demo", option, str(missing)])
    assert r.exit_code == 2 and str(missing) in r.stderr and "Traceback" not in r.output


def test_unreadable_unit_file_exit_2_naming_it(runner, tmp_path: Path) -> None:
    bad = tmp_path / "cat.toml"
    bad.write_bytes(b"\xff\xfe\x00 not text")
    r = runner.invoke(app, ["plan", "--demo", "--catalogue", str(bad)])
    assert r.exit_code == 2 and str(bad) in r.stderr


def test_two_writers_with_force_leave_one_complete_file(tmp_path: Path) -> None:
    dest = tmp_path / "plan.pdf"
    cmd = [sys.executable, "-m", "airway", "plan", "--demo", "--pdf", str(dest), "--force"]
    procs = [
        subprocess.Popen(cmd, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL) for _ in "ab"
    ]
    assert [p.wait(timeout=60) for p in procs] == [0, 0]
    data = dest.read_bytes()
    assert data.startswith(b"%PDF") and data.rstrip().endswith(b"%%EOF")
    assert [p.name for p in tmp_path.iterdir()] == ["plan.pdf"]


ROOT = Path(__file__).resolve().parent.parent
CLINIC = ROOT / "examples" / "clinic-list.csv"


def _complete_plans(folder: Path) -> int:
    """How many JSON plans are under their final names; each must parse whole."""
    import json

    plans = [p for p in folder.glob("*.json")]
    for p in plans:
        assert json.loads(p.read_text("utf-8"))["input_sha256"]
    return len(plans)


def test_full_disk_mid_list_exit_1_finished_rows_complete(runner, tmp_path, monkeypatch):
    """The disk fills after some rows: exit 1 naming a file, no temporary left behind,
    every plan already under its name complete; --resume then finishes the list."""
    import airway.workflows.batch  # noqa: F401 - imports the pool's pipes before os.write is patched

    real_write, calls = os.write, {"n": 0}

    def filling(fd: int, data: object) -> int:
        calls["n"] += 1
        if calls["n"] > 40:
            raise OSError(errno.ENOSPC, "No space left on device")
        return real_write(fd, data)  # type: ignore[arg-type]

    monkeypatch.setattr(output.os, "write", filling)
    out = tmp_path / "plans"
    r = runner.invoke(app, ["batch", str(CLINIC), "--out", str(out), "--jobs", "1"])
    assert r.exit_code == 1 and "No space left on device" in r.stderr
    assert "Traceback" not in r.output and str(out) in r.stderr
    assert not list(out.glob(".*.tmp"))
    finished = _complete_plans(out)
    assert 0 < finished < 194
    monkeypatch.setattr(output.os, "write", real_write)
    r = runner.invoke(app, ["batch", str(CLINIC), "--out", str(out), "--resume"])
    assert r.exit_code == 2, r.stderr  # the example list has six marked bad rows
    assert _complete_plans(out) == 194 and not list(out.glob(".*.tmp"))


def _children(parent: int) -> list[int]:
    """Processes whose parent is ``parent`` (Linux /proc)."""
    found = []
    for stat in Path("/proc").glob("[0-9]*/stat"):
        try:
            fields = stat.read_text().rsplit(")", 1)[1].split()
        except OSError:
            continue
        if int(fields[1]) == parent:
            found.append(int(stat.parent.name))
    return found


def _running(pid: int) -> bool:
    """Alive and not a zombie waiting to be reaped."""
    try:
        state = Path(f"/proc/{pid}/stat").read_text().rsplit(")", 1)[1].split()[0]
    except OSError:
        return False
    return state != "Z"


@pytest.mark.skipif(not Path("/proc/self/stat").exists(), reason="reads /proc")
def test_killed_mid_list_leaves_complete_plans_and_resume_finishes(tmp_path: Path) -> None:
    """A real SIGKILL while two workers plan the list; then --resume completes it."""
    out = tmp_path / "plans"
    exe = [sys.executable, "-m", "airway", "batch", str(CLINIC), "--out", str(out)]
    proc = subprocess.Popen([*exe, "--jobs", "2"], stdout=subprocess.DEVNULL)
    deadline = time.time() + 60
    while time.time() < deadline and len(list(out.glob("*.json"))) < 20:
        time.sleep(0.01)
    workers = _children(proc.pid)
    assert workers, "the list should be planned by worker processes"
    os.kill(proc.pid, signal.SIGKILL)
    proc.wait(timeout=20)
    deadline = time.time() + 10
    while time.time() < deadline and any(_running(w) for w in workers):
        time.sleep(0.05)
    assert not any(_running(w) for w in workers), "workers outlived the killed run"
    _complete_plans(out)
    done = subprocess.run([*exe, "--resume"], capture_output=True, text=True, check=False)
    assert done.returncode == 2, done.stderr
    assert _complete_plans(out) == 194 and not list(out.glob(".*.tmp"))
    assert (out / "summary.csv").is_file()


def test_group_flush_falls_back_to_fsync_each_file(tmp_path: Path, monkeypatch) -> None:
    """Where there is no syncfs (not Linux), every file is fsynced before it is named."""
    synced: list[int] = []
    monkeypatch.setattr(output.sys, "platform", "darwin")
    monkeypatch.setattr(output.os, "fsync", synced.append)
    files = [(tmp_path / f"p{i}.json", f"plan {i}".encode()) for i in range(3)]
    output.write_group_atomic(files)
    assert len(synced) == 3
    assert [p.read_text() for p, _ in files] == ["plan 0", "plan 1", "plan 2"]
    assert sorted(p.name for p in tmp_path.iterdir()) == ["p0.json", "p1.json", "p2.json"]
