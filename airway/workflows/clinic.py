"""A pre-assessment clinic's list: one woman a row, read into assessments and summarised.

Columns are the assessment's dotted field paths (:mod:`airway.fields`), an empty
cell is *not assessed*, list cells are separated by ``;``, and an ``id`` column
names each output. A bad row is reported with its row number, column and value
and never stops the others. Pure: text in, rows and summaries out; the command
line writes the files (:mod:`airway.batch`).
"""

import csv
import io
import re
from dataclasses import dataclass

from pydantic import ValidationError

from ..assessment import Assessment
from ..engine.decision import SHORT, at_a_glance
from ..engine.oxygenation import minutes_label
from ..engine.plan_model import Plan
from ..engine.triage import FLAGS, drivers, flags_for
from ..errors import InputError, Problem
from ..fields import BY_PATH, nest, parse_text
from ..loading import problems_from_validation

ID_COLUMN = "id"
IGNORED_COLUMNS = ("comment",)
# Safe as a file name on every common system, and not a word the folder uses itself.
SAFE_ID = re.compile(r"^[A-Za-z0-9][A-Za-z0-9._-]{0,63}$")
RESERVED_IDS = frozenset({"summary", "board"})
# Names Windows keeps for devices, with any extension: "CON.json" cannot be a file there
# (common practice, from the Windows file-naming rules).
WINDOWS_DEVICES = frozenset(
    {"con", "prn", "aux", "nul"} | {f"{p}{n}" for p in ("com", "lpt") for n in range(1, 10)}
)


@dataclass(frozen=True)
class Row:
    """One row of the list: its assessment, or what was wrong with it."""

    number: int  # as a spreadsheet shows it: the header is row 1
    id: str
    assessment: Assessment | None  # None when the row has problems
    problems: tuple[Problem, ...] = ()


def _check_id(value: str, seen: set[str]) -> str | None:
    if not value:
        return "is empty; every row needs an id (never a patient's name)"
    if not SAFE_ID.match(value) or value.lower() in RESERVED_IDS:
        return (
            "is not a safe file name: 1-64 letters, digits, '.', '_' or '-', starting with a "
            "letter or digit (and not 'summary' or 'board')"
        )
    if value.split(".")[0].lower() in WINDOWS_DEVICES:
        return "is a name Windows keeps for a device (CON, PRN, AUX, NUL, COM1-9, LPT1-9)"
    if value.lower() in seen:
        return "is used by an earlier row; ids must be unique"
    return None


def read_clinic_list(text: str, source: str) -> tuple[Row, ...]:
    """Every row of a clinic list, good or bad.

    Raises:
        InputError: the header itself is unusable (no ``id`` column, an unknown or
            repeated column): no row can be read until it is fixed.
    """
    text = text.removeprefix("\ufeff")
    first = text.split("\n", 1)[0]
    # Spreadsheets set to a decimal comma save lists separated by semicolons.
    delimiter = ";" if first.count(";") > first.count(",") else ","
    reader = csv.reader(io.StringIO(text, newline=""), delimiter=delimiter)
    try:
        lines = list(reader)
    except csv.Error as exc:  # a cell longer than the csv module's limit, for one
        problem = Problem(f"row {reader.line_num}", f"cannot be read as CSV ({exc})")
        raise InputError(source, [problem]) from None
    if not any(any(cell.strip() for cell in line) for line in lines):
        hint = "the list is empty: give a header row with an 'id' column, then a row per woman"
        raise InputError(source, [Problem("(file)", hint)])
    header = [h.strip() for h in (lines[0] if lines else [])]
    if len(header) == 1:
        for mark, name in (("\t", "tabs"),):
            if mark in header[0]:
                # Spreadsheets set to a decimal comma export lists this way.
                hint = f"columns are separated by {name}; save the list as comma-separated CSV"
                raise InputError(source, [Problem("row 1", hint)])
    problems = []
    if ID_COLUMN not in header:
        problems.append(Problem("row 1", f"no {ID_COLUMN!r} column"))
    for name in header:
        if name != ID_COLUMN and name not in BY_PATH and name not in IGNORED_COLUMNS:
            problems.append(
                Problem(f"row 1, column {name!r}", "unknown column; see the column reference")
            )
    repeated = sorted({n for n in header if header.count(n) > 1})
    problems += [Problem(f"row 1, column {n!r}", "appears more than once") for n in repeated]
    if problems:
        raise InputError(source, problems)
    rows: list[Row] = []
    seen: set[str] = set()
    for number, cells in enumerate(lines[1:], start=2):
        if not any(c.strip() for c in cells):
            continue  # blank lines between entries are common in spreadsheets
        cells = cells + [""] * (len(header) - len(cells))
        record = dict(zip(header, cells, strict=False))
        row_id = record.get(ID_COLUMN, "").strip()
        found: list[Problem] = []
        if len(cells) > len(header):
            found.append(Problem(f"row {number}", "has more cells than the header has columns"))
        id_problem = _check_id(row_id, seen)
        if id_problem:
            # The value is not repeated: a bad id is often a name typed in the wrong place.
            found.append(Problem(f"row {number}, column 'id'", id_problem))
            row_id = ""
        values: dict[str, object] = {}
        for name, cell in record.items():
            if name == ID_COLUMN or name in IGNORED_COLUMNS:
                continue
            try:
                values[name] = parse_text(BY_PATH[name], cell)
            except ValueError as exc:
                found.append(Problem(f"row {number}, column {name!r}", str(exc), cell, True))
        assessment = None
        if not found:
            try:
                assessment = Assessment.model_validate(nest(values))
            except ValidationError as exc:
                for p in problems_from_validation(exc, Assessment):
                    found.append(
                        Problem(
                            f"row {number}, column {p.where!r}", p.message, p.value, p.has_value
                        )
                    )
        if row_id:
            seen.add(row_id.lower())
        rows.append(Row(number, row_id, assessment, tuple(found)))
    return tuple(rows)


