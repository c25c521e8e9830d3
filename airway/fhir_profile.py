"""How an assessment is written in HL7 FHIR R4 and read back: codes, units, addresses.

One table serves both directions (``airway.render.fhir`` writes, ``airway.fhir_read``
reads), so what is written is what is read. ``docs/fhir.md`` describes the profile and
``docs/fhir/CodeSystem-airway.json`` publishes the project's own codes.

Codes, with where each was checked:

- LOINC 29463-7 body weight and 8302-2 body height: the FHIR R4 specification's example
  Observations ``observation-example`` (185 [lb_av]) and ``observation-example-body-height``
  (66.9 [in_i]); 39156-5 body mass index: the FHIR BMI profile
  (http://hl7.org/fhir/StructureDefinition/bmi fixes this code, with UCUM kg/m2).
- LOINC 49051-6 gestational age in weeks: a member of the LOINC gestational-age group
  (component LP19507-0) as the HL7 Europe Patient Summary value set expands it.
- LOINC 777-3 platelets in blood by automated count and 718-7 haemoglobin in blood: the
  US Core implementation guide's example Observations (cbc-platelets, cbc).
- LOINC 30525-0 age: the HL7 Terminology value set
  v3-LOINCObservationActContextAgeDefinitionCode, whose one member it is ("Age").
- UCUM factors: [lb_av] = 453.59237 g and [in_i] = 2.54 cm exactly, [ft_i] = 12 [in_i]
  (the UCUM specification, after the international yard and pound of 1959; from memory).

Every other finding has no standard code we could check and is coded in the project's
own CodeSystem (``AIRWAY``).
"""

from __future__ import annotations

import uuid
from typing import NamedTuple

from .fields import BY_PATH, IN_CM, LB_KG

LOINC = "http://loinc.org"
UCUM = "http://unitsofmeasure.org"
OBSERVATION_CATEGORY = "http://terminology.hl7.org/CodeSystem/observation-category"

# The project's canonical addresses. ``.invalid`` is reserved (RFC 2606) and can never
# belong to anyone: the URL names the codes, it is not a web page to fetch.
BASE = "https://airway.invalid/fhir"
AIRWAY = f"{BASE}/CodeSystem/airway"
INPUT_DIGEST = f"{BASE}/NamingSystem/input-sha256"
RECORD_NUMBER = f"{BASE}/NamingSystem/record-number"
TOOL_VERSION = f"{BASE}/tag/tool-version"
RULES_VERSION_TAG = f"{BASE}/tag/rules-version"
DATE_OF_BIRTH_AS_WRITTEN = f"{BASE}/StructureDefinition/date-of-birth-as-written"
# The namespace of every id the export derives from an input digest.
ID_NAMESPACE = uuid.uuid5(uuid.NAMESPACE_URL, BASE)


class Code(NamedTuple):
    """How one finding is coded."""

    system: str
    code: str
    display: str
    unit: str = ""  # the UCUM unit the assessment holds it in; "" for non-quantities
    category: str = ""  # observation-category code, "" for none


def _own(code: str, display: str, unit: str = "", category: str = "exam") -> Code:
    return Code(system=AIRWAY, code=code, display=display, unit=unit, category=category)


# Every field of the assessment but the identity and the date, by its path. A test
# holds that none is missing: a Bundle must carry everything a plan is made from.
CODES: dict[str, Code] = {
    "patient.weight_kg": Code(LOINC, "29463-7", "Body weight", "kg", "vital-signs"),
    "patient.height_cm": Code(LOINC, "8302-2", "Body height", "cm", "vital-signs"),
    "patient.age_years": Code(LOINC, "30525-0", "Age", "a"),
    "patient.booking_weight_kg": _own(
        "booking-weight", "Body weight at the booking visit", "kg", "vital-signs"
    ),
    "patient.gestation_weeks": Code(LOINC, "49051-6", "Gestational age in weeks", "wk"),
    "patient.in_labour": _own("in-labour", "In labour now"),
    "patient.haemoglobin_g_per_l": Code(
        LOINC, "718-7", "Hemoglobin [Mass/volume] in Blood", "g/L", "laboratory"
    ),
    "airway.mallampati": _own("mallampati-class", "Modified Mallampati class (1-4)"),
    "airway.thyromental_cm": _own("thyromental-distance", "Thyromental distance", "cm"),
    "airway.sternomental_cm": _own("sternomental-distance", "Sternomental distance", "cm"),
    "airway.mouth_opening_cm": _own("inter-incisor-gap", "Inter-incisor gap, mouth open", "cm"),
    "airway.neck_circumference_cm": _own(
        "neck-circumference", "Neck circumference at the thyroid cartilage", "cm"
    ),
    "airway.upper_lip_bite": _own("upper-lip-bite-class", "Upper lip bite test class (1-3)"),
    "airway.neck_movement": _own("neck-movement", "Neck movement"),
    "airway.jaw_protrusion": _own("jaw-protrusion", "Jaw protrusion"),
    "airway.short_neck": _own("short-neck", "Short neck"),
    "airway.receding_mandible": _own("receding-mandible", "Receding mandible"),
    "airway.protruding_incisors": _own("protruding-incisors", "Protruding upper incisors"),
    "airway.large_breasts": _own("large-breasts", "Large breasts"),
    "history.intubation": _own("previous-intubation", "Previous tracheal intubation", "", ""),
    "history.difficult_mask_ventilation": _own(
        "difficult-mask-ventilation", "Previous difficult mask ventilation", "", ""
    ),
    "history.obstructive_sleep_apnoea": _own(
        "obstructive-sleep-apnoea", "Obstructive sleep apnoea", "", ""
    ),
    "history.snoring": _own("snoring", "Snores", "", ""),
    "preeclampsia.status": _own("pre-eclampsia", "Pre-eclampsia"),
    "preeclampsia.platelets_10e9_per_l": Code(
        LOINC, "777-3", "Platelets [#/volume] in Blood by Automated count", "10*9/L", "laboratory"
    ),
    "context.urgency_category": _own(
        "caesarean-urgency-category", "Caesarean urgency category (1-4)", "", ""
    ),
    "context.anaesthetist": _own(
        "intubating-anaesthetist", "Experience of the anaesthetist who will intubate", "", ""
    ),
    "context.surgical_complexity": _own(
        "surgical-complexity", "Expected surgical complexity", "", ""
    ),
    "context.aspiration_risk": _own("aspiration-risk", "Aspiration risk", "", ""),
    "context.end_tidal_o2": _own(
        "end-tidal-oxygen-expected", "End-tidal oxygen fraction after pre-oxygenation", "1", ""
    ),
    "context.regional_alternative": _own(
        "regional-alternative", "Regional or awake technique instead", "", ""
    ),
    "context.maternal_arrest": _own(
        "maternal-arrest", "Maternal cardiac arrest or peri-arrest", "", ""
    ),
    "label": _own("assessment-label", "Label shown on the plan", "", ""),
}

