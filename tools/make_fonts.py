"""Make the bundled typeface: a cut of DejaVu Sans and DejaVu Sans Bold.

Run: python tools/make_fonts.py [FOLDER]   (needs fontTools: pip install fonttools)

FOLDER holds DejaVuSans.ttf and DejaVuSans-Bold.ttf (default: the Debian/Ubuntu
fonts-dejavu-core folder). Keeps the characters in ``airway.pdf_fonts.COVERED_RANGES``
with their glyphs, widths and hinting, drops the OpenType layout tables (reportlab
does not use them), and renames the family "Airway Sans": the fonts' licence allows
changed copies only under a name without the words "Bitstream" or "Vera". Writes
``airway/data/fonts/`` and prints each output's SHA-256 and glyph count.
"""

from __future__ import annotations

import hashlib
import sys
from pathlib import Path

from fontTools import subset
from fontTools.ttLib import TTFont

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from airway.pdf_fonts import BUNDLED, BUNDLED_FILES, COVERED_RANGES, SYSTEM_FILES  # noqa: E402

OUT = ROOT / "airway" / "data" / "fonts"
FAMILY = "Airway Sans"


def _rename(font: TTFont, style: str, postscript: str) -> None:
    full = FAMILY if style == "Regular" else f"{FAMILY} {style}"
    names = {
        1: FAMILY,
        2: style,
        3: f"{postscript} (cut of DejaVu Sans 2.37)",
        4: full,
        6: postscript,
    }
    table = font["name"]
    for record in list(table.names):
        if record.nameID in (16, 17, 18, 21, 22):  # typographic family names: not needed
            table.removeNames(nameID=record.nameID)
    for name_id, text in names.items():
        table.setName(text, name_id, 3, 1, 0x409)  # Windows, Unicode BMP, US English
        table.setName(text, name_id, 1, 0, 0)  # Macintosh, Roman, English


def main() -> None:
    folder = Path(sys.argv[1] if len(sys.argv) > 1 else "/usr/share/fonts/truetype/dejavu")
    OUT.mkdir(parents=True, exist_ok=True)
    unicodes = [c for lo, hi in COVERED_RANGES for c in range(lo, hi + 1)]
    for source, target, postscript, style in zip(
        SYSTEM_FILES, BUNDLED_FILES, BUNDLED, ("Regular", "Bold"), strict=True
    ):
        # Keep the source's timestamps, so that every run writes the same bytes.
        font = TTFont(folder / source, recalcTimestamp=False)
        options = subset.Options()
        options.layout_features = []
        options.name_IDs = ["*"]
        options.name_languages = ["*"]
        options.notdef_outline = True
        options.recalc_timestamp = False
        options.drop_tables += ["FFTM", "GSUB", "GPOS", "GDEF"]
        cutter = subset.Subsetter(options)
        cutter.populate(unicodes=unicodes)
        cutter.subset(font)
        _rename(font, style, postscript)
        path = OUT / target
        font.save(path)
        digest = hashlib.sha256(path.read_bytes()).hexdigest()
        glyphs = len(font.getGlyphOrder())
        print(f"{path.relative_to(ROOT)}  {glyphs} glyphs  sha256 {digest}")


if __name__ == "__main__":
    main()
