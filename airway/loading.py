"""Read an assessment from TOML or JSON (a file, or ``-`` for stdin).

A saved JSON plan stands for the assessment it was made from (the clinic files
plans; the reassessment compares with them and replans them under current rules).

Every problem is collected and raised at once as an :class:`InputError` that
names the field, the value given and what is allowed.
"""

from __future__ import annotations

import json
import re
import stat
import sys
from collections.abc import Mapping
from pathlib import Path
from typing import Any

from pydantic import BaseModel, ValidationError

from .assessment import Assessment
from .errors import InputError, Problem

_RANGE_ERRORS = ("less_than_equal", "greater_than_equal", "less_than", "greater_than")
_MESSAGES = {
    "extra_forbidden": "unknown key; check its spelling",
    "missing": "required but missing",
}


# Keys that may hold a name, a record number or a date of birth, wherever they are written.
_IDENTIFIER_KEY = re.compile(
    r"name|record|number|nhs|mrn|birth|dob|identifier|patient_id|hospital_id|address|phone",
    re.IGNORECASE,
)


def looks_like_identifier(key: str) -> bool:
    """True for a key that may hold an identifier: its value is never repeated."""
    return bool(_IDENTIFIER_KEY.search(key))


def _where(loc: tuple[int | str, ...]) -> str:
    out = ""
    for part in loc:
        out += f"[{part}]" if isinstance(part, int) else (f".{part}" if out else str(part))
    return out or "(top level)"


def _field_range(model: type[BaseModel], loc: tuple[int | str, ...]) -> str | None:
    """'between 20 and 44 (weeks)' for a field with ge/le bounds, found by its location."""
    current: Any = model
    info = None
    for part in loc:
        if not (isinstance(current, type) and issubclass(current, BaseModel)):
            return None
        info = current.model_fields.get(str(part))
        if info is None:
            return None
        current = info.annotation
    if info is None:
        return None
    lo = next((m.ge for m in info.metadata if getattr(m, "ge", None) is not None), None)
    hi = next((m.le for m in info.metadata if getattr(m, "le", None) is not None), None)
    if lo is None or hi is None:
        return None
    extra = info.json_schema_extra if isinstance(info.json_schema_extra, dict) else {}
    unit = f" {extra['unit']}" if "unit" in extra else ""
    return f"must be between {lo:g} and {hi:g}{unit}"


def problems_from_validation(
    exc: ValidationError, model: type[BaseModel] | None = None
) -> list[Problem]:
    """Turn pydantic's errors into problems a clinician can act on."""
    problems = []
    for err in exc.errors(include_url=False):
        kind = err["type"]
        message = _MESSAGES.get(kind, err["msg"].removeprefix("Value error, "))
        if kind in _RANGE_ERRORS and model is not None:
            message = _field_range(model, err["loc"]) or message
        if kind == "extra_forbidden" and model is Assessment:
            message += " (see `airway schema`)"  # the schema describes assessments only
        if kind == "literal_error":
            message = "must be one of " + err.get("ctx", {}).get("expected", "the listed values")
        # Identifiers are never echoed back, wherever they stand: messages can end up
        # in logs.
        has_value = (
            kind not in ("missing",)
            and not isinstance(err.get("input"), dict | list)
            and err["loc"][:1] != ("identity",)
            and not any(looks_like_identifier(str(part)) for part in err["loc"])
        )
        problems.append(Problem(_where(err["loc"]), message, err.get("input"), has_value))
    return problems


def assessment_from_mapping(data: Mapping[str, Any], source: str = "input") -> Assessment:
    """Validate a decoded mapping (from TOML, JSON or command-line flags)."""
    try:
        return Assessment.model_validate(data)
    except ValidationError as exc:
        raise InputError(source, problems_from_validation(exc, Assessment)) from None


class _DuplicateKeyError(ValueError):
    def __init__(self, keys: list[str]) -> None:
        self.keys = keys
        super().__init__(", ".join(keys))


def _refuse_duplicates(pairs: list[tuple[str, Any]]) -> dict[str, Any]:
    """JSON object hook: a key given twice is refused, never silently the last value."""
    seen: dict[str, Any] = {}
    repeated: list[str] = []
    for key, value in pairs:
        if key in seen and key not in repeated:
            repeated.append(key)
        seen[key] = value
    if repeated:
        raise _DuplicateKeyError(repeated)
    return seen


def _decode(text: str, source: str, fmt: str) -> object:
    import tomllib  # here, not at the top: the emergency path reads no TOML

    try:
        if fmt == "json":
            return json.loads(text, object_pairs_hook=_refuse_duplicates)
        return tomllib.loads(text)
    except json.JSONDecodeError as exc:
        where = f"line {exc.lineno}, column {exc.colno}"
        raise InputError(source, [Problem(where, f"not valid JSON: {exc.msg}")]) from None
    except tomllib.TOMLDecodeError as exc:
        raise InputError(source, [Problem("(syntax)", f"not valid TOML: {exc}")]) from None
    except _DuplicateKeyError as exc:
        problems = [
            Problem(f"key {key!r}", "is given more than once; give each key once")
            for key in exc.keys
        ]
        raise InputError(source, problems) from None
    except RecursionError:
        # An assessment is two levels deep; thousands of levels are not an assessment.
        problem = Problem("(structure)", "is nested far too deeply to be an assessment")
        raise InputError(source, [problem]) from None


