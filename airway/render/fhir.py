"""The plan as one FHIR R4 Bundle (type collection) for the electronic record.

Built from the ``fhir.resources`` R4B models, which validate every element as it is
made; the bytes are its plain data as sorted, indented JSON. Every id derives from the
input digest, so the same assessment gives the same bytes. What is written, and how
it is read back, is described in ``docs/fhir.md``; the codes in
:mod:`airway.fhir_profile`.
"""

from __future__ import annotations

import base64
import hashlib
from decimal import Decimal
from typing import Any

from fhir.resources.R4B.annotation import Annotation
from fhir.resources.R4B.attachment import Attachment
from fhir.resources.R4B.bundle import Bundle, BundleEntry
from fhir.resources.R4B.codeableconcept import CodeableConcept
from fhir.resources.R4B.codesystem import CodeSystem, CodeSystemConcept
from fhir.resources.R4B.coding import Coding
from fhir.resources.R4B.documentreference import DocumentReference, DocumentReferenceContent
from fhir.resources.R4B.extension import Extension
from fhir.resources.R4B.humanname import HumanName
from fhir.resources.R4B.identifier import Identifier
from fhir.resources.R4B.meta import Meta
from fhir.resources.R4B.observation import Observation
from fhir.resources.R4B.patient import Patient
from fhir.resources.R4B.quantity import Quantity
from fhir.resources.R4B.reference import Reference
from fhir.resources.R4B.riskassessment import RiskAssessment, RiskAssessmentPrediction

from ..engine.plan_model import Plan
from ..engine.scoring import LEVEL_LABELS, level_heading
from ..fhir_profile import (
    AIRWAY,
    BMI,
    CODES,
    DATE_OF_BIRTH_AS_WRITTEN,
    INPUT_DIGEST,
    OBSERVATION_CATEGORY,
    RECORD_NUMBER,
    RULES_VERSION_TAG,
    SIGN_CODES,
    SIGNS_PATH,
    TOOL_VERSION,
    UCUM,
    Code,
    answer_code,
    derived_id,
    level_code,
    value_kind,
)
from ..fields import BY_PATH, field_specs, flatten
from .json import dumps

# Sections whose findings the airway level is estimated from (the RiskAssessment's
# basis); the context and the label inform the decision and the page, not the level.
_BASIS_SECTIONS = ("patient", "airway", "history", "preeclampsia")


def _day(plan: Plan) -> Any:
    """The assessment's date as FHIR writes a date (a dateTime may be a date alone)."""
    assessed_on = plan.assessment.assessed_on
    return assessed_on.isoformat() if assessed_on else None


def _quantity(value: float, unit: str) -> Quantity:
    # repr: the shortest text that reads back as the same float, so the round trip is exact.
    return Quantity(value=Decimal(repr(float(value))), unit=unit, system=UCUM, code=unit)


def _url(plan: Plan, key: str) -> str:
    """The Bundle-local address of one of the plan's resources."""
    return f"urn:uuid:{derived_id(plan.input_sha256, key)}"


def _refs(urls: list[str]) -> list[Reference]:
    return [Reference(reference=url) for url in urls]


def _concept(code: Code) -> CodeableConcept:
    coding = Coding(system=code.system, code=code.code, display=code.display)
    return CodeableConcept(coding=[coding], text=code.display)


def _value(path: str, value: object) -> dict[str, Any]:
    """The Observation's value[x] for one field's value."""
    kind, code = value_kind(path), CODES[path]
    if kind == "valueQuantity":  # age included: 'a'
        assert isinstance(value, int | float)
        return {kind: _quantity(value, code.unit)}
    if kind == "valueCodeableConcept":
        answer = Coding(system=code.system, code=answer_code(path, str(value)), display=str(value))
        return {kind: CodeableConcept(coding=[answer], text=str(value))}
    return {kind: value}


def _findings(plan: Plan) -> list[tuple[str, Code, dict[str, Any]]]:
    """(key, code, value[x]) for every finding given, in examination order."""
    values = flatten(plan.assessment.model_dump())
    out = []
    for spec in field_specs():
        value = values[spec.path]
        if spec.path == SIGNS_PATH:
            out += [(f"{SIGNS_PATH}:{s}", SIGN_CODES[s], {"valueBoolean": True}) for s in value]
        elif value is not None and spec.path in CODES:
            out.append((spec.path, CODES[spec.path], _value(spec.path, value)))
    return out


def _observation(
    plan: Plan,
    key: str,
    code: Code,
    value: dict[str, Any],
    subject: Reference | None,
    derived_from: list[str] | None = None,
) -> Observation:
    category = None
    if code.category:
        coding = Coding(system=OBSERVATION_CATEGORY, code=code.category)
        category = [CodeableConcept(coding=[coding])]
    return Observation(
        id=derived_id(plan.input_sha256, key),
        status="final",
        category=category,
        code=_concept(code),
        subject=subject,
        effectiveDateTime=_day(plan),
        derivedFrom=_refs(derived_from) if derived_from else None,
        **value,
    )


def _bmi(plan: Plan, subject: Reference | None, derived_from: list[str]) -> Observation:
    quantity = _quantity(plan.body.bmi, BMI.unit)
    return _observation(plan, "bmi", BMI, {"valueQuantity": quantity}, subject, derived_from)


def _patient(plan: Plan) -> Patient | None:
    identity = plan.assessment.identity
    if not (identity.name or identity.record_number or identity.date_of_birth):
        return None
    # The date of birth is kept as written (it need not be a full date), so it goes in
    # an extension of the project's rather than in Patient.birthDate.
    extension = None
    if identity.date_of_birth:
        written = Extension(url=DATE_OF_BIRTH_AS_WRITTEN, valueString=identity.date_of_birth)
        extension = [written]
    record = identity.record_number
    return Patient(
        id=derived_id(plan.input_sha256, "patient"),
        name=[HumanName(text=identity.name)] if identity.name else None,
        identifier=[Identifier(system=RECORD_NUMBER, value=record)] if record else None,
        extension=extension,
    )


