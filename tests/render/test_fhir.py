"""The plan as a FHIR R4 Bundle: valid, coded, complete, and the same bytes each time."""

import base64
import hashlib
import json
from pathlib import Path

import pytest
from fhir.resources.R4B.bundle import Bundle
from fhir.resources.R4B.codesystem import CodeSystem

from airway import plan_for, read_assessment
from airway.fhir_profile import AIRWAY, CODES, LOINC, SIGN_CODES, UCUM
from airway.fields import field_specs
from airway.render.fhir import code_system, dumps_resource, render_fhir
from airway.render.pdf.plan import render_plan_pdf

from ..conftest import EXAMPLES, ROOT, make

CODE_SYSTEM_FILE = ROOT / "docs" / "fhir" / "CodeSystem-airway.json"


def _bundle(text: str) -> Bundle:
    return Bundle.model_validate(json.loads(text))


def _of_type(bundle: Bundle, kind: str) -> list:
    return [e.resource for e in bundle.entry if e.resource.get_resource_type() == kind]


def _luhn_ok(loinc: str) -> bool:
    """LOINC's mod-10 check digit (LOINC Users' Guide; the algorithm from memory)."""
    body, check = loinc.split("-")
    total = 0
    for position, digit in enumerate(reversed(body)):
        doubled = int(digit) * (2 if position % 2 == 0 else 1)
        total += doubled // 10 + doubled % 10
    return (10 - total % 10) % 10 == int(check)


@pytest.mark.parametrize("example", EXAMPLES, ids=lambda p: p.name)
def test_every_example_exports_a_bundle_the_fhir_models_accept(example: Path) -> None:
    plan = plan_for(read_assessment(example))
    bundle = _bundle(render_fhir(plan))
    assert bundle.type == "collection"
    risks = _of_type(bundle, "RiskAssessment")
    assert len(risks) == 1
    urls = {e.fullUrl for e in bundle.entry}
    assert all(url.startswith("urn:uuid:") for url in urls)
    # The basis points at Observations of this Bundle, LOINC- and project-coded.
    basis = {b.reference for b in risks[0].basis}
    assert basis <= urls
    observations = {e.fullUrl: e.resource for e in bundle.entry if e.fullUrl in basis}
    systems = {c.system for o in observations.values() for c in o.code.coding}
    assert systems == {LOINC, AIRWAY}
    assert all(o.status == "final" for o in _of_type(bundle, "Observation"))


def test_the_level_is_the_qualitative_risk_with_its_label_and_the_cautions_as_notes() -> None:
    plan = plan_for(make(history={"intubation": "failed"}))
    (risk,) = _of_type(_bundle(render_fhir(plan)), "RiskAssessment")
    qualitative = risk.prediction[0].qualitativeRisk
    assert [(c.system, c.code) for c in qualitative.coding] == [(AIRWAY, "airway-level-4")]
    assert qualitative.text == plan.risk.label
    assert plan.generated_by.rules_version in risk.method.text
    notes = " ".join(n.text for n in risk.note)
    assert "does not replace clinical judgement" in notes
    assert "Reassess the airway immediately before induction" in notes


def test_findings_not_assessed_are_absent_never_written_as_normal() -> None:
    plan = plan_for(make(airway={"mallampati": 2}))
    bundle = _bundle(render_fhir(plan))
    codes = {c.code for o in _of_type(bundle, "Observation") for c in o.code.coding}
    assert "mallampati-class" in codes
    for absent in ("thyromental-distance", "short-neck", "previous-intubation", "777-3"):
        assert absent not in codes
    assert not any(c.code.startswith("oedema-") for c in SIGN_CODES.values() if c.code in codes)


def test_units_are_ucum_and_dates_come_from_the_assessment() -> None:
    plan = plan_for(make(assessed_on="2026-11-02", preeclampsia={"platelets_10e9_per_l": 92}))
    observations = _of_type(_bundle(render_fhir(plan)), "Observation")
    quantities = [o.valueQuantity for o in observations if o.valueQuantity is not None]
    assert quantities and all(q.system == UCUM and q.code == q.unit for q in quantities)
    assert {str(o.effectiveDateTime) for o in observations} == {"2026-11-02"}
    platelets = next(o for o in observations if o.code.coding[0].code == "777-3")
    assert (float(platelets.valueQuantity.value), platelets.valueQuantity.code) == (92, "10*9/L")


def test_a_patient_only_when_identifiers_are_given_and_then_the_subject() -> None:
    anonymous = _bundle(render_fhir(plan_for(make())))
    assert _of_type(anonymous, "Patient") == []
    named = make(
        identity={"name": "Example Woman", "record_number": "X123", "date_of_birth": "1990"}
    )
    bundle = _bundle(render_fhir(plan_for(named)))
    (patient,) = _of_type(bundle, "Patient")
    url = next(e.fullUrl for e in bundle.entry if e.resource is patient)
    assert all(o.subject.reference == url for o in _of_type(bundle, "Observation"))
    assert _of_type(bundle, "RiskAssessment")[0].subject.reference == url


