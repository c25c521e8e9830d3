"""Run a clinic list: a JSON plan (and a PDF) per woman, a summary CSV and PDF.

The I/O around :mod:`airway.workflows.clinic`. Every file is written atomically, so a kill
or a full disk leaves each finished output complete and no half-written file
under a final name; temporary files left by a killed run are removed by the next.
A folder that already holds outputs is refused unless ``force`` (replace) or
``resume`` (keep rows whose outputs are complete and still match their row).
A long list is planned in parallel, one process per core, in chunks of rows.
"""

import os
import threading
import time
from collections import deque
from collections.abc import Callable
from concurrent.futures import Future, ProcessPoolExecutor
from dataclasses import dataclass
from pathlib import Path

from ..catalogue import Catalogue
from ..checklist import Checklist
from ..engine.plan import build_plan
from ..errors import InputError, OutputExistsError, Problem
from ..loading import read_bounded
from ..output import folder_lock, remove_stale_temporaries, write_atomic, write_group_atomic
from ..render.json import render_json_bytes
from .clinic import Row, SummaryRow, read_clinic_list, summary_csv, summary_row

SUMMARY_CSV = "summary.csv"
SUMMARY_PDF = "summary.pdf"
FHIR_SUFFIX = ".fhir.json"  # a row's FHIR Bundle beside its plan

Progress = Callable[[int, int], None]


@dataclass(frozen=True)
class BatchResult:
    rows: tuple[Row, ...]
    summary: tuple[SummaryRow, ...]
    written: int  # files written this run
    kept: int  # rows kept from an earlier run (resume)
    encoding: str = "UTF-8"  # how the list's text was read

    @property
    def bad_rows(self) -> tuple[Row, ...]:
        return tuple(r for r in self.rows if r.assessment is None)

    @property
    def problems(self) -> tuple[Problem, ...]:
        """Every bad row's problems, in list order."""
        return tuple(p for r in self.bad_rows for p in r.problems)

    def report(self, out: Path) -> str:
        """'planned 194 of 200 rows (read as UTF-8) into plans (195 files written, 0 kept)'."""
        planned = len(self.rows) - len(self.bad_rows)
        files = "file" if self.written == 1 else "files"
        return (
            f"planned {planned} of {len(self.rows)} rows (read as {self.encoding}) into {out} "
            f"({self.written} {files} written, {self.kept} kept)"
        )


def read_list_file(path: Path) -> tuple[tuple[Row, ...], str]:
    """The rows of a clinic list file and the encoding they were read in: UTF-8 with or
    without a byte-order mark, or Windows-1252 as Excel saves a CSV on Windows; comma- or
    semicolon-separated."""
    text, encoding = decode_list(read_bounded(path, "clinic list"), str(path))
    return read_clinic_list(text, str(path)), encoding


def decode_list(raw: bytes, name: str) -> tuple[str, str]:
    """The list's text and the encoding it was read in."""
    try:
        return raw.decode("utf-8").removeprefix("\ufeff"), "UTF-8"
    except UnicodeDecodeError:
        pass
    try:
        return raw.decode("cp1252"), "Windows-1252"
    except UnicodeDecodeError:
        problem = Problem("(file)", "is neither UTF-8 nor Windows-1252 text")
        raise InputError(name, [problem]) from None


# This run's mark on its temporaries: a clinic-list run removes only its own.
RUN_TAG = f"run{os.getpid()}"


def _outputs(row: Row, pdf: bool, fhir: bool = False) -> list[str]:
    return [
        f"{row.id}.json",
        *([f"{row.id}.pdf"] if pdf else []),
        *([f"{row.id}{FHIR_SUFFIX}"] if fhir else []),
    ]


def _remove_stale_temporaries(out: Path, names: list[str]) -> None:
    """Temporaries of this list's own outputs left by a killed run (older than
    STALE_TEMPORARY_S); never another file, nor a temporary still being written."""
    for name in names:
        remove_stale_temporaries(out / name)


