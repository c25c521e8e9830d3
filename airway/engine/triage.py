"""Clinic triage flags: what a pre-assessment clinic arranges for a woman now.

Each flag's thresholds are written once, here, and its printed wording is made
from them, so the rule shown on the summary is the rule applied.
"""

from typing import NamedTuple

from ..sources import Evidence
from .oxygenation import SHORT_MINUTES
from .plan_model import Plan

SENIOR_REVIEW_FROM_LEVEL = 3  # project rule: clinic triage threshold
EARLY_EPIDURAL_FROM_LEVEL = 3  # common practice: early neuraxial analgesia
EARLY_EPIDURAL_FROM_BMI = 40.0  # common practice
AWAKE_OR_REGIONAL_LEVEL = 4  # project rule: level-4 airway


class Flag(NamedTuple):
    id: str
    name: str  # as a summary's column shows it
    rule: str  # when it is raised, in words, printed in the summary's legend
    evidence: Evidence


FLAGS: tuple[Flag, ...] = (
    Flag(
        id="senior_review",
        name="senior review",
        rule=f"airway level {SENIOR_REVIEW_FROM_LEVEL} or more, or SpO2 90% "
        f"predicted within {SHORT_MINUTES:g} minutes (the plan's short apnoea time)",
        evidence=Evidence("project", "project_rule", "clinic triage threshold"),
    ),
    Flag(
        id="early_epidural",
        name="early epidural",
        rule=f"discuss an early epidural: airway level {EARLY_EPIDURAL_FROM_LEVEL} or more, or "
        f"BMI {EARLY_EPIDURAL_FROM_BMI:g} or more (a working epidural in labour can spare her "
        "a general anaesthetic)",
        evidence=Evidence("common_practice", "common_practice", "early neuraxial analgesia"),
    ),
    Flag(
        id="awake_or_regional",
        name="awake / regional",
        rule=f"plan an awake or regional technique: airway level {AWAKE_OR_REGIONAL_LEVEL} "
        "(stridor, a previous failed or difficult intubation, or the index)",
        evidence=Evidence("project", "project_rule", "level-4 airway"),
    ),
)


def _raised(flag_id: str, plan: Plan) -> bool:
    level, bmi = plan.risk.level, plan.body.bmi
    if flag_id == "senior_review":
        return level >= SENIOR_REVIEW_FROM_LEVEL or plan.oxygenation.short
    if flag_id == "early_epidural":
        heavy = bmi is not None and bmi >= EARLY_EPIDURAL_FROM_BMI
        return level >= EARLY_EPIDURAL_FROM_LEVEL or heavy
    return level == AWAKE_OR_REGIONAL_LEVEL


def flags_for(plan: Plan) -> tuple[str, ...]:
    """The ids of the :data:`FLAGS` raised for this plan, in their order."""
    return tuple(f.id for f in FLAGS if _raised(f.id, plan))


def drivers(plan: Plan, most: int = 3) -> str:
    """The factors that drove the level: overrides, then the largest contributions."""
    r = plan.risk
    ranked = sorted(
        (f for f in r.factors if f.present and f.role == "difficulty" and f.contribution > 0),
        key=lambda f: -f.contribution,
    )
    names = [*r.overrides, *(f.label for f in ranked)]
    return "; ".join(names[:most]) or "none found"
