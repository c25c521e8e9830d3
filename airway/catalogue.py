"""The unit's equipment catalogue as the engine reads it: what the trolley stocks.

A validated input model, like the assessment: :mod:`airway.unit.catalogue` reads
a unit's TOML file (or the shipped one) into it, and the engine chooses sizes only
from what it lists.
"""

import itertools
import math
from typing import Annotated

from pydantic import (
    AfterValidator,
    BaseModel,
    BeforeValidator,
    ConfigDict,
    Field,
    StringConstraints,
    field_validator,
    model_validator,
)

from .assessment import plain_printable

# A unit's names for its devices print in table cells of the plan and the trolley
# sheets; a cell taller than a page cannot be laid out. One or two printed lines is
# ample for a device and its sizes (project rule).
CATALOGUE_TEXT_MAX = 160
# Printable text only: a control character, a bidirectional override or a terminal
# escape would print as an empty box on a laminated sheet or reach the terminal raw.
CatalogueText = Annotated[
    str,
    StringConstraints(min_length=1, max_length=CATALOGUE_TEXT_MAX),
    AfterValidator(plain_printable),
]


def _number(value: object) -> object:
    """A number, never a boolean nor text that looks like one."""
    if isinstance(value, bool) or not isinstance(value, int | float):
        raise ValueError("must be a number")
    return value


# Cuffed tracheal tubes of adult airway practice, internal diameter in mm (from the
# 4.0 mm microlaryngeal tube to 9.0 mm; common practice).
TUBE_RANGE_MM = (4.0, 9.0)
TubeSize = Annotated[
    float,
    BeforeValidator(_number),
    Field(ge=TUBE_RANGE_MM[0], le=TUBE_RANGE_MM[1], allow_inf_nan=False),
]
# Adult supraglottic sizes run from 3 to 5 or 6; 1 to 6 allows the whole range
# makers publish (common practice).
SupraglotticSize = Annotated[float, BeforeValidator(_number), Field(ge=1, le=6)]
Kilograms = Annotated[float, BeforeValidator(_number), Field(ge=0, le=400, allow_inf_nan=False)]
# The weights an assessment accepts (Patient.weight_kg): the bands must cover them all.
COVERED_KG = (30.0, 300.0)

_CONFIG = ConfigDict(frozen=True, extra="forbid")


class Band(BaseModel):
    model_config = _CONFIG
    size: SupraglotticSize
    min_kg: Kilograms
    max_kg: Kilograms

    @model_validator(mode="after")
    def _ordered(self) -> "Band":
        if not self.min_kg < self.max_kg:
            raise ValueError(f"min_kg {self.min_kg:g} must be below max_kg {self.max_kg:g}")
        return self


class Supraglottic(BaseModel):
    model_config = _CONFIG
    device: CatalogueText
    bands: tuple[Band, ...] = Field(min_length=1, max_length=12)

    @model_validator(mode="after")
    def _cover_every_weight(self) -> "Supraglottic":
        bands = self.bands
        for a, b in itertools.pairwise(bands):
            if b.min_kg != a.max_kg:
                raise ValueError(
                    "bands must follow one another in order without gap or overlap: "
                    f"{a.min_kg:g}-{a.max_kg:g} kg is followed by {b.min_kg:g}-{b.max_kg:g} kg"
                )
        lo, hi = COVERED_KG
        if bands[0].min_kg > lo or bands[-1].max_kg <= hi:
            raise ValueError(
                f"bands must cover every weight from {lo:g} to {hi:g} kg "
                f"(they run from {bands[0].min_kg:g} to {bands[-1].max_kg:g} kg)"
            )
        return self


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
    tracheal_tube_sizes_mm: tuple[TubeSize, ...] = Field(min_length=1, max_length=20)
    front_of_neck_tube_mm: TubeSize
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
