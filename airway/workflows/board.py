"""The labour ward's airway board: one line per woman, from a folder of saved plans.

Kept at the coordinator's desk so the on-call anaesthetist knows, before the
3 a.m. call, which women carry an airway risk. Highest airway level first; a
plan older than the allowed age, without an assessment date, or made under
other rules is marked. Pure apart from :func:`load_plans`, which reads files.
"""

from dataclasses import dataclass, replace
from datetime import date
from pathlib import Path
from typing import NamedTuple

from pydantic import ValidationError

from ..engine.decision import at_a_glance
from ..engine.oxygenation import minutes_label
from ..engine.plan import RULES_VERSION, build_plan
from ..engine.plan_model import Plan, plan_from_data, saved_object
from ..errors import InputError, Problem
from ..loading import read_bounded
from ..unit.catalogue import load_catalogue

# A woman in labour, or assessed today or yesterday, is taken to be on the ward now
# (project rule): the coordinator's question is who carries airway risk tonight.
ON_WARD_DAYS = 1
DEFAULT_MAX_AGE_DAYS = 14  # project rule: a clinic plan older than two weeks is checked again
SKIPPED = ("summary",)  # the clinic summary lives in the same folder


@dataclass(frozen=True)
class BoardRow:
    name: str  # the plan file's name without .json (the clinic's id)
    level: int
    first_tube_mm: float
    supraglottic_size: float
    minutes_to_spo2_90: str
    decision: str
    assessed_on: str
    warnings: tuple[str, ...]
    on_ward: bool = False  # in labour, or assessed within ON_WARD_DAYS: here tonight


EDITED = "values edited after saving: shown as recomputed from its assessment; replan"


def _as_it_stands(saved: Plan) -> tuple[Plan, bool]:
    """A saved plan is never trusted: its assessment is planned again under the current
    rules. The level, decision and minutes shown come from that; the unit's tube and
    supraglottic sizes stay as saved unless the file's values were edited. True when a
    plan made under the current rules no longer agrees with its own assessment."""
    fresh = build_plan(saved.assessment, load_catalogue())
    same_rules = saved.generated_by.rules_version == RULES_VERSION
    edited = same_rules and (
        saved.input_sha256 != fresh.input_sha256
        or saved.risk != fresh.risk
        or saved.decision != fresh.decision
        or saved.oxygenation != fresh.oxygenation
    )
    shown = fresh._replace(generated_by=saved.generated_by)
    return (shown if edited else shown._replace(equipment=saved.equipment)), edited


def load_plans(folder: Path) -> tuple[list[tuple[str, Plan]], list[str], set[str]]:
    """Every saved JSON plan in ``folder`` as its assessment gives it now, a note for each
    file that is not one or that was edited, and the names of the edited ones."""
    plans: list[tuple[str, Plan]] = []
    skipped: list[str] = []
    edited: set[str] = set()
    for path in sorted(folder.glob("*.json")):
        if path.stem in SKIPPED:
            continue
        try:
            data = saved_object(read_bounded(path, "assessment"))
            plan = None if data is None else plan_from_data(data)
        except (InputError, ValidationError):
            plan = None
        if plan is None:
            skipped.append(f"{path.name}: not a plan this version can read; left off the board")
            continue
        shown, was_edited = _as_it_stands(plan)
        if was_edited:
            edited.add(path.stem)
            skipped.append(f"{path.name}: {EDITED}")
        plans.append((path.stem, shown))
    return plans, skipped, edited


def board_row(
    name: str, plan: Plan, today: date, max_age_days: int, edited: bool = False
) -> BoardRow:
    warnings = [EDITED] if edited else []
    assessed = plan.assessment.assessed_on
    if assessed is None:
        warnings.append("no assessment date: reassess")
    elif assessed > today:  # a mistyped year, most often
        warnings.append("dated after today: check the date, reassess")
    elif (today - assessed).days > max_age_days:
        warnings.append(f"{(today - assessed).days} days old: reassess")
    if plan.generated_by.rules_version != RULES_VERSION:
        warnings.append(f"rules {plan.generated_by.rules_version}, now {RULES_VERSION}: replan")
    oxy = plan.oxygenation
    return BoardRow(
        name=name,
        level=plan.risk.level,
        first_tube_mm=plan.equipment.tracheal_tube_mm.first,
        supraglottic_size=plan.equipment.supraglottic_size,
        minutes_to_spo2_90=minutes_label(oxy.minutes_to_spo2_90, oxy.horizon_minutes),
        decision=at_a_glance(plan.decision.recommendation, plan.decision.if_category),
        assessed_on="" if assessed is None else assessed.isoformat(),
        warnings=tuple(warnings),
        on_ward=bool(plan.assessment.patient.in_labour)
        or (assessed is not None and 0 <= (today - assessed).days <= ON_WARD_DAYS),
    )


