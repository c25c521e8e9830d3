"""Records made once per process and shared by every plan that holds them.

Most risk factors are absent or not assessed in any one woman, and several steps
of the sequence hold none of her values, so those records are made once and the
same objects are put in every plan. Marking them here lets the JSON writer make
their JSON-ready form once too (:mod:`airway.render_json`): they never change,
and they are kept alive here, so an object's id names it for the whole process.
"""

from __future__ import annotations

from typing import TypeVar

T = TypeVar("T")

LASTING: dict[int, object] = {}


def lasting(record: T) -> T:
    """Mark a record as made once and never changed; returns it."""
    LASTING[id(record)] = record
    return record
