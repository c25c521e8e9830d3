"""Every finding of the assessment as a flat field: dotted path, kind, unit, limits.

Drawn from the assessment model itself, so the clinic list's columns, the guided
entry's questions and the README's column reference cannot drift from what the
plan reads. A cell or an answer is text; :func:`parse_text` turns it into the
value the model validates (ranges and choices are checked by the model).
"""

from __future__ import annotations

import re
import types
import typing
from dataclasses import dataclass
from datetime import date
from typing import Any, Literal

from pydantic import BaseModel

from .assessment import Assessment

Kind = Literal["number", "integer", "yes/no", "choice", "choices", "text", "date"]

# The examination order: sections as the clinician meets them.
SECTIONS = ("identity", "patient", "airway", "history", "preeclampsia", "context")
LIST_SEPARATOR = ";"
NOT_ASSESSED = ""  # an empty cell or a blank answer
ROMAN = {"I": 1, "II": 2, "III": 3, "IV": 4}
YES = ("yes", "y", "true", "1")
NO = ("no", "n", "false", "0")


# What each finding is called when asked for (airway assess) or listed (the column
# reference): plain words a clinician uses at the bedside.
LABELS = {
    "identity.name": "Her name, printed on her own plan only",
    "identity.record_number": "Her record number, printed on her own plan only",
    "assessed_on": "Date of this assessment",
    "patient.weight_kg": "Current weight",
    "patient.height_cm": "Height",
    "patient.age_years": "Age",
    "patient.gestation_weeks": "Gestation",
    "patient.in_labour": "In labour now",
    "patient.booking_weight_kg": "Weight at booking",
    "patient.haemoglobin_g_per_l": "Latest haemoglobin",
    "airway.mallampati": "Modified Mallampati class",
    "airway.upper_lip_bite": "Upper lip bite class",
    "airway.mouth_opening_cm": "Inter-incisor gap",
    "airway.thyromental_cm": "Thyromental distance",
    "airway.sternomental_cm": "Sternomental distance",
    "airway.jaw_protrusion": "Jaw protrusion",
    "airway.neck_movement": "Neck movement",
    "airway.neck_circumference_cm": "Neck circumference",
    "airway.short_neck": "Short neck",
    "airway.receding_mandible": "Receding mandible",
    "airway.protruding_incisors": "Protruding upper incisors",
    "airway.large_breasts": "Large breasts",
    "history.intubation": "Previous intubation",
    "history.difficult_mask_ventilation": "Previous difficult mask ventilation",
    "history.obstructive_sleep_apnoea": "Obstructive sleep apnoea",
    "history.snoring": "Snores",
    "preeclampsia.status": "Pre-eclampsia",
    "preeclampsia.signs": "Signs of airway oedema now",
    "preeclampsia.platelets_10e9_per_l": "Latest platelet count",
    "context.urgency_category": "Caesarean urgency category (blank in clinic)",
    "context.anaesthetist": "Anaesthetist who will intubate",
    "context.surgical_complexity": "Expected surgical complexity",
    "context.aspiration_risk": "Aspiration risk",
    "context.regional_alternative": "Regional or awake technique instead",
}


@dataclass(frozen=True)
class FieldSpec:
    """One finding the assessment can hold."""

    path: str  # "patient.weight_kg"
    kind: Kind
    required: bool
    unit: str = ""
    low: float | None = None
    high: float | None = None
    choices: tuple[str, ...] = ()
    description: str = ""

    @property
    def section(self) -> str:
        return self.path.split(".")[0] if "." in self.path else ""

    @property
    def name(self) -> str:
        return self.path.split(".")[-1]

    def allowed(self) -> str:
        """What an answer may be, for a question or a column reference."""
        if self.kind in ("number", "integer"):
            unit = f" {self.unit}" if self.unit else ""
            if self.low is not None and self.high is not None:
                return f"{self.kind} {self.low:g}-{self.high:g}{unit}"
            return f"{self.kind}{unit}"
        if self.kind == "choice":
            return " | ".join(self.choices)
        if self.kind == "choices":
            return f"any of {', '.join(self.choices)}, separated by '{LIST_SEPARATOR}'"
        if self.kind == "date":
            return "date YYYY-MM-DD"
        if self.kind == "yes/no":
            return "yes | no"
        return "text"


def _strip_none(annotation: Any) -> Any:
    if isinstance(annotation, types.UnionType) or typing.get_origin(annotation) is typing.Union:
        args = [a for a in typing.get_args(annotation) if a is not type(None)]
        return args[0] if len(args) == 1 else annotation
    return annotation


def _literal_values(annotation: Any) -> tuple[str, ...]:
    if typing.get_origin(annotation) is Literal:
        return tuple(str(v) for v in typing.get_args(annotation))
    return ()


