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
    +-- SheetTooLongError                 a unit list too long for its one-page sheet (exit 2)

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
        got = f" (got {shown_value(self.value)})" if self.has_value else ""
        return f"{self.where}: {self.message}{got}"


# An echoed value is shortened to this many characters: enough to recognise a typing
# slip, never a whole pasted document.
SHOWN_VALUE_MAX = 100
# Problems listed in one message; the rest are counted.
SHOWN_PROBLEMS_MAX = 20


def shown_value(value: object) -> str:
    """The value as a message may repeat it: its repr (control characters escaped),
    shortened to SHOWN_VALUE_MAX characters."""
    text = repr(value)
    return text if len(text) <= SHOWN_VALUE_MAX else text[: SHOWN_VALUE_MAX - 3] + "..."


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
        shown = self.problems[:SHOWN_PROBLEMS_MAX]
        lines = [f"{source}: {count} {noun}"] + [f"  - {p}" for p in shown]
        if count > len(shown):
            lines.append(f"  - and {count - len(shown)} more")
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
