"""airway: obstetric airway plans from one bedside assessment.

Library first: :func:`read_assessment` (or :func:`parse_assessment`) gives a
validated :class:`Assessment`; :func:`plan_for` turns it into a :class:`Plan`
with the shipped unit files (or :func:`build_plan` with a unit's own catalogue
and checklists); the renderers in :mod:`airway.render` format it. The command
line (:mod:`airway.cli`) is a thin layer over these.

The packages, in the direction data flows: the input models and loading at this
level; :mod:`airway.unit` reads a unit's own files; :mod:`airway.engine` is the
clinical computation (pure); :mod:`airway.workflows` is what a user does with it;
:mod:`airway.render` formats plans; :mod:`airway.cli` is the command line.
"""

__version__ = "0.1.0"

from .assessment import Assessment
from .engine.plan import build_plan
from .engine.plan_model import Plan
from .errors import AirwayError, InputError
from .loading import assessment_from_mapping, parse_assessment, read_assessment
from .workflows.planning import plan_for

__all__ = [
    "AirwayError",
    "Assessment",
    "InputError",
    "Plan",
    "__version__",
    "assessment_from_mapping",
    "build_plan",
    "parse_assessment",
    "plan_for",
    "read_assessment",
]
