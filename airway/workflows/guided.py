"""Guided entry: the findings asked for one at a time, in the order of the examination.

Each question gives the unit and what is allowed; a blank answer means *not
assessed*; a bad answer is explained and asked again (never a silent default);
the running airway level is shown as findings come in. The questions are
drawn from the model (:mod:`airway.fields`), so they cannot drift from it.
Input and output are passed in, so a test can drive it with a list of answers.
"""

import json
from collections.abc import Callable
from datetime import date
from typing import Any

from pydantic import ValidationError

from ..assessment import Assessment
from ..engine.body import body_size
from ..engine.scoring import score
from ..fields import BY_PATH, LABELS, FieldSpec, nest, read_text
from ..loading import problems_from_validation

# The examination as it runs: (heading, field paths).
GROUPS: tuple[tuple[str, tuple[str, ...]], ...] = (
    (
        "Her identifiers (printed on her own plan only; blank to leave out)",
        ("identity.name", "identity.record_number", "identity.date_of_birth"),
    ),
    (
        "Patient",
        (
            "assessed_on",
            "patient.weight_kg",
            "patient.height_cm",
            "patient.age_years",
            "patient.gestation_weeks",
            "patient.in_labour",
            "patient.booking_weight_kg",
            "patient.haemoglobin_g_per_l",
        ),
    ),
    (
        "Mouth and neck",
        (
            "airway.mallampati",
            "airway.upper_lip_bite",
            "airway.mouth_opening_cm",
            "airway.thyromental_cm",
            "airway.sternomental_cm",
            "airway.jaw_protrusion",
            "airway.neck_movement",
            "airway.neck_circumference_cm",
            "airway.short_neck",
            "airway.receding_mandible",
            "airway.protruding_incisors",
            "airway.large_breasts",
        ),
    ),
    (
        "History",
        (
            "history.intubation",
            "history.difficult_mask_ventilation",
            "history.obstructive_sleep_apnoea",
            "history.snoring",
        ),
    ),
    (
        "Pre-eclampsia",
        (
            "preeclampsia.status",
            "preeclampsia.signs",
            "preeclampsia.platelets_10e9_per_l",
        ),
    ),
    (
        "Context",
        (
            "context.urgency_category",
            "context.anaesthetist",
            "context.surgical_complexity",
            "context.aspiration_risk",
            "context.regional_alternative",
        ),
    ),
)


Ask = Callable[[str], str]  # shows a prompt, returns one line; raises EOFError at end of input
Say = Callable[[str], None]


class Stopped(Exception):
    """The clinician stopped (Ctrl-C) or input ended before the last question."""


TODAY = "today"  # a date answer the clinician may type instead of the date


def question(spec: FieldSpec, today: date | None = None) -> str:
    blank = (
        "required"
        if spec.required
        else "blank: none found"
        if spec.kind == "choices"
        else "blank: not assessed"
    )
    allowed = spec.allowed()
    if spec.kind == "date" and today is not None:
        allowed += f" or {TODAY}"
    return f"{LABELS.get(spec.path, spec.path)} [{allowed}; {blank}]: "


def _check(values: dict[str, object], path: str) -> list[str]:
    """Problems with the answer at ``path``, judged with the answers so far."""
    try:
        Assessment.model_validate(nest(values))
    except ValidationError as exc:
        return [
            p.message
            for p in problems_from_validation(exc, Assessment)
            if p.where == path or p.where.startswith(f"{path}[")
        ]
    return []


def running_level(values: dict[str, object]) -> str:
    """'airway level 2 so far (index 1.17)', from the findings given up to now."""
    if "patient.weight_kg" not in values:
        return ""
    assessment = Assessment.model_validate(nest(values))
    p = assessment.patient
    risk = score(assessment, body_size(p.weight_kg, p.height_cm, p.booking_weight_kg))
    return f"airway level {risk.level} so far (index {risk.index:.2f})"


def guided_entry(ask: Ask, say: Say, today: date | None = None) -> Assessment:
    """Ask every question in :data:`GROUPS`; the finished assessment.

    ``today`` (passed in: the library reads no clock) lets a date be answered with
    "today", the usual answer at the bedside.

    Raises:
        Stopped: Ctrl-C or end of input before the last answer (nothing is kept).
    """
    values: dict[str, object] = {}
    steps = [(heading, path) for heading, paths in GROUPS for path in paths]
    n, shown = 0, ""
    try:
        while n < len(steps):
            heading, path = steps[n]
            if heading != shown:
                say(f"\n{heading.upper()}")
                shown = heading
            answer = ask(question(BY_PATH[path], today))
            if answer.strip().lower() == BACK:
                n = max(0, n - 1)  # the previous question is asked again
                values.pop(steps[n][1], None)
                continue
            value, problem, converted = _answer(path, answer, values, today)
            if problem:
                say(f"  {problem}; try again")
                continue
            if converted:
                say(f"  = {converted.split(' = ', 1)[1]}")  # '203 lb' -> '= 92.1 kg'
            values[path] = value
            clinical = ("airway.", "history.", "preeclampsia.", "patient.height")
            if value is not None and path.startswith(clinical):
                say(f"  -> {running_level(values)}")
            n += 1
    except (EOFError, KeyboardInterrupt):
        raise Stopped from None
    return Assessment.model_validate(nest(values))


BACK = "back"  # an answer that returns to the previous question


def _answer(
    path: str, answer: str, values: dict[str, object], today: date | None
) -> tuple[object, str, str | None]:
    """The value of one answer, or what is wrong with it; and how it was converted."""
    spec = BY_PATH[path]
    if spec.kind == "date" and today and answer.strip().lower() == TODAY:
        answer = today.isoformat()
    try:
        value, converted = read_text(spec, answer)
    except ValueError as exc:
        return None, str(exc), None
    if value is None and spec.required:
        return None, "this one is needed for every plan", None
    problems = _check({**values, path: value}, path)
    return (None, "; ".join(problems), None) if problems else (value, "", converted)


def _toml_value(value: Any) -> str:
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, int | float):
        return f"{value:g}" if isinstance(value, float) else str(value)
    if isinstance(value, date):
        return value.isoformat()
    if isinstance(value, list | tuple):
        return "[" + ", ".join(_toml_value(v) for v in value) + "]"
    # A JSON string is a valid TOML basic string: the same quotes and escapes.
    return json.dumps(str(value), ensure_ascii=False)


def assessment_toml(assessment: Assessment) -> str:
    """The assessment as TOML that ``airway plan`` reads back unchanged."""
    data = assessment.model_dump(exclude_none=True, exclude_defaults=True)
    lines = ["# Assessment entered with `airway assess`."]
    for key, value in data.items():
        if not isinstance(value, dict):
            lines.append(f"{key} = {_toml_value(value)}")
    for key, value in data.items():
        if isinstance(value, dict) and value:
            lines += ["", f"[{key}]"]
            lines += [f"{k} = {_toml_value(v)}" for k, v in value.items()]
    if "patient" not in data:
        lines += ["", "[patient]"]
    return "\n".join(lines) + "\n"
