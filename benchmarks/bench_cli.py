"""Benchmark: wall time of the commands a user runs, in fresh processes, against two floors.

Run: python benchmarks/bench_cli.py [repeats] [--instructions]

Two floors are measured in the same run, interleaved with the commands so that a
noisy, shared machine slows them alike:

- terminal floor: a bare two-command typer app that validates one pydantic model;
- PDF floor: a bare script that imports typer, pydantic and reportlab, registers
  DejaVu Sans and builds a one-page table document.

Targets: ``airway quick`` to the terminal at most 1.3 x the terminal floor;
``airway quick --pdf`` at most 1.15 x the PDF floor. Prints medians and ratios.

``--instructions`` also runs each target command and its floor once under
valgrind's callgrind (when valgrind is installed) and prints the ratio of the
instructions they execute: a count that other work on a shared machine does not
change (it varies by about 0.1% between runs), to read beside the noisy times.
Instructions are not time (waiting on files and memory is not counted).
"""

from __future__ import annotations

import os
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent

TERMINAL_FLOOR = """
import typer
from pydantic import BaseModel, Field

app = typer.Typer(add_completion=False)


class Finding(BaseModel):
    weight_kg: float = Field(ge=30, le=300)


@app.command()
def quick(weight_kg: float = typer.Option(...)) -> None:
    print(Finding(weight_kg=weight_kg))


@app.command()
def other() -> None:
    pass


app()
"""

PDF_FLOOR = """
import io
import sys

import typer
from pydantic import BaseModel, Field
from reportlab.lib.pagesizes import A4
from reportlab.pdfbase import pdfmetrics
from reportlab.pdfbase.ttfonts import TTFont
from reportlab.platypus import SimpleDocTemplate, Table

app = typer.Typer(add_completion=False)


class Finding(BaseModel):
    weight_kg: float = Field(ge=30, le=300)


@app.command()
def quick(weight_kg: float = typer.Option(...), pdf: str = typer.Option(...)) -> None:
    Finding(weight_kg=weight_kg)
    pdfmetrics.registerFont(TTFont("DejaVuSans", FONT))
    buf = io.BytesIO()
    doc = SimpleDocTemplate(buf, pagesize=A4)
    rows = [[f"row {i}", "value", "more"] for i in range(30)]
    table = Table(rows)
    table.setStyle([("FONTNAME", (0, 0), (-1, -1), "DejaVuSans")])
    doc.build([table])
    with open(pdf, "wb") as f:
        f.write(buf.getvalue())


@app.command()
def other() -> None:
    pass


app()
"""

TARGETS = {"quick (terminal)": ("terminal floor", 1.3), "quick --pdf": ("PDF floor", 1.15)}


def _font() -> str:
    for folder in (os.environ.get("AIRWAY_FONT_DIR", ""), "/usr/share/fonts/truetype/dejavu"):
        path = Path(folder, "DejaVuSans.ttf")
        if folder and path.is_file():
            return str(path)
    sys.exit("DejaVu Sans not found (fonts-dejavu-core or AIRWAY_FONT_DIR)")


def _instructions(args: list[str]) -> int:
    """Instructions one run executes, counted by valgrind's callgrind."""
    out = subprocess.run(
        ["valgrind", "--tool=callgrind", "--callgrind-out-file=/dev/null", *args],
        check=True,
        capture_output=True,
        text=True,
    )
    for line in out.stderr.splitlines():
        if "Collected :" in line:
            return int(line.rsplit(":", 1)[1])
    raise RuntimeError("valgrind printed no instruction count")


def main() -> None:
    flags = [a for a in sys.argv[1:] if a.startswith("--")]
    numbers = [a for a in sys.argv[1:] if not a.startswith("--")]
    repeat = int(numbers[0]) if numbers else 15
    exe = shutil.which("airway") or "airway"
    out = Path(tempfile.mkdtemp())
    (out / "terminal_floor.py").write_text(TERMINAL_FLOOR)
    (out / "pdf_floor.py").write_text(PDF_FLOOR.replace("FONT))", f"{_font()!r}))"))
    example = str(ROOT / "examples" / "severe-preeclampsia-category1.toml")
    py = sys.executable
    commands = {
        "terminal floor": [py, str(out / "terminal_floor.py"), "quick", "--weight-kg", "90"],
        "PDF floor": [
            py,
            str(out / "pdf_floor.py"),
            "quick",
            "--weight-kg",
            "90",
            "--pdf",
            str(out / "floor.pdf"),
        ],
        "quick (terminal)": [exe, "quick", "--weight-kg", "90"],
        "quick --pdf": [exe, "quick", "--weight-kg", "90", "--pdf", str(out / "q.pdf"), "--force"],
        "plan FILE (text)": [exe, "plan", example],
        "plan FILE --pdf": [exe, "plan", example, "--pdf", str(out / "p.pdf"), "--force"],
        "sheet doses": [exe, "sheet", "doses", "-o", str(out / "d.pdf"), "--force"],
    }
    # An installed package has its bytecode compiled at install time; an editable checkout
    # on a machine with PYTHONDONTWRITEBYTECODE would recompile on every run.
    subprocess.run([py, "-m", "compileall", "-q", str(ROOT / "airway")], check=True)
    samples: dict[str, list[float]] = {name: [] for name in commands}
    for args in commands.values():  # warm the file cache once
        subprocess.run(args, check=True, capture_output=True)
    for _ in range(repeat):
        for name, args in commands.items():
            start = time.perf_counter()
            subprocess.run(args, check=True, capture_output=True)
            samples[name].append(time.perf_counter() - start)
    median = {name: statistics.median(s) for name, s in samples.items()}
    fastest = {name: min(s) for name, s in samples.items()}
    print(f"{repeat} runs each, interleaved; medians (and the ratio of the fastest runs,")
    print("which noise from other work on a shared machine can only slow)")
    print(f"{'command':<22} {'median':>9}  {'ratio to floor':<26} {'fastest':>7}  target")
    for name, m in median.items():
        floor, target = TARGETS.get(name, ("terminal floor", None))
        ratio = m / median[floor]
        best = fastest[name] / fastest[floor]
        verdict = (
            "" if target is None else f"<= {target:g}  {'ok' if ratio <= target else 'MISSED'}"
        )
        print(
            f"{name:<22} {m * 1000:7.0f} ms  x{ratio:4.2f} of {floor:<18} x{best:4.2f}   {verdict}"
        )
    if "--instructions" in flags:
        if shutil.which("valgrind") is None:
            sys.exit("--instructions needs valgrind (Debian package valgrind)")
        print("instructions executed, one run each under callgrind:")
        for name, (floor, target) in TARGETS.items():
            ours, base = _instructions(commands[name]), _instructions(commands[floor])
            print(
                f"{name:<22} {ours / 1e6:7.0f} M  x{ours / base:5.3f} of {floor:<18}"
                f"({base / 1e6:.0f} M)  target <= {target:g}"
            )


if __name__ == "__main__":
    main()
