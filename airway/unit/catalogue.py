"""Reading a unit's equipment catalogue (TOML) into :class:`airway.catalogue.Catalogue`.

The shipped catalogue (``airway/data/equipment.toml``) is read and validated the
same way as a unit's own file. Every problem names the line of the file it is
on (the line of its table when the key is missing).
"""

import re
from importlib import resources
from pathlib import Path

from pydantic import ValidationError

from ..catalogue import Catalogue
from ..errors import CatalogueError, Problem
from ..loading import problems_from_validation, read_text_file, toml_from_text

SHIPPED = "data/equipment.toml"

_HEADER = re.compile(r"^\s*\[\s*([A-Za-z0-9_.\s\"-]+?)\s*\]\s*(#.*)?$")
_KEY = re.compile(r"^\s*([A-Za-z0-9_-]+)\s*=")


def line_of(text: str, where: str) -> int | None:
    """The line a dotted location ('drugs.propofol.mg_per_ml') is written on: the key's
    own line, else its table's header; None when neither is in the file."""
    parts = where.split(".")
    table, key = ".".join(parts[:-1]), parts[-1]
    current, header_line = "", None
    for number, line in enumerate(text.splitlines(), start=1):
        header = _HEADER.match(line)
        if header:
            current = re.sub(r"[\s\"]", "", header.group(1))
            if current == where:
                header_line = number
            if current == table and header_line is None:
                header_line = number
            continue
        found = _KEY.match(line)
        if found and current == table and found.group(1) == key:
            return number
    return header_line


def _line(text: str, where: str) -> int | None:
    """The line of a location, or of the nearest enclosing key written in the file
    ('supraglottic.bands[0].size' is on the line of its array when written inline)."""
    parts = re.sub(r"\[\d+\]", "", where).split(".")
    for end in range(len(parts), 0, -1):
        number = line_of(text, ".".join(parts[:end]))
        if number is not None:
            return number
    return None


def _with_lines(text: str, problems: list[Problem]) -> list[Problem]:
    out = []
    for p in problems:
        number = _line(text, p.where)
        out.append(p._replace(where=f"line {number}: {p.where}") if number else p)
    return out


def load_catalogue(path: Path | None = None) -> Catalogue:
    """Read a catalogue TOML file; the shipped one when ``path`` is None.

    Raises:
        CatalogueError: the file cannot be read or breaks the model; every problem named
            with its line.
    """
    if path is None:
        name = "shipped equipment catalogue"
        text = resources.files("airway").joinpath(SHIPPED).read_text("utf-8")
    else:
        name = str(path)
        text = read_text_file(path, CatalogueError)
    data = toml_from_text(text, name, CatalogueError)
    try:
        return Catalogue.model_validate(data)
    except ValidationError as exc:
        problems = problems_from_validation(exc, Catalogue)
        raise CatalogueError(name, _with_lines(text, problems)) from None
