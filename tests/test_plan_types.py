"""The plan's records hold exactly the types they declare.

The engine builds its records (named tuples) without validation, so nothing turns
an int into a float or a list into a tuple on the way in. These tests walk every
record of many plans and check each value against its annotation: a 1166 where
1166.0 is declared would change the JSON contract's bytes, a list where a tuple
is declared would make a plan mutable.
"""

from __future__ import annotations

import types
import typing
from pathlib import Path
from typing import Any, get_args, get_origin, get_type_hints

import pytest
from pydantic import BaseModel

from airway.clinic import read_clinic_list
from airway.compare import compare_plans
from airway.plan import build_plan
from airway.plan_model import Plan

ROOT = Path(__file__).resolve().parent.parent


def _problems(value: Any, annotation: Any, where: str) -> list[str]:
    origin = get_origin(annotation)
    if annotation is Any:
        return []
    if origin in (typing.Union, types.UnionType):
        options = get_args(annotation)
        if any(not _problems(value, o, where) for o in options):
            return []
        return [f"{where}: {value!r} is none of {annotation}"]
    if annotation is type(None):
        return [] if value is None else [f"{where}: {value!r} is not None"]
    if origin is tuple:
        if type(value) is not tuple:
            return [f"{where}: {type(value).__name__} where a tuple is declared"]
        args = get_args(annotation)
        if len(args) == 2 and args[1] is Ellipsis:
            return [p for i, v in enumerate(value) for p in _problems(v, args[0], f"{where}[{i}]")]
        if len(args) != len(value):
            return [f"{where}: {len(value)} items where {len(args)} are declared"]
        pairs = enumerate(zip(value, args, strict=True))
        return [p for i, (v, a) in pairs for p in _problems(v, a, f"{where}[{i}]")]
    if origin is dict:
        if type(value) is not dict:
            return [f"{where}: {type(value).__name__} where a dict is declared"]
        key, item = get_args(annotation)
        return [
            p
            for k, v in value.items()
            for p in _problems(k, key, f"{where} key") + _problems(v, item, f"{where}[{k}]")
        ]
    if isinstance(annotation, type) and hasattr(annotation, "_fields"):
        if type(value) is not annotation:
            return [f"{where}: {type(value).__name__} where {annotation.__name__} is declared"]
        return _record_problems(value, where)
    if isinstance(annotation, type) and issubclass(annotation, BaseModel):
        return [] if isinstance(value, annotation) else [f"{where}: not a {annotation.__name__}"]
    if annotation in (int, float, str, bool):
        # exact types: a bool is not an int here, an int is not a float
        return [] if type(value) is annotation else [f"{where}: {value!r} is not {annotation}"]
    raise AssertionError(f"{where}: annotation {annotation} not handled by this test")


def _record_problems(record: Any, where: str) -> list[str]:
    hints = get_type_hints(type(record))
    return [
        p
        for name in record._fields
        for p in _problems(getattr(record, name), hints[name], f"{where}.{name}")
    ]


def _plans() -> list[Plan]:
    source = (ROOT / "examples" / "clinic-list.csv").read_text("utf-8")
    rows = [r.assessment for r in read_clinic_list(source, "clinic-list.csv") if r.assessment]
    return [build_plan(a) for a in rows]


PLANS = _plans()


def test_the_checker_sees_a_wrong_type() -> None:
    """Control: an int where a float is declared, and a list where a tuple is."""
    plan = PLANS[0]
    oxy = plan.oxygenation._replace(horizon_minutes=20)
    assert _record_problems(plan._replace(oxygenation=oxy), "plan")
    assert _record_problems(plan._replace(warnings=list(plan.warnings)), "plan")


@pytest.mark.parametrize("index", range(0, len(PLANS), 7))
def test_every_record_of_a_clinic_plan_holds_its_declared_types(index: int) -> None:
    plan = PLANS[index]
    later = PLANS[(index + 1) % len(PLANS)]
    with_changes = later._replace(changes_since=compare_plans(plan, later))
    assert _record_problems(with_changes, "plan") == []
