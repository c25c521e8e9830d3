"""The wake-or-proceed decision, made before induction.

The rows are those of the OAA/DAS 2015 obstetric guideline's table of factors
for deciding whether to wake the mother or proceed with surgery if intubation
fails (Mushambi 2015, Table 1): maternal condition, fetal condition (here the
urgency category), the anaesthetist, obesity, surgical factors, aspiration
risk, an alternative technique, and the two rows judged after failure (the
airway device and ventilation, airway hazards), which when foreseen before
induction already lean to waking. Each row is graded from 1 (the wake end) to
4 (the proceed end); which finding sits in which grade is from memory of that
table. A grade becomes points, -2, -1, +1, +2; urgency and the airway-hazard
rows weigh double (category 2 near neutral). Four rules stand above the sum
(project rules): maternal cardiac arrest or peri-arrest means proceed whatever
else; two foreseen airway hazards mean wake; without compromise (category 3 or 4)
and with another technique possible, wake; one foreseen hazard is never
outvoted into proceed, only into a senior call. The tool recommends; the
clinician ticks the final decision.
"""

from typing import NamedTuple

from ..assessment import Assessment
from ..sources import Evidence
from .body import BodySize
from .factors import PLATELETS_LOW_10E9

FACTOR_LIST_EVIDENCE = Evidence("mushambi2015", "published", "factor list (Table 1)")
GRADING_EVIDENCE = Evidence("mushambi2015", "from_memory", "the grade of each finding")
POINTS_EVIDENCE = Evidence(
    "project", "project_rule", "points per grade, hazards weighing double, the rules above the sum"
)

# Grade 1 is the wake end of a row, grade 4 the proceed end (Mushambi 2015, Table 1).
GRADE_POINTS = {1: -2, 2: -1, 3: 1, 4: 2}
HAZARD_WEIGHT = 2  # airway hazards weigh double (project rule)

# Fetal condition: category 1 (immediate threat) sits at the proceed end; category 2
# (compromise, usually corrected by resuscitation in utero) in grade 2, next to
# neutral on the wake side; categories 3 and 4 (no compromise) at the wake end.
# Urgency is the table's first concern and weighs double, except that category 2
# counts only -1, near neutral (project rule); category 3 counts -3, as delivery
# should still be soon.
URGENCY_GRADE = {1: 4, 2: 2, 3: 1, 4: 1}
URGENCY_POINTS = {1: 4, 2: -1, 3: -3, 4: -4}
# The four categories of Lucas 2000, described in this project's words.
URGENCY_TEXT = {
    1: "category 1: her life or the baby's is in danger now",
    2: "category 2: she or the baby is compromised, without danger to life yet",
    3: "category 3: nobody is compromised, but delivery should be soon",
    4: "category 4: planned, at a time that suits her and the team",
}
ANAESTHETIST_GRADE = {"junior": 2, "intermediate": 3, "senior": 4}
SURGERY_GRADE = {"high": 1, "moderate": 2, "low": 4}
ASPIRATION_GRADE = {"high": 1, "moderate": 3, "low": 4}
ASPIRATION_IN_LABOUR_GRADE = 2  # fasted, in labour: grade 2 of the table
ALTERNATIVE_GRADE = {"feasible": 1, "difficult": 2, "impossible": 4}
LOW_PLATELETS_GRADE = 3  # regional block relatively contraindicated
# Obesity: normal BMI at the proceed end, super-morbid at the wake end. The BMI
# boundaries are WHO's 30 and 40 and 50 for super-morbid (common usage).
OBESITY_BANDS = ((30.0, 4), (40.0, 3), (50.0, 2))
# Airway hazards foreseen before induction: stridor, a voice change or a swollen
# tongue stand for laryngeal or airway oedema (grade 1); the softer oedema signs
# sit in grade 2.
OEDEMA_GRADE = {
    "stridor": 1,
    "voice_change": 1,
    "tongue_swelling": 1,
    "facial_oedema": 2,
    "new_snoring": 2,
    "breathless_lying_flat": 2,
}

# Without maternal or fetal compromise (categories 3 and 4) nothing in the table weighs
# towards proceeding but the want of an alternative: with one (regional or awake not
# impossible), wake (project rule, the table's reading for planned surgery).
NO_COMPROMISE = (3, 4)

# The same heading in text, Markdown and PDF.
DECISION_TITLE = "If intubation fails (decided before induction)"

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
    grade: int | None = None  # 1 (wake end) to 4 (proceed end); None when not known


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
    rule: str = ""  # the rule above the sum that decided, if one did


def _direction(points: int | None) -> str:
    if points is None:
        return "unknown"
    return "proceed" if points > 0 else "wake" if points < 0 else "neither"


def _graded(
    name: str, finding: str, grade: int | None, weight: int = 1, derived: bool = False
) -> DecisionFactor:
    points = None if grade is None else GRADE_POINTS[grade] * weight
    return DecisionFactor(
        name=name,
        finding=finding,
        points=points or 0,
        points_to=_direction(points),
        derived=derived,
        grade=grade,
    )


