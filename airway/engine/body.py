"""Body-size scalars: BMI and its WHO class, ideal, lean and adjusted weight.

All formulas come from non-pregnant adults; none has been validated at term
(the plan says so). Each function is pure and takes SI-ish units (kg, cm).
"""

from typing import NamedTuple

from ..sources import Evidence

CM_PER_INCH = 2.54  # exact by definition

# WHO adult BMI classes; each lower bound is inclusive (30.0 is obese class I).
WHO_BMI_CLASSES: tuple[tuple[float, str], ...] = (
    (40.0, "obese class III"),
    (35.0, "obese class II"),
    (30.0, "obese class I"),
    (25.0, "pre-obese"),
    (18.5, "normal"),
    (0.0, "underweight"),
)
WHO_BMI_EVIDENCE = Evidence("who_bmi", "published")

# Devine 1974, female: 45.5 kg at 60 in plus 2.3 kg per inch above.
DEVINE_FEMALE_BASE_KG = 45.5
DEVINE_KG_PER_INCH = 2.3
DEVINE_MIN_HEIGHT_IN = 60.0
DEVINE_EVIDENCE = Evidence("devine1974", "published", "not meant for heights under 152.4 cm")

# Janmahasatian 2005, female: LBW = 9270 x TBW / (8780 + 244 x BMI).
JANMAHASATIAN_FEMALE = (9270.0, 8780.0, 244.0)
# The range of the people the formula was derived from.
JANMAHASATIAN_BMI_RANGE = (17.1, 69.9)
JANMAHASATIAN_WEIGHT_RANGE_KG = (40.7, 216.5)
JANMAHASATIAN_EVIDENCE = Evidence("janmahasatian2005", "published")

BODY_FORMULA_WARNING = (
    "Body-size formulas come from non-pregnant adults and are not validated at term."
)

# A height not measured is taken as short, never as average: a shorter woman of the
# same weight has a higher BMI (more airway risk counted, more caution in the
# decision, faster desaturation) and a lower lean and BMI-30 weight (smaller doses
# of the drugs dosed on them), so the plan is never less cautious nor more heavily
# dosed than for any height from 150 cm up. 150 cm is shorter than about 19 women
# in 20 (project rule; the centile is from memory).
ASSUMED_HEIGHT_CM = 150.0
HEIGHT_ASSUMED_TEXT = (
    "Height not measured: planned on an assumed 150 cm (cautious: higher BMI, smaller "
    "lean-weight doses); measure it and plan again."
)

ADJUSTED_WEIGHT_FACTOR = 0.4
ADJUSTED_EVIDENCE = Evidence("erstad2004", "published", "IBW + 0.4 x (TBW - IBW)")


def bmi(weight_kg: float, height_cm: float) -> float:
    """Body-mass index in kg/m²."""
    metres = height_cm / 100.0
    return weight_kg / (metres * metres)


def who_bmi_class(value: float) -> str:
    """WHO adult class for a BMI (kg/m²)."""
    for lower, name in WHO_BMI_CLASSES:
        if value >= lower:
            return name
    return WHO_BMI_CLASSES[-1][1]


def ideal_weight_devine_female(height_cm: float) -> float:
    """Ideal body weight (kg), Devine 1974, female."""
    inches = height_cm / CM_PER_INCH
    return DEVINE_FEMALE_BASE_KG + DEVINE_KG_PER_INCH * (inches - DEVINE_MIN_HEIGHT_IN)


def lean_weight_janmahasatian_female(weight_kg: float, height_cm: float) -> float:
    """Lean body weight (kg), Janmahasatian 2005, female formula."""
    a, b, c = JANMAHASATIAN_FEMALE
    return a * weight_kg / (b + c * bmi(weight_kg, height_cm))


def adjusted_weight(weight_kg: float, ideal_kg: float) -> float:
    """Adjusted body weight (kg): IBW + 0.4 x (TBW - IBW)."""
    return ideal_kg + ADJUSTED_WEIGHT_FACTOR * (weight_kg - ideal_kg)


class BodySize(NamedTuple):
    """The scalars a plan doses on; ``None`` when height was not given."""

    weight_kg: float
    height_cm: float  # measured, or ASSUMED_HEIGHT_CM when height_assumed
    bmi: float
    bmi_class: str
    booking_bmi: float | None
    ideal_weight_kg: float
    lean_weight_kg: float
    adjusted_weight_kg: float
    warnings: tuple[str, ...]
    basis: tuple[str, ...]
    height_assumed: bool = False  # height not measured: ASSUMED_HEIGHT_CM stands in


def body_size(
    weight_kg: float, height_cm: float | None, booking_weight_kg: float | None = None
) -> BodySize:
    """All body-size scalars for one woman, with warnings where a formula strains."""
    basis = (
        f"BMI class: {WHO_BMI_EVIDENCE.describe()}",
        f"Ideal weight: {DEVINE_EVIDENCE.describe()}",
        f"Lean weight: {JANMAHASATIAN_EVIDENCE.describe()}",
        f"Adjusted weight: {ADJUSTED_EVIDENCE.describe()}",
    )
    warnings: list[str] = []
    assumed = height_cm is None
    if height_cm is None:
        height_cm = ASSUMED_HEIGHT_CM
        warnings.append(HEIGHT_ASSUMED_TEXT)
    value = bmi(weight_kg, height_cm)
    ideal = ideal_weight_devine_female(height_cm)
    lean = lean_weight_janmahasatian_female(weight_kg, height_cm)
    if not assumed and height_cm / CM_PER_INCH < DEVINE_MIN_HEIGHT_IN:
        warnings.append(
            f"Height {height_cm:g} cm is below 152.4 cm (60 in), the range the Devine "
            "ideal-weight formula was made for; ideal and adjusted weight are extrapolated."
        )
    lo_bmi, hi_bmi = JANMAHASATIAN_BMI_RANGE
    lo_wt, hi_wt = JANMAHASATIAN_WEIGHT_RANGE_KG
    if not (lo_bmi <= value <= hi_bmi and lo_wt <= weight_kg <= hi_wt):
        warnings.append(
            f"BMI {value:.1f} / weight {weight_kg:g} kg is outside the range the "
            f"Janmahasatian lean-weight formula was derived on (BMI {lo_bmi}-{hi_bmi}, "
            f"weight {lo_wt}-{hi_wt} kg); lean weight is extrapolated."
        )
    warnings.append(BODY_FORMULA_WARNING)
    return BodySize(
        weight_kg=weight_kg,
        height_cm=height_cm,
        bmi=round(value, 2),
        bmi_class=who_bmi_class(round(value, 2)),
        booking_bmi=(
            None if booking_weight_kg is None else round(bmi(booking_weight_kg, height_cm), 2)
        ),
        ideal_weight_kg=round(ideal, 2),
        lean_weight_kg=round(lean, 2),
        adjusted_weight_kg=round(adjusted_weight(weight_kg, ideal), 2),
        warnings=tuple(warnings),
        basis=basis,
        height_assumed=assumed,
    )
