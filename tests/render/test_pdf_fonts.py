"""The bundled typeface: DejaVu Sans 2.37, whole, and what it cannot print.

Checked against the outside world: the DejaVu Sans files of Debian's
fonts-dejavu-core (2.37), which the bundled files must equal byte for byte.
"""

import dataclasses
import hashlib
import io
from importlib import resources
from pathlib import Path

import pytest
from pypdf import PdfReader

from airway import plan_for
from airway.cli import app
from airway.render.pdf.fonts import FILES, FontMissingError, missing, texts_in
from airway.render.pdf.plan import render_plan_pdf

from ..conftest import make

SYSTEM_DIR = Path("/usr/share/fonts/truetype/dejavu")
BUNDLED_DIR = resources.files("airway").joinpath("data/fonts")
# A name in each script the issue names; all invented.
NAMES = {
    "Latin": "Zoë Ångström-Dvořák",
    "Greek": "Ελένη Παπαδοπούλου",
    "Cyrillic": "Ольга Петрова",
    "Arabic": "فاطمة الزهراء",
}
CHINESE = "王秀英"


def _fonts(pdf: bytes) -> set[str]:
    names = set()
    for page in PdfReader(io.BytesIO(pdf)).pages:
        for font in page["/Resources"]["/Font"].values():
            names.add(str(font.get_object()["/BaseFont"]).split("+")[-1])
    return names


def _text(pdf: bytes) -> str:
    return " ".join(p.extract_text() for p in PdfReader(io.BytesIO(pdf)).pages)


@pytest.mark.skipif(not SYSTEM_DIR.is_dir(), reason="fonts-dejavu-core not installed")
@pytest.mark.parametrize("file", sorted(FILES.values()))
def test_bundled_font_is_debians_dejavu_sans_unchanged(file: str) -> None:
    bundled = BUNDLED_DIR.joinpath(file).read_bytes()
    system = (SYSTEM_DIR / file).read_bytes()
    assert hashlib.sha256(bundled).digest() == hashlib.sha256(system).digest()


def test_licence_travels_with_the_font() -> None:
    licence = BUNDLED_DIR.joinpath("LICENSE.txt").read_text("utf-8")
    assert "Bitstream" in licence and "Permission is hereby granted" in licence


@pytest.mark.parametrize("script", sorted(NAMES))
def test_a_name_in_each_script_prints_with_no_glyph_missing(script: str) -> None:
    name = NAMES[script]
    assert missing([name]) == set()
    pdf = render_plan_pdf(plan_for(make(identity={"name": name})))
    assert _fonts(pdf) <= {"DejaVuSans", "DejaVuSans-Bold"}
    if script != "Arabic":  # pypdf gives right-to-left text back in drawing order
        assert name in _text(pdf)


def test_clinical_signs_print() -> None:
    assert missing(["≥ ≤ µg ± 37 °C – ☐ ✓ SpO₂ ×"]) == set()


def test_a_name_the_font_cannot_draw_is_refused_naming_the_script_only() -> None:
    with pytest.raises(FontMissingError) as info:
        render_plan_pdf(plan_for(make(identity={"name": CHINESE})))
    message = str(info.value)
    assert "CJK" in message
    assert not any(ch in message for ch in CHINESE)  # the characters may be her name's


def test_the_command_line_refuses_it_with_exit_2_and_writes_nothing(runner, tmp_path) -> None:
    src = tmp_path / "a.toml"
    src.write_text(f'[identity]\nname = "{CHINESE}"\n[patient]\nweight_kg = 80\n', "utf-8")
    out = tmp_path / "plan.pdf"
    result = runner.invoke(app, ["plan", str(src), "--pdf", str(out)])
    assert result.exit_code == 2
    assert "CJK" in result.stderr and CHINESE not in result.stderr
    assert not out.exists()


def test_texts_in_walks_every_container() -> None:
    plan = plan_for(make(label="label-x", identity={"name": "name-y"}))
    assert {"label-x", "name-y"} <= set(texts_in(plan))
    assert set(texts_in({"k": [("a", 1.5), {"b"}]})) == {"k", "a", "b"}

    @dataclasses.dataclass
    class Row:  # as the ward board's rows
        name: str
        warnings: tuple[str, ...]

    assert set(texts_in([Row("n", ("w",))])) == {"n", "w"}