def parse_assessment(
    text: str, source: str, fmt: str | None = None, notes: list[str] | None = None
) -> Assessment:
    """Decode TOML or JSON text and validate it.

    Args:
        text: the file's contents: an assessment, a saved JSON plan or a FHIR Bundle.
        source: the name shown in error messages.
        fmt: ``"toml"`` or ``"json"``; guessed from the first character when None.
        notes: when given, what the reader should know about how a FHIR Bundle was
            read (units converted, Observations not used) is appended to it.
    """
    # Many Windows editors and spreadsheets start UTF-8 files with a byte-order mark.
    text = text.removeprefix("\ufeff")
    if not text.strip():
        problem = Problem("(file)", "is empty; expected a TOML or JSON assessment")
        raise InputError(source, [problem])
    if fmt is None:
        fmt = "json" if text.lstrip().startswith("{") else "toml"
    data = _decode(text, source, fmt)
    if not isinstance(data, dict):
        raise InputError(source, [Problem("(top level)", "must be a table of sections")])
    if data.get("resourceType") == "Bundle":
        from .fhir_read import assessment_data  # the FHIR models load only when needed

        data, read_notes = assessment_data(data, source)
        if notes is not None:
            notes += [f"{source}: {note}" for note in read_notes]
        source = f"{source} (the assessment read from this FHIR Bundle)"
    elif is_saved_plan(data):
        # A clinic files plans, not assessments: at the reassessment the saved plan is
        # what there is. It holds the assessment it was made from, validated again here.
        inner = data["assessment"]
        source = f"{source} (the assessment inside this saved plan)"
        if not isinstance(inner, dict):
            raise InputError(source, [Problem("assessment", "must be a table of sections")])
        data = inner
    return assessment_from_mapping(data, source)


# Keys every saved JSON plan has and no assessment can have.
SAVED_PLAN_KEYS = frozenset({"assessment", "generated_by", "input_sha256"})


def is_saved_plan(data: Mapping[str, Any]) -> bool:
    """True for a decoded JSON plan as ``airway plan -f json`` writes it."""
    return data.keys() >= SAVED_PLAN_KEYS


# The largest file of each kind the tool reads (docs/cli.md): far above any real one,
# small enough that a wrong file is refused at once rather than read into memory.
MAX_BYTES = {
    "assessment": 1_000_000,  # a saved plan with its curve and checklists is ~60 kB
    "unit file": 1_000_000,  # catalogue, contacts, config, one checklist
    "clinic list": 20_000_000,  # some 100,000 rows
    "PDF": 20_000_000,  # a printed plan is ~60 kB
}


def read_bounded(path: Path, kind: str, error: type[InputError] = InputError) -> bytes:
    """The bytes of a regular file of at most MAX_BYTES[kind]; anything else (a device, a
    pipe, a folder, a link to one, a file too large) is ``error`` at once, never a hang."""
    limit = MAX_BYTES[kind]
    try:
        info = path.stat()
        if not stat.S_ISREG(info.st_mode):
            raise error(
                str(path), [Problem("(file)", "is not a regular file (a device, pipe or folder)")]
            )
        if info.st_size > limit:
            raise error(
                str(path),
                [Problem("(file)", f"is {info.st_size:,} bytes; an {kind} is at most {limit:,}")],
            )
        with path.open("rb") as handle:
            raw = handle.read(limit + 1)
    except OSError as exc:
        raise error(str(path), [Problem("(file)", exc.strerror or str(exc))]) from None
    if len(raw) > limit:  # grew while being read
        raise error(str(path), [Problem("(file)", f"is larger than {limit:,} bytes")])
    return raw


def read_text_file(
    path: Path, error: type[InputError] = InputError, kind: str = "unit file"
) -> str:
    """A UTF-8 text file (a leading byte-order mark dropped); ``error`` names it if not."""
    raw = read_bounded(path, kind, error)
    try:
        return raw.decode("utf-8").removeprefix("\ufeff")
    except UnicodeDecodeError:
        raise error(str(path), [Problem("(file)", "is not UTF-8 text")]) from None


def toml_from_text(text: str, name: str, error: type[InputError] = InputError) -> dict[str, Any]:
    """TOML text as a table; a syntax error is ``error`` naming ``name``."""
    import tomllib

    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise error(name, [Problem("(syntax)", f"not valid TOML: {exc}")]) from None
    except RecursionError:
        raise error(name, [Problem("(structure)", "is nested far too deeply")]) from None


def read_toml_file(path: Path, error: type[InputError] = InputError) -> dict[str, Any]:
    """A TOML file as a table; every way it can fail is ``error`` naming the file."""
    return toml_from_text(read_text_file(path, error), str(path), error)


def read_assessment(path: str | Path, notes: list[str] | None = None) -> Assessment:
    """Read an assessment from a ``.toml`` or ``.json`` file (an assessment, a saved plan
    or a FHIR Bundle), or ``-`` for stdin; ``notes`` as for :func:`parse_assessment`."""
    if str(path) == "-":
        raw = sys.stdin.buffer.read(MAX_BYTES["assessment"] + 1)
        return assessment_from_bytes(raw, "<stdin>", None, notes)
    file = Path(path)
    fmt = {".toml": "toml", ".json": "json"}.get(file.suffix.lower())
    return assessment_from_bytes(read_bounded(file, "assessment"), str(path), fmt, notes)


def assessment_from_bytes(
    raw: bytes, name: str, fmt: str | None = None, notes: list[str] | None = None
) -> Assessment:
    """An assessment (or saved plan, or FHIR Bundle) from a file's bytes, as read from
    disk, stdin or an upload: at most MAX_BYTES["assessment"], UTF-8 text."""
    limit = MAX_BYTES["assessment"]
    if len(raw) > limit:
        raise InputError(name, [Problem("(file)", f"is larger than {limit:,} bytes")])
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError:
        raise InputError(name, [Problem("(file)", "is not UTF-8 text")]) from None
    return parse_assessment(text, name, fmt, notes)
