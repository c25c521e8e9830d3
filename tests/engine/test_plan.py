"""The plan: sequence, decision, cautions, reproducibility."""

from __future__ import annotations

import json

import pytest

from airway import plan_for, read_assessment
from airway.engine.decision import URGENCY_POINTS
from airway.engine.guidance import MAX_INTUBATION_ATTEMPTS
from airway.engine.plan import CAUTION_AID, CAUTION_REASSESS
from airway.render.json import render_json

from ..conftest import EXAMPLES, make


def test_attempt_limit_from_obstetric_guidance() -> None:
    """OAA/DAS 2015 (Mushambi): at most two intubation attempts."""
    assert MAX_INTUBATION_ATTEMPTS == 2
    step = next(s for s in plan_for(make()).steps if s.id == "intubate")
    assert any("At most 2 attempts" in a for a in step.actions)


def test_cricoid_force_from_memory_of_guidance() -> None:
    """10 N awake rising to 30 N (Vanner & Asai 1999; OAA/DAS 2015) - from memory."""
    step = next(s for s in plan_for(make()).steps if s.id == "cricoid")
    assert "10 N" in step.actions[0] and "30 N" in step.actions[0]


def test_sequence_order_and_values_filled_in() -> None:
    p = plan_for(make(preeclampsia={"signs": ["voice_change"]}))
    phases = [s.phase for s in p.steps]
    order = [
        "before induction",
        "first attempt",
        "failed intubation",
        "wake or proceed",
        "can't intubate, can't oxygenate",
        "after the event",
    ]
    assert [ph for ph in dict.fromkeys(phases)] == order
    t = p.equipment.tracheal_tube_mm
    text = json.dumps([s._asdict() for s in p.steps])
    assert f"{t.first:.1f} mm" in text and f"size {p.equipment.supraglottic_size:g}" in text
    assert f"{p.dose('sugammadex').dose_mg_low:g} mg" in text


def test_decision_factors_are_the_guidance_list() -> None:
    """OAA/DAS 2015 Table 1 lists urgency, seniority, obesity, surgical complexity,
    aspiration risk and the difficulty of an alternative technique."""
    names = {f.name for f in plan_for(make()).decision.factors}
    for wanted in (
        "Maternal or fetal condition (urgency)",
        "Anaesthetist",
        "Obesity",
        "Surgical complexity",
        "Aspiration risk",
        "Alternative technique (regional or awake)",
    ):
        assert wanted in names


def test_category_1_leans_to_proceed_category_4_to_wake() -> None:
    base = {
        "anaesthetist": "intermediate",
        "surgical_complexity": "moderate",
        "aspiration_risk": "moderate",
        "regional_alternative": "difficult",
    }
    p1 = plan_for(make(context=base | {"urgency_category": 1}, patient={"weight_kg": 80}))
    p4 = plan_for(make(context=base | {"urgency_category": 4}, patient={"weight_kg": 80}))
    assert p1.decision.recommendation == "proceed" and p4.decision.recommendation == "wake"


def test_clinic_plan_shows_each_category() -> None:
    d = plan_for(make()).decision
    assert d.recommendation == "decide_on_the_day"
    assert set(d.if_category) == {str(k) for k in URGENCY_POINTS}


def test_cautions_never_empty_and_say_aid_and_reassess() -> None:
    for path in EXAMPLES:
        p = plan_for(read_assessment(path))
        assert CAUTION_AID in p.cautions and CAUTION_REASSESS in p.cautions


def test_improbable_bmi_warns_not_refuses() -> None:
    p = plan_for(make(patient={"weight_kg": 200, "height_cm": 160}))  # BMI 78
    assert any("above 70" in w for w in p.warnings)


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.name)
def test_json_is_byte_identical_and_has_contract(path) -> None:  # type: ignore[no-untyped-def]
    a, b = (
        render_json(plan_for(read_assessment(path))),
        render_json(plan_for(read_assessment(path))),
    )
    assert a == b
    data = json.loads(a)
    assert 1 <= data["risk"]["level"] <= 4
    for key in ("label", "index", "factors", "overrides"):
        assert key in data["risk"]
    for f in data["risk"]["factors"]:
        assert {"id", "present", "weight", "source"} <= set(f)
    for key in ("bmi", "ideal_weight_kg", "lean_weight_kg", "adjusted_weight_kg"):
        assert key in data["body"]
    assert set(data["equipment"]["tracheal_tube_mm"]) >= {"first", "backup", "smallest"}
    assert data["equipment"]["front_of_neck_tube_mm"] == 6.0
    assert {d["drug"] for d in data["doses"]} == {
        "propofol",
        "thiopental",
        "suxamethonium",
        "rocuronium",
        "sugammadex",
    }
    assert data["steps"] and data["cautions"]
    assert data["generated_by"]["tool"] == "airway" and len(data["input_sha256"]) == 64


def test_digest_ignores_file_format(tmp_path) -> None:  # type: ignore[no-untyped-def]
    toml = tmp_path / "a.toml"
    toml.write_text("[patient]\nweight_kg = 80\nheight_cm = 165\n")
    js = tmp_path / "a.json"
    js.write_text('{"patient": {"height_cm": 165, "weight_kg": 80}}')
    assert (
        plan_for(read_assessment(toml)).input_sha256 == plan_for(read_assessment(js)).input_sha256
    )
