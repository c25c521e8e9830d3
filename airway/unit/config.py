"""A unit's own settings: checklist folder, equipment catalogue, contact list.

Read from a TOML config file (``--config``, or ``airway.toml`` in the current
folder when present)::

    checklists = "our-checklists"      # folder of *.md; shipped ones fill gaps
    catalogue = "our-equipment.toml"
    contacts = "our-contacts.toml"

Paths are relative to the config file. Flags on the command line win over the
file; the shipped files are the fallback for anything not given.
"""

from datetime import date
from pathlib import Path
from typing import Annotated, NamedTuple

from pydantic import (
    AfterValidator,
    BaseModel,
    ConfigDict,
    StringConstraints,
    ValidationError,
)

from ..assessment import plain_printable
from ..catalogue import Catalogue
from ..checklist import Checklist
from ..errors import CatalogueError
from ..loading import problems_from_validation, read_toml_file
from .catalogue import load_catalogue
from .checklists import load_checklists

DEFAULT_CONFIG = Path("airway.toml")


_Text = Annotated[
    str, StringConstraints(min_length=1, max_length=60), AfterValidator(plain_printable)
]


class UnitPaths(BaseModel):
    model_config = ConfigDict(frozen=True, extra="forbid")
    checklists: Path | None = None
    catalogue: Path | None = None
    contacts: Path | None = None
    # Printed on the laminated sheets: whose they are, who approved them, when to review.
    unit_name: _Text | None = None
    approved_by: _Text | None = None
    review_by: date | None = None


def load_unit_paths(config: Path | None) -> UnitPaths:
    """The unit's paths from its config file; nothing when there is none."""
    if config is None:
        if not DEFAULT_CONFIG.is_file():
            return UnitPaths()
        config = DEFAULT_CONFIG
    data = read_toml_file(config, CatalogueError)
    try:
        paths = UnitPaths.model_validate(data)
    except ValidationError as exc:
        raise CatalogueError(str(config), problems_from_validation(exc, UnitPaths)) from None
    base = config.parent
    files = ("checklists", "catalogue", "contacts")
    return paths.model_copy(
        update={k: base / v for k in files if (v := getattr(paths, k)) is not None}
    )


class Unit(NamedTuple):
    """A unit's files, read: what the engine plans with, and where the rest is."""

    catalogue: Catalogue
    checklists: tuple[Checklist, ...]
    paths: UnitPaths


def load_unit(
    config: Path | None = None, catalogue: Path | None = None, checklists: Path | None = None
) -> Unit:
    """The unit's catalogue and checklists: the paths given, then the config file's,
    then the shipped files."""
    paths = load_unit_paths(config)
    return Unit(
        catalogue=load_catalogue(catalogue or paths.catalogue),
        checklists=load_checklists(checklists or paths.checklists),
        paths=paths,
    )