def _spec(path: str, info: Any) -> FieldSpec:
    annotation = _strip_none(info.annotation)
    lo = next((m.ge for m in info.metadata if getattr(m, "ge", None) is not None), None)
    hi = next((m.le for m in info.metadata if getattr(m, "le", None) is not None), None)
    extra = info.json_schema_extra if isinstance(info.json_schema_extra, dict) else {}
    common = {
        "path": path,
        "required": info.is_required(),
        "description": info.description or "",
        "unit": str(extra.get("unit", "")),
        "low": lo,
        "high": hi,
    }
    if typing.get_origin(annotation) is tuple:
        inner = typing.get_args(annotation)[0]
        return FieldSpec(kind="choices", choices=_literal_values(inner), **common)
    if choices := _literal_values(annotation):
        return FieldSpec(kind="choice", choices=choices, **common)
    kinds: dict[Any, Kind] = {bool: "yes/no", int: "integer", float: "number", date: "date"}
    return FieldSpec(kind=kinds.get(annotation, "text"), **common)


def field_specs() -> tuple[FieldSpec, ...]:
    """Every field, in examination order, then the top-level fields."""
    out: list[FieldSpec] = []
    for section in SECTIONS:
        model = Assessment.model_fields[section].annotation
        assert isinstance(model, type) and issubclass(model, BaseModel)
        out += [_spec(f"{section}.{name}", info) for name, info in model.model_fields.items()]
    out += [
        _spec(name, info) for name, info in Assessment.model_fields.items() if name not in SECTIONS
    ]
    return tuple(out)


BY_PATH: dict[str, FieldSpec] = {f.path: f for f in field_specs()}


# What a clinician writes for a unit, by the unit the field holds, with the factor into
# it. Exact factors: 1 lb = 0.45359237 kg, 1 in = 2.54 cm (the international yard and
# pound, 1959); 1 stone = 14 lb; 1 g/dL = 10 g/L.
LB_KG = 0.45359237
IN_CM = 2.54
UNIT_WORDS: dict[str, dict[str, float]] = {
    "kg": dict.fromkeys(("kg", "kgs", "kilo", "kilos", "kilogram", "kilograms"), 1.0)
    | dict.fromkeys(("lb", "lbs", "pound", "pounds"), LB_KG)
    | {"g": 0.001},
    "cm": {"cm": 1.0, "mm": 0.1}
    | dict.fromkeys(("m", "metre", "metres", "meter", "meters"), 100.0)
    | dict.fromkeys(("in", "inch", "inches", '"'), IN_CM),
    "weeks": dict.fromkeys(("weeks", "week", "wk", "wks", "w"), 1.0),
    "g/L": {"g/l": 1.0, "g/dl": 10.0},
    "x10^9/L": dict.fromkeys(("x10^9/l", "x 10^9/l", "10^9/l", "x10*9/l"), 1.0),
    "fraction": {"%": 0.01},
}
_NUMBER = r"(-?\d+(?:\.\d+)?)"
_WEEKS_DAYS = re.compile(r"(\d{1,2})\s*\+\s*([0-6])")  # 36+2: 36 weeks and 2 days
_STONES = re.compile(rf"{_NUMBER}\s*(?:st|stone|stones)(?:\s*{_NUMBER}\s*(?:lb|lbs|pounds?)?)?")
_FEET = re.compile(rf"{_NUMBER}\s*(?:ft|feet|foot|')\s*(?:{_NUMBER}\s*(?:in|inch|inches|\"|'')?)?")
_WITH_UNIT = re.compile(rf"{_NUMBER}\s*(.*)")


def _converted(spec: FieldSpec, text: str, value: float) -> tuple[float, str]:
    places = 2 if spec.unit == "weeks" else (3 if spec.unit == "fraction" else 1)
    value = round(value, places)
    return value, f"{text.strip()} = {value:g} {spec.unit}"


def _measure(spec: FieldSpec, text: str) -> tuple[float, str | None]:
    """A number in the field's unit, or written in another unit and converted into it
    ('203 lb', '14 st 2', '5 ft 4', '1.62 m', '36+2', '11.2 g/dL')."""
    low = text.lower().replace(",", ".").strip()
    if spec.unit == "weeks" and (m := _WEEKS_DAYS.fullmatch(low)):
        return _converted(spec, text, int(m[1]) + int(m[2]) / 7)
    if spec.unit == "kg" and (m := _STONES.fullmatch(low)):
        return _converted(spec, text, (float(m[1]) * 14 + float(m[2] or 0)) * LB_KG)
    if spec.unit == "cm" and (m := _FEET.fullmatch(low)):
        return _converted(spec, text, (float(m[1]) * 12 + float(m[2] or 0)) * IN_CM)
    m = _WITH_UNIT.fullmatch(low)
    if m is None:
        raise ValueError(f"not a number; {spec.allowed()}")
    number, word = float(m[1]), m[2].strip()
    if not word or word == spec.unit.lower():
        return number, None
    factor = UNIT_WORDS.get(spec.unit, {}).get(word)
    if factor is None:
        raise ValueError(f"not a number in a unit read here; {spec.allowed()}")
    return (number, None) if factor == 1.0 else _converted(spec, text, number * factor)


