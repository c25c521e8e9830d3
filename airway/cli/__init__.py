"""The ``airway`` command line: parse, call one library function, render, exit.

:mod:`airway.cli.app` holds the app, the shared options and the mapping of errors
to exit codes; the commands live in :mod:`airway.cli.plans` (one woman) and
:mod:`airway.cli.unit` (clinic lists, the ward board, trolley sheets, reference) and
:mod:`airway.cli.serve` (the web application).
"""

from . import plans, serve, unit
from .app import app, main

__all__ = ["app", "main", "plans", "serve", "unit"]
