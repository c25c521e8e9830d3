"""Assessment in, plan out: the one pure function the renderers format.

:func:`build_plan` does no I/O, reads no clock and holds no state; the same
assessment and catalogue give the same plan (and byte-identical JSON).
"""

import hashlib
import json

from .. import __version__
from ..assessment import ADDED_FIELDS, Assessment
from ..catalogue import Catalogue
from ..checklist import Checklist
from ..sources import Evidence
from .body import BodySize, body_size
from .checklists import for_plan
from .decision import Decision, decide
from .doses import Dose, compute_doses, dose_text
from .equipment import Equipment, choose_equipment
from .guidance import (
    CRICOID_ASLEEP_N,
    CRICOID_AWAKE_N,
    CRICOID_EVIDENCE,
    MAX_INTUBATION_ATTEMPTS,
    MAX_SGA_ATTEMPTS,
    SGA_ATTEMPTS_EVIDENCE,
)
from .oxygenation import FEO2_DEFAULT, Oxygenation, oxygenation_for
from .plan_model import GeneratedBy, Plan, Step
from .scoring import Risk, score

# Bumped whenever a weight, threshold, band, dose or step changes meaning.
RULES_VERSION = "2026.12.4"

PREOX_TARGET_FEO2 = 0.9
PREOX_EVIDENCE = Evidence(
    "tanoubi2009", "published", "3 min tidal breathing or 8 vital-capacity breaths in 60 s"
)
POSITION_EVIDENCE = Evidence(
    "common_practice", "common_practice", "ramp and about 15 degrees of left uterine displacement"
)
ANTACID_EVIDENCE = Evidence("common_practice", "common_practice")
CICO_EVIDENCE = Evidence(
    "frerk2015", "from_memory", "scalpel-bougie-tube; 8-10 cm vertical incision if impalpable"
)
PERIMORTEM_EVIDENCE = Evidence(
    "mushambi2015", "published", "timely perimortem caesarean section if oxygenation fails"
)

# Values that are possible but improbable: a warning, never a refusal.
IMPROBABLE_BMI = 70.0
IMPROBABLE_AGE = (16, 50)
IMPROBABLE_GESTATION_WEEKS = 42.0
IMPROBABLE_EVIDENCE = Evidence(
    "project",
    "project_rule",
    "warn above BMI 70 (edge of the lean-weight formula's data), "
    "age outside 16-50, gestation beyond 42 weeks",
)

CAUTION_AID = (
    "This plan is a decision aid. It does not replace clinical judgement, local "
    "guidelines or licensed practice."
)
CAUTION_REASSESS = (
    "Reassess the airway immediately before induction: findings change, especially in labour."
)
CAUTION_DOSES = "Doses are a calculation aid in practical steps: check each and titrate."
CAUTION_WEAK_TESTS = (
    "Bedside tests predict poorly in pregnancy (Hirmanpour 2014): a low airway level "
    "does not rule out a difficult airway."
)


# The canonical form: sorted keys, no spaces, text as written (one encoder, made once).
_CANONICAL = json.JSONEncoder(sort_keys=True, separators=(",", ":"), ensure_ascii=False)


def assessment_digest(assessment: Assessment) -> str:
    """SHA-256 of the assessment's canonical JSON: the same findings, the same digest."""
    data = assessment.model_dump(mode="json")
    for section, names in ADDED_FIELDS.items():
        for name in names:
            if data[section].get(name) is None:
                del data[section][name]
    canonical = _CANONICAL.encode(data)
    return hashlib.sha256(canonical.encode("utf-8")).hexdigest()


def _minutes_text(minutes: float | None, horizon: float) -> str:
    return f"more than {horizon:g} min" if minutes is None else f"about {minutes:g} min"


# Steps that hold none of her values.
_POSITION_STEP = Step(
    id="position",
    phase="before induction",
    title="Position",
    summary="ramp (ear canal level with sternal notch), left tilt about 15°",
    actions=(
        "Ramp head-up until the ear canal is level with the sternal notch.",
        "Left uterine displacement of about 15 degrees (tilt or wedge).",
    ),
    basis=POSITION_EVIDENCE.describe(),
)


