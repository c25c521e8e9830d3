"""Combine the risk factors into one index and a level from 1 to 4.

The index is the sum of the natural logs of each present factor's ratio (per
unit for per-unit factors). Adding log ratios assumes the factors act
independently and multiplicatively; they do not (short neck and obesity, for
one, were collinear in Rocke 1992), so the index *ranks* risk and is never
shown as a probability.
"""

import math
from typing import NamedTuple

from ..assessment import Assessment
from ..sources import SOURCES, Evidence
from .body import BodySize
from .factors import CATALOGUE, Factor

# Level boundaries on the index (project rule): a combined ratio of 3, 10 and
# 30. Mallampati 3 alone (ln 7.58 = 2.03) lands in level 2; Mallampati 3 or 4
# with one of short neck, receding mandible or protruding incisors lands in
# level 4, in keeping with Rocke 1992's quoted combined probability of over 90%.
LEVEL_THRESHOLDS: tuple[float, float, float] = (math.log(3), math.log(10), math.log(30))
LEVEL_EVIDENCE = Evidence("project", "project_rule", "combined ratio 3 / 10 / 30")

# Each label uses words no other level uses, so that a level heard over a phone or
# read at a glance cannot be mistaken for its neighbour.
LEVEL_LABELS: dict[int, str] = {
    1: "standard care",
    2: "extra vigilance",
    3: "difficulty likely",
    4: "senior-led plan",
}


def level_heading(level: int) -> str:
    """'Airway level 3 of 4: difficulty likely': never a bare number, which a listener
    could take for a Mallampati class, a laryngoscopy grade or an urgency category."""
    return f"Airway level {level} of 4: {LEVEL_LABELS[level]}"


def thresholds_text(thresholds: tuple[float, float, float]) -> str:
    """Where each level starts on the index, every level named in full."""
    return ", ".join(
        f"airway level {n} from {t:.2f}" for n, t in zip((2, 3, 4), thresholds, strict=True)
    )


INDEPENDENCE_NOTE = (
    "The index treats the factors as independent; they are not, so it ranks risk "
    "and is not a probability."
)


class FactorResult(NamedTuple):
    """One factor as found in this assessment."""

    id: str
    label: str
    role: str
    kind: str
    present: bool | None  # None: not assessed
    weight: float | None
    contribution: float  # added to the index
    detail: str
    source: str
    source_short: str
    basis: str
    evidence: str
    prepares: str


class Risk(NamedTuple):
    """The combined airway-difficulty estimate."""

    level: int
    label: str
    index: float  # type: ignore[assignment]  # shadows tuple.index, never called
    index_level: int  # what the index alone gives, before overrides
    overrides: tuple[str, ...]
    factors: tuple[FactorResult, ...]
    not_assessed: tuple[str, ...]
    note: str
    thresholds: tuple[float, float, float]


def level_for_index(index: float) -> int:
    """Level 1-4 for a combined index."""
    return 1 + sum(index >= t for t in LEVEL_THRESHOLDS)


def _result(factor: Factor, present: bool | None, contribution: float, detail: str) -> FactorResult:
    return FactorResult(
        id=factor.id,
        label=factor.label,
        role=factor.role,
        kind=factor.kind,
        present=present,
        weight=factor.weight,
        contribution=contribution,
        detail=detail,
        source=factor.evidence.source,
        source_short=SOURCES[factor.evidence.source].short,
        basis=factor.evidence.basis,
        evidence=factor.evidence.describe(),
        prepares=factor.prepares,
    )


def _evaluate(factor: Factor, assessment: Assessment, body: BodySize) -> FactorResult:
    present, units, detail = factor.read(assessment, body)
    if not present:
        return _result(factor, present, 0.0, "")
    contribution = round(factor.log_weight * units, 4) if factor.role == "difficulty" else 0.0
    return _result(factor, True, contribution, detail)


_SHOWN_THRESHOLDS: tuple[float, float, float] = (
    round(LEVEL_THRESHOLDS[0], 4),
    round(LEVEL_THRESHOLDS[1], 4),
    round(LEVEL_THRESHOLDS[2], 4),
)


def score(assessment: Assessment, body: BodySize) -> Risk:
    """Evaluate every catalogued factor and combine them into a :class:`Risk`."""
    results = tuple(_evaluate(f, assessment, body) for f in CATALOGUE)
    index = round(sum([r.contribution for r in results]), 4)
    overrides = tuple([r.label for r in results if r.role == "override" and r.present])
    index_level = level_for_index(index)
    level = 4 if overrides else index_level
    not_assessed = tuple(dict.fromkeys([_FINDING_OF[r.id] for r in results if r.present is None]))
    return Risk(
        level=level,
        label=LEVEL_LABELS[level],
        index=index,
        index_level=index_level,
        overrides=overrides,
        factors=results,
        not_assessed=not_assessed,
        note=INDEPENDENCE_NOTE,
        thresholds=_SHOWN_THRESHOLDS,
    )


# Several factors read one finding (Mallampati 2/3/4): list the finding once.
_FINDING = {
    "mallampati_2": "Mallampati class",
    "mallampati_3": "Mallampati class",
    "mallampati_4": "Mallampati class",
    "bmi": "BMI (height)",
    "age": "age",
    "preeclampsia_without_severe": "pre-eclampsia status",
    "preeclampsia_with_severe": "pre-eclampsia status",
    "upper_lip_bite_3": "upper lip bite test",
    "thyromental_short": "thyromental distance",
    "sternomental_short": "sternomental distance",
    "mouth_opening_small": "inter-incisor gap",
    "neck_movement_reduced": "neck movement",
    "jaw_protrusion_limited": "jaw protrusion",
    "neck_circumference_large": "neck circumference",
    "low_platelets": "platelet count",
    "in_labour": "labour status",
    "previous_failed_intubation": "intubation history",
    "previous_difficult_intubation": "intubation history",
}


def finding_name(factor_id: str) -> str:
    """The finding a factor reads: the three Mallampati factors read one finding."""
    return _FINDING.get(factor_id, factor_id.replace("_", " "))


_FINDING_OF = {f.id: finding_name(f.id) for f in CATALOGUE}
