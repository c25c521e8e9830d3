"""Rapid-sequence induction doses computed on the right body-size scalar.

A dose here is a calculation aid: the anaesthetist checks and titrates it.
Where sources disagree on the scalar, the dose carries the alternatives.
"""

import functools
import math
from typing import Literal, NamedTuple

from ..catalogue import Drugs, Stock
from ..sources import Evidence
from .body import BodySize

Scalar = Literal["total", "lean", "ideal", "adjusted", "boundary"]

SCALAR_LABEL = {
    "total": "total body weight",
    "lean": "lean body weight",
    "ideal": "ideal body weight",
    "adjusted": "adjusted body weight",
    "boundary": "BMI-30 weight for her height",
}
# One word or two, for a one-screen column.
SCALAR_SHORT = {
    "total": "total",
    "lean": "lean",
    "ideal": "ideal",
    "adjusted": "adjusted",
    "boundary": "BMI-30",
}

# Obesity, for the choice of scalar: WHO obese class I or above (BMI >= 30),
# applied to the current weight (project rule: the airway is managed at term).
OBESE_BMI = 30.0
OBESE_EVIDENCE = Evidence(
    "who_bmi", "published", "obese from BMI 30; using current weight is a project rule"
)

# Switching from total to lean weight at BMI 30 would make the dose fall as weight
# rises (lean weight is about 58% of total weight there: 9270 / (8780 + 244 x 30)).
# So a drug whose obese scalar is lighter than total weight is never dosed below its
# dose at the boundary: the dosing weight is the larger of the scalar's weight and
# her total weight at BMI 30 for her height. Below BMI 30 nothing changes; above it
# the guideline's scalar is shown as an alternative. Continuous and non-decreasing
# in weight at every height (tests/test_doses.py checks 45-170 kg).
CONTINUITY_EVIDENCE = Evidence(
    "project",
    "project_rule",
    "never below the dose at BMI 30 for her height, so a heavier woman never gets less",
)


# Doses a clinician would draw up (project rule): whole milligrams in steps, weights
# to the whole kilogram, millilitres to 0.5 mL (0.1 mL under 5 mL). Rounding to the
# nearest step never leaves the published mg/kg range by more than half a step.
ML_STEP, ML_FINE_STEP, ML_FINE_BELOW = 0.5, 0.1, 5.0


class Ceiling(NamedTuple):
    """A dose above which the plan does not go, with where it comes from."""

    mg: float
    evidence: Evidence


class Drug(NamedTuple):
    """One catalogued drug: mg/kg range, scalars, step, ceiling, evidence.

    Its strength (mg/mL) is not here: it comes from the unit's catalogue.
    """

    name: str
    label: str
    role: str
    mg_per_kg: tuple[float, float]
    scalar_normal: Scalar
    scalar_obese: Scalar
    alternatives_obese: tuple[tuple[Scalar, str], ...]  # (scalar, source id)
    step_mg: float
    dose_evidence: Evidence
    scalar_evidence: Evidence
    note: str = ""
    ceiling: Ceiling | None = None


