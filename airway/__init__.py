"""airway: obstetric airway plans from one bedside assessment.

Library first: :func:`read_assessment` (or :func:`parse_assessment`) gives a
validated :class:`Assessment`; :func:`build_plan` turns it into a :class:`Plan`;
the renderers in :mod:`airway.render_text`, :mod:`airway.render_markdown` and
:mod:`airway.render_json` format it. The command line (:mod:`airway.cli`) is a
thin layer over these.

The names below are imported when first used, so that ``import airway.cli``
(or ``--version``) does not build every model first.
"""

from __future__ import annotations

import importlib
from typing import TYPE_CHECKING, Any

__version__ = "0.1.0"

# Public name -> the module that defines it.
_PUBLIC = {
    "AirwayError": "errors",
    "InputError": "errors",
    "Assessment": "assessment",
    "assessment_from_mapping": "loading",
    "parse_assessment": "loading",
    "read_assessment": "loading",
    "Plan": "plan_model",
    "build_plan": "plan",
}

if TYPE_CHECKING:
    from .assessment import Assessment
    from .engine.plan import build_plan
    from .engine.plan_model import Plan
    from .errors import AirwayError, InputError
    from .loading import assessment_from_mapping, parse_assessment, read_assessment


def __getattr__(name: str) -> Any:
    if name in _PUBLIC:
        value = getattr(importlib.import_module(f".{_PUBLIC[name]}", __name__), name)
        globals()[name] = value
        return value
    raise AttributeError(f"module 'airway' has no attribute {name!r}")


__all__ = [
    "AirwayError",
    "Assessment",
    "InputError",
    "Plan",
    "__version__",
    "assessment_from_mapping",
    "build_plan",
    "parse_assessment",
    "read_assessment",
]
