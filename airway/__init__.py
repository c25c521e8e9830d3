"""airway: obstetric airway plans from one bedside assessment.

Library first: :func:`read_assessment` (or :func:`parse_assessment`) gives a
validated :class:`Assessment`; :func:`build_plan` turns it into a :class:`Plan`;
the renderers in :mod:`airway.render_text`, :mod:`airway.render_markdown` and
:mod:`airway.render_json` format it. The command line (:mod:`airway.cli`) is a
thin layer over these.
"""

__version__ = "0.1.0"

from .assessment import Assessment
from .errors import AirwayError, InputError
from .loading import assessment_from_mapping, parse_assessment, read_assessment
from .plan import Plan, build_plan

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