DRUGS: tuple[Drug, ...] = (
    Drug(
        "propofol",
        "Propofol",
        "induction",
        (2.0, 2.5),
        "total",
        "lean",
        (("adjusted", "nightingale2015"),),
        10.0,
        Evidence(
            "valtonen1989",
            "published",
            "2.5 mg/kg in that obstetric trial; 2 mg/kg in others (common practice range 2-2.5)",
        ),
        Evidence("nightingale2015", "published", "lean weight for induction in obesity"),
        note="Sources disagree: lean-weight doses were often too small in morbid obesity "
        "(Subramani 2017); 2 mg/kg adjusted weight has also been used. Titrate.",
    ),
    Drug(
        "thiopental",
        "Thiopental",
        "induction",
        (4.0, 5.0),
        "total",
        "lean",
        (),
        10.0,
        Evidence("common_practice", "common_practice", "obstetric doses of 4-5 mg/kg"),
        Evidence("nightingale2015", "published", "lean weight in obesity"),
        note="More awareness than with propofol (AAGBI/SOBA 2015).",
        ceiling=Ceiling(
            500.0,
            Evidence(
                "common_practice",
                "common_practice",
                "usual upper limit of one induction dose, from memory",
            ),
        ),
    ),
    Drug(
        "suxamethonium",
        "Suxamethonium",
        "neuromuscular block",
        (1.0, 1.5),
        "total",
        "total",
        (),
        10.0,
        Evidence("elorbany2010", "published", "1-1.5 mg/kg for rapid sequence induction"),
        Evidence("lemmens2006", "published", "total weight, also in obesity"),
        note="Saturation falls before 1 mg/kg wears off (Benumof 1997): never plan to wait for it.",
        ceiling=Ceiling(
            200.0,
            Evidence(
                "common_practice",
                "common_practice",
                "no published cap found; from memory",
            ),
        ),
    ),
    Drug(
        "rocuronium",
        "Rocuronium",
        "neuromuscular block",
        (1.0, 1.2),
        "total",
        "lean",
        (("ideal", "leykin2004"),),
        5.0,
        Evidence("williamson2011", "published", "1.2 mg/kg in obstetric rapid sequence induction"),
        Evidence(
            "nightingale2015",
            "published",
            "lean weight in obesity, never total weight (prolongs the block)",
        ),
        note="Scalar in obesity disputed: lean (AAGBI/SOBA 2015) or ideal weight (Leykin 2004).",
    ),
    Drug(
        "sugammadex",
        "Sugammadex (immediate reversal)",
        "reversal",
        (16.0, 16.0),
        "total",
        "total",
        (),
        100.0,
        Evidence(
            "sugammadex_label",
            "published",
            "16 mg/kg for immediate reversal of rocuronium 1.2 mg/kg",
        ),
        Evidence("sugammadex_label", "from_memory", "actual body weight"),
        note="Drawn up whenever rocuronium is used. It restores breathing, not the airway.",
    ),
)

BY_NAME = {d.name: d for d in DRUGS}


class Alternative(NamedTuple):
    scalar: str
    weight_kg: float
    dose_mg_low: float
    dose_mg_high: float
    source: str


class Dose(NamedTuple):
    """One computed dose range."""

    drug: str
    label: str
    role: str
    mg_per_kg_low: float
    mg_per_kg_high: float
    scalar: str
    scalar_weight_kg: float
    dose_mg_low: float
    dose_mg_high: float
    mg_per_ml: float
    volume_ml_low: float
    volume_ml_high: float
    scaled_as_intended: bool  # always True: a missing height is assumed (body.py)
    alternatives: tuple[Alternative, ...]
    basis: str
    note: str
    # Set when the dose is held at its BMI-30 value (CONTINUITY_EVIDENCE): the
    # sentence that says so, and the guideline's scalar that would have given less.
    rule: str = ""
    held_from_scalar: str | None = None
    step_mg: float = 1.0
    ceiling_mg: float | None = None  # set when the ceiling lowered the dose
    ceiling_text: str = ""  # the sentence that says so, with its source
    strength_form: str = ""  # how the unit stocks it: "1% emulsion (common strength)"


def held_rule_text(floor_kg: float) -> str:
    """The one sentence that explains a held dose."""
    return (
        f"Held at the dose for BMI 30 at her height ({floor_kg:.0f} kg), because the "
        "guideline's lighter scalar would give a heavier woman less than a lighter one "
        "(project rule); the guideline's dose is listed as an alternative."
    )


def span(low: float, high: float) -> str:
    """'95-140' or '1500' when both ends are the same."""
    return f"{low:g}" if low == high else f"{low:g}-{high:g}"


def mg_text(d: Dose) -> str:
    """'100-140 mg' or '1500 mg'."""
    return f"{span(d.dose_mg_low, d.dose_mg_high)} mg"


def ml_text(d: Dose) -> str:
    """'10-14 mL of 10 mg/mL' or '15 mL of 100 mg/mL'."""
    return f"{span(d.volume_ml_low, d.volume_ml_high)} mL of {d.mg_per_ml:g} mg/mL"


def dose_text(d: Dose) -> str:
    """'100-140 mg (10-14 mL of 10 mg/mL)' or '1500 mg (15 mL of 100 mg/mL)'."""
    return f"{mg_text(d)} ({ml_text(d)})"