_ANTACID_STEP = Step(
    id="antacid",
    phase="before induction",
    title="Antacid prophylaxis",
    summary="antacid: H2 antagonist or PPI, sodium citrate 30 mL",
    actions=(
        "H2-receptor antagonist or proton-pump inhibitor given; sodium citrate "
        "0.3 M 30 mL just before induction.",
    ),
    basis=ANTACID_EVIDENCE.describe(),
)


_CRICOID_STEP = Step(
    id="cricoid",
    phase="before induction",
    title="Cricoid force",
    summary=f"cricoid {CRICOID_AWAKE_N} N awake -> {CRICOID_ASLEEP_N} N asleep; ease if difficult",
    actions=(
        f"{CRICOID_AWAKE_N} N while awake, rising to {CRICOID_ASLEEP_N} N once "
        "consciousness is lost.",
        "Reduce or release it if laryngoscopy, mask ventilation or supraglottic "
        "insertion is difficult.",
    ),
    basis=CRICOID_EVIDENCE.describe(),
)


_REASSESS_STEP = Step(
    id="reassess",
    phase="before induction",
    title="Reassess the airway now",
    summary="reassess Mallampati and oedema signs on the table",
    actions=(
        "Repeat Mallampati and look for new oedema signs (voice, stridor, "
        "tongue) on the table before induction.",
    ),
)


_AFTER_STEP = Step(
    id="after",
    phase="after the event",
    title="After the event",
    summary="after: airway alert, record, debrief, letter",
    actions=(
        "Airway alert recorded in her notes.",
        "Full record: grades, devices, attempts, what worked.",
        "Team debrief; incident report per local policy.",
        "Explain to her, and send a letter to her and her family doctor.",
    ),
)


# The steps' sources, the same for every woman.
_PREOX_BASIS = PREOX_EVIDENCE.describe()
_SGA_ATTEMPTS_BASIS = SGA_ATTEMPTS_EVIDENCE.describe()
_CICO_BASIS = f"{CICO_EVIDENCE.describe()}; {PERIMORTEM_EVIDENCE.describe()}"


