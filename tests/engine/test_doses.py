"""Doses against published mg/kg ranges and scalars, in the steps a clinician draws up."""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from airway.catalogue import Stock
from airway.engine.body import body_size
from airway.engine.doses import BY_NAME, compute_dose, compute_doses
from airway.unit.catalogue import load_catalogue

STOCK = load_catalogue().drugs


def _dose(drug: str, weight: float, height: float | None, stock: Stock | None = None):  # type: ignore[no-untyped-def]
    return compute_dose(BY_NAME[drug], body_size(weight, height), stock or getattr(STOCK, drug))


def _doses(weight: float, height: float | None):  # type: ignore[no-untyped-def]
    return compute_doses(body_size(weight, height), STOCK)


def test_sugammadex_16_mg_per_kg_actual_weight_in_100_mg_steps() -> None:
    """Sugammadex label: 16 mg/kg for immediate reversal; 95 kg -> 1520 mg (reference
    check value 19), drawn up as 1500 mg = 15 mL of 100 mg/mL (steps: project rule)."""
    d = _dose("sugammadex", 95, 165)
    assert (d.dose_mg_low, d.dose_mg_high, d.volume_ml_low, d.scalar) == (1500, 1500, 15, "total")


def test_suxamethonium_1_to_1_5_mg_per_kg_total_weight_in_10_mg_steps() -> None:
    """El-Orbany & Connolly 2010 (1-1.5 mg/kg); Lemmens & Brodsky 2006 (total weight):
    95-142.5 mg at 95 kg (reference check value 20) becomes 100-140 mg."""
    d = _dose("suxamethonium", 95, 165)
    assert (d.dose_mg_low, d.dose_mg_high, d.scalar) == (100, 140, "total")
    assert (d.volume_ml_low, d.volume_ml_high) == (2, 2.8)  # 50 mg/mL, shipped strength


def _alt(d, scalar: str):  # type: ignore[no-untyped-def]
    return next(a for a in d.alternatives if a.scalar == scalar)


def test_rocuronium_in_obesity_never_total_weight() -> None:
    """1.2 mg/kg at 95 kg / 165 cm (reference check value 21): lean 61.1 mg (AAGBI/SOBA
    2015) and ideal 68.3 mg (Leykin 2004) shown as alternatives, each within one 5 mg
    step; never the 114.0 mg of total weight."""
    d = _dose("rocuronium", 95, 165)
    assert abs(_alt(d, "lean").dose_mg_high - 61.1) <= 5
    assert abs(_alt(d, "ideal").dose_mg_high - 68.3) <= 5
    assert d.scalar == "boundary" and d.scalar_weight_kg == round(30 * 1.65**2)
    assert 61.1 < d.dose_mg_high < 114.0


def test_propofol_lean_weight_in_obesity_shown_as_alternative() -> None:
    """2-2.5 mg/kg on lean weight at 95 kg / 165 cm: 101.8-127.3 mg (reference check
    value 22, Janmahasatian lean weight 50.92 kg), shown as 100-130 mg on 51 kg."""
    lean = _alt(_dose("propofol", 95, 165), "lean")
    assert (lean.weight_kg, lean.dose_mg_low, lean.dose_mg_high) == (51, 100, 130)


def test_propofol_does_not_fall_across_bmi_30_at_150_cm() -> None:
    """At 150 cm, 65 kg (BMI 28.9) gets 2.5 x 65 = 162.5 mg on total weight (160 mg drawn
    up); 70 kg (BMI 31.1) must not get less (on lean weight it would be about 99 mg)."""
    at_65 = _dose("propofol", 65, 150)
    at_70 = _dose("propofol", 70, 150)
    assert at_65.dose_mg_high == 160 and at_65.scalar == "total"
    assert at_70.dose_mg_high >= at_65.dose_mg_high
    assert _alt(at_70, "lean").dose_mg_high == 100
    assert at_70.held_from_scalar == "lean" and "Held at the dose for BMI 30" in at_70.rule


def test_non_obese_doses_on_total_weight() -> None:
    d = _dose("rocuronium", 65, 165)  # BMI 23.9
    assert d.scalar == "total" and d.dose_mg_low == 65


