"""The typeface every PDF is set in: DejaVu Sans, regular and bold, bundled whole.

DejaVu Sans draws Latin, Greek, Cyrillic, Armenian, Georgian, Hebrew and Arabic
letters and the signs clinical text uses (≥, µ, ±, °, –, ☐). A document that
would print a character it has no glyph for (a name in Chinese characters, say)
is refused before anything is written, with the script named and never the
characters themselves, which may be her name's.
"""

import dataclasses
import unicodedata
from collections.abc import Iterable, Iterator
from enum import Enum
from functools import cache
from importlib import resources

from reportlab.pdfbase import pdfmetrics
from reportlab.pdfbase.ttfonts import TTFont

from ...errors import AirwayError

REGULAR, BOLD = "DejaVuSans", "DejaVuSans-Bold"
FILES = {REGULAR: "DejaVuSans.ttf", BOLD: "DejaVuSans-Bold.ttf"}
# Characters that are never drawn, so never need a glyph: line breaks and tabs.
_NOT_DRAWN = frozenset("\t\n\r")


class FontMissingError(AirwayError):
    """The text holds characters the bundled font cannot draw: bad input for a PDF."""

    exit_code = 2


def font(bold: bool = False) -> str:
    """The registered name of the regular or bold face."""
    return BOLD if bold else REGULAR


@cache
def _faces() -> dict[str, TTFont]:
    """Both faces, registered with reportlab once per process."""
    folder = resources.files("airway").joinpath("data/fonts")
    faces = {}
    for name, file in FILES.items():
        with resources.as_file(folder.joinpath(file)) as path:
            faces[name] = TTFont(name, str(path))
        pdfmetrics.registerFont(faces[name])
    pdfmetrics.registerFontFamily(REGULAR, normal=REGULAR, bold=BOLD)
    return faces


def missing(texts: Iterable[str]) -> set[str]:
    """The characters of these texts that the font has no glyph for."""
    glyphs = _faces()[REGULAR].face.charToGlyph
    found: set[str] = set()
    for text in texts:
        if not (text.isascii() and text.isprintable()):  # DejaVu draws all of printable ASCII
            found.update(ch for ch in text if ch not in _NOT_DRAWN and ord(ch) not in glyphs)
    return found


def script(ch: str) -> str:
    """The writing system a character belongs to, from its Unicode name ("Cyrillic")."""
    first = unicodedata.name(ch, "unnamed").split(" ")[0]
    return first if len(first) <= 3 else first.capitalize()


def use_fonts(*sources: object) -> None:
    """Register the faces, and refuse a document whose text they cannot draw.

    ``sources`` are the values whose strings the document prints (the plan, the
    sheet's lists, the board's rows); the renderers' own words are DejaVu's too.

    Raises:
        FontMissingError: some character has no glyph; the message names its script.
    """
    lacking = missing(text for source in sources for text in texts_in(source))
    if lacking:
        scripts = sorted({script(ch) for ch in lacking})
        named = f"{'script' if len(scripts) == 1 else 'scripts'}: {', '.join(scripts)}"
        raise FontMissingError(
            f"the text holds characters the bundled font cannot print ({len(lacking)} "
            f"distinct, {named}); write them in Latin letters to print this document"
        )


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
