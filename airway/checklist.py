"""A checklist as the engine reads it: front matter, sections, items and conditions.

A validated input model, like the assessment: :mod:`airway.unit.checklists` parses
the Markdown files into it, and :mod:`airway.engine.checklists` fills it in for
one woman's plan or for a generic trolley sheet. The file format is described in
``checklists/README.md``.
"""

import re

from pydantic import BaseModel, ConfigDict, Field

# A value in an item's text: {{name}}.
VALUE = re.compile(r"\{\{\s*(?P<name>[a-z0-9_]+)\s*\}\}")

# A checklist is read aloud and ticked in an emergency: one action a line. The limits
# also keep every item and heading shorter than a printed page (project rule).
ITEM_MAX_CHARS = 240
TITLE_MAX_CHARS = 120


class FrontMatter(BaseModel):
    model_config = ConfigDict(frozen=True, extra="forbid")
    title: str = Field(min_length=1, max_length=TITLE_MAX_CHARS)
    use: tuple[str, ...] = ("sheet",)
    sheet: str
    paper: str = "A4"


class Condition(BaseModel):
    """A parsed ``{when ...}``: a name, negated or not, or a minimum level."""

    model_config = ConfigDict(frozen=True)
    name: str | None = None
    negate: bool = False
    min_level: int | None = None


class Item(BaseModel):
    model_config = ConfigDict(frozen=True)
    text: str  # with {{values}} still in place
    line: int
    condition: Condition | None = None
    checkbox: bool = True


class Section(BaseModel):
    model_config = ConfigDict(frozen=True)
    title: str
    line: int
    items: tuple[Item, ...]


class Checklist(BaseModel):
    model_config = ConfigDict(frozen=True)
    path: str
    meta: FrontMatter
    sections: tuple[Section, ...]
