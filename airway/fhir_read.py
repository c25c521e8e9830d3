"""Read an assessment from a FHIR R4 Bundle of Observations (``docs/fhir.md``).

The Bundle is validated by the ``fhir.resources`` R4B models first; then each
Observation whose code the profile knows (``airway.fhir_profile.CODES``) gives one
field, its unit converted into the field's. When a code is given more than once the
latest by date is used; two of the same date that disagree are refused, both named.
Observations not used are listed in notes for the reader, never silently dropped.
The result is a plain mapping that :func:`airway.loading.assessment_from_mapping`
validates like any other assessment.
"""

from __future__ import annotations

import math
from datetime import date, datetime
from typing import Any, NamedTuple

from pydantic import ValidationError

from .errors import InputError, Problem
from .fhir_profile import (
    BMI,
    BUNDLE_TYPES_READ,
    CODES,
    CONVERSIONS,
    CONVERTED_DECIMALS,
    DATE_OF_BIRTH_AS_WRITTEN,
    LOINC,
    RECORD_NUMBER,
    SIGN_CODES,
    SIGNS_PATH,
    STATUSES_READ,
    UCUM,
    answer_code,
)
from .fields import BY_PATH, LABELS, nest

# (system, code) -> the path it fills; a sign's path is "preeclampsia.signs:<sign>".
_BY_CODE: dict[tuple[str, str], str] = {(c.system, c.code): p for p, c in CODES.items()}
_BY_CODE |= {(c.system, c.code): f"{SIGNS_PATH}:{s}" for s, c in SIGN_CODES.items()}


def _named(path: str) -> str:
    """A field as a clinician calls it: 'Current weight'."""
    if path.startswith(SIGNS_PATH + ":"):
        return SIGN_CODES[path.split(":", 1)[1]].display
    return LABELS.get(path, path)


class _Reading(NamedTuple):
    path: str
    value: object
    day: date | None
    where: str  # 'entry[3] (Observation LOINC 29463-7)'
    notes: tuple[str, ...]  # how its unit was converted


def _short(system: str | None, code: str | None) -> str:
    name = {LOINC: "LOINC", UCUM: "UCUM"}.get(system or "", "code")
    return f"{name} {code}"


def _coding_key(observation: Any) -> tuple[str | None, str]:
    """The path this Observation fills (None if unknown) and how to name its code."""
    codings = observation.code.coding or []
    for coding in codings:
        path = _BY_CODE.get((coding.system, coding.code))
        if path is not None:
            return path, _short(coding.system, coding.code)
    if codings:
        return None, _short(codings[0].system, codings[0].code)
    return None, f"'{observation.code.text or 'no code'}'"


def _day(observation: Any) -> date | None:
    when = observation.effectiveDateTime or observation.effectiveInstant
    if isinstance(when, datetime):
        return when.date()
    if isinstance(when, date):
        return when
    return None  # no date, or a partial one (a year, a month): not a day


def _quantity(path: str, observation: Any, where: str, notes: list[str]) -> float:
    quantity = observation.valueQuantity
    held = CODES[path].unit
    if quantity is None or quantity.value is None:
        raise ValueError(f"{where}: has no quantity; expected a value in {held}")
    if quantity.system not in (None, UCUM):
        raise ValueError(f"{where}: unit {quantity.code!r} is not a UCUM unit")
    unit = quantity.code or quantity.unit
    factor = CONVERSIONS[held].get(unit or "")
    if factor is None:
        known = ", ".join(CONVERSIONS[held])
        raise ValueError(f"{where}: unit {unit!r} cannot be converted to {held} (read: {known})")
    value = float(quantity.value)
    if factor == 1.0:
        return value
    converted = round(value * factor, CONVERTED_DECIMALS)
    notes.append(f"{_named(path)}: {value:g} {unit} read as {converted:g} {held}")
    return converted