def _still_matches(out: Path, row: Row, job: "_Job", plan_json: bytes) -> bool:
    """For resume: the row's outputs exist, are complete, and are exactly what the row
    gives now (an edited value in a saved plan is replanned, not kept)."""
    assert row.assessment is not None
    try:
        saved = read_bounded(out / f"{row.id}.json", "assessment")
    except InputError:
        return False
    if saved != plan_json:
        return False
    if job.fhir:
        try:
            bundle = read_bounded(out / f"{row.id}{FHIR_SUFFIX}", "assessment")
        except InputError:
            return False
        if not bundle.rstrip().endswith(b"}"):
            return False
    if job.pdf:
        try:
            data = read_bounded(out / f"{row.id}.pdf", "PDF")
        except InputError:
            return False
        return data.startswith(b"%PDF") and data.rstrip().endswith(b"%%EOF")
    return True


@dataclass(frozen=True)
class _Job:
    """What every worker needs to plan rows of the list: sent once, when it starts."""

    rows: tuple[Row, ...]  # the good rows, in list order
    out: Path
    catalogue: Catalogue
    checklists: tuple[Checklist, ...]
    pdf: bool
    paper: str
    resume: bool
    fhir: bool = False


# (row number, its summary line, files written, kept from an earlier run)
Done = tuple[int, SummaryRow, int, bool]
CHUNK = 16  # rows a worker plans before it reports (the progress bar moves by this much)
ROWS_PER_WORKER = 48  # a shorter list is planned in one process: starting one costs more


def _plan_rows(job: _Job, start: int, stop: int) -> list[Done]:
    """Plan rows ``start:stop``: JSON (and PDF) written atomically, flushed to disk.

    The chunk's files are flushed together (one journal commit, not one per file)
    and the chunk is reported only once all of them are under their names.
    """
    done: list[Done] = []
    files: list[tuple[Path, bytes]] = []
    for row in job.rows[start:stop]:
        assert row.assessment is not None
        plan = build_plan(row.assessment, job.catalogue, job.checklists)
        line = summary_row(row, plan)
        plan_json = render_json_bytes(plan)
        if job.resume and _still_matches(job.out, row, job, plan_json):
            done.append((row.number, line, 0, True))
            continue
        files.append((job.out / f"{row.id}.json", plan_json))
        printed = None
        if job.pdf:
            from ..render.pdf.plan import render_plan_pdf

            printed = render_plan_pdf(plan, job.paper)
            files.append((job.out / f"{row.id}.pdf", printed))
        if job.fhir:
            from ..render.fhir import render_fhir

            bundle = render_fhir(plan, printed).encode("utf-8")
            files.append((job.out / f"{row.id}{FHIR_SUFFIX}", bundle))
        done.append((row.number, line, 1 + job.pdf + job.fhir, False))
    write_group_atomic(files, tag=RUN_TAG)
    return done


_WORKER_JOB: _Job | None = None
PARENT_CHECK_S = 0.2


def _start_worker(parent: int, job: _Job) -> None:
    """In a worker: keep the job, and exit as soon as the process that started it is
    gone (a killed ``airway batch`` must not leave workers behind; the files a worker
    was writing stay temporaries, which the next run removes)."""
    global _WORKER_JOB
    _WORKER_JOB = job

    def watch() -> None:
        while os.getppid() == parent:
            time.sleep(PARENT_CHECK_S)
        os._exit(1)

    threading.Thread(target=watch, name="airway-parent-watch", daemon=True).start()


def _worker_rows(start: int, stop: int) -> list[Done]:
    assert _WORKER_JOB is not None, "a worker plans rows only after _start_worker"
    return _plan_rows(_WORKER_JOB, start, stop)


