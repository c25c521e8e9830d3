"""The bundled cut of DejaVu Sans, and the fall-back to the whole system font.

Checked against the outside world: the system's DejaVu Sans 2.37 (Debian
fonts-dejavu-core), whose glyph widths the cut must keep, so that a page breaks the
same in either font.
"""

from __future__ import annotations

import dataclasses
import io
from pathlib import Path

import pytest
from hypothesis import given
from hypothesis import strategies as st
from pypdf import PdfReader
from reportlab.pdfbase import pdfmetrics
from reportlab.pdfbase.ttfonts import TTFont

from airway import build_plan, render_pdf
from airway.pdf_fonts import (
    BUNDLED,
    BUNDLED_FILES,
    COVERED_RANGES,
    SYSTEM_FILES,
    outside_cut,
    texts_in,
)
from airway.render_pdf import BUNDLED_FONT_DIR, FontMissingError, render_plan_pdf

from .conftest import make

ROOT = Path(__file__).resolve().parent.parent
SYSTEM_DIR = Path("/usr/share/fonts/truetype/dejavu")
needs_system_font = pytest.mark.skipif(
    not (SYSTEM_DIR / SYSTEM_FILES[0]).is_file(), reason="DejaVu Sans not installed"
)
CYRILLIC = "Ольга"  # outside the cut; DejaVu Sans draws it


def _fonts(pdf: bytes) -> set[str]:
    names = set()
    for page in PdfReader(io.BytesIO(pdf)).pages:
        for font in page["/Resources"]["/Font"].values():
            names.add(str(font.get_object()["/BaseFont"]).split("+")[-1])
    return names


def _text(pdf: bytes) -> str:
    return " ".join(p.extract_text() for p in PdfReader(io.BytesIO(pdf)).pages)


def test_outside_cut() -> None:
    assert outside_cut(["Zoë Ångström µg ≥ 3 – ok • ☐ ✓ ș"]) == set()
    assert outside_cut(["line\nbreak\ttab"]) == set()
    assert outside_cut([f"name {CYRILLIC}", "王"]) == set(CYRILLIC) | {"王"}
    assert outside_cut(["\u03a2"]) == set()  # unassigned inside a kept range: not a gap
    # Names across Europe are in the cut; rarer Latin letters go to the whole font.
    assert outside_cut(["Małgorzata Dvořák Şahin Ğül Ștefan Ελένη"]) == set()
    assert outside_cut(["Lǚ Ǆ"]) == {"ǚ", "Ǆ"}


def test_texts_in_walks_every_container() -> None:
    plan = build_plan(make(label="label-x", identity={"name": "name-y"}))
    texts = set(texts_in(plan))
    assert {"label-x", "name-y"} <= texts
    assert set(texts_in({"k": [("a", 1.5), {"b"}]})) == {"k", "a", "b"}

    @dataclasses.dataclass
    class Row:  # as the ward board's rows
        name: str
        warnings: tuple[str, ...]

    assert set(texts_in([Row(CYRILLIC, ("w",))])) == {CYRILLIC, "w"}


@needs_system_font
@pytest.mark.parametrize(("bundled", "system"), list(zip(BUNDLED_FILES, SYSTEM_FILES, strict=True)))
def test_cut_keeps_dejavu_glyphs_and_widths(bundled: str, system: str) -> None:
    """Every kept character DejaVu Sans draws is in the cut, at DejaVu's width."""
    cut = TTFont("cut-" + bundled, str(BUNDLED_FONT_DIR / bundled))
    whole = TTFont("whole-" + system, str(SYSTEM_DIR / system))
    kept = {c for lo, hi in COVERED_RANGES for c in range(lo, hi + 1)}
    drawn = kept & set(whole.face.charToGlyph)
    assert len(drawn) > 400
    # 0xFFFF: the end marker of a format-4 character map, not a character
    assert set(cut.face.charToGlyph) - {0xFFFF} == drawn
    for code in sorted(drawn):
        ch = chr(code)
        assert cut.stringWidth(ch, 10) == whole.stringWidth(ch, 10), hex(code)