def _value(path: str, observation: Any, where: str, notes: list[str]) -> object:
    """The field's value, converted; ValueError says why it cannot be read."""
    if path.startswith(SIGNS_PATH + ":"):
        if observation.valueBoolean is None:
            raise ValueError(f"{where}: an oedema sign is valued true or false")
        return observation.valueBoolean
    spec = BY_PATH[path]
    if spec.kind == "number" or (spec.kind == "integer" and CODES[path].unit):
        number = _quantity(path, observation, where, notes)
        return math.floor(number) if spec.kind == "integer" else number  # completed years
    if spec.kind == "integer":
        if observation.valueInteger is None:
            raise ValueError(f"{where}: a class is valued as an integer")
        return observation.valueInteger
    if spec.kind == "yes/no":
        if observation.valueBoolean is None:
            raise ValueError(f"{where}: valued true or false")
        return observation.valueBoolean
    if spec.kind == "choice":
        concept = observation.valueCodeableConcept
        answers = {answer_code(path, c): c for c in spec.choices}
        for coding in concept.coding or [] if concept is not None else []:
            if coding.system == CODES[path].system and coding.code in answers:
                return answers[coding.code]
        raise ValueError(f"{where}: answer must be one of {', '.join(answers)}")
    if observation.valueString is None:
        raise ValueError(f"{where}: valued as a string")
    return observation.valueString


def _validated(data: dict[str, Any], source: str) -> Any:
    from fhir.resources.R4B.bundle import Bundle

    from .loading import problems_from_validation

    try:
        return Bundle.model_validate(data)
    except ValidationError as exc:
        raise InputError(source, problems_from_validation(exc)) from None
    except (KeyError, TypeError, ValueError) as exc:  # an unknown resourceType
        problem = Problem("(Bundle)", f"is not a valid FHIR R4 Bundle ({exc})")
        raise InputError(source, [problem]) from None


def _identity(patients: list[Any], source: str) -> dict[str, str]:
    """Name, record number and date of birth from the Bundle's one Patient."""
    if len(patients) > 1:
        problem = Problem("(Bundle)", "holds more than one Patient; give one woman's Bundle")
        raise InputError(source, [problem])
    if not patients:
        return {}
    patient = patients[0]
    out: dict[str, str] = {}
    if patient.name:
        first = patient.name[0]
        out["name"] = first.text or " ".join([*(first.given or []), first.family or ""]).strip()
    ours = [i for i in patient.identifier or [] if i.system == RECORD_NUMBER]
    chosen = ours or (patient.identifier if len(patient.identifier or []) == 1 else [])
    if chosen and chosen[0].value:
        out["record_number"] = chosen[0].value
    written = [e for e in patient.extension or [] if e.url == DATE_OF_BIRTH_AS_WRITTEN]
    if written and written[0].valueString:
        out["date_of_birth"] = written[0].valueString
    elif patient.birthDate is not None:
        out["date_of_birth"] = str(patient.birthDate)
    return {k: v for k, v in out.items() if v}


def _subjects_agree(observations: list[tuple[int, Any]], source: str) -> None:
    subjects = {o.subject.reference for _, o in observations if o.subject is not None}
    if len(subjects) > 1:
        problem = Problem("(Bundle)", "holds Observations of more than one subject")
        raise InputError(source, [problem])


def _latest(readings: list[_Reading]) -> tuple[list[_Reading], list[Problem], list[str]]:
    """One reading per path: the latest; same-day disagreements are problems."""
    by_path: dict[str, list[_Reading]] = {}
    for reading in readings:
        by_path.setdefault(reading.path, []).append(reading)
    chosen, problems, notes = [], [], []
    for path, group in by_path.items():
        group.sort(key=lambda r: r.day or date.min, reverse=True)
        top = group[0]
        same_day = [r for r in group[1:] if r.day == top.day and r.value != top.value]
        if same_day:
            message = (
                f"disagrees with {same_day[0].where} of the same date "
                f"({top.day or 'no date'}); remove one"
            )
            problems.append(Problem(top.where, message))
            continue
        if len(group) > 1 and top.day is not None:
            notes.append(
                f"{_named(path)}: the latest of {len(group)} Observations used ({top.day})"
            )
        chosen.append(top)
    return chosen, problems, notes


