"""The ``airway`` console script: the command line, for one command then exit.

Cyclic garbage collection is switched off before the command line's libraries are
imported: building typer's and pydantic's objects at start-up would otherwise set
the collector off many times, for nothing, since the process ends after one
command (a clinic list turns it back on: see ``airway batch``). Reference counting
still frees memory. Only this entry point does it; importing :mod:`airway` or
:mod:`airway.cli` as a library never changes the collector.
"""

import gc

gc.disable()

from .cli import main  # noqa: E402  (after the collector is off, on purpose)

__all__ = ["main"]
