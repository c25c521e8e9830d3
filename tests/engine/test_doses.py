"""Doses against published mg/kg ranges and scalars."""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from airway.engine.body import body_size
from airway.engine.doses import BY_NAME, compute_dose, compute_doses


def _dose(drug: str, weight: float, height: float | None):  # type: ignore[no-untyped-def]
    return compute_dose(BY_NAME[drug], body_size(weight, height))


def test_sugammadex_16_mg_per_kg_actual_weight() -> None:
    """Sugammadex label: 16 mg/kg for immediate reversal; 95 kg -> 1520 mg = 15.2 mL
    at 100 mg/mL."""
    d = _dose("sugammadex", 95, 165)
    assert (d.dose_mg_low, d.dose_mg_high, d.volume_ml_low, d.scalar) == (1520, 1520, 15.2, "total")


def test_suxamethonium_1_to_1_5_mg_per_kg_total_weight() -> None:
    """El-Orbany & Connolly 2010 (1-1.5 mg/kg); Lemmens & Brodsky 2006 (total weight)."""
    d = _dose("suxamethonium", 95, 165)
    assert (d.dose_mg_low, d.dose_mg_high, d.scalar) == (95, 142.5, "total")


def _alt(d, scalar: str):  # type: ignore[no-untyped-def]
    return next(a for a in d.alternatives if a.scalar == scalar)


def test_rocuronium_in_obesity_never_total_weight() -> None:
    """1.2 mg/kg at 95 kg / 165 cm (reference check value 21): lean 61.1 mg (AAGBI/SOBA
    2015) and ideal 68.3 mg (Leykin 2004) shown as alternatives; never the 114.0 mg of
    total weight. The dose itself is held at BMI 30 for 165 cm (81.68 kg, project rule)."""
    d = _dose("rocuronium", 95, 165)
    assert _alt(d, "lean").dose_mg_high == pytest.approx(61.1, abs=0.2)
    assert _alt(d, "ideal").dose_mg_high == pytest.approx(68.3, abs=0.2)
    assert d.scalar == "boundary" and d.scalar_weight_kg == pytest.approx(30 * 1.65**2, abs=0.01)
    assert 61.1 < d.dose_mg_high < 114.0


def test_propofol_lean_weight_in_obesity_shown_as_alternative() -> None:
    """2-2.5 mg/kg on lean weight at 95 kg / 165 cm: 101.8-127.3 mg (reference check
    value 22, Janmahasatian lean weight 50.92 kg)."""
    lean = _alt(_dose("propofol", 95, 165), "lean")
    assert lean.weight_kg == pytest.approx(50.92, abs=0.05)
    assert lean.dose_mg_low == pytest.approx(101.8, abs=0.2)
    assert lean.dose_mg_high == pytest.approx(127.3, abs=0.2)


def test_propofol_does_not_fall_across_bmi_30_at_150_cm() -> None:
    """At 150 cm, 65 kg (BMI 28.9) gets 2.5 x 65 = 162.5 mg on total weight; 70 kg
    (BMI 31.1) must not get less (on lean weight it would be 99.1 mg)."""
    at_65 = _dose("propofol", 65, 150)
    at_70 = _dose("propofol", 70, 150)
    assert at_65.dose_mg_high == 162.5 and at_65.scalar == "total"
    assert at_70.dose_mg_high >= at_65.dose_mg_high
    assert _alt(at_70, "lean").dose_mg_high == pytest.approx(99.1, abs=0.2)
    assert at_70.held_from_scalar == "lean" and "Held at the dose for BMI 30" in at_70.rule


def test_non_obese_doses_on_total_weight() -> None:
    d = _dose("rocuronium", 65, 165)  # BMI 23.9
    assert d.scalar == "total" and d.dose_mg_low == 65


def test_missing_height_says_what_was_not_scaled() -> None:
    doses = {d.drug: d for d in compute_doses(body_size(98, None))}
    for drug in ("propofol", "thiopental", "rocuronium"):
        assert not doses[drug].scaled_as_intended
        assert "Height missing" in doses[drug].note
    assert doses["suxamethonium"].scaled_as_intended


@settings(max_examples=200, deadline=None)
@given(weight=st.floats(30, 300), height=st.one_of(st.none(), st.floats(120, 210)))
def test_no_nan_or_negative_dose(weight: float, height: float | None) -> None:
    for d in compute_doses(body_size(weight, height)):
        for v in (d.dose_mg_low, d.dose_mg_high, d.volume_ml_low, d.volume_ml_high):
            assert math.isfinite(v) and v > 0
        assert d.dose_mg_low <= d.dose_mg_high


@settings(max_examples=100, deadline=None)
@given(weight=st.floats(30, 300), height=st.one_of(st.none(), st.floats(120, 210)))
def test_doses_scale_with_the_weight_they_are_dosed_on(weight, height) -> None:
    for d in compute_doses(body_size(weight, height)):
        assert d.dose_mg_low == pytest.approx(d.mg_per_kg_low * d.scalar_weight_kg, abs=0.06)
        assert d.dose_mg_high == pytest.approx(d.mg_per_kg_high * d.scalar_weight_kg, abs=0.06)


HEIGHTS_CM = (145.0, 150.0, 155.0, 160.0, 165.0, 170.0, 180.0, 190.0)


@pytest.mark.parametrize("height", HEIGHTS_CM)
def test_every_dose_non_decreasing_over_45_to_170_kg(height: float) -> None:
    """A 0.1 kg grid from 45 to 170 kg: no drug's dose (low or high) ever falls as weight
    rises, and no step between neighbours exceeds what 0.1 kg more can add."""
    previous: dict[str, tuple[float, float]] = {}
    for tenth in range(450, 1701):
        kg = tenth / 10
        for d in compute_doses(body_size(kg, height)):
            now = (d.dose_mg_low, d.dose_mg_high)
            if d.drug in previous:
                before = previous[d.drug]
                assert now[0] >= before[0] and now[1] >= before[1], (d.drug, kg, before, now)
                # Continuity: a 0.1 kg step adds at most 0.1 kg x mg/kg (plus rounding).
                assert now[1] - before[1] <= 0.1 * d.mg_per_kg_high + 0.11, (d.drug, kg)
            previous[d.drug] = now


@settings(max_examples=300, deadline=None)
@given(
    a=st.floats(45, 170),
    b=st.floats(45, 170),
    height=st.one_of(st.none(), st.floats(140, 200)),
)
def test_heavier_never_gets_less(a: float, b: float, height: float | None) -> None:
    light, heavy = sorted((a, b))
    lighter, heavier = (
        compute_doses(body_size(light, height)),
        compute_doses(body_size(heavy, height)),
    )
    for x, y in zip(lighter, heavier, strict=True):
        assert y.dose_mg_low >= x.dose_mg_low and y.dose_mg_high >= x.dose_mg_high, x.drug
