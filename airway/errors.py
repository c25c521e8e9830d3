"""The exceptions raised by ``airway``.

Every error the library raises on purpose derives from :class:`AirwayError`, so
the command line needs one ``except`` to turn them into a message and an exit
code::

    AirwayError
    +-- InputError (also ValueError)      bad assessment: file, field, value, allowed
    |   +-- CatalogueError                bad equipment catalogue or contact list
    +-- ChecklistError (also ValueError)  bad checklist Markdown: file and line
    +-- OutputExistsError                 refusing to overwrite without --force
    +-- FontMissingError                  a PDF's text the font cannot draw (render/pdf/fonts)
    +-- PdfLayoutError                    a plan that cannot be laid out (render/pdf/plan)

The library never prints and never exits; the CLI decides what the user sees.
"""

from typing import NamedTuple


class AirwayError(Exception):
    """Root of every error ``airway`` raises deliberately."""

    exit_code = 1


class Problem(NamedTuple):
    """One thing wrong with an input: where, what was given, what is allowed."""

    where: str
    message: str
    value: object = None
    has_value: bool = False

    def __str__(self) -> str:
        got = f" (got {self.value!r})" if self.has_value else ""
        return f"{self.where}: {self.message}{got}"


class InputError(AirwayError, ValueError):
    """The assessment (file, stdin or flags) could not be turned into a plan.

    Carries every problem found, not just the first, so the user can fix the
    whole file in one pass.
    """

    exit_code = 2

    def __init__(self, source: str, problems: list[Problem]) -> None:
        self.source = source
        self.problems = tuple(problems)
        count = len(self.problems)
        noun = "problem" if count == 1 else "problems"
        lines = [f"{source}: {count} {noun}"] + [f"  - {p}" for p in self.problems]
        super().__init__("\n".join(lines))


class CatalogueError(InputError):
    """The unit's equipment catalogue or contact list is unusable."""


class ChecklistError(AirwayError, ValueError):
    """A checklist Markdown file is malformed; names the file and the line."""

    exit_code = 2

    def __init__(self, path: str, line: int | None, message: str) -> None:
        self.path = path
        self.line = line
        where = f"{path}:{line}" if line is not None else path
        super().__init__(f"{where}: {message}")


class OutputPathError(AirwayError):
    """An output name that cannot be a file: a folder, or in a folder that does not exist."""

    exit_code = 2


class OutputExistsError(AirwayError):
    """The output file exists and ``--force`` was not given."""

    exit_code = 2

    def __init__(self, path: str, message: str = "") -> None:
        self.path = path
        super().__init__(message or f"{path} already exists; use --force to replace it")
