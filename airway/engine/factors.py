"""The catalogue of airway risk factors, each with its weight and its evidence.

A factor has one of three roles:

``difficulty``
    adds ``ln(weight)`` (times the units above a reference for per-unit
    factors) to the combined index;
``override``
    forces the highest level whatever the index (stridor, a previous failed
    intubation, a known difficult airway); adds nothing to the index because
    no published ratio exists;
``preparation``
    changes what is prepared rather than how hard intubation is (labour,
    difficult mask ventilation...); adds nothing to the index.

A difficulty factor may also change the preparation (large breasts: a
short-handled laryngoscope; pre-eclampsia: smaller tubes).

To add a factor: append a :class:`Factor` to :data:`CATALOGUE` with a reader
that returns ``None`` when the finding was not assessed, and a source id from
:mod:`airway.sources`. ``tests/test_factors.py`` checks every entry.
"""

import math
from collections.abc import Callable
from typing import Literal, NamedTuple

from ..assessment import Assessment
from ..sources import Evidence
from .body import BodySize

Role = Literal["difficulty", "override", "preparation"]
Kind = Literal["relative_risk", "odds_ratio_per_unit", "likelihood_ratio", "project_ratio", "rule"]

OEDEMA_SIGNS_NOT_STRIDOR = (
    "voice_change",
    "facial_oedema",
    "tongue_swelling",
    "new_snoring",
    "breathless_lying_flat",
)

# Bedside thresholds. Each is the usual cut-off; the Detsky 2019 pooled ratios
# were computed over a range of cut-offs (given in the evidence note).
THYROMENTAL_SHORT_CM = 6.0  # Patil's classic cut-off, from memory
STERNOMENTAL_SHORT_CM = 12.5  # Savva 1994, from memory
MOUTH_OPENING_SMALL_CM = 4.0  # El-Ganzouri 1996 and handbook tables
NECK_CIRCUMFERENCE_LARGE_CM = 43.0  # handbook table, obese cohorts
BMI_REFERENCE = 25.0  # project rule: per-unit odds counted above the top of WHO normal
AGE_REFERENCE_YEARS = 35  # McKeen 2011 found age >= 35 predictive; per-year odds above it
PLATELETS_LOW_10E9 = 70.0  # SOAP 2021 consensus threshold for neuraxial block, from memory
# Project rule, no published ratio: breasts hinder the laryngoscope's insertion more
# than they narrow the view, and a short handle largely offsets them, so they weigh
# less than Mallampati 2 (3.23) and as much as pre-eclampsia without severe features.
LARGE_BREASTS_RATIO = 1.5


class Reading(NamedTuple):
    """What a factor found in one assessment."""

    present: bool | None  # None: not assessed
    units: float = 1.0  # for per-unit factors: how many units above the reference
    detail: str = ""


Reader = Callable[[Assessment, BodySize], Reading]

# Readings without a detail, made once: most findings in a plan are absent or not
# assessed, and a clinic list reads thousands of plans.
NOT_ASSESSED = Reading(present=None)
ABSENT = Reading(present=False)
PRESENT = Reading(present=True)


def _presence(value: bool | None) -> Reading:
    """The shared reading for present, absent or not assessed (no detail)."""
    return NOT_ASSESSED if value is None else PRESENT if value else ABSENT


class Factor(NamedTuple):
    """One catalogued risk factor."""

    id: str
    label: str
    role: Role
    kind: Kind
    weight: float | None  # ratio; None for rules and preparation factors
    evidence: Evidence
    read: Reader
    prepares: str = ""  # what the plan must prepare because of it
    domain: str = ""  # the anatomy it reads: one contribution per domain (scoring.py)
    # The ratio for a normal finding where the source gives one (a negative
    # likelihood ratio); None: a normal finding adds nothing.
    weight_normal: float | None = None
    # The weight is divided by this before it counts: for the Mallampati classes, the
    # average relative risk at term, so that the classes are ratios against the
    # average woman rather than against class 1 (MALLAMPATI_CENTRE).
    centre: float = 1.0

    @property
    def log_weight(self) -> float:
        """Natural log of the centred weight (per unit for per-unit factors); 0 for rules."""
        return 0.0 if self.weight is None else math.log(self.weight / self.centre)

    @property
    def log_weight_normal(self) -> float:
        """Natural log of the ratio for a normal finding; 0 when there is none."""
        return 0.0 if self.weight_normal is None else math.log(self.weight_normal)


