"""Write examples/clinic-list.csv: an invented clinic's list of 200 referred women.

Every row is invented (random findings from a fixed seed, no real person or
hospital). Levels spread from 1 to 4; six rows are deliberately bad, each marked
so in its comment column, to show how a bad row is reported.

Run: python examples/make_clinic_list.py
"""

from __future__ import annotations

import csv
import random
from datetime import date, timedelta
from pathlib import Path

COLUMNS = (
    "id",
    "comment",
    "assessed_on",
    "patient.age_years",
    "patient.weight_kg",
    "patient.height_cm",
    "patient.booking_weight_kg",
    "patient.gestation_weeks",
    "airway.mallampati",
    "airway.thyromental_cm",
    "airway.mouth_opening_cm",
    "airway.upper_lip_bite",
    "airway.neck_movement",
    "airway.large_breasts",
    "airway.short_neck",
    "airway.receding_mandible",
    "history.intubation",
    "history.obstructive_sleep_apnoea",
    "history.snoring",
    "preeclampsia.status",
    "preeclampsia.signs",
    "preeclampsia.platelets_10e9_per_l",
    "context.surgical_complexity",
)

# Row index -> (column, bad value, what the comment says).
BAD = {
    17: ("patient.weight_kg", "ninety", "deliberately bad: weight written in words"),
    48: ("patient.height_cm", "1.63", "deliberately bad: height in metres"),
    91: ("airway.mallampati", "5", "deliberately bad: Mallampati class 5"),
    120: ("id", "Jo Bloggs", "deliberately bad: a name where the id goes"),
    152: ("preeclampsia.signs", "hoarse", "deliberately bad: not a listed oedema sign"),
    187: ("airway.large_breasts", "maybe", "deliberately bad: neither yes nor no"),
}


def _maybe(rng: random.Random, value: object, p_missing: float = 0.15) -> str:
    return "" if rng.random() < p_missing else str(value)


def _row(i: int, rng: random.Random, start: date) -> dict[str, str]:
    height = round(rng.gauss(163, 7))
    bmi = max(19.0, rng.gauss(31, 7))
    weight = round(bmi * (height / 100) ** 2, 1)
    heavy = bmi >= 35
    pe = rng.choices(
        ["none", "without_severe_features", "with_severe_features"], [0.8, 0.14, 0.06]
    )[0]
    signs = []
    if pe != "none" and rng.random() < 0.3:
        signs = rng.sample(["voice_change", "facial_oedema", "tongue_swelling", "new_snoring"], 1)
    if pe == "with_severe_features" and rng.random() < 0.15:
        signs.append("stridor")
    row = {
        "id": f"C{i + 1:03d}",
        "comment": "",
        "assessed_on": (start + timedelta(days=i // 20)).isoformat(),
        "patient.age_years": str(rng.randint(19, 44)),
        "patient.weight_kg": f"{weight:g}",
        "patient.height_cm": str(height),
        "patient.booking_weight_kg": _maybe(rng, f"{weight - rng.randint(6, 16):g}", 0.3),
        "patient.gestation_weeks": str(rng.randint(28, 38)),
        "airway.mallampati": _maybe(
            rng,
            rng.choices(
                [1, 2, 3, 4], [0.35, 0.35, 0.22, 0.08] if heavy else [0.5, 0.35, 0.12, 0.03]
            )[0],
            0.05,
        ),
        "airway.thyromental_cm": _maybe(rng, round(rng.gauss(7.0, 1.0), 1), 0.3),
        "airway.mouth_opening_cm": _maybe(rng, round(rng.gauss(4.6, 0.6), 1), 0.2),
        "airway.upper_lip_bite": _maybe(rng, rng.choices([1, 2, 3], [0.7, 0.25, 0.05])[0], 0.3),
        "airway.neck_movement": _maybe(rng, rng.choices(["normal", "reduced"], [0.93, 0.07])[0]),
        "airway.large_breasts": _maybe(rng, "yes" if heavy and rng.random() < 0.5 else "no", 0.2),
        "airway.short_neck": _maybe(rng, "yes" if rng.random() < 0.06 else "no", 0.3),
        "airway.receding_mandible": _maybe(rng, "yes" if rng.random() < 0.04 else "no", 0.3),
        "history.intubation": _maybe(
            rng, rng.choices(["none", "difficult", "failed"], [0.95, 0.04, 0.01])[0], 0.1
        ),
        "history.obstructive_sleep_apnoea": _maybe(
            rng, "yes" if heavy and rng.random() < 0.2 else "no", 0.3
        ),
        "history.snoring": _maybe(rng, "yes" if rng.random() < 0.25 else "no", 0.2),
        "preeclampsia.status": pe,
        "preeclampsia.signs": ";".join(signs),
        "preeclampsia.platelets_10e9_per_l": str(rng.randint(55, 140)) if pe != "none" else "",
        "context.surgical_complexity": _maybe(
            rng, rng.choices(["low", "moderate", "high"], [0.7, 0.25, 0.05])[0], 0.4
        ),
    }
    if i in BAD:
        column, value, comment = BAD[i]
        row[column] = value
        row["comment"] = comment
    return row


def main() -> None:
    rng = random.Random(20261202)
    start = date(2026, 11, 2)
    target = Path(__file__).with_name("clinic-list.csv")
    with target.open("w", newline="", encoding="utf-8") as f:
        writer = csv.DictWriter(f, fieldnames=COLUMNS, lineterminator="\n")
        writer.writeheader()
        for i in range(200):
            writer.writerow(_row(i, rng, start))
    print(f"wrote {target}")


if __name__ == "__main__":
    main()
