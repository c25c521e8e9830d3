"""The plan as JSON: the documented contract other tools read (see README)."""

from __future__ import annotations

import json

from .plan_model import Plan


def render_json(plan: Plan) -> str:
    """Sorted keys, two-space indent, trailing newline: same plan, same bytes."""
    data = plan.model_dump(mode="json")
    return json.dumps(data, sort_keys=True, indent=2, ensure_ascii=False) + "\n"