def run_batch(
    list_path: Path,
    out: Path,
    catalogue: Catalogue,
    checklists: tuple[Checklist, ...],
    *,
    pdf: bool = False,
    fhir: bool = False,
    paper: str = "A4",
    force: bool = False,
    resume: bool = False,
    jobs: int | None = None,
    progress: Progress | None = None,
) -> BatchResult:
    """Plan every row of a clinic list into ``out``.

    Raises:
        InputError: the list cannot be read or its header is unusable.
        OutputExistsError: ``out`` holds outputs and neither ``force`` nor ``resume``.
    """
    rows, encoding = read_list_file(list_path)
    if out.exists() and not out.is_dir():
        raise InputError(str(out), [Problem("--out", "is a file; give a folder for the plans")])
    out.mkdir(parents=True, exist_ok=True)
    with folder_lock(out):
        return _run_locked(
            rows, out, catalogue, checklists, pdf, paper, force, resume, jobs, progress, fhir,
            encoding,
        )  # fmt: skip


def _run_locked(
    rows: tuple[Row, ...],
    out: Path,
    catalogue: Catalogue,
    checklists: tuple[Checklist, ...],
    pdf: bool,
    paper: str,
    force: bool,
    resume: bool,
    jobs: int | None,
    progress: Progress | None,
    fhir: bool = False,
    encoding: str = "UTF-8",
) -> BatchResult:
    names = [n for r in rows for n in _outputs(r, pdf, fhir)] + [SUMMARY_CSV]
    if pdf:
        names.append(SUMMARY_PDF)
    _remove_stale_temporaries(out, names)
    existing = [n for n in names if (out / n).exists()]
    if existing and not (force or resume):
        raise OutputExistsError(
            str(out),
            f"{out} already holds {len(existing)} of this list's outputs (e.g. "
            f"{existing[0]}); use --force to replace them or --resume to keep finished rows",
        )
    good = tuple(r for r in rows if r.assessment is not None)
    total = len(good)
    counts = {"done": 0, "written": 0, "kept": 0}
    lines: dict[int, SummaryRow] = {}

    def finished(chunk: list[Done]) -> None:
        for number, line, files, kept in chunk:
            lines[number] = line
            counts["done"] += 1
            counts["written"] += files
            counts["kept"] += kept
        if progress:
            progress(counts["done"], total)

    job = _Job(good, out, catalogue, checklists, pdf, paper, resume, fhir)
    chunks = [(i, min(i + CHUNK, total)) for i in range(0, total, CHUNK)]
    cores = os.cpu_count() or 1
    workers = jobs or min(cores, max(1, total // ROWS_PER_WORKER))
    if workers == 1:
        for start, stop in chunks:
            finished(_plan_rows(job, start, stop))
    else:
        # Each worker gets the list once and plans chunks of it; summaries come back,
        # plans never cross between processes. At most a few chunks wait at a time,
        # so memory stays flat however long the list.
        pool = ProcessPoolExecutor(workers, initializer=_start_worker, initargs=(os.getpid(), job))
        with pool:
            waiting: deque[Future[list[Done]]] = deque()
            try:
                for start, stop in chunks:
                    waiting.append(pool.submit(_worker_rows, start, stop))
                    while len(waiting) >= 2 * workers:
                        finished(waiting.popleft().result())
                while waiting:
                    finished(waiting.popleft().result())
            except BaseException:
                pool.shutdown(wait=True, cancel_futures=True)
                raise
    written, kept = counts["written"], counts["kept"]
    summary = tuple(lines.get(r.number) or summary_row(r, None) for r in rows)
    write_atomic(
        out / SUMMARY_CSV, summary_csv(list(summary)).encode("utf-8"), force=True, sweep_stale=False
    )
    written += 1
    if pdf:
        from ..render.pdf.summary import render_summary_pdf

        summary_pdf = render_summary_pdf(list(summary), paper, read_as=encoding)
        write_atomic(out / SUMMARY_PDF, summary_pdf, force=True, sweep_stale=False)
        written += 1
    return BatchResult(rows=rows, summary=summary, written=written, kept=kept, encoding=encoding)
