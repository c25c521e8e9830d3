"""The unit's equipment catalogue as the engine reads it: what the trolley stocks.

A validated input model, like the assessment: :mod:`airway.unit.catalogue` reads
a unit's TOML file (or the shipped one) into it, and the engine chooses sizes only
from what it lists.
"""

from typing import Annotated

from pydantic import BaseModel, ConfigDict, Field, model_validator

# A unit's names for its devices print in table cells of the plan and the trolley
# sheets; a cell taller than a page cannot be laid out. One or two printed lines is
# ample for a device and its sizes (project rule).
CATALOGUE_TEXT_MAX = 160
CatalogueText = Annotated[str, Field(min_length=1, max_length=CATALOGUE_TEXT_MAX)]


_CONFIG = ConfigDict(frozen=True, extra="forbid")


class Band(BaseModel):
    model_config = _CONFIG
    size: float
    min_kg: float = Field(ge=0)
    max_kg: float = Field(gt=0)


class Supraglottic(BaseModel):
    model_config = _CONFIG
    device: CatalogueText
    bands: tuple[Band, ...] = Field(min_length=1)


class Laryngoscopes(BaseModel):
    model_config = _CONFIG
    videolaryngoscope: CatalogueText
    direct: CatalogueText
    short_handle: CatalogueText


class Adjuncts(BaseModel):
    model_config = _CONFIG
    face_masks: CatalogueText
    oral_airways: CatalogueText
    bougie: CatalogueText


class Catalogue(BaseModel):
    """What a unit stocks."""

    model_config = _CONFIG
    tracheal_tube_sizes_mm: tuple[float, ...] = Field(min_length=1)
    front_of_neck_tube_mm: float
    supraglottic: Supraglottic
    laryngoscopes: Laryngoscopes
    airway_adjuncts: Adjuncts

    @model_validator(mode="after")
    def _front_of_neck_stocked(self) -> "Catalogue":
        if self.front_of_neck_tube_mm not in self.tracheal_tube_sizes_mm:
            raise ValueError(
                f"front_of_neck_tube_mm {self.front_of_neck_tube_mm} is not among "
                f"tracheal_tube_sizes_mm {list(self.tracheal_tube_sizes_mm)}"
            )
        return self

    def supraglottic_size(self, weight_kg: float) -> float:
        """The first band that holds this weight; the nearest band if none does."""
        for band in self.supraglottic.bands:
            if band.min_kg <= weight_kg < band.max_kg:
                return band.size
        nearest = min(
            self.supraglottic.bands,
            key=lambda b: min(abs(weight_kg - b.min_kg), abs(weight_kg - b.max_kg)),
        )
        return nearest.size
