"""The assessment of one woman: the validated input to every plan.

Every bedside finding is optional. ``None`` means *not assessed* and is shown
as such in the plan; it never stands in for a normal finding. Field names carry
their units. Ranges are the limits of physiological plausibility: outside
them a value is refused; inside them but improbable (see
:func:`airway.engine.plan.build_plan`) it gives a warning in the plan.
"""

import typing
import unicodedata
from datetime import date
from typing import Annotated, Literal

from pydantic import (
    AfterValidator,
    BaseModel,
    ConfigDict,
    Field,
    StringConstraints,
    ValidationInfo,
    field_validator,
)
from pydantic_core import PydanticCustomError

OedemaSign = Literal[
    "voice_change",
    "stridor",
    "facial_oedema",
    "tongue_swelling",
    "new_snoring",
    "breathless_lying_flat",
]
PreeclampsiaStatus = Literal["none", "without_severe_features", "with_severe_features"]
IntubationHistory = Literal["none", "difficult", "failed"]
Grade3 = Literal["low", "moderate", "high"]


# Characters that print as nothing or reorder what follows: control characters (NUL,
# escape, newline...) and the bidirectional embeddings, overrides and isolates, which
# can make an identifier read differently from what was typed.
_BIDI_CONTROLS = frozenset("\u202a\u202b\u202c\u202d\u202e\u2066\u2067\u2068\u2069")
# Characters no name, record number or label needs that hide in one: line and paragraph
# separators (which break the line they sit in), zero-width space, word joiner, the
# byte-order mark and soft hyphen (invisible), and tag characters. Zero-width joiners
# and non-joiners stay: some scripts write names with them.
_INVISIBLE = frozenset("\u2028\u2029\u200b\u2060\ufeff\u00ad")


def _refused(ch: str) -> bool:
    return (
        unicodedata.category(ch) == "Cc"
        or ch in _BIDI_CONTROLS
        or ch in _INVISIBLE
        or "\U000e0000" <= ch <= "\U000e007f"
    )


def _printable(value: str) -> str:
    for ch in value:
        if _refused(ch):
            control = unicodedata.category(ch) == "Cc" or ch in _BIDI_CONTROLS
            kind = "control character" if control else "invisible character"
            raise PydanticCustomError(
                "control_character",
                "contains the {kind} U+{code}; identifiers and labels must be plain printable text",
                {"kind": kind, "code": f"{ord(ch):04X}"},
            )
    return value


def refused_character(text: str) -> str | None:
    """'the control character U+001B' for the first character no printed text may hold
    (tab, newline and carriage return aside: files are made of lines); None if clean."""
    for ch in text:
        if ch not in "\t\n\r" and _refused(ch):
            control = unicodedata.category(ch) == "Cc" or ch in _BIDI_CONTROLS
            return f"the {'control' if control else 'invisible'} character U+{ord(ch):04X}"
    return None


def plain_printable(value: str) -> str:
    """The value, if it holds no control, bidirectional or invisible character."""
    return _printable(value)


def _printable_text(max_chars: int) -> object:
    """Plain printable text of at most ``max_chars`` characters (length checked first)."""
    return Annotated[str, StringConstraints(max_length=max_chars), AfterValidator(_printable)]


def _kinds(annotation: object) -> set[type]:
    """The plain types a field's annotation allows ('float | None' -> {float, NoneType})."""
    args = typing.get_args(annotation)
    if not args:
        return {annotation} if isinstance(annotation, type) else set()
    return set().union(*(_kinds(a) for a in args))


def refuse_wrong_kind(value: object, annotation: object) -> object:
    """A boolean is never a number and a number never a date: pydantic's lax mode would
    take ``true`` as Mallampati class 1 or urgency category 1, and 1700000000 as a date."""
    kinds = _kinds(annotation)
    if isinstance(value, bool) and kinds & {int, float} and bool not in kinds:
        raise PydanticCustomError("bool_not_number", "must be a number, not true or false")
    if isinstance(value, int | float) and date in kinds:
        raise PydanticCustomError("number_not_date", "must be a date written YYYY-MM-DD")
    return value


