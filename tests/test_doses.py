"""Doses against published mg/kg ranges and scalars."""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from airway.body import body_size
from airway.doses import BY_NAME, compute_dose, compute_doses


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


def test_rocuronium_in_obesity_never_total_weight() -> None:
    """1.2 mg/kg at 95 kg / 165 cm: lean 61.1 mg (AAGBI/SOBA 2015), ideal 68.3 mg
    (Leykin 2004) as the alternative; never the 114 mg of total weight."""
    d = _dose("rocuronium", 95, 165)
    assert d.scalar == "lean" and d.dose_mg_high == pytest.approx(61.1, abs=0.2)
    (alt,) = d.alternatives
    assert alt.scalar == "ideal" and alt.dose_mg_high == pytest.approx(68.3, abs=0.2)


def test_propofol_lean_weight_in_obesity() -> None:
    """2-2.5 mg/kg on lean weight at 95 kg / 165 cm: 101.8-127.3 mg."""
    d = _dose("propofol", 95, 165)
    assert d.dose_mg_low == pytest.approx(101.8, abs=0.2)
    assert d.dose_mg_high == pytest.approx(127.3, abs=0.2)


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