def test_cut_is_renamed_as_the_licence_asks() -> None:
    """The Bitstream Vera licence: a changed copy must not be named Bitstream or Vera."""
    for file, name in zip(BUNDLED_FILES, BUNDLED, strict=True):
        face = TTFont("n-" + file, str(BUNDLED_FONT_DIR / file)).face
        assert face.name.decode() == name
        for field in (face.name, face.familyName, face.styleName):
            text = field.decode() if isinstance(field, bytes) else str(field)
            assert "Vera" not in text and "Bitstream" not in text
    licence = (BUNDLED_FONT_DIR / "LICENSE.txt").read_text("utf-8")
    assert "Bitstream" in licence and "Permission is hereby granted" in licence


def test_every_word_of_ours_is_in_the_cut() -> None:
    """The renderers' own words, the bundled data and the checklists print in the cut."""
    files = [*ROOT.joinpath("airway").glob("*.py"), *ROOT.joinpath("airway", "data").rglob("*")]
    files += [*ROOT.joinpath("checklists").glob("*"), *ROOT.joinpath("examples").glob("*")]
    texts = [f.read_text("utf-8") for f in files if f.is_file() and f.suffix != ".ttf"]
    assert outside_cut(texts) == set()


def test_ordinary_plan_needs_no_system_font(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setattr(render_pdf, "FONT_DIRS", ("",))
    pdf = render_plan_pdf(build_plan(make(label="Zoë Ångström µg ≥ 3")))
    assert _fonts(pdf) == {"AirwaySans", "AirwaySans-Bold"}
    assert "Zoë Ångström µg ≥ 3" in _text(pdf)


@needs_system_font
def test_text_outside_the_cut_is_set_in_the_whole_font() -> None:
    ordinary = build_plan(make())
    before = render_plan_pdf(ordinary)
    pdf = render_plan_pdf(build_plan(make(identity={"name": CYRILLIC})))
    assert _fonts(pdf) <= {"DejaVuSans", "DejaVuSans-Bold"}
    assert CYRILLIC in _text(pdf)
    # Each document chooses its own fonts: the next ordinary plan is as before.
    assert render_plan_pdf(ordinary) == before


def test_text_outside_the_cut_without_the_system_font(
    monkeypatch: pytest.MonkeyPatch,
) -> None:
    monkeypatch.setattr(render_pdf, "FONT_DIRS", ("",))
    for name in ("DejaVuSans", "DejaVuSans-Bold"):  # as in a process that never had it
        monkeypatch.delitem(pdfmetrics._fonts, name, raising=False)
    with pytest.raises(FontMissingError) as info:
        render_plan_pdf(build_plan(make(identity={"name": CYRILLIC})))
    message = str(info.value)
    assert "fonts-dejavu-core" in message and "Cyrillic" in message
    # The characters may be her name's: named by script, never repeated.
    assert not any(ch in message for ch in CYRILLIC)


@needs_system_font
def test_ward_board_with_a_name_outside_the_cut(tmp_path: Path) -> None:
    """The board names each woman by her plan file's name (a clinic id, or whatever a
    ward saved it as): one outside the cut sets the board in the whole DejaVu Sans,
    and the name prints as written."""
    from datetime import date

    from airway.board import board_rows, load_plans
    from airway.render_board import render_board_pdf
    from airway.render_json import render_json

    for n, name in enumerate(["Zoë", CYRILLIC]):
        plan = build_plan(make(assessed_on="2026-12-01", label=f"woman {n}"))
        (tmp_path / f"{name}.json").write_text(render_json(plan), "utf-8")
    plans, _skipped = load_plans(tmp_path)
    rows = board_rows(plans, date(2026, 12, 2), max_age_days=14)
    pdf = render_board_pdf(rows, "2026-12-02", 14, [])
    assert _fonts(pdf) <= {"DejaVuSans", "DejaVuSans-Bold"}
    assert CYRILLIC in _text(pdf) and "Zoë" in _text(pdf)


@given(st.lists(st.text(alphabet=st.characters(codec="utf-8", exclude_categories=("Cs",)))))
def test_outside_cut_is_every_character_of_no_kept_range(texts: list[str]) -> None:
    """The characters found outside are exactly those in none of the kept ranges,
    line breaks and tabs apart: worked out here from the ranges, one by one."""

    def kept(ch: str) -> bool:
        return ch in "\t\n\r" or any(lo <= ord(ch) <= hi for lo, hi in COVERED_RANGES)

    assert outside_cut(texts) == {ch for text in texts for ch in text if not kept(ch)}