# Each airway oedema sign present is an Observation of its own, valued true.
SIGN_CODES: dict[str, Code] = {
    "voice_change": _own("oedema-voice-change", "Airway oedema sign: voice change"),
    "stridor": _own("oedema-stridor", "Airway oedema sign: stridor"),
    "facial_oedema": _own("oedema-facial", "Airway oedema sign: facial oedema"),
    "tongue_swelling": _own("oedema-tongue-swelling", "Airway oedema sign: swollen tongue"),
    "new_snoring": _own("oedema-new-snoring", "Airway oedema sign: new snoring"),
    "breathless_lying_flat": _own(
        "oedema-breathless-lying-flat", "Airway oedema sign: breathless lying flat"
    ),
}
SIGNS_PATH = "preeclampsia.signs"

# Written beside weight and height (derived from them), never read: the plan computes it.
BMI = Code(LOINC, "39156-5", "Body mass index (BMI) [Ratio]", "kg/m2", "vital-signs")

# The airway level in the RiskAssessment's qualitativeRisk.
LEVEL_CODE_PREFIX = "airway-level-"


def answer_code(path: str, value: str) -> str:
    """The project's code for one answer to a choice: 'neck-movement.reduced'."""
    return f"{CODES[path].code}.{value.replace('_', '-')}"


def level_code(level: int) -> str:
    return f"{LEVEL_CODE_PREFIX}{level}"


# UCUM units each held unit is read from, with the factor into it. Exact factors are
# UCUM's own definitions (see the module docstring); 10*3/uL is 10*9/L by definition.
CONVERSIONS: dict[str, dict[str, float]] = {
    "kg": {"kg": 1.0, "g": 0.001, "[lb_av]": LB_KG},
    "cm": {"cm": 1.0, "m": 100.0, "mm": 0.1, "[in_i]": IN_CM, "[ft_i]": 12 * IN_CM},
    "wk": {"wk": 1.0, "d": 1 / 7},
    "a": {"a": 1.0},
    "g/L": {"g/L": 1.0, "g/dL": 10.0},
    "10*9/L": {"10*9/L": 1.0, "10*3/uL": 1.0},
    "1": {"1": 1.0, "%": 0.01},
    "kg/m2": {"kg/m2": 1.0},
}
# A converted value keeps two decimals: far finer than any bedside measure.
CONVERTED_DECIMALS = 2

# Observation statuses whose value stands (FHIR R4 observation-status).
STATUSES_READ = frozenset({"final", "amended", "corrected"})
# Bundle types an assessment is read from.
BUNDLE_TYPES_READ = frozenset({"collection", "searchset", "transaction"})


def derived_id(digest: str, key: str) -> str:
    """A fixed id for one resource of the Bundle made from the input ``digest``."""
    return str(uuid.uuid5(ID_NAMESPACE, f"{digest}/{key}"))


def value_kind(path: str) -> str:
    """The Observation's value[x] element a field is written in."""
    spec = BY_PATH[path]
    if CODES[path].unit:
        return "valueQuantity"
    return {
        "integer": "valueInteger",
        "yes/no": "valueBoolean",
        "choice": "valueCodeableConcept",
    }.get(spec.kind, "valueString")


def profile_table() -> str:
    """The Markdown table of what each field is written as (``docs/fhir.md``)."""
    lines = [
        "| field | code | meaning | value | UCUM unit (also read) |",
        "|---|---|---|---|---|",
    ]
    for path, code in CODES.items():
        system = "LOINC" if code.system == LOINC else "airway"
        also = ", ".join(f"`{u}`" for u in CONVERSIONS.get(code.unit, {}) if u != code.unit)
        unit = f"`{code.unit}`" + (f" ({also})" if also else "") if code.unit else "-"
        lines.append(
            f"| `{path}` | {system} `{code.code}` | {code.display} | {value_kind(path)} | {unit} |"
        )
    for sign, code in SIGN_CODES.items():
        lines.append(
            f"| `{SIGNS_PATH}` {sign} | airway `{code.code}` | {code.display} | "
            "valueBoolean true | - |"
        )
    return "\n".join(lines) + "\n"
