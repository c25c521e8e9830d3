"""Scoring: ratios per finding, one finding per anatomy, normal findings, levels."""

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


LEAN = {"height_cm": 170, "weight_kg": 65}  # BMI 22.5: body size adds nothing


def _part(r, fid: str) -> float:  # type: ignore[no-untyped-def]
    return next(f.contribution for f in r.factors if f.id == fid)


def test_mallampati_classes_keep_rockes_ratios_between_them() -> None:
    """Rocke 1992: RR 3.23, 7.58 and 11.3 against class 1. Centred on the average at
    term, the classes keep those ratios to one another, class 1 lowers the index and
    class 2 (the commonest) barely moves it."""
    parts = {
        c: _part(_risk(airway={"mallampati": c}, patient=LEAN), f"mallampati_{c}")
        for c in (1, 2, 3, 4)
    }
    assert parts[1] < 0 < parts[3] < parts[4] and abs(parts[2]) < 0.25
    for c, rr in ((2, 3.23), (3, 7.58), (4, 11.3)):
        assert math.exp(parts[c] - parts[1]) == __import__("pytest").approx(rr, rel=1e-3)


def test_findings_of_different_anatomies_add() -> None:
    """Mallampati 3 (the view) and a short neck (Rocke 1992 RR 5.01, from memory) add."""
    r = _risk(airway={"mallampati": 3, "short_neck": True}, patient=LEAN)
    alone = _risk(airway={"mallampati": 3}, patient=LEAN)
    assert r.index == round(alone.index + math.log(5.01), 4)


def test_findings_of_one_anatomy_count_once_the_strongest() -> None:
    """Upper lip bite class 3 (Detsky 2019 LR+ 14), limited jaw protrusion (LR+ 5.5) and
    a receding mandible describe one small mandible: only the strongest counts."""
    r = _risk(
        airway={"upper_lip_bite": 3, "jaw_protrusion": "limited", "receding_mandible": True},
        patient=LEAN,
    )
    assert r.index == round(math.log(14.0), 4)
    counted = [f.id for f in r.factors if f.counted and f.domain == "jaw"]
    assert counted == ["upper_lip_bite_3"]


def test_snoring_and_new_snoring_are_not_counted_twice() -> None:
    """Snoring (Detsky 2019 LR+ 3.4) and the oedema sign 'new snoring' share one anatomy."""
    both = _risk(history={"snoring": True}, preeclampsia={"signs": ["new_snoring"]}, patient=LEAN)
    assert both.index == round(math.log(3.4), 4)


def test_a_normal_finding_lowers_the_index() -> None:
    """Detsky 2019 negative likelihood ratios: thyromental distance 0.63."""
    r = _risk(airway={"thyromental_cm": 7.5}, patient=LEAN)
    assert r.index == round(math.log(0.63), 4)


def test_a_thorough_normal_examination_ends_no_higher_than_a_brief_one() -> None:
    normal = {
        "mallampati": 2,
        "thyromental_cm": 7.5,
        "sternomental_cm": 15,
        "mouth_opening_cm": 5,
        "upper_lip_bite": 1,
        "neck_movement": "normal",
        "jaw_protrusion": "normal",
        "short_neck": False,
        "receding_mandible": False,
    }
    brief = _risk(airway={"mallampati": 2}, patient=LEAN)
    thorough = _risk(airway=normal, history={"snoring": False}, patient=LEAN)
    assert thorough.index < brief.index and thorough.level <= brief.level


def test_mallampati_3_or_4_with_one_rocke_feature_ranks_above_either_alone() -> None:
    """Rocke 1992 (quoted, from memory): class 3-4 with a short neck, receding mandible or
    protruding incisors made difficult laryngoscopy very likely. Calibrated, such a woman
    stands above class 3-4 alone and at airway level 2 at least."""
    for mp in (3, 4):
        alone = _risk(airway={"mallampati": mp}, patient=LEAN)
        for feature in ("short_neck", "receding_mandible", "protruding_incisors"):
            r = _risk(airway={"mallampati": mp, feature: True}, patient=LEAN)
            assert r.level >= 2 and r.index > alone.index, (mp, feature)


def test_mallampati_1_lean_woman_is_level_1() -> None:
    assert _risk(airway={"mallampati": 1}, patient=LEAN).level == 1


def test_overrides_force_level_4() -> None:
    assert _risk(preeclampsia={"signs": ["stridor"]}).level == 4
    assert _risk(history={"intubation": "failed"}).level == 4
    r = _risk(history={"intubation": "difficult"})
    assert r.level == 4 and r.index_level == 1 and r.overrides == ("Previous difficult intubation",)


def test_airway_oedema_signs_raise_the_level_to_3_at_least() -> None:
    r = _risk(preeclampsia={"status": "with_severe_features", "signs": ["voice_change"]})
    assert r.level >= 3 and r.floors == ("Signs of airway oedema",)


def test_not_assessed_is_listed_not_counted_and_its_reach_is_said() -> None:
    r = _risk()
    assert "Mallampati class" in r.not_assessed
    assert all(f.contribution == 0 for f in r.factors if f.present is None)
    # Intubation history not asked: a previous failed intubation could force level 4.
    assert r.unassessed_range[1] == 4 and r.unassessed_range[0] <= r.level
    full = _risk(
        airway={"mallampati": 1, "thyromental_cm": 8, "upper_lip_bite": 1},
        history={"intubation": "none"},
    )
    assert full.unassessed_range[0] <= full.level <= full.unassessed_range[1]


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


@settings(max_examples=200, deadline=None)
@given(airway=AIRWAY_FINDINGS, weight=st.floats(40, 250), height=st.floats(150, 190))
def test_a_missing_height_never_lowers_the_level(airway: dict, weight: float, height: float):
    """Planned without a height, the index and level are never below the same woman's
    with any height from 150 to 190 cm (no BMI contribution lost)."""
    unknown = _risk(airway=airway, patient={"weight_kg": weight, "height_cm": None})
    known = _risk(airway=airway, patient={"weight_kg": weight, "height_cm": height})
    assert unknown.index >= known.index - 1e-9 and unknown.level >= known.level
