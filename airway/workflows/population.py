"""A population model of women at term, run through the engine to calibrate the levels.

Each woman is drawn with every bedside finding examined, from the prevalences
below. Each prevalence names its source, or says it is from memory or assumed.
Where a bedside test's prevalence is not published for pregnant women it is
derived from the pooled sensitivity and specificity in Detsky 2019 at that
review's 10% prevalence of difficult intubation: share positive = sensitivity x
0.10 + (1 - specificity) x 0.90. Findings are drawn independently of one another
(apart from snoring with pre-eclampsia and the Mallampati class with labour),
which spreads abnormal findings over more women than real anatomy would: the
level shares are, if anything, overstated.

The model calibrates a ranking; it is not a description of any real maternity
population, and it holds no real person.
"""

import random
from collections import Counter
from typing import NamedTuple

from ..assessment import Assessment
from ..engine.factors import MALLAMPATI_TERM_SHARE
from ..engine.plan import risk_for
from ..loading import assessment_from_mapping


def _share(sensitivity: float, specificity: float, prevalence: float = 0.10) -> float:
    """Share of tests positive at a given prevalence of difficult intubation."""
    return sensitivity * prevalence + (1 - specificity) * (1 - prevalence)


class Prevalence(NamedTuple):
    finding: str
    share: float
    source: str


# Bedside findings, each drawn with its own probability.
FINDINGS: tuple[Prevalence, ...] = (
    Prevalence("thyromental short", _share(0.45, 0.86), "Detsky 2019 sens/spec"),
    Prevalence("sternomental short", _share(0.41, 0.90), "Detsky 2019 sens/spec"),
    Prevalence("mouth opening small", _share(0.36, 0.90), "Detsky 2019 sens/spec"),
    Prevalence("neck movement reduced", _share(0.28, 0.93), "Detsky 2019 sens/spec"),
    Prevalence("jaw protrusion limited", _share(0.25, 0.95), "Detsky 2019 sens/spec"),
    Prevalence("receding mandible", _share(0.19, 0.98), "Detsky 2019 retrognathia sens/spec"),
    # Detsky gives specificity 0.96 for ULBT class 3 but no sensitivity: 0.25 assumed.
    Prevalence("upper lip bite class 3", _share(0.25, 0.96), "Detsky 2019 spec; sens assumed"),
    Prevalence("short neck", 0.05, "assumed"),
    Prevalence("protruding incisors", 0.05, "assumed"),
    Prevalence("large breasts", 0.20, "assumed"),
    Prevalence("previous difficult intubation", 0.01, "about 1%, uncertain (reference notes)"),
    Prevalence("previous failed intubation", 0.001, "assumed"),
    Prevalence("stridor", 0.0005, "assumed"),
)

# Mallampati class at term (not in labour): the shares the estimate is centred on
# (engine/factors.py). In labour, classes 3-4 in 36.8% at epidural insertion
# (Boutonnet 2010); the split of 1 from 2 and of 3 from 4 is assumed (project rule).
MALLAMPATI_AT_TERM = MALLAMPATI_TERM_SHARE
MALLAMPATI_IN_LABOUR = {1: 0.22, 2: 0.412, 3: 0.29, 4: 0.078}
IN_LABOUR_SHARE = 0.5  # assumed: about half of obstetric general anaesthetics are intrapartum
PREECLAMPSIA_SHARE = 0.04  # 2-8% of pregnancies (from memory)
SEVERE_SHARE = 0.5  # of pre-eclampsia, assumed
OEDEMA_SIGNS_SHARE = {"with_severe_features": 0.15, "without_severe_features": 0.03, "none": 0.002}
SNORING_SHARE = {"none": 0.28, "pre-eclampsia": 0.75}  # Izci 2003
# Booking BMI: log-normal with a median of 25 and about one woman in five at 30 or
# more (UK maternity data, from memory); weight gained to term about 12 kg (IOM 2009
# ranges, from memory); height 163 +/- 7 cm and age 30.5 +/- 5.5 years (from memory).
BOOKING_BMI_MEDIAN = 25.0
BOOKING_BMI_LOG_SD = 0.21
GAIN_KG = (12.0, 4.0)
HEIGHT_CM = (163.0, 7.0)
AGE_YEARS = (30.5, 5.5)


def _class(rng: random.Random, shares: dict[int, float]) -> int:
    return rng.choices(list(shares), weights=list(shares.values()))[0]


