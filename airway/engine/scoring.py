"""Combine the risk factors into one index and a level from 1 to 4.

Each finding is a ratio: above 1 for an abnormal finding, below 1 for a
normal one where its source gives a negative
likelihood ratio, 1 (nothing) when it was not assessed. Findings of one anatomy
travel together (an upper lip bite class 3, a limited jaw protrusion and a
receding mandible all describe one small mandible), so within each domain only
the strongest counts: the strongest abnormal finding, or when every finding of
the domain is normal, the strongest normal one. The index is the sum of the
natural logs of the counted ratios, and the levels are cut on it so that, on the
population model of women at term (workflows/population.py), their shares match
the published incidence of difficult intubation in obstetric general
anaesthesia (docs/method.md). The factors are not independent, so the index is
a ranking calibrated to incidence, never a probability.
"""

import math
from typing import NamedTuple

from ..assessment import Assessment
from ..sources import SOURCES, Evidence
from .body import BodySize
from .factors import CATALOGUE, Factor

# Level boundaries on the index: combined ratios of 6, 40 and 200, set on the
# population model of women at term (workflows/population.py) so that levels 3-4
# together hold about as many women as the published incidence of difficult
# intubation in obstetric general anaesthesia (Odor 2021, 1 in 19; McKeen 2011,
# 4.7-5.7%; the target band 3-15%) and level 4 at most 4%, forced levels included
# (project rule; figures in docs/method.md). They are large because the ratios of
# several domains still multiply: they rank, they are not odds.
LEVEL_RATIOS = (6.0, 40.0, 200.0)
LEVEL_THRESHOLDS: tuple[float, float, float] = (
    math.log(LEVEL_RATIOS[0]),
    math.log(LEVEL_RATIOS[1]),
    math.log(LEVEL_RATIOS[2]),
)
LEVEL_EVIDENCE = Evidence(
    "project",
    "project_rule",
    "index cut at combined ratios of 6 / 40 / 200, calibrated on a population model of "
    "women at term to the published incidence of difficult intubation",
)

# A voice change or a swollen tongue (signs that the oedema has reached the airway
# itself) raise the level to at least 3 whatever the index: such a woman is prepared
# for as a difficult airway (common practice). Rocke 1992 found facial oedema and
# tongue swelling did not predict difficult intubation, but airway oedema predicted
# hypoxaemia in the Cape Town registry; the softer signs (facial oedema, new snoring,
# breathless lying flat) count only through the index.
FLOOR_SIGNS = ("voice_change", "tongue_swelling")
FLOOR_LEVEL = 3

DOMAIN_LABEL = {
    "view": "view into the mouth (Mallampati)",
    "jaw": "jaw, mouth and teeth",
    "neck": "neck",
    "soft_tissue": "upper-airway soft tissue (pre-eclampsia, oedema, snoring)",
    "habitus": "body size",
    "age": "age",
}

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
    "The index ranks risk, calibrated to the published incidence of difficult "
    "intubation: it is not a validated prediction."
)


class FactorResult(NamedTuple):
    """One factor as found in this assessment."""

    id: str
    label: str
    role: str
    kind: str
    present: bool | None  # None: not assessed
    weight: float | None
    contribution: float  # added to the index (0 unless it is its domain's counted finding)
    detail: str
    source: str
    source_short: str
    basis: str
    evidence: str
    prepares: str
    domain: str = ""
    raw: float = 0.0  # the finding's own log ratio, before the one-per-domain rule
    counted: bool = False  # the finding that speaks for its domain


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
    floors: tuple[str, ...] = ()  # findings that raised the level to a floor
    # The lowest and highest level the findings not assessed could give: all normal,
    # all abnormal.
    unassessed_range: tuple[int, int] = (1, 4)


def level_for_index(index: float) -> int:
    """Level 1-4 for a combined index."""
    return 1 + sum(index >= t for t in LEVEL_THRESHOLDS)


def _result(factor: Factor, present: bool | None, raw: float, detail: str) -> FactorResult:
    return FactorResult(
        id=factor.id,
        label=factor.label,
        role=factor.role,
        kind=factor.kind,
        present=present,
        weight=factor.weight,
        contribution=0.0,
        detail=detail,
        source=factor.evidence.source,
        source_short=SOURCES[factor.evidence.source].short,
        basis=factor.evidence.basis,
        evidence=factor.evidence.describe(),
        prepares=factor.prepares,
        domain=factor.domain,
        raw=raw,
    )


