"""A unit's contact list, printed on the trolley sheets (TOML, ``[[contact]]`` tables)."""

import tomllib
from importlib import resources
from pathlib import Path

from pydantic import BaseModel, ConfigDict, Field, ValidationError

from ..errors import CatalogueError
from ..loading import problems_from_validation, read_toml_file


class Contact(BaseModel):
    model_config = ConfigDict(frozen=True, extra="forbid")
    role: str = Field(min_length=1, max_length=80)
    number: str = Field(default="", max_length=40)


class Contacts(BaseModel):
    model_config = ConfigDict(frozen=True, extra="forbid")
    contact: tuple[Contact, ...] = Field(min_length=1)


def load_contacts(path: Path | None = None) -> tuple[Contact, ...]:
    """The unit's contact list; the shipped one (roles, blank numbers) when None."""
    if path is None:
        text = resources.files("airway").joinpath("data/contacts.toml").read_text("utf-8")
        data = tomllib.loads(text)
        name = "shipped contact list"
    else:
        data, name = read_toml_file(path, CatalogueError), str(path)
    try:
        return Contacts.model_validate(data).contact
    except ValidationError as exc:
        raise CatalogueError(name, problems_from_validation(exc, Contacts)) from None
