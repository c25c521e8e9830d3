"""A unit's contact list, printed on the trolley sheets (TOML, ``[[contact]]`` tables)."""

import tomllib
from importlib import resources
from pathlib import Path
from typing import Annotated

from pydantic import (
    AfterValidator,
    BaseModel,
    ConfigDict,
    Field,
    StringConstraints,
    ValidationError,
)

from ..assessment import plain_printable
from ..errors import CatalogueError
from ..loading import problems_from_validation, read_toml_file

# A contact prints as one line of the sequence sheet: printable text only, and as many
# as the sheet holds on its page (project rule).
CONTACTS_MAX = 8


class Contact(BaseModel):
    model_config = ConfigDict(frozen=True, extra="forbid")
    role: Annotated[
        str, StringConstraints(min_length=1, max_length=80), AfterValidator(plain_printable)
    ]
    number: Annotated[str, StringConstraints(max_length=40), AfterValidator(plain_printable)] = ""


class Contacts(BaseModel):
    model_config = ConfigDict(frozen=True, extra="forbid")
    contact: tuple[Contact, ...] = Field(min_length=1, max_length=CONTACTS_MAX)


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