def _flag(value: bool | None, detail: str = "") -> Reading:
    if value and detail:
        return Reading(present=True, detail=detail)
    return _presence(value)


def _below(value: float | None, limit: float, unit: str) -> Reading:
    if value is None or not value < limit:
        return _presence(None if value is None else False)
    return Reading(present=True, detail=f"{value:g} {unit} (< {limit:g} {unit})")


def _mallampati(cls: int) -> Reader:
    def read(a: Assessment, _b: BodySize) -> Reading:
        mp = a.airway.mallampati
        return _presence(None if mp is None else mp == cls)  # the label names the class

    return read


def _bmi(_a: Assessment, b: BodySize) -> Reading:
    above = max(0.0, b.bmi - BMI_REFERENCE)
    if not above > 0:
        return ABSENT
    return Reading(present=True, units=above, detail=f"BMI {b.bmi:.1f}, {above:.1f} above 25")


def _age(a: Assessment, _b: BodySize) -> Reading:
    age = a.patient.age_years
    if age is None:
        return NOT_ASSESSED
    above = float(max(0, age - AGE_REFERENCE_YEARS))
    if not above > 0:
        return ABSENT
    return Reading(present=True, units=above, detail=f"{age} years, {above:g} above 35")


def _preeclampsia(status: str) -> Reader:
    def read(a: Assessment, _b: BodySize) -> Reading:
        got = a.preeclampsia.status
        return _presence(None if got is None else got == status)

    return read


def _oedema(a: Assessment, _b: BodySize) -> Reading:
    signs = [s for s in a.preeclampsia.signs if s in OEDEMA_SIGNS_NOT_STRIDOR]
    if not signs:
        return ABSENT
    return Reading(present=True, detail=", ".join(s.replace("_", " ") for s in signs))


def _stridor(a: Assessment, _b: BodySize) -> Reading:
    return _presence("stridor" in a.preeclampsia.signs)


def _intubation(kind: str) -> Reader:
    def read(a: Assessment, _b: BodySize) -> Reading:
        got = a.history.intubation
        return _presence(None if got is None else got == kind)

    return read


def _neck_movement(a: Assessment, _b: BodySize) -> Reading:
    got = a.airway.neck_movement
    if got is None or got == "normal":
        return _presence(None if got is None else False)
    return Reading(present=True, detail=got)


def _jaw(a: Assessment, _b: BodySize) -> Reading:
    got = a.airway.jaw_protrusion
    return _presence(None if got is None else got == "limited")


def _ulbt(a: Assessment, _b: BodySize) -> Reading:
    got = a.airway.upper_lip_bite
    if got != 3:
        return _presence(None if got is None else False)
    return Reading(present=True, detail=f"class {got}")


def _neck_circumference(a: Assessment, _b: BodySize) -> Reading:
    nc = a.airway.neck_circumference_cm
    limit = NECK_CIRCUMFERENCE_LARGE_CM
    if nc is None or not nc > limit:
        return _presence(None if nc is None else False)
    return Reading(present=True, detail=f"{nc:g} cm (> {limit:g} cm)")


def _platelets(a: Assessment, _b: BodySize) -> Reading:
    p = a.preeclampsia.platelets_10e9_per_l
    if p is None or not p < PLATELETS_LOW_10E9:
        return _presence(None if p is None else False)
    return Reading(present=True, detail=f"{p:g} x10^9/L")


def _labour(a: Assessment, _b: BodySize) -> Reading:
    return _flag(a.patient.in_labour)


