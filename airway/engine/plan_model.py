"""The plan as data: what :func:`airway.engine.plan.build_plan` returns and every renderer reads.

Models, and the few helpers that turn them into JSON data and back; no planning
logic: the checklist filler (:mod:`airway.engine.checklists`) and the plan builder
(:mod:`airway.engine.plan`) both import from here, so imports run one way: ``plan`` ->
``checklists`` -> ``plan_model``.

What the engine computes is held in typed named tuples: immutable, built without
validation (the engine's own values, checked by the tests for their declared
types) and cheap to define at start-up and to build thousands of times in a
clinic list. Only what comes from outside is validated by pydantic: the
assessment, unit files, and a saved plan read back (:func:`plan_from_data`).
"""

import json
from functools import cache
from typing import TYPE_CHECKING, Any, NamedTuple

from pydantic import BaseModel

from ..assessment import Assessment
from .body import BodySize
from .decision import Decision
from .doses import Dose
from .equipment import Equipment
from .oxygenation import Oxygenation
from .scoring import Risk

if TYPE_CHECKING:
    from pydantic import TypeAdapter


class RenderedItem(NamedTuple):
    text: str
    checkbox: bool


class RenderedSection(NamedTuple):
    title: str
    items: tuple[RenderedItem, ...]


class RenderedChecklist(NamedTuple):
    """A checklist with conditions applied and values filled in for one plan."""

    title: str
    sheet: str
    sections: tuple[RenderedSection, ...]


class Step(NamedTuple):
    """One step of the sequence, with the woman's values filled in."""

    id: str
    phase: str
    title: str
    actions: tuple[str, ...]
    summary: str  # one line with the woman's values, for the one-screen view
    basis: str = ""


class GeneratedBy(NamedTuple):
    tool: str
    version: str
    rules_version: str


class Change(NamedTuple):
    """One difference between an earlier and a later assessment of the same woman."""

    kind: str  # "identity", "level", "finding", "factor", "equipment", "dose", "oxygenation"
    what: str
    before: str
    after: str
    danger: float  # > 0: the later plan is more dangerous on this count; < 0: less; 0: neither
    # In clinical words, for a finding: 'Signs of airway oedema now' ('' when ``what`` reads
    # already), and why the change matters clinically ('a new sign of airway oedema').
    label: str = ""
    why: str = ""


class Comparison(NamedTuple):
    """What changed since an earlier assessment, the most dangerous changes first."""

    earlier_sha256: str
    earlier_assessed_on: str | None
    later_assessed_on: str | None
    more_dangerous: bool  # any change with danger > 0
    plan_changed: bool  # level, tubes, supraglottic size, doses or decision differ
    changes: tuple[Change, ...]


class Plan(NamedTuple):
    """Everything a renderer shows. Renderers format; they never compute."""

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


def plain(value: Any) -> Any:
    """JSON-ready data: each record as an object (field order kept), each tuple as a
    list, the assessment as pydantic writes it in JSON mode."""
    if isinstance(value, tuple):
        fields = getattr(value, "_fields", None)
        if fields is None:
            return [plain(v) for v in value]
        return {name: plain(v) for name, v in zip(fields, value, strict=True)}
    if isinstance(value, list):
        return [plain(v) for v in value]
    if isinstance(value, dict):
        return {k: plain(v) for k, v in value.items()}
    if isinstance(value, BaseModel):
        return value.model_dump(mode="json")
    return value


def saved_object(text: str | bytes) -> dict[str, Any] | None:
    """The JSON object in a saved plan file, or None when the file holds anything else:
    text that is not JSON or not UTF-8, an array or a number, or nesting far too deep
    to be a plan (which the standard library's decoder meets with RecursionError)."""
    try:
        data = json.loads(text, object_pairs_hook=_refuse_duplicates)
    except (ValueError, RecursionError):  # a duplicate key is a ValueError too
        return None
    return data if isinstance(data, dict) else None


def _refuse_duplicates(pairs: list[tuple[str, Any]]) -> dict[str, Any]:
    """A key given twice makes the file no plan: which value would be meant?"""
    keys = [k for k, _ in pairs]
    if len(set(keys)) != len(keys):
        raise ValueError("duplicate key")
    return dict(pairs)


@cache
def _plan_adapter() -> "TypeAdapter[Plan]":
    from pydantic import TypeAdapter

    return TypeAdapter(Plan)


def plan_from_data(data: Any) -> Plan:
    """A saved JSON plan read back, every field checked against the model.

    Raises pydantic's ``ValidationError`` on anything that is not a plan of this
    version (a missing or unknown field, a wrong type).
    """
    return _plan_adapter().validate_python(data)
