"""The assessment form: its fields drawn from the assessment model, its answers read
with the same parser as clinic-list cells and guided entry (:mod:`airway.fields`)."""

from collections.abc import Mapping
from dataclasses import dataclass
from typing import NamedTuple

from ..assessment import Assessment
from ..errors import InputError
from ..fields import BY_PATH, LABELS, SECTIONS, FieldSpec, field_specs, flatten, nest, read_text
from ..loading import assessment_from_mapping

SECTION_TITLES = {
    "identity": "Her identifiers (printed on her own plan only)",
    "patient": "Patient",
    "airway": "Mouth and neck",
    "history": "History",
    "preeclampsia": "Pre-eclampsia",
    "context": "Operation and team",
    "": "This assessment",
}


@dataclass(frozen=True)
class Field:
    spec: FieldSpec
    label: str
    value: str  # as typed, kept through an error
    chosen: tuple[str, ...]  # for the oedema signs
    error: str


def _label(spec: FieldSpec) -> str:
    return LABELS.get(spec.path, spec.name.replace("_", " ").capitalize())


def groups(
    values: Mapping[str, str], chosen: tuple[str, ...], errors: Mapping[str, str]
) -> list[tuple[str, list[Field]]]:
    """The form's fields by section, in examination order, identity first."""
    out: list[tuple[str, list[Field]]] = []
    for section in (*SECTIONS, ""):
        fields = [
            Field(
                spec=s,
                label=_label(s),
                value=values.get(s.path, ""),
                chosen=chosen if s.kind == "choices" else (),
                error=errors.get(s.path, ""),
            )
            for s in field_specs()
            if s.section == section
        ]
        if fields:
            out.append((SECTION_TITLES[section], fields))
    return out


def _as_typed(value: object) -> str:
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, float):
        return f"{value:g}"
    return str(value)


def form_values(assessment: Assessment) -> tuple[dict[str, str], tuple[str, ...]]:
    """The form's answers for an assessment read from a file (to check and complete)."""
    given = flatten(assessment.model_dump(mode="json"))
    values: dict[str, str] = {}
    signs: tuple[str, ...] = ()
    for spec in field_specs():
        value = given[spec.path]
        if spec.kind == "choices":
            signs = tuple(value)
        elif value is not None:
            values[spec.path] = _as_typed(value)
    return values, signs


class FormReading(NamedTuple):
    assessment: Assessment | None  # None when any answer is wrong
    errors: dict[str, str]  # by field path
    converted: list[str]  # 'Current weight: 203 lb = 92.1 kg', to be shown


def read_form(form: Mapping[str, str], signs: tuple[str, ...]) -> FormReading:
    """The assessment the form's answers give, or every problem by field path."""
    values: dict[str, object] = {}
    errors: dict[str, str] = {}
    converted: list[str] = []
    for path, spec in BY_PATH.items():
        if spec.kind == "choices":
            values[path] = list(signs) or None
            continue
        try:
            values[path], note = read_text(spec, form.get(path, ""))
        except ValueError as exc:
            errors[path] = str(exc)
            continue
        if note:
            converted.append(f"{_label(spec)}: {note}")
    if errors:
        return FormReading(None, errors, converted)
    try:
        return FormReading(assessment_from_mapping(nest(values), "form"), {}, converted)
    except InputError as exc:
        return FormReading(None, {p.where: p.message for p in exc.problems}, converted)
