"""The plan as data: what :func:`airway.plan.build_plan` returns and every renderer reads.

Models only, no logic: the checklist filler (:mod:`airway.checklists`) and the
plan builder (:mod:`airway.plan`) both import from here, so imports run one
way: ``plan`` -> ``checklists`` -> ``plan_model``.
"""

from __future__ import annotations

from pydantic import BaseModel, ConfigDict

from .assessment import Assessment
from .body import BodySize
from .decision import Decision
from .doses import Dose
from .equipment import Equipment
from .oxygenation import Oxygenation
from .scoring import Risk


class RenderedItem(BaseModel):
    model_config = ConfigDict(frozen=True)
    text: str
    checkbox: bool


class RenderedSection(BaseModel):
    model_config = ConfigDict(frozen=True)
    title: str
    items: tuple[RenderedItem, ...]


class RenderedChecklist(BaseModel):
    """A checklist with conditions applied and values filled in for one plan."""

    model_config = ConfigDict(frozen=True)
    title: str
    sheet: str
    sections: tuple[RenderedSection, ...]


class Step(BaseModel):
    """One step of the sequence, with the woman's values filled in."""

    model_config = ConfigDict(frozen=True)
    id: str
    phase: str
    title: str
    actions: tuple[str, ...]
    summary: str  # one line with the woman's values, for the one-screen view
    basis: str = ""


class GeneratedBy(BaseModel):
    model_config = ConfigDict(frozen=True)
    tool: str
    version: str
    rules_version: str


class Change(BaseModel):
    """One difference between an earlier and a later assessment of the same woman."""

    model_config = ConfigDict(frozen=True)
    kind: str  # "identity", "level", "finding", "factor", "equipment", "dose", "oxygenation"
    what: str
    before: str
    after: str
    danger: float  # > 0: the later plan is more dangerous on this count; < 0: less; 0: neither


class Comparison(BaseModel):
    """What changed since an earlier assessment, the most dangerous changes first."""

    model_config = ConfigDict(frozen=True)
    earlier_sha256: str
    earlier_assessed_on: str | None
    later_assessed_on: str | None
    more_dangerous: bool  # any change with danger > 0
    plan_changed: bool  # level, tubes, supraglottic size, doses or decision differ
    changes: tuple[Change, ...]


class Plan(BaseModel):
    """Everything a renderer shows. Renderers format; they never compute."""

    model_config = ConfigDict(frozen=True)
    generated_by: GeneratedBy
    input_sha256: str
    assessment: Assessment
    risk: Risk
    body: BodySize
    equipment: Equipment
    doses: tuple[Dose, ...]
    decision: Decision
    oxygenation: Oxygenation
    steps: tuple[Step, ...]
    preparation: tuple[str, ...]
    not_assessed: tuple[str, ...]
    warnings: tuple[str, ...]
    cautions: tuple[str, ...]
    checklists: tuple[RenderedChecklist, ...] = ()
    changes_since: Comparison | None = None  # set by `airway plan LATER --since EARLIER`

    def dose(self, drug: str) -> Dose:
        """The computed dose of one drug."""
        return next(d for d in self.doses if d.drug == drug)
