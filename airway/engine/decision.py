"""The wake-or-proceed decision, made before induction.

The factors are those the OAA/DAS 2015 obstetric guidance lists for deciding,
before induction, whether to wake the mother or proceed with surgery if
intubation fails (Mushambi 2015, Table 1): urgency from the maternal or fetal
condition, the anaesthetist's seniority, obesity, surgical complexity,
aspiration risk and how hard an alternative (regional or awake) technique
would be. The direction each grade points is from memory of that guidance;
the points and the way they are summed are this project's rule. The tool
recommends; the clinician ticks the final decision.
"""

from typing import NamedTuple

from ..assessment import Assessment
from ..sources import Evidence
from .body import BodySize
from .factors import OEDEMA_SIGNS_NOT_STRIDOR, PLATELETS_LOW_10E9

FACTOR_LIST_EVIDENCE = Evidence("mushambi2015", "published", "factor list (Table 1)")
GRADING_EVIDENCE = Evidence("mushambi2015", "from_memory", "direction of each grade")
POINTS_EVIDENCE = Evidence("project", "project_rule", "points per grade and their sum")

# Urgency dominates: no other single factor should outweigh it (project rule).
URGENCY_POINTS = {1: 4, 2: 2, 3: -3, 4: -4}
# The four categories of Lucas 2000, described in this project's words.
URGENCY_TEXT = {
    1: "category 1: her life or the baby's is in danger now",
    2: "category 2: she or the baby is compromised, without danger to life yet",
    3: "category 3: nobody is compromised, but delivery should be soon",
    4: "category 4: planned, at a time that suits her and the team",
}

# The same heading in text, Markdown and PDF.
DECISION_TITLE = "If intubation fails (decided before induction)"
ANAESTHETIST_POINTS = {"senior": 1, "intermediate": 0, "junior": -1}
GRADE_POINTS = {"low": 1, "moderate": 0, "high": -1}  # surgery, aspiration
ALTERNATIVE_POINTS = {"feasible": -1, "difficult": 0, "impossible": 1}

# How each recommendation reads: a headline for a heading, a phrase inside a sentence.
HEADLINE = {
    "wake": "WAKE",
    "proceed": "PROCEED",
    "balanced": "SENIOR CALL: the factors are even, the senior anaesthetist decides now",
    "decide_on_the_day": "DECIDE ON THE DAY, once the urgency is known",
}
PHRASE = {
    "wake": "wake her",
    "proceed": "proceed with surgery",
    "balanced": "a senior call: the factors are even, so the senior anaesthetist decides "
    "now, before induction",
    "decide_on_the_day": "decide on the day, once the urgency is known",
}


# A recommendation in two or three words, for lists such as "category 1: proceed".
SHORT = {
    "wake": "wake",
    "proceed": "proceed",
    "balanced": "senior call",
    "decide_on_the_day": "decide on the day",
}


def by_category_text(if_category: dict[str, str]) -> str:
    """'if urgency category 1 or 2: proceed; category 3 or 4: wake' for a clinic plan."""
    groups: dict[str, list[str]] = {}
    for category, recommendation in if_category.items():
        groups.setdefault(recommendation, []).append(category)
    return "if urgency category " + "; category ".join(
        f"{' or '.join(cats)}: {SHORT[rec]}" for rec, cats in groups.items()
    )


def at_a_glance(recommendation: str, if_category: dict[str, str] | None) -> str:
    """The decision in a few words for a list: 'wake', 'senior call', or for a clinic
    plan the choice by urgency ('if urgency category 1 or 2: proceed; ...')."""
    return by_category_text(if_category) if if_category else SHORT[recommendation]


class DecisionFactor(NamedTuple):
    name: str
    finding: str
    points: int
    points_to: str  # "wake", "proceed", "neither", "unknown"
    derived: bool  # derived from other findings rather than stated


class Decision(NamedTuple):
    """The pre-made decision for the moment intubation has failed."""

    recommendation: str  # "wake", "proceed", "balanced", "decide_on_the_day"
    headline: str  # HEADLINE[recommendation]
    phrase: str  # PHRASE[recommendation]
    total: int
    factors: tuple[DecisionFactor, ...]
    if_category: dict[str, str]  # when urgency is not yet known: category -> recommendation
    conditions: tuple[str, ...]
    basis: tuple[str, ...]


def _direction(points: int | None) -> str:
    if points is None:
        return "unknown"
    return "proceed" if points > 0 else "wake" if points < 0 else "neither"