_SCALAR_FIELD = {
    "total": "weight_kg",
    "lean": "lean_weight_kg",
    "ideal": "ideal_weight_kg",
    "adjusted": "adjusted_weight_kg",
}


def _weight(body: BodySize, scalar: Scalar) -> float:
    weight: float = getattr(body, _SCALAR_FIELD[scalar])
    return weight


def to_step(value: float, step: float) -> float:
    """The nearest multiple of ``step`` (halves up), never below one step."""
    return max(step, step * math.floor(value / step + 0.5))


def millilitres(mg: float, mg_per_ml: float) -> float:
    """Volume to draw up: to 0.5 mL, or to 0.1 mL under 5 mL."""
    ml = mg / mg_per_ml
    step = ML_FINE_STEP if ml < ML_FINE_BELOW else ML_STEP
    return round(step * math.floor(ml / step + 0.5), 1)


def boundary_weight_kg(height_cm: float) -> float:
    """Total weight (kg) at which a woman of this height reaches BMI 30."""
    metres = height_cm / 100.0
    return OBESE_BMI * metres * metres


def _mg_range(drug: Drug, kg: float) -> tuple[float, float]:
    low, high = drug.mg_per_kg
    return to_step(low * kg, drug.step_mg), to_step(high * kg, drug.step_mg)


def _alternative(drug: Drug, scalar: Scalar, kg: float, source: str) -> Alternative:
    whole = float(round(kg))
    low, high = _mg_range(drug, whole)
    return Alternative(scalar, whole, low, high, source)


@functools.cache  # the same few sentences for every woman: made once
def _basis(drug: Drug, held: bool) -> str:
    evidence: tuple[Evidence, ...] = (
        drug.dose_evidence,
        drug.scalar_evidence,
    )
    if held:
        evidence += (CONTINUITY_EVIDENCE,)
    return "; ".join(e.describe() for e in evidence)


def compute_dose(drug: Drug, body: BodySize, stock: Stock) -> Dose:
    """Dose range for one drug and one woman, in practical steps, with its millilitres
    at the strength the unit stocks.

    Continuous in steps and non-decreasing in weight at any height: see
    :data:`CONTINUITY_EVIDENCE`.
    """
    obese = body.bmi >= OBESE_BMI
    wanted: Scalar = drug.scalar_obese if obese else drug.scalar_normal
    kg = _weight(body, wanted)
    alternatives: tuple[Alternative, ...] = ()
    rule, held_from = "", None
    if obese and wanted != "total":
        floor = boundary_weight_kg(body.height_cm)
        if kg < floor:
            alternatives = (_alternative(drug, wanted, kg, drug.scalar_evidence.source),)
            rule, held_from = held_rule_text(floor), wanted
            wanted, kg = "boundary", floor
    kg = float(round(kg))  # dose on the weight as shown, so mg/kg x weight checks
    if obese:
        for scalar, source in drug.alternatives_obese:
            alternatives += (_alternative(drug, scalar, _weight(body, scalar), source),)
    low, high = _mg_range(drug, kg)
    ceiling_mg, ceiling_text = None, ""
    if drug.ceiling is not None and high > drug.ceiling.mg:
        ceiling_mg = drug.ceiling.mg
        low, high = min(low, ceiling_mg), ceiling_mg
        ceiling_text = (
            f"{drug.label} kept to {ceiling_mg:g} mg at most ({drug.ceiling.evidence.describe()})."
        )
    return Dose(
        drug.name,
        drug.label,
        drug.role,
        drug.mg_per_kg[0],
        drug.mg_per_kg[1],
        wanted,
        kg,
        low,
        high,
        stock.mg_per_ml,
        millilitres(low, stock.mg_per_ml),
        millilitres(high, stock.mg_per_ml),
        True,
        alternatives,
        _basis(drug, held_from is not None),
        drug.note,
        rule,
        held_from,
        drug.step_mg,
        ceiling_mg,
        ceiling_text,
        stock.form or "",
    )


def compute_doses(body: BodySize, stocks: Drugs) -> tuple[Dose, ...]:
    """All catalogued drugs for one woman, at the strengths the unit stocks."""
    return tuple(compute_dose(d, body, getattr(stocks, d.name)) for d in DRUGS)
