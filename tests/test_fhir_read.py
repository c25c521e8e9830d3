"""An assessment read from a FHIR Bundle: other systems' units, the latest value, conflicts
refused, nothing dropped silently, and the tool's own export read back exactly."""

import json
from pathlib import Path
from typing import Any

import pytest
from hypothesis import given
from hypothesis import strategies as st

from airway import plan_for
from airway.cli import app
from airway.engine.plan import assessment_digest
from airway.errors import InputError
from airway.loading import assessment_from_mapping, parse_assessment
from airway.render.fhir import render_fhir
from airway.render.json import render_json

from .conftest import AIRWAY_FINDINGS, EXAMPLES

# The FHIR R4 specification's example Observations (values as published): body weight
# 'observation-example', 185 [lb_av] on 2016-03-28, coded LOINC 29463-7 among others;
# body height 'observation-example-body-height', 66.899999999999991 [in_i] on 1999-07-02.
SPEC_BODY_WEIGHT: dict[str, Any] = {
    "resourceType": "Observation",
    "id": "example",
    "status": "final",
    "category": [
        {
            "coding": [
                {
                    "system": "http://terminology.hl7.org/CodeSystem/observation-category",
                    "code": "vital-signs",
                }
            ]
        }
    ],
    "code": {
        "coding": [
            {"system": "http://loinc.org", "code": "29463-7", "display": "Body Weight"},
            {"system": "http://loinc.org", "code": "3141-9", "display": "Body weight Measured"},
            {"system": "http://snomed.info/sct", "code": "27113001", "display": "Body weight"},
        ]
    },
    "subject": {"reference": "Patient/example"},
    "effectiveDateTime": "2016-03-28",
    "valueQuantity": {
        "value": 185,
        "unit": "lbs",
        "system": "http://unitsofmeasure.org",
        "code": "[lb_av]",
    },
}
SPEC_BODY_HEIGHT: dict[str, Any] = {
    "resourceType": "Observation",
    "id": "body-height",
    "status": "final",
    "code": {
        "coding": [{"system": "http://loinc.org", "code": "8302-2", "display": "Body height"}]
    },
    "subject": {"reference": "Patient/example"},
    "effectiveDateTime": "1999-07-02",
    "valueQuantity": {
        "value": 66.899999999999991,
        "unit": "in",
        "system": "http://unitsofmeasure.org",
        "code": "[in_i]",
    },
}


def _bundle(*resources: dict[str, Any], kind: str = "searchset") -> dict[str, Any]:
    return {"resourceType": "Bundle", "type": kind, "entry": [{"resource": r} for r in resources]}


def _observation(code: str, value: float, unit: str, day: str, **extra: Any) -> dict[str, Any]:
    return {
        "resourceType": "Observation",
        "status": "final",
        "code": {"coding": [{"system": "http://loinc.org", "code": code}]},
        "effectiveDateTime": day,
        "valueQuantity": {"value": value, "system": "http://unitsofmeasure.org", "code": unit},
        **extra,
    }


def _read(bundle: dict[str, Any], notes: list[str] | None = None):
    return parse_assessment(json.dumps(bundle), "record.json", notes=notes)


def test_the_specifications_weight_in_pounds_and_height_in_inches_are_read_in_kg_and_cm() -> None:
    notes: list[str] = []
    a = _read(_bundle(SPEC_BODY_WEIGHT, SPEC_BODY_HEIGHT), notes)
    # 185 lb x 0.45359237 = 83.91 kg; 66.9 in x 2.54 = 169.93 cm (UCUM definitions).
    assert a.patient.weight_kg == pytest.approx(83.91, abs=0.005)
    assert a.patient.height_cm == pytest.approx(169.93, abs=0.005)
    assert a.assessed_on.isoformat() == "2016-03-28"  # the latest finding's date
    assert any("185 [lb_av] read as 83.91 kg" in n for n in notes)
    # The height is 17 years older than the weight: said, so that no one plans on it unaware.
    assert any(n.startswith("record.json: Height is dated 1999-07-02") for n in notes)


