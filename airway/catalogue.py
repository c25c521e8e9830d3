"""The unit's equipment catalogue as the engine reads it: what the trolley stocks.

A validated input model, like the assessment: :mod:`airway.unit.catalogue` reads
a unit's TOML file (or the shipped one) into it, and the engine chooses sizes only
from what it lists.
"""

import math
from typing import Annotated

from pydantic import BaseModel, ConfigDict, Field, field_validator, model_validator

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


TubeSize = Annotated[float, Field(gt=2, le=10, allow_inf_nan=False)]


class Adjuncts(BaseModel):
    model_config = _CONFIG
    face_masks: CatalogueText
    oral_airways: CatalogueText
    bougie: CatalogueText
    # The smallest tube (internal diameter, mm) the bougie passes through.
    bougie_fits_from_mm: TubeSize = 6.0
    # An aid that passes the smaller tubes (a small bougie or an exchange catheter),
    # and the smallest tube it passes; None when the unit stocks none.
    small_tube_aid: CatalogueText | None = None
    small_tube_aid_fits_from_mm: TubeSize | None = None

    @model_validator(mode="after")
    def _aid_has_its_size(self) -> "Adjuncts":
        if (self.small_tube_aid is None) != (self.small_tube_aid_fits_from_mm is None):
            raise ValueError(
                "small_tube_aid and small_tube_aid_fits_from_mm are given together or not at all"
            )
        return self


def _a_number(value: object) -> object:
    if isinstance(value, bool) or not isinstance(value, int | float) or math.isnan(value):
        raise ValueError("must be a number of mg per mL, such as 50")
    return value


Strength = Annotated[float, Field(gt=0, le=1000, allow_inf_nan=False)]


class Stock(BaseModel):
    """One drug as the unit stocks it: its strength, and how it comes."""

    model_config = _CONFIG
    mg_per_ml: Strength
    form: CatalogueText | None = None  # "1% emulsion, 20 mL ampoule"

    @field_validator("mg_per_ml", mode="before")
    @classmethod
    def _strength_is_a_number(cls, value: object) -> object:
        return _a_number(value)


class Drugs(BaseModel):
    """The strength of every drug the plan doses: millilitres are drawn from these."""

    model_config = _CONFIG
    propofol: Stock
    thiopental: Stock
    suxamethonium: Stock
    rocuronium: Stock
    sugammadex: Stock


class Catalogue(BaseModel):
    """What a unit stocks."""

    model_config = _CONFIG
    tracheal_tube_sizes_mm: tuple[float, ...] = Field(min_length=1)
    front_of_neck_tube_mm: float
    supraglottic: Supraglottic
    laryngoscopes: Laryngoscopes
    airway_adjuncts: Adjuncts
    drugs: Drugs

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
