"""Rapid-sequence induction doses computed on the right body-size scalar.

A dose here is a calculation aid: the anaesthetist checks and titrates it.
Where sources disagree on the scalar, the dose carries the alternatives.
"""

import functools
from typing import Literal, NamedTuple

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


class Drug(NamedTuple):
    """One catalogued drug: mg/kg range, scalars, concentration, evidence."""

    name: str
    label: str
    role: str
    mg_per_kg: tuple[float, float]
    scalar_normal: Scalar
    scalar_obese: Scalar
    alternatives_obese: tuple[tuple[Scalar, str], ...]  # (scalar, source id)
    mg_per_ml: float
    dose_evidence: Evidence
    scalar_evidence: Evidence
    concentration_evidence: Evidence
    note: str = ""


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
        Evidence("valtonen1989", "published", "obstetric induction trials used 2-2.5 mg/kg"),
        Evidence("nightingale2015", "published", "lean weight for induction in obesity"),
        Evidence("common_practice", "common_practice", "1% emulsion"),
        note="Sources disagree: lean-weight doses were often too small (Subramani 2017); "
        "2 mg/kg adjusted weight has also been used. Titrate.",
    ),
    Drug(
        "thiopental",
        "Thiopental",
        "induction",
        (4.0, 5.0),
        "total",
        "lean",
        (),
        25.0,
        Evidence("common_practice", "common_practice", "obstetric doses of 4-5 mg/kg"),
        Evidence("nightingale2015", "published", "lean weight in obesity"),
        Evidence("common_practice", "common_practice", "2.5% solution"),
        note="More awareness than with propofol (AAGBI/SOBA 2015).",
    ),
    Drug(
        "suxamethonium",
        "Suxamethonium",
        "neuromuscular block",
        (1.0, 1.5),
        "total",
        "total",
        (),
        50.0,
        Evidence("elorbany2010", "published", "1-1.5 mg/kg for rapid sequence induction"),
        Evidence("lemmens2006", "published", "total weight, also in obesity"),
        Evidence("common_practice", "common_practice", "50 mg/mL ampoules; check local stock"),
        note="Saturation falls before 1 mg/kg wears off (Benumof 1997): never plan to wait for it.",
    ),
    Drug(
        "rocuronium",
        "Rocuronium",
        "neuromuscular block",
        (1.0, 1.2),
        "total",
        "lean",
        (("ideal", "leykin2004"),),
        10.0,
        Evidence("williamson2011", "published", "1.2 mg/kg in obstetric rapid sequence induction"),
        Evidence(
            "nightingale2015",
            "published",
            "lean weight in obesity, never total weight (prolongs the block)",
        ),
        Evidence("common_practice", "common_practice", "10 mg/mL"),
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
        Evidence("sugammadex_label", "published", "100 mg/mL"),
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
    scaled_as_intended: bool  # False when height was missing and total weight stood in
    alternatives: tuple[Alternative, ...]
    basis: str
    note: str
    # Set when the dose is held at its BMI-30 value (CONTINUITY_EVIDENCE): the
    # sentence that says so, and the guideline's scalar that would have given less.
    rule: str = ""
    held_from_scalar: str | None = None


def held_rule_text(floor_kg: float) -> str:
    """The one sentence that explains a held dose."""
    return (
        f"Held at the dose for BMI 30 at her height ({floor_kg:.1f} kg), because the "
        "guideline's lighter scalar would give a heavier woman less than a lighter one "
        "(project rule); the guideline's dose is listed as an alternative."
    )


def mg_text(d: Dose) -> str:
    """'95-142.5 mg' or '1520 mg'."""
    if d.dose_mg_low == d.dose_mg_high:
        return f"{d.dose_mg_low:g} mg"
    return f"{d.dose_mg_low:g}-{d.dose_mg_high:g} mg"


def dose_text(d: Dose) -> str:
    """'95-142.5 mg (1.9-2.9 mL)' or '1520 mg (15.2 mL)'."""
    if d.dose_mg_low == d.dose_mg_high:
        return f"{mg_text(d)} ({d.volume_ml_low:g} mL)"
    return f"{mg_text(d)} ({d.volume_ml_low:g}-{d.volume_ml_high:g} mL)"


_SCALAR_FIELD = {
    "total": "weight_kg",
    "lean": "lean_weight_kg",
    "ideal": "ideal_weight_kg",
    "adjusted": "adjusted_weight_kg",
}


def _weight(body: BodySize, scalar: Scalar) -> float | None:
    weight: float | None = getattr(body, _SCALAR_FIELD[scalar])
    return weight


def _mg(mg_per_kg: float, kg: float) -> float:
    return round(mg_per_kg * kg, 1)


def boundary_weight_kg(height_cm: float) -> float:
    """Total weight (kg) at which a woman of this height reaches BMI 30."""
    metres = height_cm / 100.0
    return OBESE_BMI * metres * metres


def _alternative(low: float, high: float, scalar: Scalar, kg: float, source: str) -> Alternative:
    return Alternative(scalar, round(kg, 2), _mg(low, kg), _mg(high, kg), source)


@functools.cache  # the same few sentences for every woman: made once
def _basis(drug: Drug, held: bool) -> str:
    evidence: tuple[Evidence, ...] = (
        drug.dose_evidence,
        drug.scalar_evidence,
        drug.concentration_evidence,
    )
    if held:
        evidence += (CONTINUITY_EVIDENCE,)
    return "; ".join(e.describe() for e in evidence)


# The shipped drugs' basis sentences, by identity (hashing a whole drug costs more).
_SHIPPED_BASIS = {(id(d), held): _basis(d, held) for d in DRUGS for held in (False, True)}


def compute_dose(drug: Drug, body: BodySize) -> Dose:
    """Dose range for one drug and one woman.

    Continuous and non-decreasing in weight at any height: see
    :data:`CONTINUITY_EVIDENCE`.
    """
    low, high = drug.mg_per_kg
    bmi = body.bmi
    obese = bmi is not None and bmi >= OBESE_BMI
    wanted: Scalar = drug.scalar_obese if obese else drug.scalar_normal
    kg = _weight(body, wanted)
    scaled = kg is not None
    note = drug.note
    alternatives: tuple[Alternative, ...] = ()
    rule, held_from = "", None
    if obese and kg is not None and body.height_cm is not None and wanted != "total":
        floor = boundary_weight_kg(body.height_cm)
        if kg < floor:
            alternatives = (_alternative(low, high, wanted, kg, drug.scalar_evidence.source),)
            rule, held_from = held_rule_text(floor), wanted
            wanted, kg = "boundary", floor
    if bmi is None and drug.scalar_obese != "total":
        scaled = False
        note = (
            f"Height missing: not scaled to {SCALAR_LABEL[drug.scalar_obese]}; shown on "
            "total weight, which overestimates the dose in obesity. " + note
        ).strip()
    if kg is None:
        wanted, kg = "total", body.weight_kg
    # Dose on the weight as shown, so mg/kg x shown weight checks exactly.
    kg = round(kg, 2)
    if obese:
        for scalar, source in drug.alternatives_obese:
            alt_kg = _weight(body, scalar)
            if alt_kg is not None:
                alternatives += (_alternative(low, high, scalar, alt_kg, source),)
    held = held_from is not None
    basis = _SHIPPED_BASIS.get((id(drug), held)) or _basis(drug, held)
    per_ml = drug.mg_per_ml
    return Dose(
        drug.name,
        drug.label,
        drug.role,
        low,
        high,
        wanted,
        kg,
        round(low * kg, 1),  # _mg, written out
        round(high * kg, 1),
        per_ml,
        round(low * kg / per_ml, 1),
        round(high * kg / per_ml, 1),
        scaled,
        alternatives,
        basis,
        note,
        rule,
        held_from,
    )


def compute_doses(body: BodySize) -> tuple[Dose, ...]:
    """All catalogued drugs for one woman."""
    return tuple(compute_dose(d, body) for d in DRUGS)
