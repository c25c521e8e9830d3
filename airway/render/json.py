"""The plan as JSON: the documented contract other tools read (``docs/json-contract.md``).

The bytes are ``json.dumps`` of the plan's plain data with sorted keys, a
two-space indent and UTF-8 text, plus a newline: same plan, same bytes.
"""

import json
from typing import Any

from ..engine.plan_model import Plan, plain


def dumps(data: Any) -> str:
    """Plain data (records, tuples, the assessment) as sorted, indented JSON text."""
    return json.dumps(plain(data), sort_keys=True, indent=2, ensure_ascii=False) + "\n"


def render_json(plan: Plan) -> str:
    """Sorted keys, two-space indent, trailing newline: same plan, same bytes."""
    return dumps(plan)


def render_json_bytes(plan: Plan) -> bytes:
    """:func:`render_json` as the UTF-8 bytes of a file."""
    return render_json(plan).encode("utf-8")
