"""A unit's own settings: checklist folder, equipment catalogue, contact list.

Read from a TOML config file (``--config``, or ``airway.toml`` in the current
folder when present)::

    checklists = "our-checklists"      # folder of *.md; shipped ones fill gaps
    catalogue = "our-equipment.toml"
    contacts = "our-contacts.toml"

Paths are relative to the config file. Flags on the command line win over the
file; the shipped files are the fallback for anything not given.
"""

from pathlib import Path
from typing import NamedTuple

from pydantic import BaseModel, ConfigDict, ValidationError

from ..catalogue import Catalogue
from ..checklist import Checklist
from ..errors import CatalogueError
from ..loading import problems_from_validation, read_toml_file
from .catalogue import load_catalogue
from .checklists import load_checklists

DEFAULT_CONFIG = Path("airway.toml")


class UnitPaths(BaseModel):
    model_config = ConfigDict(frozen=True, extra="forbid")
    checklists: Path | None = None
    catalogue: Path | None = None
    contacts: Path | None = None


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
    return UnitPaths(
        **{k: (base / v if v is not None else None) for k, v in paths.model_dump().items()}
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