def _risk_assessment(plan: Plan, subject: Reference | None, basis: list[str]) -> RiskAssessment:
    risk, g = plan.risk, plan.generated_by
    level = Coding(system=AIRWAY, code=level_code(risk.level), display=level_heading(risk.level))
    prediction = RiskAssessmentPrediction(
        outcome=CodeableConcept(text="Difficult or failed tracheal intubation"),
        qualitativeRisk=CodeableConcept(coding=[level], text=risk.label),
        rationale=f"Combined index {risk.index:.2f}. {risk.note}",
    )
    return RiskAssessment(
        id=derived_id(plan.input_sha256, "risk"),
        status="final",
        subject=subject or Reference(display="the woman assessed (no identifiers given)"),
        occurrenceDateTime=_day(plan),
        code=CodeableConcept(text="Obstetric airway difficulty"),
        method=CodeableConcept(text=f"{g.tool} {g.version}, rules {g.rules_version}"),
        basis=_refs(basis),
        prediction=[prediction],
        mitigation=plan.decision.headline,
        note=[Annotation(text=caution) for caution in plan.cautions],
    )


def _document(plan: Plan, pdf: bytes, subject: Reference | None) -> DocumentReference:
    attachment = Attachment(
        contentType="application/pdf",
        data=base64.b64encode(pdf),
        hash=base64.b64encode(hashlib.sha1(pdf).digest()),  # R4's Attachment.hash is SHA-1
        size=len(pdf),
        title="Obstetric airway plan",
    )
    return DocumentReference(
        id=derived_id(plan.input_sha256, "document"),
        status="current",
        type=CodeableConcept(text="Obstetric airway plan"),
        subject=subject,
        content=[DocumentReferenceContent(attachment=attachment)],
    )


def plan_bundle(plan: Plan, pdf: bytes | None = None) -> Bundle:
    """The FHIR Bundle of one plan: Observations, RiskAssessment, Patient if identified,
    and the printed plan as a DocumentReference when ``pdf`` is given."""
    patient = _patient(plan)
    patient_url = _url(plan, "patient")
    subject = Reference(reference=patient_url) if patient else None
    resources: list[tuple[str, Any]] = [(patient_url, patient)] if patient else []
    basis: list[str] = []
    for key, code, value in _findings(plan):
        full_url = _url(plan, key)
        resources.append((full_url, _observation(plan, key, code, value, subject)))
        if key.split(".")[0].split(":")[0] in _BASIS_SECTIONS:
            basis.append(full_url)
    if not plan.body.height_assumed:  # a BMI on an assumed height is not hers to file
        sources = [_url(plan, k) for k in ("patient.weight_kg", "patient.height_cm")]
        bmi_url = _url(plan, "bmi")
        resources.append((bmi_url, _bmi(plan, subject, sources)))
        basis.append(bmi_url)
    risk_url = _url(plan, "risk")
    resources.append((risk_url, _risk_assessment(plan, subject, basis)))
    if pdf is not None:
        doc_url = _url(plan, "document")
        resources.append((doc_url, _document(plan, pdf, subject)))
    g = plan.generated_by
    return Bundle(
        id=derived_id(plan.input_sha256, "bundle"),
        meta=Meta(
            tag=[
                Coding(system=TOOL_VERSION, code=g.version, display=f"{g.tool} {g.version}"),
                Coding(system=RULES_VERSION_TAG, code=g.rules_version),
                Coding(system=INPUT_DIGEST, code=plan.input_sha256),
            ]
        ),
        identifier=Identifier(system=INPUT_DIGEST, value=plan.input_sha256),
        type="collection",
        entry=[BundleEntry(fullUrl=u, resource=r) for u, r in resources],
    )


def dumps_resource(resource: Any) -> str:
    """A resource as the plan's JSON is written: sorted, indented, a trailing newline."""
    return dumps(resource.model_dump(mode="json", by_alias=True, exclude_none=True))


def render_fhir(plan: Plan, pdf: bytes | None = None) -> str:
    """The plan's Bundle as JSON text: same assessment, same bytes."""
    return dumps_resource(plan_bundle(plan, pdf))


def code_system() -> CodeSystem:
    """The project's own codes as a FHIR CodeSystem (``docs/fhir/CodeSystem-airway.json``)."""
    concepts: list[CodeSystemConcept] = []
    for path, code in CODES.items():
        if code.system != AIRWAY:
            continue
        concepts.append(CodeSystemConcept(code=code.code, display=code.display))
        spec = BY_PATH[path]
        concepts += [
            CodeSystemConcept(code=answer_code(path, c), display=f"{code.display}: {c}")
            for c in spec.choices
        ]
    concepts += [CodeSystemConcept(code=c.code, display=c.display) for c in SIGN_CODES.values()]
    concepts += [
        CodeSystemConcept(code=level_code(n), display=level_heading(n))
        for n in sorted(LEVEL_LABELS)
    ]
    return CodeSystem(
        id="airway",
        url=AIRWAY,
        name="AirwayFindings",
        title="Obstetric airway findings and levels",
        status="active",
        experimental=False,
        content="complete",
        caseSensitive=True,
        description=(
            "Bedside airway findings, answers and airway levels written by the airway "
            "tool where no LOINC code was found. A decision aid's vocabulary: it does not "
            "replace clinical judgement, local guidelines or licensed practice."
        ),
        concept=concepts,
    )