# Severe pre-eclampsia: what blunting the pressor response and magnesium mean for
# the anaesthetic (common practice; the drugs named are those usually used, from
# memory: check local guidance for doses).
PRESSOR_RESPONSE_PREPARATION = (
    "smaller tubes; blunt the pressor response to laryngoscopy (remifentanil or "
    "alfentanil at induction, or labetalol before it); magnesium prolongs neuromuscular "
    "block: monitor it, sugammadex ready"
)

_ROCKE_MEMORY = "relative risk against Mallampati I; value quoted from memory, check the paper"

# Rocke 1992's relative risks are against class 1. Multiplied as they stand, class 2
# (the commonest class at term) would count as a finding. Each class is therefore
# divided by the average relative risk at term, so that a class counts as a ratio
# against the average woman: class 1 below 1, class 2 near 1, classes 3-4 above.
MALLAMPATI_RR = {1: 1.0, 2: 3.23, 3: 7.58, 4: 11.3}  # Rocke 1992
# Share of each class late in pregnancy: classes 3-4 together 10.3% in the 8th
# month (Boutonnet 2010) and 10.4% before elective caesarean (Tan 2019); the split
# of 1 from 2 and of 3 from 4 is assumed (project rule).
MALLAMPATI_TERM_SHARE = {1: 0.40, 2: 0.497, 3: 0.083, 4: 0.020}
MALLAMPATI_CENTRE = sum(MALLAMPATI_TERM_SHARE[c] * MALLAMPATI_RR[c] for c in MALLAMPATI_RR)
_CENTRED = "relative risk against class 1, divided by the average at term (project rule)"


def _mallampati_factor(cls: int) -> Factor:
    return Factor(
        f"mallampati_{cls}",
        f"Mallampati class {cls}",
        "difficulty",
        "relative_risk",
        MALLAMPATI_RR[cls],
        Evidence("rocke1992", "published", _CENTRED),
        _mallampati(cls),
        domain="view",
        centre=MALLAMPATI_CENTRE,
    )


