"""A unit's own settings: checklist folder, equipment catalogue, contact list.

Read from a TOML config file (``--config``, or ``airway.toml`` in the current
folder when present)::

    checklists = "our-checklists"      # folder of *.md; shipped ones fill gaps
    catalogue = "our-equipment.toml"
    contacts = "our-contacts.toml"

Paths are relative to the config file. Flags on the command line win over the
file; the shipped files are the fallback for anything not given.
"""

from __future__ import annotations

from importlib import resources
from pathlib import Path

from pydantic import BaseModel, ConfigDict, Field, ValidationError

from .errors import CatalogueError
from .loading import problems_from_validation, read_toml_file

DEFAULT_CONFIG = Path("airway.toml")


# Built when a unit's file is read (defer_build): most runs have none.
class UnitPaths(BaseModel):
    model_config = ConfigDict(frozen=True, extra="forbid", defer_build=True)
    checklists: Path | None = None
    catalogue: Path | None = None
    contacts: Path | None = None


class Contact(BaseModel):
    model_config = ConfigDict(frozen=True, extra="forbid", defer_build=True)
    role: str = Field(min_length=1, max_length=80)
    number: str = Field(default="", max_length=40)


class Contacts(BaseModel):
    model_config = ConfigDict(frozen=True, extra="forbid", defer_build=True)
    contact: tuple[Contact, ...] = Field(min_length=1)


def _read_toml(path: Path, what: str) -> dict[str, object]:
    del what  # the file's name says which file it is
    return read_toml_file(path, CatalogueError)


def load_unit_paths(config: Path | None) -> UnitPaths:
    """The unit's paths from its config file; nothing when there is none."""
    if config is None:
        if not DEFAULT_CONFIG.is_file():
            return UnitPaths.model_construct()  # no unit files: the defaults, unchecked
        config = DEFAULT_CONFIG
    data = _read_toml(config, "config file")
    try:
        paths = UnitPaths.model_validate(data)
    except ValidationError as exc:
        raise CatalogueError(str(config), problems_from_validation(exc, UnitPaths)) from None
    base = config.parent
    return UnitPaths(
        **{k: (base / v if v is not None else None) for k, v in paths.model_dump().items()}
    )


def load_contacts(path: Path | None = None) -> tuple[Contact, ...]:
    """The unit's contact list; the shipped one (roles, blank numbers) when None."""
    if path is None:
        import tomllib

        text = resources.files("airway").joinpath("data/contacts.toml").read_text("utf-8")
        data = tomllib.loads(text)
        name = "shipped contact list"
    else:
        data, name = _read_toml(path, "contact list"), str(path)
    try:
        return Contacts.model_validate(data).contact
    except ValidationError as exc:
        raise CatalogueError(name, problems_from_validation(exc, Contacts)) from None