def test_the_latest_observation_of_a_code_is_used() -> None:
    notes: list[str] = []
    a = _read(
        _bundle(
            _observation("29463-7", 90, "kg", "2026-10-01"),
            _observation("29463-7", 94, "kg", "2026-11-20"),
            _observation("29463-7", 92, "kg", "2026-11-02"),
        ),
        notes,
    )
    assert a.patient.weight_kg == 94
    assert any("latest of 3" in n for n in notes)


def test_two_observations_of_one_code_and_date_that_disagree_are_refused_both_named() -> None:
    bundle = _bundle(
        _observation("29463-7", 90, "kg", "2026-11-02"),
        _observation("29463-7", 96, "kg", "2026-11-02T15:00:00+00:00"),
    )
    with pytest.raises(InputError) as caught:
        _read(bundle)
    message = str(caught.value)
    assert "entry[0]" in message and "entry[1]" in message and "same date" in message


def test_a_unit_that_cannot_be_converted_is_refused_with_its_code_and_unit() -> None:
    bundle = _bundle(_observation("29463-7", 13, "[stone_av]", "2026-11-02"))
    with pytest.raises(InputError) as caught:
        _read(bundle)
    assert "29463-7" in str(caught.value) and "[stone_av]" in str(caught.value)


def test_observations_not_used_are_listed_never_silently_dropped() -> None:
    notes: list[str] = []
    blood_pressure = _observation("8480-6", 150, "mm[Hg]", "2026-11-02")
    retracted = _observation("718-7", 70, "g/L", "2026-11-02", status="entered-in-error")
    a = _read(
        _bundle(_observation("29463-7", 80, "kg", "2026-11-02"), blood_pressure, retracted), notes
    )
    assert a.patient.haemoglobin_g_per_l is None  # an entry in error is never a value
    listed = " ".join(notes)
    assert "LOINC 8480-6" in listed and "entered-in-error" in listed


def test_laboratory_units_are_converted() -> None:
    """Haemoglobin in g/dL and platelets in 10*3/uL, as the US Core examples give them."""
    a = _read(
        _bundle(
            _observation("29463-7", 80, "kg", "2026-11-02"),
            _observation("718-7", 11.2, "g/dL", "2026-11-02"),
            _observation("777-3", 85, "10*3/uL", "2026-11-02"),
            _observation("49051-6", 254, "d", "2026-11-02"),
        )
    )
    assert a.patient.haemoglobin_g_per_l == pytest.approx(112)
    assert a.preeclampsia.platelets_10e9_per_l == 85
    assert a.patient.gestation_weeks == pytest.approx(36.29, abs=0.005)  # 36+2


@pytest.mark.parametrize(
    ("bundle", "said"),
    [
        (_bundle(_observation("8302-2", 160, "cm", "2026-11-02")), "body weight"),
        (_bundle(_observation("29463-7", 80, "kg", "2026-11-02"), kind="document"), "type"),
        (
            _bundle(
                _observation("29463-7", 80, "kg", "2026-11-02", subject={"reference": "Patient/a"}),
                _observation("8302-2", 160, "cm", "2026-11-02", subject={"reference": "Patient/b"}),
            ),
            "more than one subject",
        ),
        (
            _bundle(
                _observation("29463-7", 80, "kg", "2026-11-02"),
                {"resourceType": "Patient"},
                {"resourceType": "Patient"},
            ),
            "more than one Patient",
        ),
        (_bundle({"resourceType": "Observation", "status": "final"}), "code"),
        (_bundle({"resourceType": "NotAResource"}), "not a valid FHIR"),
    ],
    ids=["no-weight", "document", "two-subjects", "two-patients", "no-code", "unknown-type"],
)
def test_bundles_that_cannot_be_one_womans_assessment_are_refused(bundle, said: str) -> None:
    with pytest.raises(InputError) as caught:
        _read(bundle)
    assert said in str(caught.value)