CATALOGUE: tuple[Factor, ...] = (
    *(_mallampati_factor(cls) for cls in (1, 2, 3, 4)),
    Factor(
        "short_neck",
        "Short neck",
        "difficulty",
        "relative_risk",
        5.01,
        Evidence("rocke1992", "from_memory", _ROCKE_MEMORY),
        lambda a, _b: _flag(a.airway.short_neck),
        domain="neck",
    ),
    Factor(
        "receding_mandible",
        "Receding mandible",
        "difficulty",
        "relative_risk",
        9.71,
        Evidence("rocke1992", "from_memory", _ROCKE_MEMORY),
        lambda a, _b: _flag(a.airway.receding_mandible),
        domain="jaw",
    ),
    Factor(
        "protruding_incisors",
        "Protruding maxillary incisors",
        "difficulty",
        "relative_risk",
        8.0,
        Evidence("rocke1992", "from_memory", _ROCKE_MEMORY),
        lambda a, _b: _flag(a.airway.protruding_incisors),
        domain="jaw",
    ),
    Factor(
        "upper_lip_bite_3",
        "Upper lip bite class 3",
        "difficulty",
        "likelihood_ratio",
        14.0,
        Evidence("detsky2019", "published", "positive likelihood ratio; classes per Khan 2003"),
        _ulbt,
        domain="jaw",
    ),
    Factor(
        "thyromental_short",
        "Thyromental distance short (< 6 cm)",
        "difficulty",
        "likelihood_ratio",
        3.3,
        Evidence(
            "detsky2019",
            "published",
            "LR+ pooled over cut-offs < 4 to < 7 cm; 6 cm (Patil) from memory",
        ),
        lambda a, _b: _below(a.airway.thyromental_cm, THYROMENTAL_SHORT_CM, "cm"),
        weight_normal=0.63,  # Detsky 2019 negative likelihood ratio
        domain="jaw",
    ),
    Factor(
        "sternomental_short",
        "Sternomental distance short (< 12.5 cm)",
        "difficulty",
        "likelihood_ratio",
        4.1,
        Evidence(
            "detsky2019",
            "published",
            "LR+ pooled over cut-offs < 12 to 15 cm; 12.5 cm (Savva) from memory",
        ),
        lambda a, _b: _below(a.airway.sternomental_cm, STERNOMENTAL_SHORT_CM, "cm"),
        weight_normal=0.65,  # Detsky 2019 negative likelihood ratio
        domain="neck",
    ),
    Factor(
        "mouth_opening_small",
        "Inter-incisor gap small (< 4 cm)",
        "difficulty",
        "likelihood_ratio",
        3.6,
        Evidence("detsky2019", "published", "LR+ pooled over cut-offs < 2 to 5 cm"),
        lambda a, _b: _below(a.airway.mouth_opening_cm, MOUTH_OPENING_SMALL_CM, "cm"),
        weight_normal=0.71,  # Detsky 2019 negative likelihood ratio
        domain="jaw",
    ),
    Factor(
        "neck_movement_reduced",
        "Neck movement reduced or fixed",
        "difficulty",
        "likelihood_ratio",
        4.2,
        Evidence("detsky2019", "published", "LR+ for impaired neck mobility"),
        _neck_movement,
        weight_normal=0.77,  # Detsky 2019 negative likelihood ratio
        domain="neck",
    ),
    Factor(
        "jaw_protrusion_limited",
        "Jaw protrusion limited",
        "difficulty",
        "likelihood_ratio",
        5.5,
        Evidence("detsky2019", "published", "LR+ for impaired mandibular protrusion"),
        _jaw,
        weight_normal=0.78,  # Detsky 2019 negative likelihood ratio
        domain="jaw",
    ),
    Factor(
        "snoring",
        "History of snoring",
        "difficulty",
        "likelihood_ratio",
        3.4,
        Evidence("detsky2019", "published", "LR+ for a history of snoring"),
        lambda a, _b: _flag(a.history.snoring),
        weight_normal=0.65,  # Detsky 2019 negative likelihood ratio
        domain="soft_tissue",
    ),
    Factor(
        "bmi",
        "BMI above 25 (per kg/m²)",
        "difficulty",
        "odds_ratio_per_unit",
        1.06,
        Evidence(
            "quinn2013",
            "published",
            "adjusted odds ratio of failed intubation per kg/m²; counted above 25 (project rule)",
        ),
        _bmi,
        domain="habitus",
    ),
    Factor(
        "age",
        "Age above 35 (per year)",
        "difficulty",
        "odds_ratio_per_unit",
        1.07,
        Evidence(
            "quinn2013",
            "published",
            "adjusted odds ratio of failed intubation per year; counted above 35 "
            "(McKeen 2011 threshold)",
        ),
        _age,
        domain="age",
    ),
    Factor(
        "preeclampsia_without_severe",
        "Pre-eclampsia without severe features",
        "difficulty",
        "project_ratio",
        1.5,
        Evidence(
            "project",
            "project_rule",
            "no published ratio; airway narrower in pre-eclampsia (Izci 2003)",
        ),
        _preeclampsia("without_severe_features"),
        prepares="smaller tracheal tubes; look for airway oedema just before induction",
        domain="soft_tissue",
    ),
    Factor(
        "preeclampsia_with_severe",
        "Pre-eclampsia with severe features",
        "difficulty",
        "project_ratio",
        2.0,
        Evidence(
            "project",
            "project_rule",
            "no published ratio; airway narrower in pre-eclampsia (Izci 2003)",
        ),
        _preeclampsia("with_severe_features"),
        prepares=PRESSOR_RESPONSE_PREPARATION,
        domain="soft_tissue",
    ),
    Factor(
        "airway_oedema_signs",
        "Signs of airway oedema",
        "difficulty",
        "project_ratio",
        2.0,
        Evidence(
            "project",
            "project_rule",
            "no published ratio; Rocke 1992 found facial oedema and swollen tongue "
            "did not predict difficult intubation, but airway oedema predicted "
            "hypoxaemia in the Cape Town registry",
        ),
        _oedema,
        prepares="smaller tubes (down to 5.0-5.5 mm); front-of-neck kit open; "
        "expect rapid desaturation",
        domain="soft_tissue",
    ),
    Factor(
        "stridor",
        "Stridor",
        "override",
        "rule",
        None,
        Evidence(
            "common_practice",
            "common_practice",
            "stridor means critical airway narrowing: senior-led plan",
        ),
        _stridor,
        prepares="senior anaesthetist present; consider awake technique; front-of-neck kit open",
    ),
    Factor(
        "previous_failed_intubation",
        "Previous failed intubation",
        "override",
        "rule",
        None,
        Evidence("common_practice", "common_practice", "known failed airway"),
        _intubation("failed"),
        prepares="obtain the previous anaesthetic record; senior-led plan",
    ),
    Factor(
        "previous_difficult_intubation",
        "Previous difficult intubation",
        "override",
        "rule",
        None,
        Evidence("common_practice", "common_practice", "known difficult airway"),
        _intubation("difficult"),
        prepares="obtain the previous anaesthetic record; senior-led plan",
    ),
    Factor(
        "large_breasts",
        "Large breasts",
        "difficulty",
        "project_ratio",
        LARGE_BREASTS_RATIO,
        Evidence(
            "project",
            "project_rule",
            "no published ratio; enlarged breasts get in the way of the laryngoscope "
            "handle (Khan 2014), the reason the short-handled laryngoscope was made "
            "(Datta 1981)",
        ),
        lambda a, _b: _flag(a.airway.large_breasts),
        prepares="short-handled laryngoscope; ramp; assistant retracts breasts "
        "caudally or tapes them",
        domain="habitus",
    ),
    Factor(
        "in_labour",
        "In labour",
        "preparation",
        "rule",
        None,
        Evidence(
            "kodali2008",
            "published",
            "Mallampati rose by 1 class or more in 23 of 61 women (38%) during labour",
        ),
        _labour,
        prepares="reassess Mallampati immediately before induction; full-stomach precautions",
    ),
    Factor(
        "difficult_mask_ventilation",
        "Previous difficult mask ventilation",
        "preparation",
        "rule",
        None,
        Evidence("common_practice", "common_practice"),
        lambda a, _b: _flag(a.history.difficult_mask_ventilation),
        prepares="two-person mask technique with oral airway; supraglottic airway "
        "in hand; low threshold to wake",
    ),
    Factor(
        "obstructive_sleep_apnoea",
        "Obstructive sleep apnoea",
        "preparation",
        "rule",
        None,
        Evidence("common_practice", "common_practice"),
        lambda a, _b: _flag(a.history.obstructive_sleep_apnoea),
        prepares="expect obstruction and rapid desaturation; high-flow nasal oxygen; "
        "oral airway ready",
    ),
    Factor(
        "neck_circumference_large",
        "Neck circumference > 43 cm",
        "preparation",
        "rule",
        None,
        Evidence(
            "handbook_bedside",
            "from_memory",
            "43 cm from a handbook table that names no primary study (probably obese "
            "cohorts); the same handbook calls it the strongest predictor of impossible "
            "mask ventilation",
        ),
        _neck_circumference,
        prepares="difficult mask ventilation likely: two-person technique, "
        "supraglottic airway in hand",
    ),
    Factor(
        "low_platelets",
        "Platelets < 70 x10^9/L",
        "preparation",
        "rule",
        None,
        Evidence("bauer2021", "from_memory", "threshold for neuraxial block"),
        _platelets,
        prepares="regional anaesthesia may be contraindicated; gentle laryngoscopy, "
        "no nasal instrumentation (bleeding)",
    ),
)

BY_ID: dict[str, Factor] = {f.id: f for f in CATALOGUE}