def _raw(factor: Factor, present: bool | None, units: float) -> float:
    """The finding's own log ratio: abnormal, normal, or nothing when not assessed."""
    if factor.role != "difficulty" or present is None:
        return 0.0
    return round(factor.log_weight * units if present else factor.log_weight_normal, 4)


def _evaluate(factor: Factor, assessment: Assessment, body: BodySize) -> FactorResult:
    present, units, detail = factor.read(assessment, body)
    return _result(factor, present, _raw(factor, present, units), detail if present else "")


def domain_value(raws: list[float]) -> float:
    """What one domain adds: its strongest abnormal finding, or when none is abnormal its
    strongest normal one, or nothing."""
    above = [r for r in raws if r > 0]
    if above:
        return max(above)
    return min(raws, default=0.0)


def _counted(results: tuple[FactorResult, ...]) -> tuple[FactorResult, ...]:
    """Mark the one finding that speaks for each domain, and give it its contribution."""
    chosen: dict[str, str] = {}
    for domain in dict.fromkeys(r.domain for r in results if r.domain):
        raws = [(r.raw, r.id) for r in results if r.domain == domain and r.raw != 0]
        value = domain_value([raw for raw, _ in raws])
        # Ties: the first finding of the catalogue with the domain's value speaks for it.
        strongest = next((fid for raw, fid in raws if raw == value), None)
        if strongest is not None:
            chosen[domain] = strongest
    return tuple(
        r._replace(counted=True, contribution=r.raw) if chosen.get(r.domain) == r.id else r
        for r in results
    )


def _best_and_worst(results: tuple[FactorResult, ...]) -> tuple[float, float, bool]:
    """The index if every finding not assessed were normal, and if every one were abnormal
    (one unit for per-unit findings); and whether an unassessed finding could force level 4."""
    low = high = 0.0
    for domain in dict.fromkeys(r.domain for r in results if r.domain):
        mine = [(r, BY_FACTOR[r.id]) for r in results if r.domain == domain]
        known = [r.raw for r, _ in mine if r.present is not None and r.raw != 0]
        unknown = [f for r, f in mine if r.present is None]
        normal = [min(f.log_weight, f.log_weight_normal) for f in unknown]
        abnormal = [max(f.log_weight, 0.0) for f in unknown]
        low += domain_value([x for x in known + normal if x != 0])
        high += domain_value([x for x in known + abnormal if x != 0])
    forcing = any(r.role == "override" and r.present is None for r in results)
    return low, high, forcing


BY_FACTOR = {f.id: f for f in CATALOGUE}


def _level(index: float, overrides: tuple[str, ...], floors: tuple[int, ...]) -> int:
    return 4 if overrides else max((level_for_index(index), *floors))


_SHOWN_THRESHOLDS: tuple[float, float, float] = (
    round(LEVEL_THRESHOLDS[0], 4),
    round(LEVEL_THRESHOLDS[1], 4),
    round(LEVEL_THRESHOLDS[2], 4),
)


def score(assessment: Assessment, body: BodySize) -> Risk:
    """Evaluate every catalogued factor and combine them into a :class:`Risk`."""
    results = _counted(tuple(_evaluate(f, assessment, body) for f in CATALOGUE))
    index = round(sum(r.contribution for r in results), 4)
    overrides = tuple(r.label for r in results if r.role == "override" and r.present)
    floored = [
        r
        for r in results
        if r.present
        and r.id == "airway_oedema_signs"
        and set(FLOOR_SIGNS) & set(assessment.preeclampsia.signs)
    ]
    floor_levels = tuple(FLOOR_LEVEL for _ in floored)
    index_level = level_for_index(index)
    level = _level(index, overrides, floor_levels)
    low, high, forcing = _best_and_worst(results)
    unassessed_range = (
        _level(low, overrides, floor_levels),
        4 if forcing else _level(high, overrides, floor_levels),
    )
    not_assessed = tuple(dict.fromkeys(_FINDING_OF[r.id] for r in results if r.present is None))
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
        floors=tuple(r.label for r in floored),
        unassessed_range=unassessed_range,
    )


# Several factors read one finding (Mallampati 2/3/4): list the finding once.
_FINDING = {
    "mallampati_1": "Mallampati class",
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
