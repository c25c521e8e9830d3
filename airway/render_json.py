"""The plan as JSON: the documented contract other tools read (see README).

The bytes are those of ``json.dumps(data, sort_keys=True, indent=2,
ensure_ascii=False)`` plus a newline: same plan, same bytes. The standard
library's indenting encoder is pure Python (about 1 ms a plan, most of a clinic
list's time), so the keys are sorted here and pydantic-core's encoder indents.
The two write every string, integer and float alike except floats below 1e-4
(Python writes 2.5e-05 where pydantic-core writes 0.000025) and non-finite ones;
data holding one, or data the fast encoder refuses, is written by the standard
library instead. A test holds the two to the same bytes over every example, an
invented clinic list, every decade of floats and random documents.
"""

from __future__ import annotations

import json
from typing import Any

from pydantic_core import to_json

from .plan_model import Plan, plain

# Python and pydantic-core write floats alike from 1e-4 up to (not including) 1e16;
# below, Python writes 2.5e-05 where pydantic-core writes 0.000025 (measured over
# every decade in tests/test_render_json.py).
_FLOAT_SMALLEST = 1e-4
_FLOAT_LARGEST = 1e16


class _OddFloat(Exception):
    """A float the two encoders may write differently."""


def _odd(number: float) -> bool:
    return number != 0.0 and not _FLOAT_SMALLEST <= abs(number) < _FLOAT_LARGEST


_SCALARS = frozenset({str, int, bool, type(None)})


def _sorted(value: Any) -> Any:
    """Plain data with every object's keys in sorted order; raises _OddFloat at odd floats.

    Takes dicts, lists, tuples, the plan's records (named tuples) and pydantic
    models (the assessment). Written out by hand, one loop over the values of an
    object or an array (no call per plain value): a plan has about a thousand.
    """
    kind = type(value)
    keys: list[str] | None = None
    if kind is dict:
        keys = sorted(value)
        values = [value[k] for k in keys]
    elif kind is list or kind is tuple:
        values = value
    elif hasattr(kind, "_fields"):  # one of the plan's records
        keys, order = _ORDER.get(kind) or _order(kind)
        values = [value[i] for i in order]
    else:
        return _sorted(plain(value))
    out: list[Any] = []
    for v in values:
        if type(v) in _SCALARS:
            pass
        elif type(v) is float:
            if _odd(v):
                raise _OddFloat
        else:
            v = _sorted(v)
        out.append(v)
    return out if keys is None else dict(zip(keys, out, strict=True))


# For each kind of record: its field names in sorted order, and where each one sits.
_ORDER: dict[type, tuple[list[str], list[int]]] = {}


def _order(kind: Any) -> tuple[list[str], list[int]]:
    order = sorted(range(len(kind._fields)), key=kind._fields.__getitem__)
    _ORDER[kind] = ([kind._fields[i] for i in order], order)
    return _ORDER[kind]


def standard_json(data: Any) -> str:
    """The reference form: the standard library's sorted, two-space-indented JSON."""
    return json.dumps(data, sort_keys=True, indent=2, ensure_ascii=False) + "\n"


def dumps(data: Any) -> str:
    """``standard_json(plain(data))``, byte for byte, but fast for plan-shaped data."""
    if type(data) is not dict and not hasattr(type(data), "_fields"):
        return standard_json(plain(data))
    try:
        fast = to_json(_sorted(data), indent=2)
    except (_OddFloat, ValueError):  # or text that is not valid Unicode, a huge integer
        return standard_json(plain(data))
    return fast.decode("utf-8") + "\n"


def render_json(plan: Plan) -> str:
    """Sorted keys, two-space indent, trailing newline: same plan, same bytes."""
    return dumps(plan)
