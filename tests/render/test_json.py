"""The JSON contract (docs/json-contract.md): its fields and its bytes."""

import json

import pytest
from pydantic import ValidationError

from airway import plan_for, read_assessment
from airway.engine.plan_model import plan_from_data
from airway.render.json import dumps, render_json

from ..conftest import EXAMPLES, make

# The plan's top-level fields as docs/json-contract.md lists them: fields are added,
# never renamed or removed (a rename must keep the old name as an alias).
CONTRACT_FIELDS = {
    "assessment",
    "body",
    "cautions",
    "changes_since",
    "checklists",
    "decision",
    "doses",
    "equipment",
    "generated_by",
    "input_sha256",
    "not_assessed",
    "oxygenation",
    "preparation",
    "risk",
    "steps",
    "warnings",
}


def test_every_documented_field_is_written() -> None:
    data = json.loads(render_json(plan_for(read_assessment(EXAMPLES[0]))))
    assert set(data) >= CONTRACT_FIELDS


def test_bytes_are_sorted_two_space_utf8_with_a_newline() -> None:
    """The documented form: keys sorted, two-space indent, UTF-8 (not \\u escapes)."""
    plan = plan_for(make(identity={"name": "Zoë Ní Bhriain"}))
    text = render_json(plan)
    assert text == json.dumps(json.loads(text), sort_keys=True, indent=2, ensure_ascii=False) + "\n"
    assert "Zoë Ní Bhriain" in text


def test_plan_reads_back_to_the_same_bytes() -> None:
    plan = plan_for(read_assessment(EXAMPLES[0]))
    text = render_json(plan)
    assert dumps(json.loads(text)) == text


def test_json_holds_every_field_of_the_plan() -> None:
    """Read back through pydantic's validator of the plan model, each example's JSON
    gives the plan it was written from: no field lost, none renamed, none altered."""
    for path in EXAMPLES:
        plan = plan_for(read_assessment(path))
        assert plan_from_data(json.loads(render_json(plan))) == plan


def test_a_plan_with_a_field_missing_or_added_is_refused() -> None:
    data = json.loads(render_json(plan_for(read_assessment(EXAMPLES[0]))))
    del data["risk"]["level"]
    with pytest.raises(ValidationError):
        plan_from_data(data)
    data = json.loads(render_json(plan_for(read_assessment(EXAMPLES[0]))))
    data["equipment"]["unknown"] = 1
    with pytest.raises(ValidationError):
        plan_from_data(data)
