"""The plan as JSON: the documented contract other tools read (see README).

The bytes are those of ``json.dumps(data, sort_keys=True, indent=2,
ensure_ascii=False)`` plus a newline: same plan, same bytes. The standard
library's indenting encoder is pure Python (about 1 ms a plan, most of a clinic
list's time), so the keys are sorted here and pydantic-core's encoder indents. Each
kind of record is put in key order by a function written for its declared field
types the first time it is met (:func:`_converter`).
The two write every string, integer and float alike except floats below 1e-4
(Python writes 2.5e-05 where pydantic-core writes 0.000025) and non-finite ones;
data holding one, or data the fast encoder refuses, is written by the standard
library instead. A test holds the two to the same bytes over every example, an
invented clinic list, every decade of floats and random documents.
"""

from __future__ import annotations

import json
import types
import typing
from collections.abc import Callable
from typing import Any

from pydantic_core import to_json

from .lasting import LASTING
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
        return (_CONVERTERS.get(kind) or _converter(kind))(value)
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


def _checked(value: Any) -> Any:
    """A number field's value, refused when it is a float the encoders write apart."""
    if type(value) is float and _odd(value):
        raise _OddFloat
    return value


# JSON-ready forms of records made once per process (airway.lasting), by id.
_MEMO: dict[int, dict[str, Any]] = {}

# For each kind of record, a function written for it (see _converter).
_CONVERTERS: dict[type, Callable[[Any], Any]] = {}
_BUILDING: set[type] = set()
_TEXT = (str, bool, type(None))


def _field_code(hint: Any, at: str, env: dict[str, Any]) -> str:
    """The expression that makes one field JSON-ready, chosen by its declared type."""
    origin, args = typing.get_origin(hint), typing.get_args(hint)
    if origin in (typing.Union, types.UnionType):
        inner = [a for a in args if a is not type(None)]
        if all(a in _TEXT for a in inner):
            return at
        if all(a in _TEXT or a in (int, float) for a in inner):
            return f"_checked({at})"
        if len(inner) == 1 and hasattr(inner[0], "_fields"):
            return f"(None if {at} is None else {_record_name(inner[0], env)}({at}))"
        return f"_sorted({at})"
    if hint in _TEXT:
        return at
    if hint in (int, float):
        return f"_checked({at})"
    if isinstance(hint, type) and hasattr(hint, "_fields"):
        return f"{_record_name(hint, env)}({at})"
    if origin is tuple and len(args) == 2 and args[1] is Ellipsis:
        if args[0] is str:
            return f"list({at})"
        if hasattr(args[0], "_fields"):
            return f"[{_record_name(args[0], env)}(x) for x in {at}]"
        pair = typing.get_args(args[0])
        if typing.get_origin(args[0]) is tuple and pair and set(pair) <= {int, float}:
            return f"[[_checked(y) for y in x] for x in {at}]"  # the SpO2 curve's points
    return f"_sorted({at})"  # dicts, mixed tuples, anything else: the general walk


def _record_name(kind: type, env: dict[str, Any]) -> str:
    """A name in ``env`` for the function of a record held in a field."""
    name = f"_record_{len(env)}"
    if kind not in _CONVERTERS and kind not in _BUILDING:
        _converter(kind)
    # A record that holds its own kind (none does yet) is looked up when called.
    env[name] = _CONVERTERS.get(kind) or (lambda value: _CONVERTERS[kind](value))
    return name


def _converter(kind: Any) -> Callable[[Any], Any]:
    """A function that writes one kind of record as an object with its keys sorted.

    The same result as the general walk, but written out for the record's declared
    field types (one dict display, no test of each value's type), since a clinic
    list writes thousands of plans: text fields pass as they are, number fields are
    checked for floats the two encoders write apart, records and tuples of records
    call their own functions, and anything else takes the general walk. Records hold
    exactly the types they declare (tests/test_plan_types.py).
    """
    hints = typing.get_type_hints(kind)
    env: dict[str, Any] = {"_checked": _checked, "_sorted": _sorted}
    _BUILDING.add(kind)
    try:
        items = [
            f"{name!r}: {_field_code(hints[name], f'v[{kind._fields.index(name)}]', env)}"
            for name in sorted(kind._fields)
        ]
    finally:
        _BUILDING.discard(kind)
    # A record made once per process (airway.lasting) is converted once: the memo
    # holds its JSON-ready form, keyed by the id that names it for the process.
    env["_lasting"], env["_memo"] = LASTING, _MEMO
    exec(
        "def convert(v):\n"
        "    out = _memo.get(id(v))\n"
        "    if out is None:\n"
        f"        out = {{{', '.join(items)}}}\n"
        "        if id(v) in _lasting:\n"
        "            _memo[id(v)] = out\n"
        "    return out\n",
        env,
    )
    _CONVERTERS[kind] = env["convert"]
    return env["convert"]


def standard_json(data: Any) -> str:
    """The reference form: the standard library's sorted, two-space-indented JSON."""
    return json.dumps(data, sort_keys=True, indent=2, ensure_ascii=False) + "\n"


def _fast(data: Any) -> bytes | None:
    """The fast encoder's UTF-8 bytes, or None where the standard library must write."""
    if type(data) is not dict and not hasattr(type(data), "_fields"):
        return None
    try:
        return to_json(_sorted(data), indent=2) + b"\n"
    except (_OddFloat, ValueError):  # or text that is not valid Unicode, a huge integer
        return None


def dumps(data: Any) -> str:
    """``standard_json(plain(data))``, byte for byte, but fast for plan-shaped data."""
    fast = _fast(data)
    return standard_json(plain(data)) if fast is None else fast.decode("utf-8")


def dumps_bytes(data: Any) -> bytes:
    """:func:`dumps` as UTF-8 bytes, with no round trip through a string (for files)."""
    fast = _fast(data)
    return standard_json(plain(data)).encode("utf-8") if fast is None else fast


def render_json(plan: Plan) -> str:
    """Sorted keys, two-space indent, trailing newline: same plan, same bytes."""
    return dumps(plan)


def render_json_bytes(plan: Plan) -> bytes:
    """:func:`render_json` as the UTF-8 bytes of a file."""
    return dumps_bytes(plan)