# A finding this much older than the newest one may no longer be hers (a weight from the
# booking visit, a platelet count from last month): said, never silently planned on
# (project rule).
STALE_AFTER_DAYS = 14


def _old_findings(chosen: list[_Reading], newest: date) -> list[str]:
    return [
        f"{_named(r.path)} is dated {r.day}, {(newest - r.day).days} days before the newest "
        "finding; "
        "check it is still hers before relying on the plan"
        for r in chosen
        if r.day is not None and (newest - r.day).days > STALE_AFTER_DAYS
    ]


def assessment_data(data: dict[str, Any], source: str) -> tuple[dict[str, Any], list[str]]:
    """The assessment a Bundle holds, as a mapping to validate, and notes for the reader.

    Raises:
        InputError: the Bundle is not valid FHIR, is of a type not read, mixes
            subjects or patients, or holds an Observation that cannot be read (unit,
            value) or two of one code and date that disagree.
    """
    bundle = _validated(data, source)
    if bundle.type not in BUNDLE_TYPES_READ:
        allowed = ", ".join(sorted(BUNDLE_TYPES_READ))
        problem = Problem("type", f"is {bundle.type!r}; a Bundle of type {allowed} is read")
        raise InputError(source, [problem])
    resources = [(i, e.resource) for i, e in enumerate(bundle.entry or []) if e.resource]
    observations = [(i, r) for i, r in resources if r.get_resource_type() == "Observation"]
    patients = [r for _, r in resources if r.get_resource_type() == "Patient"]
    _subjects_agree(observations, source)
    readings: list[_Reading] = []
    problems: list[Problem] = []
    unused: list[str] = []
    for i, observation in observations:
        path, named = _coding_key(observation)
        where = f"entry[{i}] (Observation {named})"
        if observation.status not in STATUSES_READ:
            unused.append(f"{named} (status {observation.status})")
            continue
        if path is None:
            is_bmi = any(
                (c.system, c.code) == (BMI.system, BMI.code) for c in observation.code.coding or []
            )
            if not is_bmi:  # BMI is computed from weight and height, never read
                text = observation.code.text
                unused.append(named + (f" '{text[:60]}'" if text else ""))
            continue
        converted: list[str] = []
        try:
            value = _value(path, observation, where, converted)
        except ValueError as exc:
            problems.append(Problem(where, str(exc).removeprefix(where + ": ")))
            continue
        readings.append(
            _Reading(
                path=path,
                value=value,
                day=_day(observation),
                where=where,
                notes=tuple(converted),
            )
        )
    chosen, conflicts, notes = _latest(readings)
    problems += conflicts
    if problems:
        raise InputError(source, problems)
    flat: dict[str, object] = {r.path: r.value for r in chosen if ":" not in r.path}
    signs = [r.path.split(":", 1)[1] for r in chosen if ":" in r.path and r.value is True]
    mapping = nest({**flat, SIGNS_PATH: signs or None})
    notes += [note for r in chosen for note in r.notes]
    if identity := _identity(patients, source):
        mapping["identity"] = identity
    days = [r.day for r in chosen if r.day is not None]
    if days:
        mapping["assessed_on"] = max(days).isoformat()
        notes += _old_findings(chosen, max(days))
    if "weight_kg" not in mapping.get("patient", {}):
        problem = Problem("patient.weight_kg", "no Observation of body weight (LOINC 29463-7)")
        raise InputError(source, [problem])
    if unused:
        notes.append(f"{len(unused)} Observation(s) not used: {'; '.join(unused)}")
    return mapping, notes