def _steps(
    a: Assessment,
    risk: Risk,
    eq: Equipment,
    doses: tuple[Dose, ...],
    decision: Decision,
    oxy: Oxygenation,
) -> tuple[Step, ...]:
    by = {d.drug: d for d in doses}
    tubes = eq.tracheal_tube_mm
    sux, roc, sgx = by["suxamethonium"], by["rocuronium"], by["sugammadex"]
    prop, thio = by["propofol"], by["thiopental"]
    pre = decision.phrase
    t90 = _minutes_text(oxy.minutes_to_spo2_90, oxy.horizon_minutes)
    short_actions: tuple[str, ...] = ()
    if oxy.short:
        short_actions = (
            f"Predicted time to SpO2 90% is short ({t90}): high-flow nasal oxygen set up, "
            "fewest attempts, front-of-neck kit open.",
        )
    return (
        Step(
            id="brief",
            phase="before induction",
            title="Team brief, aloud",
            summary=f"brief aloud: airway level {risk.level}, pre-made decision, roles",
            actions=(
                f"Airway level {risk.level} of 4: {risk.label}.",
                f"If intubation fails, the pre-made decision is: {pre}.",
                "Agree who calls for help, who gives cricoid force, who opens the "
                "front-of-neck kit.",
            ),
        ),
        _POSITION_STEP,
        Step(
            id="preoxygenate",
            phase="before induction",
            title="Pre-oxygenate",
            summary=f"pre-oxygenate FiO2 1.0 to end-tidal O2 ≥ {PREOX_TARGET_FEO2:g}; "
            f"nasal O2 on; SpO2 90% {t90} after apnoea (model estimate)",
            actions=(
                "FiO2 1.0 by tight-fitting mask at 15 L/min or more: 3 min of tidal "
                "breathing or 8 vital-capacity breaths in 60 s.",
                f"Aim for an end-tidal O2 fraction of at least {PREOX_TARGET_FEO2:g}.",
                "Nasal oxygen on and left on through apnoea (apnoeic oxygenation).",
                f"Model estimate: SpO2 falls to 90% {t90} after apnoea begins (not a guarantee).",
                *short_actions,
            ),
            basis=_PREOX_BASIS,
        ),
        _ANTACID_STEP,
        Step(
            id="drugs",
            phase="before induction",
            title="Drugs drawn up and labelled",
            summary="drugs drawn up (doses above), sugammadex if rocuronium",
            actions=(
                f"Induction: propofol {dose_text(prop)} or thiopental {dose_text(thio)}.",
                f"Block: suxamethonium {dose_text(sux)} or rocuronium {dose_text(roc)}.",
                f"If rocuronium: sugammadex {dose_text(sgx)} drawn up and to hand.",
                "Vasopressor drawn up.",
            ),
        ),
        _CRICOID_STEP,
        _REASSESS_STEP,
        Step(
            id="intubate",
            phase="first attempt",
            title="Intubate",
            summary=f"intubate: {eq.first_laryngoscope.split(' (')[0]}, bougie, tube "
            f"{tubes.first:.1f} -> {tubes.backup:.1f} -> {tubes.smallest:.1f} mm; "
            f"at most {MAX_INTUBATION_ATTEMPTS} attempts",
            actions=(
                f"First device: {eq.first_laryngoscope}; bougie to hand.",
                f"Tube {tubes.first:.1f} mm; then {tubes.backup:.1f} mm; smallest "
                f"{tubes.smallest:.1f} mm.",
                f"At most {MAX_INTUBATION_ATTEMPTS} attempts; a third only by a more "
                "experienced anaesthetist.",
                "Between attempts: gentle mask ventilation, change position, blade or "
                "device, ease cricoid force.",
                "Confirm with a sustained capnography trace.",
            ),
        ),
        Step(
            id="declare",
            phase="failed intubation",
            title="Declare failed intubation",
            summary="failed: say so aloud, call senior help, surgery waits",
            actions=(
                "Say it aloud: 'failed intubation'. Call for senior help.",
                "Surgery does not start; the obstetrician waits.",
                f"Oxygenate first: SpO2 90% was predicted {t90} after apnoea began; "
                "watch the saturation, not the clock.",
            ),
        ),
        Step(
            id="supraglottic",
            phase="failed intubation",
            title="Supraglottic rescue",
            summary=f"supraglottic size {eq.supraglottic_size:g}, at most {MAX_SGA_ATTEMPTS} "
            "attempts; else two-person face mask",
            actions=(
                f"Second-generation supraglottic airway size {eq.supraglottic_size:g}; "
                f"at most {MAX_SGA_ATTEMPTS} insertion attempts.",
                "Ease cricoid force during insertion.",
                "If it fails: two-person face-mask ventilation with an oral airway.",
            ),
            basis=_SGA_ATTEMPTS_BASIS,
        ),
        Step(
            id="wake_or_proceed",
            phase="wake or proceed",
            title="Carry out the pre-made decision",
            summary=f"pre-made decision: {pre}",
            actions=(
                f"Pre-made decision: {pre}.",
                "Wake: keep oxygenating; if rocuronium was given, sugammadex "
                f"{dose_text(sgx)}; then plan a regional or awake technique.",
                "Proceed: continue on the supraglottic airway, maintain anaesthesia, "
                "surgeon told, most experienced person holds the airway.",
                *decision.conditions[:1],
            ),
        ),
        Step(
            id="cico",
            phase="can't intubate, can't oxygenate",
            title="Can't intubate, can't oxygenate: front-of-neck access",
            summary=f"CICO: keep oxygenating from above; scalpel, bougie, "
            f"{eq.front_of_neck_tube_mm:.1f} mm tube; arrest: perimortem caesarean",
            actions=(
                "Say 'can't intubate, can't oxygenate' so that everyone hears; the "
                "front-of-neck kit comes to the head end.",
                "Keep oxygenating from above (face mask or supraglottic airway, oxygen "
                "100%) while the neck is opened; full neuromuscular block helps.",
                "Neck extended; membrane felt: cut through it with a no. 10 scalpel, pass a "
                f"bougie into the trachea and slide a {eq.front_of_neck_tube_mm:.1f} mm "
                "cuffed tube over it.",
                "Membrane not felt: vertical midline skin cut of 8-10 cm, part the tissues "
                "with the fingers until it is felt, then the same.",
                "The tube is in the trachea only when capnography shows it.",
                "If her circulation fails: resuscitate and deliver by perimortem caesarean "
                "section.",
            ),
            basis=_CICO_BASIS,
        ),
        _AFTER_STEP,
    )