def test_ceilings_are_applied_and_said() -> None:
    """Suxamethonium 1.5 mg/kg at 170 kg would be 255 mg; thiopental 5 mg/kg past 500 mg.
    Both are kept to their ceilings (from memory, marked so) and the plan says why."""
    sux = _dose("suxamethonium", 170, 165)
    assert sux.dose_mg_high == 200 and sux.ceiling_mg == 200
    assert "200 mg at most" in sux.ceiling_text and "from memory" in sux.ceiling_text
    thio = _dose("thiopental", 125, 190)  # BMI 34.6: held at BMI-30 weight 108 kg
    assert thio.dose_mg_high == 500 and "500 mg" in thio.ceiling_text
    assert _dose("suxamethonium", 80, 165).ceiling_mg is None


def test_millilitres_follow_the_catalogues_strength() -> None:
    """A unit stocking suxamethonium at 20 mg/mL draws 2.5 times the volume of 50 mg/mL."""
    weak = _dose("suxamethonium", 95, 165, Stock(mg_per_ml=20))
    assert (weak.dose_mg_low, weak.dose_mg_high) == (100, 140)
    assert (weak.volume_ml_low, weak.volume_ml_high) == (5, 7)
    assert weak.mg_per_ml == 20


def test_millilitres_in_practical_steps() -> None:
    """0.5 mL from 5 mL up, 0.1 mL below (project rule): propofol 10 mg/mL at 69 kg is
    140-170 mg, 14-17 mL; suxamethonium 50 mg/mL is under 5 mL, to 0.1 mL."""
    for d in _doses(69, 165) + _doses(131, 171):
        for ml in (d.volume_ml_low, d.volume_ml_high):
            step = 0.1 if ml < 5 else 0.5
            assert abs(ml / step - round(ml / step)) < 1e-6, (d.drug, ml)


@settings(max_examples=300, deadline=None)
@given(weight=st.floats(30, 300), height=st.one_of(st.none(), st.floats(120, 210)))
def test_rounding_keeps_within_one_step_of_the_published_range(weight, height) -> None:
    """Whole milligrams in the drug's step; whole kilograms; never more than one step
    beyond mg/kg x the weight shown (unless a ceiling holds it lower)."""
    for d in _doses(weight, height):
        assert d.scalar_weight_kg == round(d.scalar_weight_kg)
        for mg, per_kg in ((d.dose_mg_low, d.mg_per_kg_low), (d.dose_mg_high, d.mg_per_kg_high)):
            assert mg % d.step_mg == 0 and math.isfinite(mg) and mg > 0
            exact = per_kg * d.scalar_weight_kg
            if d.ceiling_mg is None:
                assert abs(mg - exact) <= d.step_mg, (d.drug, mg, exact)
            else:
                assert mg <= d.ceiling_mg
        assert d.dose_mg_low <= d.dose_mg_high


HEIGHTS_CM = (145.0, 150.0, 155.0, 160.0, 165.0, 170.0, 180.0, 190.0)


@pytest.mark.parametrize("height", HEIGHTS_CM)
def test_every_dose_non_decreasing_over_45_to_170_kg(height: float) -> None:
    """A 0.1 kg grid from 45 to 170 kg: no drug's dose (low or high) ever falls as weight
    rises, and no jump between neighbours exceeds one drawing-up step."""
    previous: dict[str, tuple[float, float]] = {}
    for tenth in range(450, 1701):
        kg = tenth / 10
        for d in _doses(kg, height):
            now = (d.dose_mg_low, d.dose_mg_high)
            if d.drug in previous:
                before = previous[d.drug]
                assert now[0] >= before[0] and now[1] >= before[1], (d.drug, kg, before, now)
                assert now[1] - before[1] <= d.step_mg, (d.drug, kg)
            previous[d.drug] = now


@settings(max_examples=300, deadline=None)
@given(
    a=st.floats(45, 170),
    b=st.floats(45, 170),
    height=st.one_of(st.none(), st.floats(140, 200)),
)
def test_heavier_never_gets_less(a: float, b: float, height: float | None) -> None:
    light, heavy = sorted((a, b))
    for x, y in zip(_doses(light, height), _doses(heavy, height), strict=True):
        assert y.dose_mg_low >= x.dose_mg_low and y.dose_mg_high >= x.dose_mg_high, x.drug


@settings(max_examples=300, deadline=None)
@given(weight=st.floats(40, 250), height=st.floats(150, 190))
def test_a_missing_height_never_gives_a_heavier_dose(weight: float, height: float) -> None:
    """Planned without a height, no drug is dosed above the same woman with any height
    from 150 to 190 cm."""
    for unknown, known in zip(_doses(weight, None), _doses(weight, height), strict=True):
        assert unknown.dose_mg_high <= known.dose_mg_high, (unknown.drug, weight, height)
        assert unknown.dose_mg_low <= known.dose_mg_low, (unknown.drug, weight, height)
