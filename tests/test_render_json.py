"""The JSON contract's bytes: the fast writer equals the standard library's form.

Reference: Python's ``json.dumps(data, sort_keys=True, indent=2, ensure_ascii=False)``,
the form the README documents and earlier plans were written in.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from hypothesis import given
from hypothesis import strategies as st
from pydantic import ValidationError

from airway import build_plan, read_assessment
from airway.clinic import read_clinic_list
from airway.plan_model import plain, plan_from_data
from airway.render_json import dumps, render_json, standard_json

from .conftest import EXAMPLES

ROOT = Path(__file__).resolve().parent.parent


def test_examples_write_the_standard_bytes() -> None:
    for path in EXAMPLES:
        plan = build_plan(read_assessment(path))
        assert render_json(plan) == standard_json(plain(plan))


def test_file_bytes_are_the_text_in_utf8() -> None:
    """A clinic list writes plans as bytes straight from the encoder: the same bytes
    as the text of `plan -f json`, encoded."""
    from airway.render_json import dumps_bytes, render_json_bytes

    for path in EXAMPLES:
        plan = build_plan(read_assessment(path))
        assert render_json_bytes(plan) == render_json(plan).encode("utf-8")
    odd = {"tiny": 2.5e-05, "name": "Zoë"}  # written by the standard library
    assert dumps_bytes(odd) == standard_json(odd).encode("utf-8")


def test_every_clinic_list_plan_writes_the_standard_bytes() -> None:
    rows = read_clinic_list((ROOT / "examples" / "clinic-list.csv").read_text("utf-8"), "x")
    plans = [build_plan(r.assessment) for r in rows if r.assessment is not None]
    assert len(plans) > 150
    for plan in plans:
        assert render_json(plan) == standard_json(plain(plan))


def test_plan_reads_back_to_the_same_bytes() -> None:
    plan = build_plan(read_assessment(EXAMPLES[0]))
    text = render_json(plan)
    assert dumps(json.loads(text)) == text


def test_json_holds_every_field_of_the_plan() -> None:
    """Read back through pydantic's validator of the plan model, each example's JSON
    gives the plan it was written from: no field lost, none renamed, none altered."""
    for path in EXAMPLES:
        plan = build_plan(read_assessment(path))
        assert plan_from_data(json.loads(render_json(plan))) == plan


def test_a_plan_with_a_field_missing_or_added_is_refused() -> None:
    data = json.loads(render_json(build_plan(read_assessment(EXAMPLES[0]))))
    del data["risk"]["level"]
    with pytest.raises(ValidationError):
        plan_from_data(data)
    data = json.loads(render_json(build_plan(read_assessment(EXAMPLES[0]))))
    data["equipment"]["unknown"] = 1
    with pytest.raises(ValidationError):
        plan_from_data(data)


SCALARS = (
    st.none()
    | st.booleans()
    | st.integers(min_value=-(2**70), max_value=2**70)
    | st.floats(allow_nan=True, allow_infinity=True)
    | st.floats(min_value=-1e-3, max_value=1e-3)  # near the 1e-4 switch to exponents
    | st.text()
)
DOCUMENTS = st.recursive(
    SCALARS,
    lambda inner: (
        st.lists(inner, max_size=4)
        | st.lists(inner, max_size=3).map(tuple)
        | st.dictionaries(st.text(), inner, max_size=4)
    ),
    max_leaves=25,
)


@given(DOCUMENTS)
def test_random_documents_write_the_standard_bytes(doc: object) -> None:
    assert dumps(doc) == standard_json(doc)


@given(st.dictionaries(st.text(), DOCUMENTS, min_size=1, max_size=6))
def test_random_objects_write_the_standard_bytes(doc: dict[str, object]) -> None:
    # Objects take the fast path unless a number needs an exponent.
    assert dumps(doc) == standard_json(doc)


def test_lone_surrogate_falls_back_to_the_standard_writer() -> None:
    assert dumps({"a": "\ud800"}) == standard_json({"a": "\ud800"})


def test_floats_of_every_size_write_the_standard_bytes() -> None:
    """Decade by decade from 1e-12 to 1e20, where Python's float repr changes form."""
    mantissas = (1.0, 1.5, 2.5, 3.14159, 9.99, 9.999999)
    for exponent in range(-12, 21):
        for m in mantissas:
            for value in (m * 10.0**exponent, -m * 10.0**exponent, round(m * 10.0**exponent, 1)):
                doc = {"value": value, "list": [value, {"nested": value}]}
                assert dumps(doc) == standard_json(doc), value


def test_odd_floats_inside_the_plans_records_write_the_standard_bytes() -> None:
    """Each kind of record has its own writer, chosen by its fields' declared types; a
    float the two encoders write apart (2.5e-05, 1e+17) in a number field, a curve point
    or a nested record still gives json.dumps's bytes."""
    plan = build_plan(read_assessment(EXAMPLES[0]))
    dose = plan.doses[0]._replace(dose_mg_low=2.5e-05, volume_ml_high=1e17)
    oxygenation = plan.oxygenation._replace(curve=((0, 99.0), (10, 2.5e-05)))
    body = plan.body._replace(weight_kg=1e-05)
    for odd in (
        plan._replace(doses=(dose, *plan.doses[1:])),
        plan._replace(oxygenation=oxygenation),
        plan._replace(body=body),
    ):
        assert render_json(odd) == standard_json(plain(odd))
        assert "e-05" in render_json(odd) or "e+17" in render_json(odd)
