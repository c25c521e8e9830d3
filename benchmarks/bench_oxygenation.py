"""Benchmark: one woman's oxygenation model, all scenarios (target: under 5 ms).

Run: python benchmarks/bench_oxygenation.py
Reports the median of many runs and, in the same run, the ratio to building the
whole plan, so the figures are comparable on a noisy shared machine.
"""

import statistics
import time

from airway import assessment_from_mapping, plan_for
from airway.engine.oxygenation import oxygenation_for
from airway.unit.catalogue import load_catalogue
from airway.unit.checklists import load_checklists

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
    catalogue, lists = load_catalogue(), load_checklists()
    for name, data in CASES.items():
        a = assessment_from_mapping(data)
        oxy = _median_ms(lambda a=a: oxygenation_for(a))
        plan = _median_ms(lambda a=a: plan_for(a, catalogue, lists))
        print(
            f"{name:<45} oxygenation {oxy:6.2f} ms   whole plan {plan:6.2f} ms   "
            f"ratio {oxy / plan:.2f}"
        )


if __name__ == "__main__":
    main()