def woman(rng: random.Random) -> dict:
    """One invented woman at term, every finding examined, as assessment data."""
    has = {p.finding: rng.random() < p.share for p in FINDINGS}
    height = min(195.0, max(140.0, rng.gauss(*HEIGHT_CM)))
    booking_bmi = BOOKING_BMI_MEDIAN * 2.718281828 ** rng.gauss(0, BOOKING_BMI_LOG_SD)
    weight = booking_bmi * (height / 100) ** 2 + max(0.0, rng.gauss(*GAIN_KG))
    labour = rng.random() < IN_LABOUR_SHARE
    pe = "none"
    if rng.random() < PREECLAMPSIA_SHARE:
        pe = "with_severe_features" if rng.random() < SEVERE_SHARE else "without_severe_features"
    signs = ["voice_change"] if rng.random() < OEDEMA_SIGNS_SHARE[pe] else []
    if has["stridor"]:
        signs.append("stridor")
    snoring = rng.random() < SNORING_SHARE["none" if pe == "none" else "pre-eclampsia"]
    intubation = (
        "failed"
        if has["previous failed intubation"]
        else "difficult"
        if has["previous difficult intubation"]
        else "none"
    )
    return {
        "patient": {
            "weight_kg": round(min(250.0, weight), 1),
            "height_cm": round(height, 1),
            "age_years": int(min(55, max(16, rng.gauss(*AGE_YEARS)))),
            "in_labour": labour,
        },
        "airway": {
            "mallampati": _class(rng, MALLAMPATI_IN_LABOUR if labour else MALLAMPATI_AT_TERM),
            "thyromental_cm": 5.5 if has["thyromental short"] else 7.5,
            "sternomental_cm": 11.5 if has["sternomental short"] else 15.0,
            "mouth_opening_cm": 3.5 if has["mouth opening small"] else 5.0,
            "upper_lip_bite": 3 if has["upper lip bite class 3"] else 1,
            "neck_movement": "reduced" if has["neck movement reduced"] else "normal",
            "jaw_protrusion": "limited" if has["jaw protrusion limited"] else "normal",
            "short_neck": has["short neck"],
            "receding_mandible": has["receding mandible"],
            "protruding_incisors": has["protruding incisors"],
            "large_breasts": has["large breasts"],
        },
        "history": {"intubation": intubation, "snoring": snoring},
        "preeclampsia": {"status": pe, "signs": signs},
    }


class Shares(NamedTuple):
    """How many women fell at each level, in one group."""

    group: str
    women: int
    by_level: dict[int, int]

    def percent(self, *levels: int) -> float:
        return 100.0 * sum(self.by_level.get(n, 0) for n in levels) / max(1, self.women)


def _bmi_band(a: Assessment) -> str:
    p = a.patient
    assert p.height_cm is not None  # the model always draws a height
    bmi = p.weight_kg / (p.height_cm / 100) ** 2
    return "BMI < 30" if bmi < 30 else "BMI 30-39.9" if bmi < 40 else "BMI 40 or more"


GROUPS = ("all women", "BMI < 30", "BMI 30-39.9", "BMI 40 or more", "not in labour", "in labour")


def run(women: int = 20_000, seed: int = 2026) -> tuple[Shares, ...]:
    """Level shares over a seeded population: overall, by BMI band, by labour."""
    rng = random.Random(seed)
    counts: dict[str, Counter[int]] = {g: Counter() for g in GROUPS}
    for _ in range(women):
        a = assessment_from_mapping(woman(rng))
        level = risk_for(a).level
        labour = "in labour" if a.patient.in_labour else "not in labour"
        for group in ("all women", _bmi_band(a), labour):
            counts[group][level] += 1
    return tuple(Shares(g, sum(c.values()), dict(c)) for g, c in counts.items())


def table(shares: tuple[Shares, ...]) -> str:
    """The shares as a plain-text table."""
    lines = [f"{'group':<16}{'women':>7}  level 1  level 2  level 3  level 4  levels 3-4"]
    for s in shares:
        cells = "".join(f"{s.percent(n):>8.1f}%" for n in (1, 2, 3, 4))
        lines.append(f"{s.group:<16}{s.women:>7} {cells}{s.percent(3, 4):>10.1f}%")
    return "\n".join(lines) + "\n"


CHART_WIDTH = 50
CHART_MARKS = {1: ".", 2: "-", 3: "=", 4: "#"}


def chart(shares: tuple[Shares, ...]) -> str:
    """Each group's level shares as one stacked bar of CHART_WIDTH characters."""
    key = "   ".join(f"{mark} level {n}" for n, mark in CHART_MARKS.items())
    lines = [f"{'':<16}{key}"]
    for s in shares:
        bar, used = "", 0.0
        for n, mark in CHART_MARKS.items():
            used += s.percent(n) * CHART_WIDTH / 100
            bar += mark * (round(used) - len(bar))
        lines.append(f"{s.group:<16}|{bar:<{CHART_WIDTH}}|")
    return "\n".join(lines) + "\n"
