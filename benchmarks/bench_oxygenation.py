"""Benchmark: one woman's oxygenation model, all scenarios (target: under 5 ms).

Run: python benchmarks/bench_oxygenation.py
Reports the median of many runs and, in the same run, the ratio to building the
whole plan, so the figures are comparable on a noisy shared machine.
"""

from __future__ import annotations

import statistics
import time

from airway.oxygenation import oxygenation_for

from airway import build_plan
from airway.loading import assessment_from_mapping

CASES = {
    "term, BMI 27": {"patient": {"weight_kg": 75, "height_cm": 165}},
    "labour, BMI 50": {"patient": {"weight_kg": 136, "height_cm": 165, "in_labour": True}},
    "normal BMI (nasal O2 runs the full horizon)": {"patient": {"weight_kg": 60, "height_cm": 170}},
}


def _median_ms(fn, repeat: int = 60) -> float:  # type: ignore[no-untyped-def]
    fn()
    samples = []
    for _ in range(repeat):
        start = time.perf_counter()
        fn()
        samples.append((time.perf_counter() - start) * 1000)
    return statistics.median(samples)


def main() -> None:
    for name, data in CASES.items():
        a = assessment_from_mapping(data)
        oxy = _median_ms(lambda a=a: oxygenation_for(a))
        plan = _median_ms(lambda a=a: build_plan(a))
        print(
            f"{name:<45} oxygenation {oxy:6.2f} ms   whole plan {plan:6.2f} ms   "
            f"ratio {oxy / plan:.2f}"
        )


if __name__ == "__main__":
    main()