def _factor(name: str, finding: str, points: int | None, derived: bool = False) -> DecisionFactor:
    return DecisionFactor(
        name=name,
        finding=finding,
        points=points or 0,
        points_to=_direction(points),
        derived=derived,
    )


def _obesity(body: BodySize) -> DecisionFactor:
    if body.bmi is None:
        return _factor("Obesity", "BMI not known (height missing)", None)
    b = body.bmi
    points = 1 if b < 30 else 0 if b < 35 else -1 if b < 40 else -2
    return _factor("Obesity", f"BMI {b:.1f}", points)


def _aspiration(a: Assessment) -> DecisionFactor:
    stated = a.context.aspiration_risk
    if stated is not None:
        return _factor("Aspiration risk", stated, GRADE_POINTS[stated])
    if a.patient.in_labour:
        return _factor("Aspiration risk", "high (in labour)", GRADE_POINTS["high"], derived=True)
    return _factor("Aspiration risk", "not stated", None)


def _alternative(a: Assessment) -> DecisionFactor:
    stated = a.context.regional_alternative
    if stated is not None:
        return _factor(
            "Alternative technique (regional or awake)", stated, ALTERNATIVE_POINTS[stated]
        )
    platelets = a.preeclampsia.platelets_10e9_per_l
    if platelets is not None and platelets < PLATELETS_LOW_10E9:
        return _factor(
            "Alternative technique (regional or awake)",
            f"difficult (platelets {platelets:g} x10^9/L)",
            ALTERNATIVE_POINTS["difficult"],
            derived=True,
        )
    return _factor("Alternative technique (regional or awake)", "not stated", None)


def _anticipated_hazards(a: Assessment) -> list[DecisionFactor]:
    # Guidance adds these after failure; known before induction they already lean to waking.
    out = []
    signs = set(a.preeclampsia.signs)
    if "stridor" in signs or signs & set(OEDEMA_SIGNS_NOT_STRIDOR):
        out.append(_factor("Airway hazard foreseen", "airway oedema signs", -1))
    if a.history.difficult_mask_ventilation:
        out.append(_factor("Airway hazard foreseen", "previous difficult mask ventilation", -1))
    return out


def _recommend(total: int) -> str:
    return "proceed" if total > 0 else "wake" if total < 0 else "balanced"


# The decision's sources, the same for every woman.
_BASIS = (
    FACTOR_LIST_EVIDENCE.describe(),
    GRADING_EVIDENCE.describe(),
    POINTS_EVIDENCE.describe(),
)


def decide(assessment: Assessment, body: BodySize) -> Decision:
    """Pre-induction recommendation, with the direction of every factor."""
    c = assessment.context
    others = [
        _factor(
            "Anaesthetist",
            c.anaesthetist or "not stated",
            None if c.anaesthetist is None else ANAESTHETIST_POINTS[c.anaesthetist],
        ),
        _obesity(body),
        _factor(
            "Surgical complexity",
            c.surgical_complexity or "not stated",
            None if c.surgical_complexity is None else GRADE_POINTS[c.surgical_complexity],
        ),
        _aspiration(assessment),
        _alternative(assessment),
        *_anticipated_hazards(assessment),
    ]
    rest = sum(f.points for f in others)
    if c.urgency_category is None:
        urgency = _factor(
            "Maternal or fetal condition (urgency)", "not known yet (clinic plan)", None
        )
        recommendation = "decide_on_the_day"
        if_category = {str(k): _recommend(rest + p) for k, p in URGENCY_POINTS.items()}
    else:
        cat = c.urgency_category
        urgency = _factor(
            "Maternal or fetal condition (urgency)", URGENCY_TEXT[cat], URGENCY_POINTS[cat]
        )
        recommendation = _recommend(rest + URGENCY_POINTS[cat])
        if_category = {}
    factors = (urgency, *others)
    return Decision(
        recommendation=recommendation,
        headline=HEADLINE[recommendation],
        phrase=PHRASE[recommendation],
        total=sum(f.points for f in factors),
        factors=factors,
        if_category=if_category,
        conditions=(
            "Proceed only while the supraglottic airway or face mask oxygenates and "
            "ventilates her well; otherwise wake her.",
            "Judge again once it has failed: good ventilation through a second-generation "
            "device favours going on; oedema, bleeding, trauma or poor ventilation favour waking.",
            "Oxygenation failing: can't intubate, can't oxygenate: front-of-neck access.",
        ),
        basis=_BASIS,
    )
