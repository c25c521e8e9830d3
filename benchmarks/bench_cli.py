"""Benchmark: wall time of the commands a user runs, in fresh processes.

Run: python benchmarks/bench_cli.py [repeats]
Prints the median of each command and its ratio to `airway --version` (the
interpreter and start-up floor), all measured in the same run.
"""

from __future__ import annotations

import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent


def _median_s(args: list[str], repeat: int) -> float:
    samples = []
    for _ in range(repeat):
        start = time.perf_counter()
        subprocess.run(args, check=True, capture_output=True)
        samples.append(time.perf_counter() - start)
    return statistics.median(samples)


def main() -> None:
    repeat = int(sys.argv[1]) if len(sys.argv) > 1 else 7
    exe = shutil.which("airway") or "airway"
    out = Path(tempfile.mkdtemp())
    example = str(ROOT / "examples" / "severe-preeclampsia-category1.toml")
    commands = {
        "airway --version": [exe, "--version"],
        "airway quick --weight-kg 98 (one screen)": [exe, "quick", "--weight-kg", "98"],
        "airway plan FILE (text)": [exe, "plan", example],
        "airway plan FILE --pdf": [exe, "plan", example, "--pdf", str(out / "p.pdf"), "--force"],
        "airway sheet doses": [exe, "sheet", "doses", "-o", str(out / "d.pdf"), "--force"],
    }
    floor = None
    for name, args in commands.items():
        median = _median_s(args, repeat)
        floor = floor or median
        print(f"{name:<42} median {median * 1000:6.0f} ms   x{median / floor:4.1f}")


if __name__ == "__main__":
    main()