@pytest.mark.parametrize("example", EXAMPLES, ids=lambda p: p.name)
def test_an_exported_bundle_reads_back_to_the_same_assessment_and_plan(example: Path) -> None:
    from airway import read_assessment

    plan = plan_for(read_assessment(example))
    again = parse_assessment(render_fhir(plan), "export.json")
    assert assessment_digest(again) == plan.input_sha256
    assert render_json(plan_for(again)) == render_json(plan)


PATIENT = st.fixed_dictionaries(
    {"weight_kg": st.floats(30, 300, allow_nan=False)},
    optional={
        "height_cm": st.floats(120, 210),
        "age_years": st.integers(12, 65),
        "gestation_weeks": st.floats(20, 44),
        "in_labour": st.booleans(),
        "haemoglobin_g_per_l": st.floats(40, 200),
    },
)
PREECLAMPSIA = st.fixed_dictionaries(
    {},
    optional={
        "status": st.sampled_from(["none", "without_severe_features", "with_severe_features"]),
        "signs": st.lists(st.sampled_from(["voice_change", "stridor", "new_snoring"])),
        "platelets_10e9_per_l": st.floats(1, 1000),
    },
)
CONTEXT = st.fixed_dictionaries(
    {},
    optional={
        "urgency_category": st.integers(1, 4),
        "end_tidal_o2": st.floats(0.5, 0.95),
        "maternal_arrest": st.booleans(),
        "anaesthetist": st.sampled_from(["senior", "junior"]),
    },
)
IDENTITY = st.fixed_dictionaries(
    {}, optional={"name": st.just("Example Woman"), "date_of_birth": st.just("02/03/1990")}
)


@given(
    patient=PATIENT,
    airway=AIRWAY_FINDINGS,
    preeclampsia=PREECLAMPSIA,
    context=CONTEXT,
    identity=IDENTITY,
    assessed_on=st.none() | st.dates().map(lambda d: d.isoformat()),
)
def test_the_round_trip_keeps_the_input_digest(
    patient, airway, preeclampsia, context, identity, assessed_on
) -> None:
    data = {
        "patient": patient,
        "airway": airway,
        "preeclampsia": preeclampsia,
        "context": context,
        "identity": identity,
    }
    if assessed_on:
        data["assessed_on"] = assessed_on
    assessment = assessment_from_mapping(data)
    plan = plan_for(assessment)
    again = parse_assessment(render_fhir(plan), "export.json")
    assert assessment_digest(again) == assessment_digest(assessment)


def test_the_command_line_plans_from_a_bundle_and_says_what_it_converted(
    runner, tmp_path: Path
) -> None:
    record = tmp_path / "record.json"
    record.write_text(json.dumps(_bundle(SPEC_BODY_WEIGHT, SPEC_BODY_HEIGHT)), "utf-8")
    result = runner.invoke(app, ["plan", str(record), "-f", "json"])
    assert result.exit_code == 0, result.output
    assert json.loads(result.stdout)["assessment"]["patient"]["weight_kg"] == pytest.approx(83.91)
    assert "read as 83.91 kg" in result.stderr


def test_the_command_line_refuses_a_bad_bundle_with_exit_2(runner, tmp_path: Path) -> None:
    record = tmp_path / "record.json"
    bad = _bundle(_observation("29463-7", 13, "[stone_av]", "2026-11-02"))
    record.write_text(json.dumps(bad), "utf-8")
    result = runner.invoke(app, ["plan", str(record)])
    assert result.exit_code == 2
    assert "[stone_av]" in result.stderr and "Traceback" not in result.output