def test_the_same_assessment_gives_the_same_bytes_and_carries_its_digest() -> None:
    example = read_assessment(EXAMPLES[0])
    first, second = render_fhir(plan_for(example)), render_fhir(plan_for(example))
    assert first == second
    digest = plan_for(example).input_sha256
    bundle = _bundle(first)
    assert bundle.identifier.value == digest
    assert digest in {t.code for t in bundle.meta.tag}


def test_with_the_printed_plan_a_document_reference_holds_its_bytes() -> None:
    plan = plan_for(read_assessment(EXAMPLES[0]))
    pdf = render_plan_pdf(plan)
    text = render_fhir(plan, pdf)
    (document,) = _of_type(_bundle(text), "DocumentReference")
    assert document.content[0].attachment.contentType == "application/pdf"
    (written,) = [
        e["resource"]["content"][0]["attachment"]
        for e in json.loads(text)["entry"]
        if e["resource"]["resourceType"] == "DocumentReference"
    ]
    assert base64.b64decode(written["data"]) == pdf
    assert base64.b64decode(written["hash"]) == hashlib.sha1(pdf).digest()
    assert written["size"] == len(pdf)


def test_every_field_a_plan_reads_has_a_code() -> None:
    """Nothing is lost on the way to the record: every finding, the context and the label
    (the identity goes to the Patient, the date to each effectiveDateTime)."""
    written = {s.path for s in field_specs() if s.section != "identity" and s.path != "assessed_on"}
    assert written - {"preeclampsia.signs"} == set(CODES)


LOINC_CODES = {  # the code, and where it was checked (airway.fhir_profile)
    "29463-7": "FHIR R4 example observation-example",
    "8302-2": "FHIR R4 example observation-example-body-height",
    "39156-5": "FHIR BMI profile, StructureDefinition/bmi",
    "49051-6": "LOINC gestational-age group, HL7 Europe value set",
    "777-3": "US Core example cbc-platelets",
    "718-7": "US Core example cbc",
    "30525-0": "HL7 Terminology v3-LOINCObservationActContextAgeDefinitionCode",
}
# UCUM codes (the UCUM specification's table of units, from memory).
UCUM_CODES = {"kg", "g", "[lb_av]", "cm", "m", "mm", "[in_i]", "[ft_i]", "wk", "d", "a"}
UCUM_CODES |= {"g/L", "g/dL", "10*9/L", "10*3/uL", "1", "%", "kg/m2"}


def test_loinc_codes_are_the_checked_ones_and_their_check_digits_hold() -> None:
    used = {c.code for c in CODES.values() if c.system == LOINC} | {"39156-5"}
    assert used == set(LOINC_CODES)
    assert all(_luhn_ok(code) for code in used)
    assert not _luhn_ok("29463-8")  # the check can fail


def test_units_written_and_read_are_ucum_codes() -> None:
    from airway.fhir_profile import CONVERSIONS

    read = {unit for table in CONVERSIONS.values() for unit in table}
    written = {c.unit for c in CODES.values() if c.unit}
    assert written <= set(CONVERSIONS)
    assert read <= UCUM_CODES


def test_the_published_code_system_is_the_one_the_tool_writes_and_defines_every_code() -> None:
    assert CODE_SYSTEM_FILE.read_text("utf-8") == dumps_resource(code_system())
    published = CodeSystem.model_validate(json.loads(CODE_SYSTEM_FILE.read_text("utf-8")))
    defined = {c.code for c in published.concept}
    assert len(defined) == len(published.concept)  # no code defined twice
    everything = make(
        airway={"neck_movement": "reduced", "jaw_protrusion": "limited", "mallampati": 3},
        history={"intubation": "difficult"},
        preeclampsia={"status": "with_severe_features", "signs": list(SIGN_CODES)},
        context={"anaesthetist": "junior", "regional_alternative": "impossible"},
    )
    bundle = _bundle(render_fhir(plan_for(everything)))
    used = set()
    for resource in [e.resource for e in bundle.entry]:
        for concept in ("code", "valueCodeableConcept"):
            value = getattr(resource, concept, None)
            used |= {c.code for c in getattr(value, "coding", None) or [] if c.system == AIRWAY}
    risk = _of_type(bundle, "RiskAssessment")[0]
    used |= {c.code for c in risk.prediction[0].qualitativeRisk.coding}
    assert used <= defined


def test_the_profile_table_in_the_docs_is_the_one_the_code_follows() -> None:
    from airway.fhir_profile import profile_table

    doc = (ROOT / "docs" / "fhir.md").read_text("utf-8")
    block = doc.split("<!-- profile:start -->\n")[1].split("<!-- profile:end -->")[0]
    assert block == profile_table()
