"""Body-size scalars against published formulas and their worked examples."""

from __future__ import annotations

import pytest

from airway.engine.body import (
    CM_PER_INCH,
    adjusted_weight,
    bmi,
    body_size,
    ideal_weight_devine_female,
    lean_weight_janmahasatian_female,
    who_bmi_class,
)


def test_bmi_who_worked_example_70kg_175cm() -> None:
    """WHO example: 70 kg at 1.75 m gives 22.857 kg/m²."""
    assert bmi(70, 175) == pytest.approx(22.857, abs=0.01)


@pytest.mark.parametrize(
    ("value", "expected"),
    [
        # WHO 2000 adult classes; each lower bound is inclusive.
        (18.49, "underweight"),
        (18.5, "normal"),
        (24.99, "normal"),
        (25.0, "pre-obese"),
        (29.99, "pre-obese"),
        (30.0, "obese class I"),
        (34.99, "obese class I"),
        (35.0, "obese class II"),
        (39.99, "obese class II"),
        (40.0, "obese class III"),
        (55.0, "obese class III"),
    ],
)
def test_who_bmi_class_boundaries(value: float, expected: str) -> None:
    assert who_bmi_class(value) == expected


@pytest.mark.parametrize(
    ("inches", "expected_kg"),
    [
        (60, 45.5),  # Devine 1974 female base
        (66, 59.3),  # published worked example: 45.5 + 2.3 x 6
        (70, 68.5),  # 45.5 + 23 (a secondary page prints 68: arithmetic error there)
    ],
)
def test_devine_female(inches: float, expected_kg: float) -> None:
    assert ideal_weight_devine_female(inches * CM_PER_INCH) == pytest.approx(expected_kg, abs=0.05)


def test_devine_female_165cm() -> None:
    """Devine at 165 cm (64.96 in): 56.91 kg, computed from the published formula."""
    assert ideal_weight_devine_female(165) == pytest.approx(56.91, abs=0.05)


@pytest.mark.parametrize(
    ("weight", "height", "expected"),
    [
        # Janmahasatian 2005 female formula 9270 x TBW / (8780 + 244 x BMI),
        # computed by hand from the published coefficients.
        (95, 165, 50.92),
        (120, 160, 55.02),
        (60, 165, 39.29),
    ],
)
def test_janmahasatian_female(weight: float, height: float, expected: float) -> None:
    assert lean_weight_janmahasatian_female(weight, height) == pytest.approx(expected, abs=0.05)


def test_adjusted_weight_95kg_165cm() -> None:
    """IBW + 0.4 x (TBW - IBW) with Devine IBW 56.91 kg: 72.15 kg."""
    assert adjusted_weight(95, ideal_weight_devine_female(165)) == pytest.approx(72.15, abs=0.05)


def test_short_height_warns_devine_range() -> None:
    """Devine is not meant for heights under 60 in (152.4 cm)."""
    b = body_size(60, 148)
    assert any("Devine" in w and "152.4" in w for w in b.warnings)
    assert not any("Devine" in w for w in body_size(60, 160).warnings)


def test_lean_formula_range_warning() -> None:
    """Janmahasatian was derived on BMI 17.1-69.9 kg/m²."""
    assert any("Janmahasatian" in w for w in body_size(200, 160).warnings)  # BMI 78
    assert not any("Janmahasatian" in w for w in body_size(90, 165).warnings)


def test_missing_height_is_assumed_short_and_says_so() -> None:
    """No height: the scalars of a 150 cm woman (BMI 98 / 1.5^2 = 43.6), and a warning."""
    b = body_size(98, None)
    assert b.height_assumed and b.height_cm == 150 and b.bmi == round(98 / 1.5**2, 2)
    assert b == body_size(98, 150)._replace(height_assumed=True, warnings=b.warnings)
    assert any("assumed 150 cm" in w for w in b.warnings)
