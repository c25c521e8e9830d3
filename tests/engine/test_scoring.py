"""Scoring: levels, overrides and monotonicity."""

from __future__ import annotations

import math

from hypothesis import given, settings
from hypothesis import strategies as st

from airway.engine.body import body_size
from airway.engine.scoring import LEVEL_THRESHOLDS, level_for_index, score

from ..conftest import AIRWAY_FINDINGS, make


def _risk(**sections: dict):  # type: ignore[no-untyped-def]
    a = make(**sections)
    return score(a, body_size(a.patient.weight_kg, a.patient.height_cm))


def test_index_is_sum_of_log_ratios() -> None:
    """Mallampati 3 (Rocke RR 7.58) plus short neck (Rocke RR 5.01, from memory)."""
    r = _risk(
        airway={"mallampati": 3, "short_neck": True}, patient={"height_cm": 180, "weight_kg": 70}
    )
    assert r.index == round(math.log(7.58) + math.log(5.01), 4)


def test_mallampati_3_or_4_with_one_rocke_feature_is_level_4() -> None:
    """Rocke 1992 (quoted, from memory): MP III/IV plus one of short neck, receding
    mandible or protruding incisors gives over 90% probability of difficult laryngoscopy."""
    for mp in (3, 4):
        for feature in ("short_neck", "receding_mandible", "protruding_incisors"):
            r = _risk(
                airway={"mallampati": mp, feature: True},
                patient={"height_cm": 180, "weight_kg": 70},
            )
            assert r.level == 4, (mp, feature)


def test_mallampati_1_lean_woman_is_level_1() -> None:
    assert _risk(airway={"mallampati": 1}, patient={"height_cm": 170, "weight_kg": 65}).level == 1


def test_overrides_force_level_4() -> None:
    assert _risk(preeclampsia={"signs": ["stridor"]}).level == 4
    assert _risk(history={"intubation": "failed"}).level == 4
    r = _risk(history={"intubation": "difficult"})
    assert r.level == 4 and r.index_level == 1 and r.overrides == ("Previous difficult intubation",)


def test_not_assessed_is_listed_not_counted() -> None:
    r = _risk()
    assert "Mallampati class" in r.not_assessed
    assert all(f.contribution == 0 for f in r.factors if f.present is None)


def test_level_boundaries() -> None:
    lo, mid, hi = LEVEL_THRESHOLDS
    assert [level_for_index(x) for x in (0, lo - 1e-9, lo, mid, hi, 50)] == [1, 1, 2, 3, 4, 4]


_ADDITIONS = [
    ("airway", "short_neck", True),
    ("airway", "receding_mandible", True),
    ("airway", "protruding_incisors", True),
    ("airway", "upper_lip_bite", 3),
    ("airway", "jaw_protrusion", "limited"),
    ("airway", "neck_movement", "fixed"),
    ("history", "snoring", True),
    ("history", "intubation", "failed"),
    ("preeclampsia", "status", "with_severe_features"),
    ("preeclampsia", "signs", ["stridor"]),
    ("preeclampsia", "signs", ["tongue_swelling"]),
    ("airway", "large_breasts", True),
]


@settings(max_examples=150, deadline=None)
@given(
    airway=AIRWAY_FINDINGS,
    weight=st.floats(45, 180),
    height=st.floats(145, 190),
    addition=st.sampled_from(_ADDITIONS),
)
def test_adding_a_risk_factor_never_lowers_index_or_level(
    airway: dict, weight: float, height: float, addition: tuple
) -> None:
    base = {"airway": airway, "patient": {"weight_kg": weight, "height_cm": height}}
    before = _risk(**base)
    section, key, value = addition
    more = {k: dict(v) for k, v in base.items()}
    more.setdefault(section, {})[key] = value
    after = _risk(**more)
    assert after.index >= before.index - 1e-9
    assert after.level >= before.level


@settings(max_examples=100, deadline=None)
@given(weight=st.floats(45, 250), height=st.floats(145, 190), extra=st.floats(0.5, 40))
def test_heavier_never_lowers_index(weight: float, height: float, extra: float) -> None:
    a = _risk(patient={"weight_kg": weight, "height_cm": height})
    b = _risk(patient={"weight_kg": min(300, weight + extra), "height_cm": height})
    assert b.index >= a.index - 1e-9


def test_present_factor_result_keeps_its_catalogue_fields() -> None:
    """A present factor's result is built by position from the prebuilt absent one: its
    catalogue fields must land in their own places. Mallampati 3: relative risk 7.58
    (Rocke 1992); BMI 95 kg at 160 cm is 37.1."""
    from airway.engine.factors import CATALOGUE

    a = make(patient={"weight_kg": 95, "height_cm": 160}, airway={"mallampati": 3})
    risk = score(a, body_size(95, 160, None))
    by_id = {f.id: f for f in CATALOGUE}
    for r in (x for x in risk.factors if x.present):
        f = by_id[r.id]
        assert (r.label, r.role, r.kind, r.weight, r.source, r.prepares) == (
            f.label,
            f.role,
            f.kind,
            f.weight,
            f.evidence.source,
            f.prepares,
        )
        assert r.evidence == f.evidence.describe() and r.basis == f.evidence.basis
    mp3 = next(r for r in risk.factors if r.id == "mallampati_3")
    assert mp3.present and mp3.weight == 7.58 and mp3.source == "rocke1992"
    assert mp3.contribution == round(math.log(7.58), 4)
    bmi = next(r for r in risk.factors if r.id == "bmi")
    assert bmi.detail.startswith("BMI 37.1")