@dataclass(frozen=True)
class SummaryRow:
    """One woman's line in the clinic summary."""

    id: str
    row: int
    level: int | None  # None: the row had bad input
    drivers: str
    first_tube_mm: float | None
    supraglottic_size: float | None
    minutes_to_spo2_90: str  # "3.2", "> 20" beyond the model's horizon, "" for a bad row
    decision: str
    flags: tuple[str, ...]
    problems: str = ""
    # A clinic plan's decision for urgency categories 1-4 in a word each ('proceed',
    # 'senior call', 'wake'); empty when the urgency is known and ``decision`` says it.
    by_category: tuple[str, ...] = ()


def summary_row(row: Row, plan: Plan | None) -> SummaryRow:
    """The summary line of one row (its plan when the row was good)."""
    if plan is None:
        return SummaryRow(
            id=row.id,
            row=row.number,
            level=None,
            drivers="",
            first_tube_mm=None,
            supraglottic_size=None,
            minutes_to_spo2_90="",
            decision="",
            flags=(),
            problems="; ".join(str(p) for p in row.problems),
        )
    return SummaryRow(
        id=row.id,
        row=row.number,
        level=plan.risk.level,
        drivers=drivers(plan),
        first_tube_mm=plan.equipment.tracheal_tube_mm.first,
        supraglottic_size=plan.equipment.supraglottic_size,
        minutes_to_spo2_90=minutes_label(
            plan.oxygenation.minutes_to_spo2_90, plan.oxygenation.horizon_minutes
        ),
        decision=at_a_glance(plan.decision.recommendation, plan.decision.if_category),
        flags=flags_for(plan),
        by_category=tuple(SHORT[rec] for _, rec in sorted(plan.decision.if_category.items())),
    )


def sort_summary(rows: list[SummaryRow]) -> list[SummaryRow]:
    """Bad rows first (they need fixing), then highest airway level first, then list order."""
    return sorted(rows, key=lambda r: (r.level is not None, -(r.level or 0), r.row))


SUMMARY_COLUMNS = (
    "id",
    "row",
    "airway_level",
    "drivers",
    "first_tube_mm",
    "supraglottic_size",
    "minutes_to_spo2_90",
    "decision",
    "senior_review",
    "early_epidural",
    "awake_or_regional",
    "problems",
)


def summary_csv(rows: list[SummaryRow]) -> str:
    """The summary as CSV, in :func:`sort_summary` order."""
    out = io.StringIO(newline="")
    writer = csv.writer(out, lineterminator="\n")
    writer.writerow(SUMMARY_COLUMNS)
    for r in sort_summary(rows):
        writer.writerow(
            [
                r.id,
                r.row,
                "" if r.level is None else r.level,
                r.drivers,
                "" if r.first_tube_mm is None else f"{r.first_tube_mm:.1f}",
                "" if r.supraglottic_size is None else f"{r.supraglottic_size:g}",
                r.minutes_to_spo2_90,
                r.decision,
                *("yes" if f.id in r.flags else "" for f in FLAGS),
                r.problems,
            ]
        )
    return out.getvalue()