def test_plan_f_fhir_writes_a_bundle_that_compare_and_verify_read(runner, tmp_path: Path) -> None:
    example = str(EXAMPLES[0])
    bundle, pdf = tmp_path / "plan.fhir.json", tmp_path / "plan.pdf"
    made = runner.invoke(app, ["plan", example, "-f", "fhir", "-o", str(bundle), "--pdf", str(pdf)])
    assert made.exit_code == 0, made.output
    assert '"DocumentReference"' in bundle.read_text("utf-8")
    assert runner.invoke(app, ["verify", str(pdf), str(bundle)]).exit_code == 0
    compared = runner.invoke(app, ["compare", example, str(bundle), "-f", "json"])
    assert compared.exit_code == 0
    assert json.loads(compared.stdout)["plan_changed"] is False


def test_identifiers_from_a_bundle_never_appear_in_messages(runner, tmp_path: Path) -> None:
    patient = {
        "resourceType": "Patient",
        "name": [{"text": "Secret Name"}],
        "identifier": [{"value": "RN-998877"}],
    }
    record = tmp_path / "record.json"
    weight = _observation("29463-7", 500, "kg", "2026-11-02")  # out of range: refused
    record.write_text(json.dumps(_bundle(patient, weight)), "utf-8")
    result = runner.invoke(app, ["plan", str(record)])
    assert result.exit_code == 2
    assert "Secret" not in result.output and "998877" not in result.output


CODINGS = st.sampled_from(
    [("http://loinc.org", c) for c in ("29463-7", "8302-2", "49051-6", "777-3", "718-7", "30525-0")]
    + [
        ("https://airway.invalid/fhir/CodeSystem/airway", c)
        for c in (
            "mallampati-class",
            "short-neck",
            "neck-movement",
            "oedema-stridor",
            "assessment-label",
        )
    ]
    + [("http://snomed.info/sct", "27113001"), (None, None)]
)
VALUES = st.one_of(
    st.fixed_dictionaries(
        {
            "valueQuantity": st.fixed_dictionaries(
                {"value": st.one_of(st.integers(-5, 10**6), st.floats(-1e6, 1e6, allow_nan=False))},
                optional={
                    "code": st.sampled_from(
                        ["kg", "[lb_av]", "cm", "[in_i]", "d", "g/dL", "furlong"]
                    ),
                    "system": st.sampled_from(["http://unitsofmeasure.org", "urn:other"]),
                },
            )
        }
    ),
    st.fixed_dictionaries({"valueBoolean": st.booleans()}),
    st.fixed_dictionaries({"valueInteger": st.integers(-10, 10)}),
    st.fixed_dictionaries({"valueString": st.text(max_size=30)}),
    st.fixed_dictionaries(
        {
            "valueCodeableConcept": st.fixed_dictionaries(
                {
                    "coding": st.lists(
                        st.fixed_dictionaries(
                            {"code": st.sampled_from(["neck-movement.reduced", "x"])}
                        ),
                        max_size=2,
                    )
                }
            )
        }
    ),
    st.just({}),
)


@st.composite
def hostile_observation(draw):  # type: ignore[no-untyped-def]
    system, code = draw(CODINGS)
    coding = {"code": code} if system is None else {"system": system, "code": code}
    observation = {
        "resourceType": "Observation",
        "status": draw(
            st.sampled_from(["final", "amended", "preliminary", "entered-in-error", "bogus"])
        ),
        "code": {"coding": [coding]} if code else {"text": "unnamed"},
        **draw(VALUES),
    }
    if draw(st.booleans()):
        observation["effectiveDateTime"] = draw(
            st.sampled_from(["2026-11-02", "2026-11", "2026-11-02T09:00:00Z", "yesterday"])
        )
    return observation


@given(
    st.lists(hostile_observation(), max_size=8),
    st.sampled_from(["collection", "searchset", "batch"]),
)
def test_any_bundle_is_an_assessment_or_a_clear_refusal(observations, kind) -> None:
    """Whatever the record sends, the reader gives an assessment or an InputError that
    names a place, never another exception."""
    bundle = json.dumps(
        {"resourceType": "Bundle", "type": kind, "entry": [{"resource": o} for o in observations]}
    )
    try:
        parse_assessment(bundle, "record.json")
    except InputError as exc:
        assert exc.problems and all(p.where for p in exc.problems)
