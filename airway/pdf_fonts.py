"""Which typeface a PDF is set in: the bundled cut of DejaVu Sans, or the whole font.

Every PDF is set in DejaVu Sans (it prints ≥, µ, – and accented names). Parsing the
whole font takes reportlab about 15 ms a face, a large part of a one-page plan's
start-up, for some 6,000 glyphs of which a plan uses a few dozen. So the package
carries a cut of it, "Airway Sans" (``airway/data/fonts``, made by
``tools/make_fonts.py``: DejaVu Sans and DejaVu Sans Bold kept to the characters in
:data:`COVERED_RANGES`, renamed as the fonts' licence asks of a changed copy). Its
glyphs and widths are DejaVu's, so a page looks and breaks the same in either.

A document whose text holds a character outside the cut (a Cyrillic name in a unit
file, say) is set in the whole DejaVu Sans from the system instead, so nothing is
ever printed as an empty box that the system font could have drawn.

No reportlab here: this module only decides; :mod:`airway.render_pdf` registers.
"""

from __future__ import annotations

import dataclasses
import re
from collections.abc import Iterable, Iterator
from enum import Enum
from typing import NamedTuple

# Unicode blocks kept in the bundled cut (inclusive code point ranges).
COVERED_RANGES: tuple[tuple[int, int], ...] = (
    (0x0020, 0x007E),  # Basic Latin
    (0x00A0, 0x024F),  # Latin-1 Supplement, Latin Extended-A and -B
    (0x0370, 0x03FF),  # Greek (µ, α, β in clinical text)
    (0x2000, 0x206F),  # General Punctuation (– — • …)
    (0x2070, 0x209F),  # superscripts and subscripts
    (0x20A0, 0x20CF),  # currency
    (0x2100, 0x214F),  # letterlike symbols
    (0x2190, 0x21FF),  # arrows
    (0x2200, 0x22FF),  # mathematical operators (≥ ≤ ≈)
    (0x2500, 0x257F),  # box drawing
    (0x25A0, 0x25FF),  # geometric shapes
    (0x2610, 0x2612),  # ballot boxes
    (0x26A0, 0x26A0),  # warning sign
    (0x2713, 0x2718),  # check marks and crosses
)
# Characters that are never drawn, so never need a glyph: line breaks and tabs.
_NOT_DRAWN = "\t\n\r"

_OUTSIDE = re.compile(
    "[^"
    + re.escape(_NOT_DRAWN)
    + "".join(f"\\U{lo:08x}-\\U{hi:08x}" for lo, hi in COVERED_RANGES)
    + "]"
)


class Faces(NamedTuple):
    """The registered names of a regular and a bold face."""

    regular: str
    bold: str


BUNDLED = Faces("AirwaySans", "AirwaySans-Bold")
SYSTEM = Faces("DejaVuSans", "DejaVuSans-Bold")
BUNDLED_FILES = ("AirwaySans.ttf", "AirwaySans-Bold.ttf")
SYSTEM_FILES = ("DejaVuSans.ttf", "DejaVuSans-Bold.ttf")


def outside_cut(texts: Iterable[str]) -> set[str]:
    """The characters of these texts that the bundled cut does not hold."""
    found: set[str] = set()
    for text in texts:
        found.update(_OUTSIDE.findall(text))
    return found


def texts_in(value: object) -> Iterator[str]:
    """Every string held in a value: named tuples, lists, dicts, dataclasses and
    pydantic models are walked; numbers and other scalars hold none."""
    if isinstance(value, str):
        yield value
    elif isinstance(value, Enum):
        yield from texts_in(value.value)
    elif isinstance(value, dict):
        for key, item in value.items():
            yield from texts_in(key)
            yield from texts_in(item)
    elif isinstance(value, (tuple, list, set, frozenset)):
        for item in value:
            yield from texts_in(item)
    elif dataclasses.is_dataclass(value) and not isinstance(value, type):
        for field in dataclasses.fields(value):
            yield from texts_in(getattr(value, field.name))
    elif hasattr(value, "__pydantic_fields__") and not isinstance(value, type):
        for name in type(value).__pydantic_fields__:
            yield from texts_in(getattr(value, name))