def _obesity(body: BodySize) -> DecisionFactor:
    b = body.bmi
    grade = next((g for limit, g in OBESITY_BANDS if b < limit), 1)
    assumed = " (height assumed)" if body.height_assumed else ""
    return _graded("Obesity", f"BMI {b:.1f}{assumed}", grade)


def _aspiration(a: Assessment) -> DecisionFactor:
    stated = a.context.aspiration_risk
    if stated is not None:
        return _graded("Aspiration risk", stated, ASPIRATION_GRADE[stated])
    if a.patient.in_labour:
        return _graded("Aspiration risk", "in labour", ASPIRATION_IN_LABOUR_GRADE, derived=True)
    return _graded("Aspiration risk", "not stated", None)


_ALTERNATIVE = "Alternative technique (regional or awake)"


def _alternative(a: Assessment) -> DecisionFactor:
    stated = a.context.regional_alternative
    if stated is not None:
        return _graded(_ALTERNATIVE, stated, ALTERNATIVE_GRADE[stated])
    platelets = a.preeclampsia.platelets_10e9_per_l
    if platelets is not None and platelets < PLATELETS_LOW_10E9:
        return _graded(
            _ALTERNATIVE,
            f"regional relatively contraindicated (platelets {platelets:g} x10^9/L)",
            LOW_PLATELETS_GRADE,
            derived=True,
        )
    return _graded(_ALTERNATIVE, "not stated", None)


def _hazards(a: Assessment) -> list[DecisionFactor]:
    """Airway hazards foreseen before induction, each at the wake end of its row."""
    out = []
    signs = [s for s in a.preeclampsia.signs if s in OEDEMA_GRADE]
    if signs:
        grade = min(OEDEMA_GRADE[s] for s in signs)
        finding = ", ".join(s.replace("_", " ") for s in signs)
        out.append(_graded("Airway hazard: oedema", finding, grade, HAZARD_WEIGHT))
    if a.history.difficult_mask_ventilation:
        out.append(
            _graded("Airway hazard: mask ventilation", "previously difficult", 1, HAZARD_WEIGHT)
        )
    if a.history.intubation == "failed":
        out.append(_graded("Airway hazard: intubation", "failed before", 1, HAZARD_WEIGHT))
    return out


def _recommend(
    total: int, hazards: int, arrest: bool, category: int | None, alternative: bool
) -> tuple[str, str]:
    """The recommendation and the rule above the sum that made it, if any."""
    if arrest:
        return "proceed", "Maternal cardiac arrest or peri-arrest: proceed whatever else."
    if hazards >= 2:
        return "wake", "Two airway hazards foreseen: wake, whatever the urgency."
    if category in NO_COMPROMISE and alternative:
        return "wake", ("Nobody is compromised and another technique remains: wake, whatever else.")
    if hazards == 1 and total > 0:
        return "balanced", "An airway hazard foreseen is never outvoted into proceeding."
    return ("proceed" if total > 0 else "wake" if total < 0 else "balanced"), ""


# The decision's sources, the same for every woman.
_BASIS = (
    FACTOR_LIST_EVIDENCE.describe(),
    GRADING_EVIDENCE.describe(),
    POINTS_EVIDENCE.describe(),
)
_URGENCY = "Maternal or fetal condition (urgency)"


def decide(assessment: Assessment, body: BodySize) -> Decision:
    """Pre-induction recommendation, with the direction of every factor."""
    c = assessment.context
    arrest = bool(c.maternal_arrest)
    hazards = _hazards(assessment)
    others = [
        _graded(
            "Anaesthetist",
            c.anaesthetist or "not stated",
            None if c.anaesthetist is None else ANAESTHETIST_GRADE[c.anaesthetist],
        ),
        _obesity(body),
        _graded(
            "Surgical complexity",
            c.surgical_complexity or "not stated",
            None if c.surgical_complexity is None else SURGERY_GRADE[c.surgical_complexity],
        ),
        _aspiration(assessment),
        _alternative(assessment),
        *hazards,
    ]
    if arrest:
        others.insert(0, _graded("Maternal condition", "cardiac arrest or peri-arrest", 4))
    rest = sum(f.points for f in others)
    alternative = c.regional_alternative != "impossible"
    if c.urgency_category is None:
        urgency = _graded(_URGENCY, "not known yet (clinic plan)", None)
        recommendation, rule = "decide_on_the_day", ""
        if_category = {
            str(k): _recommend(rest + p, len(hazards), arrest, k, alternative)[0]
            for k, p in URGENCY_POINTS.items()
        }
    else:
        cat = c.urgency_category
        urgency = _graded(_URGENCY, URGENCY_TEXT[cat], URGENCY_GRADE[cat])._replace(
            points=URGENCY_POINTS[cat]
        )
        recommendation, rule = _recommend(
            rest + urgency.points, len(hazards), arrest, cat, alternative
        )
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
        rule=rule,
    )
