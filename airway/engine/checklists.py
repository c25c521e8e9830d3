"""Checklists filled in for one woman's plan, or for a generic trolley sheet.

A checklist file is Markdown with TOML front matter::

    ---
    title = "Before induction: team brief"
    use = ["plan"]            # "plan", "sheet" or both
    sheet = "brief"           # which sheet or plan section it fills
    paper = "A4"              # A4 or A3, for sheets
    ---

    # Roles
    - [ ] Who calls for help is named
    - [ ] Tube {{tube_first}} mm and {{tube_smallest}} mm open {when preeclampsia}

Headings are sections; task-list items (``- [ ]``) are check items. An item
may end with ``{when NAME}``, ``{when not NAME}`` or ``{when level >= N}`` to
appear only when that holds for the plan, and may show a plan value with
``{{NAME}}``. The names form the closed lists :data:`CONDITIONS` and
:data:`VALUES`; anything else is an error naming the file and the line. On a
generic trolley sheet conditions are not applied (every item shows) and values
are not allowed.
"""

from collections.abc import Callable

from ..checklist import VALUE, Checklist, Condition
from ..errors import ChecklistError
from .doses import BY_NAME
from .guidance import (
    CRICOID_ASLEEP_N,
    CRICOID_AWAKE_N,
    MAX_INTUBATION_ATTEMPTS,
    MAX_SGA_ATTEMPTS,
)
from .plan_model import Plan, RenderedChecklist, RenderedItem, RenderedSection

Cond = Callable[["Plan"], bool]

CONDITIONS: dict[str, tuple[str, Cond]] = {
    "preeclampsia": (
        "pre-eclampsia of any severity",
        lambda p: (
            p.assessment.preeclampsia.status in ("without_severe_features", "with_severe_features")
        ),
    ),
    "severe_preeclampsia": (
        "pre-eclampsia with severe features",
        lambda p: p.assessment.preeclampsia.status == "with_severe_features",
    ),
    "oedema_signs": ("any airway oedema sign", lambda p: bool(p.assessment.preeclampsia.signs)),
    "large_breasts": ("large breasts noted", lambda p: bool(p.assessment.airway.large_breasts)),
    "in_labour": ("in labour", lambda p: bool(p.assessment.patient.in_labour)),
    "obese": ("BMI 30 or more", lambda p: p.body.bmi is not None and p.body.bmi >= 30),
    "bmi_40": ("BMI 40 or more", lambda p: p.body.bmi is not None and p.body.bmi >= 40),
    "short_apnoea": ("predicted time to SpO2 90% under 3 min", lambda p: p.oxygenation.short),
    "category_1": ("category-1 urgency", lambda p: p.assessment.context.urgency_category == 1),
    "previous_difficulty": (
        "previous difficult or failed intubation",
        lambda p: p.assessment.history.intubation in ("difficult", "failed"),
    ),
}


# Values that do not depend on one woman: allowed on trolley sheets as well as plans.
UNIT_VALUES: dict[str, tuple[str, Callable[[float], str]]] = {
    "max_intubation_attempts": (
        "intubation attempts at most (OAA/DAS 2015)",
        lambda _f: str(MAX_INTUBATION_ATTEMPTS),
    ),
    "max_supraglottic_attempts": (
        "supraglottic insertion attempts at most",
        lambda _f: str(MAX_SGA_ATTEMPTS),
    ),
    "cricoid_awake_n": ("cricoid force awake, N", lambda _f: str(CRICOID_AWAKE_N)),
    "cricoid_asleep_n": ("cricoid force asleep, N", lambda _f: str(CRICOID_ASLEEP_N)),
    "sugammadex_mg_per_kg": (
        "sugammadex immediate-reversal dose, mg/kg",
        lambda _f: f"{BY_NAME['sugammadex'].mg_per_kg[0]:g}",
    ),
    "front_of_neck_tube": ("front-of-neck tube, mm (unit catalogue)", lambda f: f"{f:.1f}"),
}

Value = Callable[["Plan"], str]

