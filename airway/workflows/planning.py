"""One woman's plan with a unit's files: the files read, then the engine.

The engine (:func:`airway.engine.plan.build_plan`) takes the catalogue and the
checklists as values; this is where they come from when a caller has none: the
shipped files.
"""

from importlib import resources

from ..assessment import Assessment
from ..catalogue import Catalogue
from ..checklist import Checklist
from ..engine.compare import compare_plans
from ..engine.plan import build_plan
from ..engine.plan_model import Comparison, Plan
from ..loading import parse_assessment, read_assessment
from ..unit.catalogue import load_catalogue
from ..unit.checklists import load_checklists
from ..unit.config import Unit

DEMO = "data/demo.toml"


def plan_for(
    assessment: Assessment,
    catalogue: Catalogue | None = None,
    checklists: tuple[Checklist, ...] | None = None,
) -> Plan:
    """Her plan with these unit files; the shipped catalogue and checklists where None."""
    return build_plan(
        assessment,
        load_catalogue() if catalogue is None else catalogue,
        load_checklists() if checklists is None else checklists,
    )


def demo_assessment() -> Assessment:
    """The built-in demo: an invented woman (no real person)."""
    text = resources.files("airway").joinpath(DEMO).read_text("utf-8")
    return parse_assessment(text, "built-in demo", "toml")


def plan_since(
    assessment: Assessment, unit: Unit, since: str | None = None, notes: list[str] | None = None
) -> Plan:
    """Her plan with the unit's files; with ``since``, what changed from that earlier
    assessment (a file, a saved plan standing for the assessment it was made from, or a
    FHIR Bundle; how it was read is added to ``notes``)."""
    plan = build_plan(assessment, unit.catalogue, unit.checklists)
    if since is None:
        return plan
    return with_changes_since(plan, read_assessment(since, notes), unit)


def with_changes_since(plan: Plan, earlier: Assessment, unit: Unit) -> Plan:
    """The plan with what changed since the earlier assessment, replanned under the same
    rules and unit files (dangerous changes first)."""
    before = build_plan(earlier, unit.catalogue, unit.checklists)
    return plan._replace(changes_since=compare_plans(before, plan))


def reassess(
    earlier: str, later: str, unit: Unit, notes: list[str] | None = None
) -> tuple[Comparison, Plan]:
    """What changed from the earlier assessment file (or saved plan, or FHIR Bundle) to
    the later one, and the later plan."""
    before = build_plan(read_assessment(earlier, notes), unit.catalogue, unit.checklists)
    after = build_plan(read_assessment(later, notes), unit.catalogue, unit.checklists)
    return compare_plans(before, after), after