def board_rows(
    plans: list[tuple[str, Plan]],
    today: date,
    max_age_days: int = DEFAULT_MAX_AGE_DAYS,
    edited: frozenset[str] | set[str] = frozenset(),
) -> list[BoardRow]:
    """One row per plan: the women on the ward now first, then by airway level, highest
    first, then by name; replaced plans last.

    Plans that share a record number are one woman's: the clinic plan and the labour
    plan side by side. Every plan but the newest is marked as replaced by it, so the
    older one is not read at 3 a.m.; plans of the same date are marked to be checked.
    """
    rows = [board_row(name, plan, today, max_age_days, name in edited) for name, plan in plans]
    extra, replaced = _same_woman_warnings(plans)
    rows = [replace(r, warnings=r.warnings + extra.get(r.name, ())) for r in rows]
    # The women on the ward now first, whatever their level; a replaced plan at the foot.
    return sorted(rows, key=lambda r: (r.name in replaced, not r.on_ward, -r.level, r.name))


def _record_key(plan: Plan) -> str | None:
    number = plan.assessment.identity.record_number
    return number.strip().casefold() if number and number.strip() else None


def _same_woman_warnings(
    plans: list[tuple[str, Plan]],
) -> tuple[dict[str, tuple[str, ...]], set[str]]:
    """For plans sharing a record number: which is newer, or that none is; and the
    names of the plans a newer one replaces. The number itself is never printed, only
    the plans' names."""
    groups: dict[str, list[tuple[str, Plan]]] = {}
    for name, plan in plans:
        key = _record_key(plan)
        if key is not None:
            groups.setdefault(key, []).append((name, plan))
    out: dict[str, tuple[str, ...]] = {}
    replaced: set[str] = set()
    for group in groups.values():
        if len(group) < 2:
            continue
        dated = [(plan.assessment.assessed_on or date.min, name) for name, plan in group]
        newest_date = max(d for d, _ in dated)
        newest = sorted(name for d, name in dated if d == newest_date)
        for d, name in dated:
            if d < newest_date:
                replaced.add(name)
                out[name] = (
                    f"replaced by {', '.join(newest)} (same record number): use that plan",
                )
            elif len(newest) > 1:
                others = ", ".join(n for n in newest if n != name)
                out[name] = (f"same record number and date as {others}: check which is current",)
    return out, replaced


def count_women(plans: list[tuple[str, Plan]]) -> int:
    """Plans that share a record number count as one woman."""
    keys = {_record_key(plan) or f"plan:{name}" for name, plan in plans}
    return len(keys)


def women(count: int) -> str:
    """'1 woman', '12 women'."""
    return f"{count} {'woman' if count == 1 else 'women'}"


class Board(NamedTuple):
    pdf: bytes
    notes: tuple[str, ...]  # files left off, plans that may be one woman
    women: int


def ward_board(
    folder: Path, today: date, max_age_days: int, paper: str = "A4", ward_only: bool = False
) -> Board:
    """The board's PDF from a folder of saved plans, aged from ``today``; ``ward_only``
    for just the women on the ward now.

    Raises:
        InputError: ``folder`` is not a folder.
    """
    from ..render.pdf.board import render_board_pdf

    if not folder.is_dir():
        raise InputError(str(folder), [Problem("(folder)", "is not a folder")])
    plans, notes, edited = load_plans(folder)
    rows = board_rows(plans, today, max_age_days, edited)
    if ward_only:
        here = {r.name for r in rows if r.on_ward}
        rows = [r for r in rows if r.on_ward]
        plans = [(name, plan) for name, plan in plans if name in here]
    count = count_women(plans)
    pdf = render_board_pdf(rows, today.isoformat(), max_age_days, notes, paper, count)
    return Board(pdf=pdf, notes=tuple(notes), women=count)