# Distances short enough to be inches written as centimetres (project rule): the
# plan says what they would be in centimetres rather than silently scoring them.
INCH_LIKE_BELOW_CM = {
    "thyromental_cm": ("Thyromental distance", 3.0),
    "sternomental_cm": ("Sternomental distance", 8.0),
    "mouth_opening_cm": ("Inter-incisor gap", 2.0),
}


def _inch_like(a: Assessment) -> list[str]:
    out = []
    for key, (name, below) in INCH_LIKE_BELOW_CM.items():
        value = getattr(a.airway, key)
        if value is not None and 0 < value < below:
            out.append(
                f"{name} {value:g} cm is unusually short: if it was measured in inches it is "
                f"{value * 2.54:.1f} cm. Check it."
            )
    return out


def _warnings(
    a: Assessment, body: BodySize, doses: tuple[Dose, ...], equipment: Equipment
) -> list[str]:
    out: list[str] = list(body.warnings)
    p = a.patient
    if body.bmi > IMPROBABLE_BMI:
        out.append(f"BMI {body.bmi:.1f} is above {IMPROBABLE_BMI:g}: check weight and height.")
    if p.age_years is not None and not IMPROBABLE_AGE[0] <= p.age_years <= IMPROBABLE_AGE[1]:
        out.append(f"Age {p.age_years} years is unusual: check it.")
    if p.gestation_weeks is not None and p.gestation_weeks > IMPROBABLE_GESTATION_WEEKS:
        out.append(f"Gestation {p.gestation_weeks:g} weeks is beyond 42: check it.")
    if p.booking_weight_kg is not None and p.booking_weight_kg > p.weight_kg + 10:
        out.append("Booking weight is more than 10 kg above current weight: check both.")
    out += _inch_like(a)
    if a.airway.mallampati is None:
        out.insert(0, "Mallampati not assessed: the airway level may understate the difficulty.")
    out += [d.ceiling_text for d in doses if d.ceiling_text]
    return out + list(equipment.warnings)


_GENERATED_BY = GeneratedBy(tool="airway", version=__version__, rules_version=RULES_VERSION)


def body_for(assessment: Assessment) -> BodySize:
    """Her body-size scalars, from the patient section."""
    p = assessment.patient
    return body_size(p.weight_kg, p.height_cm, p.booking_weight_kg)


def risk_for(assessment: Assessment) -> Risk:
    """Her airway-difficulty estimate alone (the population model runs this)."""
    return score(assessment, body_for(assessment))


def build_plan(
    assessment: Assessment,
    catalogue: Catalogue,
    checklists: tuple[Checklist, ...] = (),
) -> Plan:
    """Turn one assessment into a plan.

    Args:
        assessment: the validated assessment.
        catalogue: the unit's equipment catalogue.
        checklists: the unit's checklists; those meant for plans are filled in
            with her values.

    Returns:
        The plan: risk, body size, equipment, doses, decision, steps, cautions.
    """
    body = body_for(assessment)
    risk = score(assessment, body)
    expected = assessment.context.end_tidal_o2
    oxygenation = oxygenation_for(assessment, feo2=FEO2_DEFAULT if expected is None else expected)
    equipment = choose_equipment(assessment, body, risk.level, catalogue, oxygenation.short)
    doses = compute_doses(body, catalogue.drugs)
    decision = decide(assessment, body)
    preparation = tuple(
        f"{f.label}: {f.prepares}" for f in risk.factors if f.present and f.prepares
    )
    cautions = (
        CAUTION_AID,
        CAUTION_REASSESS,
        CAUTION_DOSES,
        risk.note,
        CAUTION_WEAK_TESTS,
        oxygenation.uncertainty,
    )
    plan = Plan(
        generated_by=_GENERATED_BY,
        input_sha256=assessment_digest(assessment),
        assessment=assessment,
        risk=risk,
        body=body,
        equipment=equipment,
        doses=doses,
        decision=decision,
        oxygenation=oxygenation,
        steps=_steps(assessment, risk, equipment, doses, decision, oxygenation),
        preparation=preparation,
        not_assessed=risk.not_assessed,
        warnings=tuple(_warnings(assessment, body, doses, equipment)),
        cautions=cautions,
    )
    filled = tuple([for_plan(c, plan) for c in checklists if "plan" in c.meta.use])
    return plan._replace(checklists=filled)
