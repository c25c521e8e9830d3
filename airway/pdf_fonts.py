"""Which typeface a PDF is set in: the bundled cut of DejaVu Sans, or the whole font.

Every PDF is set in DejaVu Sans (it prints ≥, µ, – and accented names). Parsing the
whole font takes reportlab about 10 ms a face, a large part of a one-page plan's
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

import dataclasses
from collections.abc import Iterable, Iterator
from enum import Enum
from typing import NamedTuple

# Characters kept in the bundled cut (inclusive code point ranges): those of the
# renderers' words, the shipped data and checklists, and of names written in Latin
# or Greek script. Each glyph kept costs start-up time (reportlab reads every glyph's
# entry when it loads a face), so the rarer blocks are left to the whole font: text
# with a character outside the cut is set in the system's DejaVu Sans, which looks
# the same, only loads slower.
COVERED_RANGES: tuple[tuple[int, int], ...] = (
    (0x0020, 0x007E),  # Basic Latin
    (0x00A0, 0x017F),  # Latin-1 Supplement and Latin Extended-A (° ² µ × and names)
    (0x0218, 0x021B),  # Romanian S and T with comma below
    (0x0386, 0x03CE),  # Greek letters, with their accents (α, β in clinical text)
    (0x2010, 0x2027),  # dashes, quotation marks, bullet, ellipsis
    (0x2030, 0x203A),  # per mille, primes, single angle quotation marks
    (0x2190, 0x2199),  # arrows
    (0x2212, 0x2212),  # minus sign
    (0x2248, 0x2248),  # almost equal to
    (0x2260, 0x2265),  # not equal, identical, less and greater than or equal to
    (0x25A0, 0x25A1),  # black and white squares
    (0x25B2, 0x25B3),  # up-pointing triangles
    (0x25BC, 0x25BD),  # down-pointing triangles
    (0x25CB, 0x25CF),  # circles
    (0x2610, 0x2612),  # ballot boxes
    (0x26A0, 0x26A0),  # warning sign
    (0x2713, 0x2718),  # check marks and crosses
)
# Characters that are never drawn, so never need a glyph: line breaks and tabs.
_NOT_DRAWN = "\t\n\r"

# Every character the cut holds, and those never drawn (a set: quicker to make at
# start-up than the equivalent regular expression, and quicker to test against).
_KEPT = frozenset(_NOT_DRAWN).union(
    chr(code) for lo, hi in COVERED_RANGES for code in range(lo, hi + 1)
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
        if not (text.isascii() and text.isprintable()):  # printable ASCII is all kept
            found.update(set(text) - _KEPT)
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
