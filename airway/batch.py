"""Run a clinic list: a JSON plan (and a PDF) per woman, a summary CSV and PDF.

The I/O around :mod:`airway.clinic`. Every file is written atomically, so a kill
or a full disk leaves each finished output complete and no half-written file
under a final name; temporary files left by a killed run are removed by the next.
A folder that already holds outputs is refused unless ``force`` (replace) or
``resume`` (keep rows whose outputs are complete and still match their row).
PDFs are made in parallel, one process per core.
"""

from __future__ import annotations

import json
import os
from collections import deque
from collections.abc import Callable
from concurrent.futures import Future, ProcessPoolExecutor, ThreadPoolExecutor
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from .checklists import Checklist
from .clinic import Row, SummaryRow, read_clinic_list, summary_csv, summary_row
from .equipment import Catalogue
from .errors import OutputExistsError
from .loading import read_text_file
from .output import write_atomic
from .plan import assessment_digest, build_plan
from .plan_model import Plan

SUMMARY_CSV = "summary.csv"
SUMMARY_PDF = "summary.pdf"

Progress = Callable[[int, int], None]


@dataclass(frozen=True)
class BatchResult:
    rows: tuple[Row, ...]
    summary: tuple[SummaryRow, ...]
    written: int  # files written this run
    kept: int  # rows kept from an earlier run (resume)

    @property
    def bad_rows(self) -> tuple[Row, ...]:
        return tuple(r for r in self.rows if r.assessment is None)


def read_list_file(path: Path) -> tuple[Row, ...]:
    """The rows of a clinic list file (UTF-8, with or without a byte-order mark)."""
    return read_clinic_list(read_text_file(path), str(path))


def _outputs(row: Row, pdf: bool) -> list[str]:
    return [f"{row.id}.json", *([f"{row.id}.pdf"] if pdf else [])]


def _remove_stale_temporaries(out: Path) -> None:
    # write_atomic names its temporaries ".<final name>.<random>.tmp".
    for stale in out.glob(".*.tmp"):
        stale.unlink(missing_ok=True)


def _still_matches(out: Path, row: Row, pdf: bool) -> bool:
    """For resume: the row's outputs exist, are complete, and came from this row."""
    assert row.assessment is not None
    try:
        saved = json.loads((out / f"{row.id}.json").read_text("utf-8"))
    except (OSError, ValueError):
        return False
    if saved.get("input_sha256") != assessment_digest(row.assessment):
        return False
    if pdf:
        try:
            data = (out / f"{row.id}.pdf").read_bytes()
        except OSError:
            return False
        return data.startswith(b"%PDF") and data.rstrip().endswith(b"%%EOF")
    return True


def _write_pdf(job: tuple[Plan, str, str]) -> str:
    from .render_pdf import render_plan_pdf

    plan, paper, path = job
    write_atomic(path, render_plan_pdf(plan, paper), force=True, sweep_stale=False)
    return path


def run_batch(
    list_path: Path,
    out: Path,
    catalogue: Catalogue,
    checklists: tuple[Checklist, ...],
    *,
    pdf: bool = False,
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
    rows = read_list_file(list_path)
    out.mkdir(parents=True, exist_ok=True)
    _remove_stale_temporaries(out)
    names = [n for r in rows for n in _outputs(r, pdf)] + [SUMMARY_CSV]
    if pdf:
        names.append(SUMMARY_PDF)
    existing = [n for n in names if (out / n).exists()]
    if existing and not (force or resume):
        raise OutputExistsError(
            str(out),
            f"{out} already holds {len(existing)} of this list's outputs (e.g. "
            f"{existing[0]}); use --force to replace them or --resume to keep finished rows",
        )
    from .render_json import render_json

    good = [r for r in rows if r.assessment is not None]
    total = len(good)
    counts = {"done": 0, "written": 0, "kept": 0}
    lines: dict[int, SummaryRow] = {}

    def finished(files: int) -> None:
        counts["done"] += 1
        counts["written"] += files
        if progress:
            progress(counts["done"], total)

    workers = 1 if not pdf else (jobs or os.cpu_count() or 1)
    # Plans are summarised and let go as they are made, and at most a few files wait
    # to be written, so memory stays flat however long the list. PDFs are made in
    # worker processes; JSON files are written (and flushed to disk) on one thread
    # while the next plan is made.
    pool = ProcessPoolExecutor(max_workers=workers) if workers > 1 else None
    writer = ThreadPoolExecutor(max_workers=1, thread_name_prefix="airway-writer")
    pending: deque[tuple[Future[Any], int]] = deque()
    limit = 4 * max(workers, 2)

    def wait(all_of_them: bool = False) -> None:
        while pending and (all_of_them or len(pending) >= limit or pending[0][0].done()):
            future, files = pending.popleft()
            future.result()
            finished(files)

    try:
        for row in good:
            assert row.assessment is not None
            plan = build_plan(row.assessment, catalogue, checklists)
            lines[row.number] = summary_row(row, plan)
            if resume and _still_matches(out, row, pdf):
                counts["kept"] += 1
                finished(0)
                continue
            data = render_json(plan).encode("utf-8")
            target = out / f"{row.id}.json"
            saved = writer.submit(write_atomic, target, data, True, False)
            if not pdf:
                pending.append((saved, 1))
                wait()
                continue
            job = (plan, paper, str(out / f"{row.id}.pdf"))
            if pool is None:
                saved.result()
                _write_pdf(job)
                finished(2)
                continue
            pending.append((saved, 0))
            pending.append((pool.submit(_write_pdf, job), 2))
            wait()
        wait(all_of_them=True)
    finally:
        writer.shutdown(wait=True, cancel_futures=True)
        if pool is not None:
            pool.shutdown(cancel_futures=True)
    written, kept = counts["written"], counts["kept"]
    summary = tuple(lines.get(r.number) or summary_row(r, None) for r in rows)
    write_atomic(
        out / SUMMARY_CSV, summary_csv(list(summary)).encode("utf-8"), force=True, sweep_stale=False
    )
    written += 1
    if pdf:
        from .render_summary import render_summary_pdf

        summary_pdf = render_summary_pdf(list(summary), paper)
        write_atomic(out / SUMMARY_PDF, summary_pdf, force=True, sweep_stale=False)
        written += 1
    return BatchResult(rows=rows, summary=summary, written=written, kept=kept)
