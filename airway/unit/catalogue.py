"""Reading a unit's equipment catalogue (TOML) into :class:`airway.catalogue.Catalogue`.

The shipped catalogue (``airway/data/equipment.toml``) is read and validated the
same way as a unit's own file.
"""

import tomllib
from importlib import resources
from pathlib import Path

from pydantic import ValidationError

from ..catalogue import Catalogue
from ..errors import CatalogueError
from ..loading import problems_from_validation, read_toml_file

SHIPPED = "data/equipment.toml"


def load_catalogue(path: Path | None = None) -> Catalogue:
    """Read a catalogue TOML file; the shipped one when ``path`` is None.

    Raises:
        CatalogueError: the file cannot be read or breaks the model; every problem named.
    """
    if path is None:
        name = "shipped equipment catalogue"
        data = tomllib.loads(resources.files("airway").joinpath(SHIPPED).read_text("utf-8"))
    else:
        name = str(path)
        data = read_toml_file(path, CatalogueError)
    try:
        return Catalogue.model_validate(data)
    except ValidationError as exc:
        raise CatalogueError(name, problems_from_validation(exc, Catalogue)) from None
