"""Wake or proceed, row by row of the OAA/DAS 2015 table of factors.

Source: Mushambi MC et al. Obstetric Anaesthetists' Association and Difficult
Airway Society guidelines for the management of difficult and failed tracheal
intubation in obstetrics. Anaesthesia 2015;70:1286-1306, Table 1. The factor list
is published; which finding sits at which end of its row is from memory of the
table (reference notes, section 6).
"""

from __future__ import annotations

import pytest

from airway.engine.body import body_size
from airway.engine.decision import decide

from ..conftest import make


def _decide(**sections: dict):  # type: ignore[no-untyped-def]
    a = make(**sections)
    return decide(a, body_size(a.patient.weight_kg, a.patient.height_cm))


def _row(d, name: str):  # type: ignore[no-untyped-def]
    return next(f for f in d.factors if f.name.startswith(name))


# (row, the wake end, the proceed end): each as assessment sections.
TABLE = [
    (
        "Maternal or fetal condition",
        {"context": {"urgency_category": 4}},
        {"context": {"urgency_category": 1}},
    ),
    (
        "Anaesthetist",
        {"context": {"anaesthetist": "junior"}},
        {"context": {"anaesthetist": "senior"}},
    ),
    (
        "Obesity",
        {"patient": {"weight_kg": 150, "height_cm": 160}},  # BMI 58.6, super-morbid
        {"patient": {"weight_kg": 62, "height_cm": 165}},  # BMI 22.8, normal
    ),
    (
        "Surgical complexity",
        {"context": {"surgical_complexity": "high"}},
        {"context": {"surgical_complexity": "low"}},
    ),
    (
        "Aspiration risk",
        {"context": {"aspiration_risk": "high"}},
        {"context": {"aspiration_risk": "low"}},
    ),
    (
        "Alternative technique",
        {"context": {"regional_alternative": "feasible"}},
        {"context": {"regional_alternative": "impossible"}},
    ),
]


@pytest.mark.parametrize("row,wake_end,proceed_end", TABLE, ids=[t[0] for t in TABLE])
def test_each_row_points_as_the_guideline_grades_it(row, wake_end, proceed_end) -> None:
    wake, proceed = _row(_decide(**wake_end), row), _row(_decide(**proceed_end), row)
    assert (wake.points_to == "wake" and wake.grade == 1) or row == "Anaesthetist"
    assert proceed.points_to == "proceed" and proceed.grade == 4
    assert wake.points < 0 < proceed.points


def test_hazards_sit_at_the_wake_end_and_weigh_double() -> None:
    """After failure, laryngeal oedema or stridor and difficult mask ventilation sit at the
    wake end of their rows; foreseen before induction they already lean to waking."""
    d = _decide(preeclampsia={"signs": ["stridor"]}, history={"difficult_mask_ventilation": True})
    hazards = [f for f in d.factors if f.name.startswith("Airway hazard")]
    assert len(hazards) == 2 and all(f.grade == 1 and f.points == -4 for f in hazards)


FAVOURABLE = {
    "anaesthetist": "senior",
    "surgical_complexity": "low",
    "aspiration_risk": "low",
    "regional_alternative": "impossible",
}


@pytest.mark.parametrize("category", [1, 2])
def test_stridor_with_difficult_mask_ventilation_never_proceeds(category: int) -> None:
    d = _decide(
        patient={"weight_kg": 62, "height_cm": 165},
        preeclampsia={"signs": ["stridor"]},
        history={"difficult_mask_ventilation": True},
        context=FAVOURABLE | {"urgency_category": category},
    )
    assert d.recommendation == "wake" and "Two airway hazards" in d.rule


@pytest.mark.parametrize(
    "hazard",
    [
        {"preeclampsia": {"signs": ["stridor"]}},
        {"preeclampsia": {"signs": ["voice_change"]}},
        {"history": {"difficult_mask_ventilation": True}},
        {"history": {"intubation": "failed"}},
    ],
)
def test_one_hazard_is_not_outvoted_by_urgency(hazard: dict) -> None:
    d = _decide(**hazard, context=FAVOURABLE | {"urgency_category": 1})
    assert d.recommendation != "proceed"


def test_category_2_is_near_neutral() -> None:
    d = _decide(context={"urgency_category": 2})
    assert abs(_row(d, "Maternal or fetal condition").points) <= 1


def test_maternal_arrest_proceeds_whatever_else() -> None:
    d = _decide(
        preeclampsia={"signs": ["stridor"]},
        history={"difficult_mask_ventilation": True},
        context={"urgency_category": 1, "maternal_arrest": True, "anaesthetist": "junior"},
    )
    assert d.recommendation == "proceed" and "arrest" in d.rule


def test_category_1_leans_to_proceed_category_4_to_wake() -> None:
    base = {"anaesthetist": "intermediate", "surgical_complexity": "moderate"}
    assert _decide(context=base | {"urgency_category": 1}).recommendation == "proceed"
    assert _decide(context=base | {"urgency_category": 4}).recommendation == "wake"


def test_clinic_plan_with_hazards_wakes_in_every_category() -> None:
    d = _decide(preeclampsia={"signs": ["stridor"]}, history={"intubation": "failed"})
    assert d.recommendation == "decide_on_the_day"
    assert set(d.if_category.values()) == {"wake"}


def test_planned_surgery_with_an_alternative_wakes_however_favourable_the_rest() -> None:
    """Categories 3-4 sit at the wake end of the fetal row (Mushambi 2015, Table 1):
    with a regional or awake alternative, nothing weighs towards proceeding."""
    for category in (3, 4):
        d = _decide(
            context=FAVOURABLE | {"urgency_category": category, "regional_alternative": "feasible"}
        )
        assert d.recommendation == "wake", category
