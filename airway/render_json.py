"""The plan as JSON: the documented contract other tools read (see README).

The bytes are those of ``json.dumps(data, sort_keys=True, indent=2,
ensure_ascii=False)`` plus a newline: same plan, same bytes. The standard
library's indenting encoder is pure Python (about 1 ms a plan, most of a clinic
list's time), so the keys are sorted here and pydantic-core's encoder indents.
The two agree on every string, integer and float except floats below 1e-4
(written 1e-05 against 1e-5) and values the fast encoder cannot hold; a plan
with any of those is written by the standard library instead. A test holds the
two to the same bytes over every example, an invented clinic list and random
documents.
"""

from __future__ import annotations

import json
import math
from typing import Any

from pydantic_core import to_json

from .plan_model import Plan

# Floats the two encoders write alike, and integers the fast one holds.
_FLOAT_SMALLEST = 1e-4
_FLOAT_LARGEST = 1e16
_INT_LARGEST = 2**53


class _Awkward(Exception):
    """A value the fast encoder might write differently."""


def _sorted(value: Any) -> Any:
    """A copy with every object's keys in sorted order; raises _Awkward on odd values."""
    if isinstance(value, dict):
        return {k: _sorted(value[k]) for k in sorted(value)}
    if isinstance(value, list | tuple):
        return [_sorted(v) for v in value]
    if isinstance(value, float):
        size = abs(value)
        if not math.isfinite(value) or (0 < size < _FLOAT_SMALLEST) or size >= _FLOAT_LARGEST:
            raise _Awkward
    elif isinstance(value, int) and not isinstance(value, bool) and abs(value) >= _INT_LARGEST:
        raise _Awkward
    return value


def standard_json(data: Any) -> str:
    """The reference form: the standard library's sorted, two-space-indented JSON."""
    return json.dumps(data, sort_keys=True, indent=2, ensure_ascii=False) + "\n"


def dumps(data: Any) -> str:
    """``standard_json(data)``, byte for byte, but fast for plan-shaped data."""
    try:
        ordered = _sorted(data)
        return to_json(ordered, indent=2).decode("utf-8") + "\n"
    except (_Awkward, ValueError):  # odd values; or text that is not valid Unicode
        return standard_json(data)


def render_json(plan: Plan) -> str:
    """Sorted keys, two-space indent, trailing newline: same plan, same bytes."""
    return dumps(plan.model_dump(mode="json"))
