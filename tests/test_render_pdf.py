"""The patient plan PDF: what goes in comes out, as a person would see it."""

from __future__ import annotations

import json
import shutil
import subprocess
from pathlib import Path

import pytest
from pypdf import PdfReader

from airway import build_plan, read_assessment
from airway.cli import app
from airway.doses import dose_text
from airway.render_json import render_json
from airway.render_pdf import render_plan_pdf

from .conftest import EXAMPLES, make

MM = 72 / 25.4


def _text(pdf: bytes, tmp_path: Path) -> str:
    path = tmp_path / "x.pdf"
    path.write_bytes(pdf)
    return " ".join(" ".join(page.extract_text().split()) for page in PdfReader(path).pages)


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.name)
def test_pdf_carries_the_json_plan_values(path: Path, tmp_path: Path) -> None:
    plan = build_plan(read_assessment(path))
    data = json.loads(render_json(plan))
    text = _text(render_plan_pdf(plan), tmp_path)
    t = data["equipment"]["tracheal_tube_mm"]
    assert f"tubes {t['first']:.1f} / {t['backup']:.1f} / {t['smallest']:.1f} mm" in text
    assert f"supraglottic {data['equipment']['supraglottic_size']:g}" in text
    assert f"Airway level {data['risk']['level']} of 4" in text
    for d in plan.doses:
        assert " ".join(dose_text(d).split()) in text, d.drug
    for caution in data["cautions"]:
        assert " ".join(caution.split()) in text


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.name)
@pytest.mark.parametrize(("paper", "size"), [("A4", (595.28, 841.89)), ("letter", (612, 792))])
def test_page_count_and_size(
    path: Path, paper: str, size: tuple[float, float], tmp_path: Path
) -> None:
    plan = build_plan(read_assessment(path))
    f = tmp_path / "p.pdf"
    f.write_bytes(render_plan_pdf(plan, paper))
    reader = PdfReader(f)
    limit = 2 if plan.risk.level == 4 else 1
    assert 1 <= len(reader.pages) <= limit
    box = reader.pages[0].mediabox
    assert (float(box.width), float(box.height)) == pytest.approx(size, abs=0.1)


def test_every_font_embedded(tmp_path: Path) -> None:
    f = tmp_path / "p.pdf"
    f.write_bytes(render_plan_pdf(build_plan(read_assessment(EXAMPLES[0]))))
    fonts = []
    for page in PdfReader(f).pages:
        for font in page["/Resources"]["/Font"].values():
            font = font.get_object()
            fonts.append(font["/BaseFont"])
            descriptor = font.get("/FontDescriptor")
            assert descriptor is not None and "/FontFile2" in descriptor.get_object(), font
    assert fonts and all("DejaVuSans" in str(name) for name in fonts)


def test_byte_identical_across_runs() -> None:
    plan = build_plan(read_assessment(EXAMPLES[0]))
    assert render_plan_pdf(plan) == render_plan_pdf(build_plan(read_assessment(EXAMPLES[0])))


def test_hostile_and_accented_text_prints_as_written(tmp_path: Path) -> None:
    label = "<b>O'Neil & Co</b> Zoë Ångström µg ≥ 3 – ok"
    plan = build_plan(make(label=label))
    assert label in _text(render_plan_pdf(plan), tmp_path)


def test_missing_height_pdf_says_what_was_not_scaled(tmp_path: Path) -> None:
    text = _text(render_plan_pdf(build_plan(make(patient={"height_cm": None}))), tmp_path)
    assert "Not scaled to lean or ideal weight" in text


def test_cli_pdf_force_and_no_partial_files(runner, tmp_path: Path) -> None:
    out = tmp_path / "plan.pdf"
    assert runner.invoke(app, ["plan", "--demo", "--pdf", str(out)]).exit_code == 0
    first = out.read_bytes()
    assert first.startswith(b"%PDF")
    r = runner.invoke(app, ["plan", "--demo", "--pdf", str(out)])
    assert r.exit_code == 2 and "--force" in r.stderr
    r = runner.invoke(app, ["quick", "--weight-kg", "90", "--pdf", str(out), "--force"])
    assert r.exit_code == 0 and out.read_bytes() != first
    assert [p.name for p in tmp_path.iterdir()] == ["plan.pdf"]


@pytest.mark.skipif(shutil.which("pdftoppm") is None, reason="poppler-utils not installed")
def test_rendered_page_not_blank(tmp_path: Path) -> None:
    pdf = tmp_path / "p.pdf"
    pdf.write_bytes(render_plan_pdf(build_plan(read_assessment(EXAMPLES[0]))))
    subprocess.run(
        ["pdftoppm", "-r", "30", "-gray", "-f", "1", "-l", "1", str(pdf), str(tmp_path / "pg")],
        check=True,
    )
    (png,) = tmp_path.glob("pg*.pgm")
    data = png.read_bytes()
    assert data.count(b"\x00") + data.count(b"\x20") > 100  # dark pixels exist


def test_identifiers_print_when_given_blank_lines_otherwise(tmp_path: Path) -> None:
    given = make(identity={"name": "Ana Ñúñez-O'Brien", "record_number": "X-123"})
    text = _text(render_plan_pdf(build_plan(given)), tmp_path)
    assert "Ana Ñúñez-O'Brien" in text and "X-123" in text
    blank = _text(render_plan_pdf(build_plan(make())), tmp_path)
    assert "Name: ____" in blank and "Record number: ____" in blank


def test_hostile_checklist_item_prints_verbatim(tmp_path: Path) -> None:
    unit = tmp_path / "unit"
    unit.mkdir()
    (unit / "10-team-brief.md").write_text(
        '---\ntitle = "Brief & <i>co</i>"\nuse = ["plan"]\nsheet = "brief"\n---\n'
        "# Roles\n\n- [ ] Call <b>Dr O'Neil & Co</b> on 1234\n"
    )
    from airway.checklists import load_checklists

    plan = build_plan(make(), checklists=load_checklists(unit))
    text = _text(render_plan_pdf(plan), tmp_path)
    assert "Call <b>Dr O'Neil & Co</b> on 1234" in text and "Brief & <i>co</i>" in text
