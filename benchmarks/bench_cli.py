"""Benchmark: wall time of the commands a user runs, in fresh processes, against two floors.

Run: python benchmarks/bench_cli.py [repeats]

Two floors are measured in the same run, interleaved with the commands so that a
noisy, shared machine slows them alike:

- terminal floor: a bare two-command typer app that validates one pydantic model;
- PDF floor: a bare script that imports typer, pydantic and reportlab, registers
  DejaVu Sans and builds a one-page table document.

Targets: ``airway quick`` to the terminal at most 1.5 x the terminal
floor; ``airway quick --pdf`` at most 1.4 x the PDF floor. Prints medians and ratios.
"""

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

TARGETS = {"quick (terminal)": ("terminal floor", 1.5), "quick --pdf": ("PDF floor", 1.4)}


def _font() -> str:
    """The DejaVu Sans the package bundles (the floor registers the same file)."""
    return str(ROOT / "airway" / "data" / "fonts" / "DejaVuSans.ttf")


def main() -> None:
    repeat = int(sys.argv[1]) if len(sys.argv) > 1 else 15
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


if __name__ == "__main__":
    main()