VALUES: dict[str, tuple[str, Value]] = {
    "level": ("airway level 1-4 (write 'airway level {{level}}')", lambda p: str(p.risk.level)),
    "level_label": ("airway level in words", lambda p: p.risk.label),
    "tube_first": (
        "first tracheal tube, mm",
        lambda p: f"{p.equipment.tracheal_tube_mm.first:.1f}",
    ),
    "tube_backup": (
        "backup tracheal tube, mm",
        lambda p: f"{p.equipment.tracheal_tube_mm.backup:.1f}",
    ),
    "tube_smallest": (
        "smallest tracheal tube, mm",
        lambda p: f"{p.equipment.tracheal_tube_mm.smallest:.1f}",
    ),
    "supraglottic_size": ("supraglottic size", lambda p: f"{p.equipment.supraglottic_size:g}"),
    "suxamethonium_mg": ("suxamethonium range, mg", lambda p: _mg(p, "suxamethonium")),
    "rocuronium_mg": ("rocuronium range, mg", lambda p: _mg(p, "rocuronium")),
    "sugammadex_mg": ("sugammadex dose, mg", lambda p: _mg(p, "sugammadex")),
    "propofol_mg": ("propofol range, mg", lambda p: _mg(p, "propofol")),
    "minutes_to_spo2_90": (
        "predicted minutes to SpO2 90%",
        lambda p: (
            "more than 20"
            if p.oxygenation.minutes_to_spo2_90 is None
            else f"{p.oxygenation.minutes_to_spo2_90:g}"
        ),
    ),
    "decision": (
        "pre-made wake-or-proceed recommendation",
        lambda p: p.decision.phrase,
    ),
}


def _mg(plan: Plan, drug: str) -> str:
    d = plan.dose(drug)
    return (
        f"{d.dose_mg_low:g}"
        if d.dose_mg_low == d.dose_mg_high
        else (f"{d.dose_mg_low:g}-{d.dose_mg_high:g}")
    )


def _fill(text: str, value_of: Callable[[str], str]) -> str:
    return VALUE.sub(lambda m: value_of(m["name"]), text)


def _holds(condition: Condition | None, plan: Plan) -> bool:
    if condition is None:
        return True
    if condition.min_level is not None:
        return plan.risk.level >= condition.min_level
    result = CONDITIONS[condition.name or ""][1](plan)
    return not result if condition.negate else result


def _plan_value(name: str, plan: Plan) -> str:
    if name in UNIT_VALUES:
        return UNIT_VALUES[name][1](plan.equipment.front_of_neck_tube_mm)
    return VALUES[name][1](plan)


def for_plan(checklist: Checklist, plan: Plan) -> RenderedChecklist:
    """Apply conditions and fill values for one woman's plan; empty sections are left out."""
    sections = []
    for section in checklist.sections:
        items = tuple(
            RenderedItem(
                text=_fill(item.text, lambda name: _plan_value(name, plan)),
                checkbox=item.checkbox,
            )
            for item in section.items
            if _holds(item.condition, plan)
        )
        if items:
            sections.append(RenderedSection(title=section.title, items=items))
    return RenderedChecklist(
        title=checklist.meta.title, sheet=checklist.meta.sheet, sections=tuple(sections)
    )


def generic(checklist: Checklist, front_of_neck_tube_mm: float) -> RenderedChecklist:
    """For a trolley sheet: every item shows; only values not tied to one woman."""
    for s in checklist.sections:
        for i in s.items:
            for name in VALUE.findall(i.text):
                if name not in UNIT_VALUES:
                    raise ChecklistError(
                        checklist.path,
                        i.line,
                        f"{{{{{name}}}}} belongs to one woman's plan; a trolley sheet can use "
                        "only " + ", ".join(sorted(UNIT_VALUES)),
                    )

    def unit_value(name: str) -> str:
        return UNIT_VALUES[name][1](front_of_neck_tube_mm)

    return RenderedChecklist(
        title=checklist.meta.title,
        sheet=checklist.meta.sheet,
        sections=tuple(
            RenderedSection(
                title=s.title,
                items=tuple(
                    RenderedItem(text=_fill(i.text, unit_value), checkbox=i.checkbox)
                    for i in s.items
                ),
            )
            for s in checklist.sections
        ),
    )