class _Model(BaseModel):
    model_config = ConfigDict(frozen=True, extra="forbid", str_strip_whitespace=True)

    @field_validator("*", mode="before")
    @classmethod
    def _right_kind(cls, value: object, info: ValidationInfo) -> object:
        field = cls.model_fields[info.field_name] if info.field_name else None
        return value if field is None else refuse_wrong_kind(value, field.annotation)


def _num(lo: float, hi: float, unit: str, what: str) -> object:
    return Field(
        default=None,
        ge=lo,
        le=hi,
        description=f"{what}, in {unit}; {lo}-{hi}",
        json_schema_extra={"unit": unit} if unit not in ("class", "category") else None,
    )


class Patient(_Model):
    """Who she is and where she is in pregnancy."""

    weight_kg: Annotated[
        float,
        Field(
            ge=30,
            le=300,
            description="Current body weight, in kg; 30-300",
            json_schema_extra={"unit": "kg"},
        ),
    ]
    height_cm: Annotated[float | None, _num(120, 210, "cm", "Height in centimetres")] = None
    age_years: Annotated[int | None, _num(12, 65, "years", "Age in completed years")] = None
    booking_weight_kg: Annotated[
        float | None, _num(30, 300, "kg", "Weight at booking in kilograms")
    ] = None
    gestation_weeks: Annotated[
        float | None, _num(20, 44, "weeks", "Gestation in completed weeks")
    ] = None
    in_labour: bool | None = Field(default=None, description="In labour now (true/false)")
    haemoglobin_g_per_l: Annotated[
        float | None, _num(40, 200, "g/L", "Latest haemoglobin in grams per litre")
    ] = None

    @field_validator("height_cm", mode="before")
    @classmethod
    def _height_not_metres(cls, value: object) -> object:
        if isinstance(value, int | float) and not isinstance(value, bool) and 0 < value < 3:
            raise PydanticCustomError(
                "height_in_metres",
                "looks like metres; give the height in centimetres, for example "
                "{suggest} (allowed 120-210 cm)",
                {"suggest": round(float(value) * 100)},
            )
        return value

    @field_validator("weight_kg", "booking_weight_kg", mode="before")
    @classmethod
    def _weight_not_pounds_hint(cls, value: object) -> object:
        # A weight above 300 is refused by the range; say why it may have happened.
        if isinstance(value, int | float) and not isinstance(value, bool) and 300 < value <= 700:
            raise PydanticCustomError(
                "weight_in_pounds",
                "above 300 kg; if this is in pounds, divide by 2.2 (allowed 30-300 kg)",
            )
        return value


class AirwayExam(_Model):
    """Bedside airway examination. Leave a key out when it was not assessed."""

    mallampati: Annotated[
        int | None, _num(1, 4, "class", "Modified Mallampati class (Samsoon & Young)")
    ] = None
    thyromental_cm: Annotated[float | None, _num(1, 15, "cm", "Thyromental distance")] = None
    sternomental_cm: Annotated[float | None, _num(3, 30, "cm", "Sternomental distance")] = None
    mouth_opening_cm: Annotated[
        float | None, _num(0, 8, "cm", "Inter-incisor gap, mouth fully open")
    ] = None
    neck_circumference_cm: Annotated[
        float | None, _num(25, 80, "cm", "Neck circumference at the thyroid cartilage")
    ] = None
    upper_lip_bite: Annotated[
        int | None, _num(1, 3, "class", "Upper lip bite test class (Khan 2003)")
    ] = None
    neck_movement: Literal["normal", "reduced", "fixed"] | None = None
    jaw_protrusion: Literal["normal", "limited"] | None = None
    short_neck: bool | None = None

    @field_validator("neck_circumference_cm", mode="before")
    @classmethod
    def _neck_not_inches(cls, value: object) -> object:
        # An adult woman's neck is about 29-45 cm round (from memory): a value of 10-25
        # is her neck in inches far more often than in centimetres.
        if isinstance(value, int | float) and not isinstance(value, bool) and 10 <= value < 25:
            raise PydanticCustomError(
                "neck_in_inches",
                "looks like inches ({value} in is {suggest} cm); give the neck "
                "circumference in centimetres (allowed 25-80 cm)",
                {"value": f"{float(value):g}", "suggest": round(float(value) * 2.54)},
            )
        return value

    receding_mandible: bool | None = None
    protruding_incisors: bool | None = None
    large_breasts: bool | None = None