# Plain words for a choice, by field: what a clinician writes for the model's value.
CHOICE_WORDS: dict[str, dict[str, str]] = {
    "preeclampsia.status": {
        "no": "none",
        "severe": "with_severe_features",
        "severe_features": "with_severe_features",
    },
    "history.intubation": {"no": "none", "easy": "none"},
    "preeclampsia.signs": {"swollen_tongue": "tongue_swelling", "voice_changes": "voice_change"},
}


def _choice_word(path: str, text: str) -> str:
    """'Facial edema' -> 'facial_oedema'; 'severe' -> 'with_severe_features'."""
    word = re.sub(r"(?<!o)edema", "oedema", re.sub(r"[\s\-]+", "_", text.strip().lower()))
    word = word.removeprefix("pre_eclampsia_").removeprefix("preeclampsia_")
    return CHOICE_WORDS.get(path, {}).get(word, word)


def read_text(spec: FieldSpec, text: str) -> tuple[object, str | None]:
    """The value a cell or answer stands for (``None`` when blank: not assessed), and a
    note when it was written in another unit and converted ('203 lb = 92.1 kg').

    Raises:
        ValueError: the text cannot be read as this field's kind (the message says
            what is allowed). Ranges and choices are left to the model.
    """
    text = text.strip()
    if text == NOT_ASSESSED:
        return None, None
    if spec.kind == "number":
        return _measure(spec, text)
    if spec.kind == "integer":
        # Classes are often written in Roman numerals ("Mallampati III"), with or
        # without the word "class" or "category"; an age with its unit.
        word = re.sub(r"^(class|category|cat\.?)\s*", "", text.lower()).strip()
        word = re.sub(r"\s*(years?|yrs?|y)$", "", word) if spec.unit == "years" else word
        if word.upper() in ROMAN:
            return ROMAN[word.upper()], None
        try:
            return int(word or text), None
        except ValueError:
            raise ValueError(f"not a whole number; {spec.allowed()}") from None
    if spec.kind == "yes/no":
        low = text.lower()
        if low in YES:
            return True, None
        if low in NO:
            return False, None
        raise ValueError("must be yes or no")
    if spec.kind == "choice":
        return _choice_word(spec.path, text), None
    if spec.kind == "choices":
        parts = [_choice_word(spec.path, p) for p in re.split(r"[;,]", text) if p.strip()]
        return [p for p in parts if p not in ("none", "no")], None
    if spec.kind == "date":
        # dd/mm/yyyy as UK spreadsheets write it, or ISO YYYY-MM-DD.
        day_first = re.fullmatch(r"(\d{1,2})[/.](\d{1,2})[/.](\d{4})", text)
        try:
            if day_first:
                d, m, y = (int(x) for x in day_first.groups())
                return date(y, m, d).isoformat(), None
            return date.fromisoformat(text).isoformat(), None
        except ValueError:
            raise ValueError("not a date; write it as YYYY-MM-DD or DD/MM/YYYY") from None
    return text, None


def parse_text(spec: FieldSpec, text: str) -> object:
    """:func:`read_text`'s value alone."""
    return read_text(spec, text)[0]


def nest(values: dict[str, object]) -> dict[str, Any]:
    """{"patient.weight_kg": 80} -> {"patient": {"weight_kg": 80}}; None values left out."""
    out: dict[str, Any] = {}
    for path, value in values.items():
        if value is None:
            continue
        *sections, name = path.split(".")
        target = out
        for section in sections:
            target = target.setdefault(section, {})
        target[name] = value
    out.setdefault("patient", {})
    return out


def flatten(data: dict[str, Any]) -> dict[str, Any]:
    """:func:`nest` undone for an assessment's plain data: every field path and its value
    (None when not assessed)."""
    out: dict[str, Any] = {}
    for path in BY_PATH:
        section, _, name = path.rpartition(".")
        out[path] = data[section][name] if section else data[name]
    return out


def _meaning(spec: FieldSpec) -> str:
    """The model's description without the unit and range the 'allowed' column gives,
    or the finding's name where the model has no description (or, for a yes/no
    finding, one written for TOML's true/false)."""
    text = re.sub(r", in [^;,]+; [0-9.]+-[0-9.]+$", "", spec.description)
    if not text or spec.kind == "yes/no":
        return LABELS.get(spec.path, spec.name.replace("_", " "))
    return text


def _cell(text: str) -> str:
    """Text for a Markdown table cell: a bare '|' would start a new column."""
    return text.replace("|", "\\|")


def column_reference() -> str:
    """The Markdown table of clinic-list columns, for the README."""
    lines = [
        "| column | allowed | meaning |",
        "|---|---|---|",
        "| `id` | letters, digits, `.`, `_`, `-` (1-64; never a name) | names the row's outputs |",
    ]
    for f in field_specs():
        meaning = _meaning(f) + (" (required)" if f.required else "")
        lines.append(f"| `{f.path}` | {_cell(f.allowed())} | {_cell(meaning)} |")
    lines.append("| `comment` | text | ignored: the clinic's own note on the row |")
    return "\n".join(lines) + "\n"


if __name__ == "__main__":  # python -m airway.fields: the README's column reference
    print(column_reference(), end="")
