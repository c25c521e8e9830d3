"""Benchmark: clinic lists, as whole processes and in-process.

Run: python benchmarks/bench_batch.py [rows] [repeats]

Measured in one run (medians of the repeats, default 7; the PDF batches, which take
tens of seconds each, twice):
- first, plans per second in-process from validated assessments, no PDF (target: 5,000),
  before the batches below load both cores;
- a list of ROWS (default 1000, made from the invented example list) to JSON plans, as
  one process, against one ``airway plan FILE -f json`` (target: at most 5 x);
- the same list to PDFs with ``--jobs 1`` and ``--jobs 2`` (target: at least 1.7 x
  faster on two cores);
- peak memory of the largest process during the PDF batch (target: under 300 MB).
"""

from __future__ import annotations

import csv
import io
import resource
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent


def _list(rows: int, folder: Path) -> Path:
    """ROWS good rows, cycling through the example list with new ids."""
    source = (ROOT / "examples" / "clinic-list.csv").read_text("utf-8")
    reader = list(csv.DictReader(io.StringIO(source)))
    good = [r for r in reader if not r["comment"]]
    out = folder / "list.csv"
    with out.open("w", newline="", encoding="utf-8") as f:
        writer = csv.DictWriter(f, fieldnames=list(reader[0]), lineterminator="\n")
        writer.writeheader()
        for i in range(rows):
            row = dict(good[i % len(good)])
            row["id"] = f"B{i:05d}"
            writer.writerow(row)
    return out


def _wall(args: list[str]) -> float:
    start = time.perf_counter()
    subprocess.run(args, check=False, capture_output=True)
    return time.perf_counter() - start


def main() -> None:
    rows = int(sys.argv[1]) if len(sys.argv) > 1 else 1000
    repeat = int(sys.argv[2]) if len(sys.argv) > 2 else 7
    exe = shutil.which("airway") or "airway"
    subprocess.run([sys.executable, "-m", "compileall", "-q", str(ROOT / "airway")], check=True)
    tmp = Path(tempfile.mkdtemp())
    clinic = _list(rows, tmp)
    example = str(ROOT / "examples" / "routine-elective.toml")
    # In-process first: right after the PDF batches (two minutes of both cores) the same
    # loop ran about 20% slower here for some seconds, an after-effect of that work
    # rather than a property of planning.
    from airway.engine.plan import build_plan
    from airway.unit.catalogue import load_catalogue
    from airway.unit.checklists import load_checklists
    from airway.workflows.clinic import read_clinic_list

    assessments = [
        r.assessment for r in read_clinic_list(clinic.read_text("utf-8"), "x") if r.assessment
    ]
    catalogue, lists = load_catalogue(), load_checklists()
    rates: list[float] = []
    for _ in range(repeat):
        start = time.perf_counter()
        for a in assessments:
            build_plan(a, catalogue, lists)
        rates.append(len(assessments) / (time.perf_counter() - start))

    single, json_batch, pdf_1, pdf_2 = [], [], [], []
    for n in range(repeat):
        single.append(_wall([exe, "plan", example, "-f", "json"]))
        json_batch.append(_wall([exe, "batch", str(clinic), "--out", str(tmp / f"j{n}")]))
    for n in range(2):
        pdf_1.append(
            _wall([exe, "batch", str(clinic), "--out", str(tmp / f"p1{n}"), "--pdf", "--jobs", "1"])
        )
        pdf_2.append(
            _wall([exe, "batch", str(clinic), "--out", str(tmp / f"p2{n}"), "--pdf", "--jobs", "2"])
        )
    peak_mb = resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss / 1024

    m = statistics.median
    print(f"{rows} rows; medians of {repeat} runs (PDF batches: 2)")
    print(f"{'measure':<44} {'value':>12}  target")
    ratio = m(json_batch) / m(single)
    print(f"{'one plan -f json (process)':<44} {m(single):10.2f} s")
    print(f"{'list to JSON (process)':<44} {m(json_batch):10.2f} s")
    print(f"{'  ratio to one plan':<44} {ratio:10.1f} x")
    print(f"{'list to PDF, --jobs 1':<44} {m(pdf_1):10.2f} s")
    print(f"{'list to PDF, --jobs 2':<44} {m(pdf_2):10.2f} s")
    print(f"{'  speed-up on two cores':<44} {m(pdf_1) / m(pdf_2):10.2f} x  >= 1.7")
    print(f"{'plans per second in-process':<44} {m(rates):10.0f}")
    print(f"{'peak memory of one process (MB)':<44} {peak_mb:10.0f}    < 300")


if __name__ == "__main__":
    main()