class History(_Model):
    """Airway history."""

    intubation: IntubationHistory | None = Field(
        default=None, description="Previous tracheal intubation: none, difficult or failed"
    )
    difficult_mask_ventilation: bool | None = None
    obstructive_sleep_apnoea: bool | None = None
    snoring: bool | None = None


class Preeclampsia(_Model):
    """Hypertensive disease of pregnancy and signs of airway oedema."""

    status: PreeclampsiaStatus | None = None
    signs: tuple[OedemaSign, ...] = Field(
        default=(), description="Signs of airway oedema present now (empty: none found)"
    )
    platelets_10e9_per_l: Annotated[
        float | None, _num(1, 1000, "x10^9/L", "Latest platelet count")
    ] = None

    @field_validator("signs")
    @classmethod
    def _no_repeats(cls, value: tuple[str, ...]) -> tuple[str, ...]:
        return tuple(sorted(set(value)))


class Context(_Model):
    """The operation and team: what the wake-or-proceed decision needs."""

    urgency_category: Annotated[
        int | None,
        _num(1, 4, "category", "Caesarean urgency category (Lucas 2000); absent for clinic"),
    ] = None
    anaesthetist: Literal["senior", "intermediate", "junior"] | None = Field(
        default=None, description="Experience of the anaesthetist who will intubate"
    )
    surgical_complexity: Grade3 | None = Field(
        default=None, description="Expected surgical complexity (e.g. high: placenta accreta)"
    )
    aspiration_risk: Grade3 | None = Field(
        default=None, description="Aspiration risk; derived from labour when absent"
    )
    end_tidal_o2: Annotated[
        float | None,
        _num(0.5, 0.95, "fraction", "End-tidal O2 fraction expected after pre-oxygenation"),
    ] = None
    regional_alternative: Literal["feasible", "difficult", "impossible"] | None = Field(
        default=None,
        description="Could the operation go ahead under regional or awake technique instead?",
    )
    maternal_arrest: bool | None = Field(
        default=None,
        description="Maternal cardiac arrest or peri-arrest: surgery proceeds whatever else",
    )


# Fields added after the first release enter an assessment's digest only when given,
# so that plans saved before they existed keep their digests (docs/json-contract.md).
ADDED_FIELDS: dict[str, set[str]] = {"context": {"maternal_arrest"}}


class Identity(_Model):
    """Identifiers printed on the plan only when given; blank lines otherwise."""

    name: _printable_text(80) | None = None  # type: ignore[valid-type]
    record_number: _printable_text(40) | None = None  # type: ignore[valid-type]
    date_of_birth: _printable_text(20) | None = Field(  # type: ignore[valid-type]
        default=None, description="Date of birth, as written"
    )


class Assessment(_Model):
    """One assessment of one woman."""

    identity: Identity = Identity()
    patient: Patient
    airway: AirwayExam = AirwayExam()
    history: History = History()
    preeclampsia: Preeclampsia = Preeclampsia()
    context: Context = Context()
    assessed_on: date | None = Field(
        default=None,
        description="Date of the examination (YYYY-MM-DD); the ward board flags old plans",
    )
    label: _printable_text(120) | None = Field(  # type: ignore[valid-type]
        default=None,
        description="Free-text label shown on the plan (e.g. a clinic reference); optional",
    )
