"""The patient plan PDF: what goes in comes out, as a person would see it."""

from __future__ import annotations

import json
import shutil
import subprocess
from pathlib import Path

import pytest
from pypdf import PdfReader
from typer.testing import CliRunner

from airway import plan_for, read_assessment
from airway.cli import app
from airway.engine.decision import SHORT
from airway.render.json import render_json
from airway.render.pdf.plan import render_plan_pdf

from ..conftest import EXAMPLES, make

MM = 72 / 25.4


def _text(pdf: bytes, tmp_path: Path) -> str:
    path = tmp_path / "x.pdf"
    path.write_bytes(pdf)
    return " ".join(" ".join(page.extract_text().split()) for page in PdfReader(path).pages)


def _span(low: float, high: float) -> str:
    return f"{low:g}" if low == high else f"{low:g}-{high:g}"


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.name)
def test_pdf_carries_the_json_plan_values(path: Path, tmp_path: Path) -> None:
    plan = plan_for(read_assessment(path))
    data = json.loads(render_json(plan))
    text = _text(render_plan_pdf(plan), tmp_path)
    t = data["equipment"]["tracheal_tube_mm"]
    assert f"Tracheal tubes {t['first']:.1f} / {t['backup']:.1f} / {t['smallest']:.1f} mm" in text
    assert f"Supraglottic airway size {data['equipment']['supraglottic_size']:g}" in text
    assert f"Front of neck {data['equipment']['front_of_neck_tube_mm']:.1f} mm" in text
    assert f"Airway level {data['risk']['level']} of 4" in text
    for d in plan.doses:  # the key block: mg, then mL and the strength
        mg = f"{d.dose_mg_low:g}" + (
            "" if d.dose_mg_low == d.dose_mg_high else f"-{d.dose_mg_high:g}"
        )
        ml = f"{d.volume_ml_low:g}" + (
            "" if d.volume_ml_low == d.volume_ml_high else f"-{d.volume_ml_high:g}"
        )
        assert f"{mg} mg {ml} mL, {d.mg_per_ml:g} mg/mL" in text, d.drug
    for caution in data["cautions"]:
        assert " ".join(caution.split()) in text


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.name)
@pytest.mark.parametrize(("paper", "size"), [("A4", (595.28, 841.89)), ("letter", (612, 792))])
def test_page_count_and_size(
    path: Path, paper: str, size: tuple[float, float], tmp_path: Path
) -> None:
    plan = plan_for(read_assessment(path))
    f = tmp_path / "p.pdf"
    f.write_bytes(render_plan_pdf(plan, paper))
    reader = PdfReader(f)
    limit = 1 if plan.risk.level <= 2 else 2
    assert 1 <= len(reader.pages) <= limit
    box = reader.pages[0].mediabox
    assert (float(box.width), float(box.height)) == pytest.approx(size, abs=0.1)


def test_every_font_embedded(tmp_path: Path) -> None:
    f = tmp_path / "p.pdf"
    f.write_bytes(render_plan_pdf(plan_for(read_assessment(EXAMPLES[0]))))
    fonts = []
    for page in PdfReader(f).pages:
        for font in page["/Resources"]["/Font"].values():
            font = font.get_object()
            fonts.append(font["/BaseFont"])
            descriptor = font.get("/FontDescriptor")
            assert descriptor is not None and "/FontFile2" in descriptor.get_object(), font
    # Set in the bundled cut of DejaVu Sans: this plan holds no character outside it.
    assert fonts and all("DejaVuSans" in str(name) for name in fonts)


def test_byte_identical_across_runs() -> None:
    plan = plan_for(read_assessment(EXAMPLES[0]))
    assert render_plan_pdf(plan) == render_plan_pdf(plan_for(read_assessment(EXAMPLES[0])))


def test_hostile_and_accented_text_prints_as_written(tmp_path: Path) -> None:
    label = "<b>O'Neil & Co</b> Zoë Ångström µg ≥ 3 – ok"
    plan = plan_for(make(label=label))
    assert label in _text(render_plan_pdf(plan), tmp_path)


def test_missing_height_pdf_says_what_was_assumed_at_the_top(tmp_path: Path) -> None:
    text = _text(render_plan_pdf(plan_for(make(patient={"height_cm": None}))), tmp_path)
    head = " ".join(text[: text.index("Why airway level")].split())
    assert "Height not measured: planned on an assumed 150 cm" in head


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
    pdf.write_bytes(render_plan_pdf(plan_for(read_assessment(EXAMPLES[0]))))
    subprocess.run(
        ["pdftoppm", "-r", "30", "-gray", "-f", "1", "-l", "1", str(pdf), str(tmp_path / "pg")],
        check=True,
    )
    (png,) = tmp_path.glob("pg*.pgm")
    pixels = png.read_bytes().split(b"\n", 3)[3]  # P5 header: magic, size, maximum
    assert sum(1 for p in pixels if p < 128) > 500  # dark pixels: text and the level bar


def test_identifiers_print_when_given_blank_lines_otherwise(tmp_path: Path) -> None:
    given = make(identity={"name": "Ana Ñúñez-O'Brien", "record_number": "X-123"})
    text = _text(render_plan_pdf(plan_for(given)), tmp_path)
    assert "Ana Ñúñez-O'Brien" in text and "X-123" in text
    blank = _text(render_plan_pdf(plan_for(make())), tmp_path)
    assert "Name: ____" in blank and "Record number: ____" in blank


def test_hostile_checklist_item_prints_verbatim(tmp_path: Path) -> None:
    unit = tmp_path / "unit"
    unit.mkdir()
    (unit / "10-team-brief.md").write_text(
        '---\ntitle = "Brief & <i>co</i>"\nuse = ["plan"]\nsheet = "brief"\n---\n'
        "# Roles\n\n- [ ] Call <b>Dr O'Neil & Co</b> on 1234\n"
    )
    from airway.unit.checklists import load_checklists

    plan = plan_for(make(), checklists=load_checklists(unit))
    text = _text(render_plan_pdf(plan), tmp_path)
    assert "Call <b>Dr O'Neil & Co</b> on 1234" in text and "Brief & <i>co</i>" in text


def _font_sizes(pdf: bytes) -> set[float]:
    """Every font size set with Tf in every page's content stream."""
    import io
    import re

    sizes: set[float] = set()
    for page in PdfReader(io.BytesIO(pdf)).pages:
        data = page.get_contents().get_data().decode("latin-1")
        # No scaling transform is applied to text, so Tf sizes are the printed sizes.
        sizes |= {float(m) for m in re.findall(r"/F\S+ ([\d.]+) Tf", data)}
    return sizes


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.name)
@pytest.mark.parametrize("paper", ["A4", "letter"])
def test_no_text_under_8_points(path: Path, paper: str) -> None:
    sizes = _font_sizes(render_plan_pdf(plan_for(read_assessment(path)), paper))
    assert sizes and min(sizes) >= 8.0, sorted(sizes)


def test_font_size_check_would_see_small_type() -> None:
    """The check above reads real sizes: a 6 pt line is found."""
    import io

    from reportlab.pdfgen.canvas import Canvas

    buf = io.BytesIO()
    c = Canvas(buf)
    c.setFont("Helvetica", 6)
    c.drawString(10, 10, "small")
    c.save()
    assert 6.0 in _font_sizes(buf.getvalue())


def _first_seconds_values(plan) -> list[str]:  # type: ignore[no-untyped-def]
    e, t = plan.equipment, plan.equipment.tracheal_tube_mm
    oxy = plan.oxygenation
    values = [
        f"Airway level {plan.risk.level} of 4",
        f"{t.first:.1f} / {t.backup:.1f} / {t.smallest:.1f} mm",
        f"size {e.supraglottic_size:g}",
        f"{e.front_of_neck_tube_mm:.1f} mm",
        "in " + (f"{oxy.minutes_to_spo2_90:g} min" if oxy.minutes_to_spo2_90 else ">"),
        SHORT[plan.decision.recommendation].upper(),
    ]
    for d in plan.doses:
        values.append(f"{_span(d.dose_mg_low, d.dose_mg_high)} mg")
        values.append(f"{_span(d.volume_ml_low, d.volume_ml_high)} mL")
    return values


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.name)
def test_first_seconds_numbers_in_one_block_at_the_top(path: Path, tmp_path: Path) -> None:
    """Level, tubes, supraglottic size, front-of-neck tube, doses in mg and mL (with
    sugammadex), minutes to SpO2 90% and the pre-made decision all come before the
    first section of page 1 (the factor table)."""
    plan = plan_for(read_assessment(path))
    text = _text(render_plan_pdf(plan), tmp_path)
    head = text[: text.index("Why airway level")]
    for value in _first_seconds_values(plan):
        assert value in head, value
    assert "Sugammadex" in head


def _level_cases():  # type: ignore[no-untyped-def]
    """Level 1-2 women with much to say: labour, large breasts, sleep apnoea, difficult
    mask ventilation, pre-eclampsia, a clinic or a category-2 plan, 60-170 kg."""
    import itertools

    for weight, labour, pe, category in itertools.product(
        (60, 95, 130, 170), (True, False), (None, "without_severe_features"), (None, 2)
    ):
        yield make(
            identity={"name": "Ann Other", "record_number": "X1", "date_of_birth": "1990-01-01"},
            label="A long clinic reference that wraps on the title line of the plan",
            patient={"weight_kg": weight, "height_cm": 158, "age_years": 38, "in_labour": labour},
            airway={"mallampati": 1, "large_breasts": True},
            history={"obstructive_sleep_apnoea": True, "difficult_mask_ventilation": True},
            preeclampsia={"status": pe} if pe else {},
            context={"urgency_category": category} if category else {},
        )


def test_levels_1_and_2_on_one_a4_page_even_with_much_to_say() -> None:
    import io

    checked = 0
    for assessment in _level_cases():
        plan = plan_for(assessment)
        pages = len(PdfReader(io.BytesIO(render_plan_pdf(plan))).pages)
        if plan.risk.level <= 2:
            checked += 1
            assert pages == 1, (plan.risk.level, assessment.patient)
        else:
            assert pages <= 2
    assert checked >= 8


def test_never_more_than_two_pages_on_letter() -> None:
    import io

    for assessment in _level_cases():
        plan = plan_for(assessment)
        assert len(PdfReader(io.BytesIO(render_plan_pdf(plan, "letter"))).pages) <= 2


EVERY_FINDING = {
    "identity": {"name": "W" * 80, "record_number": "9" * 40, "date_of_birth": "1" * 20},
    "label": "L" * 120,
    "patient": {"weight_kg": 140, "height_cm": 150, "age_years": 42, "in_labour": True},
    "airway": {
        "mallampati": 4,
        "upper_lip_bite": 3,
        "thyromental_cm": 5,
        "sternomental_cm": 10,
        "mouth_opening_cm": 2.5,
        "neck_circumference_cm": 50,
        "neck_movement": "fixed",
        "jaw_protrusion": "limited",
        "short_neck": True,
        "receding_mandible": True,
        "protruding_incisors": True,
        "large_breasts": True,
    },
    "history": {
        "intubation": "failed",
        "difficult_mask_ventilation": True,
        "obstructive_sleep_apnoea": True,
        "snoring": True,
    },
    "preeclampsia": {
        "status": "with_severe_features",
        "signs": [
            "stridor",
            "voice_change",
            "facial_oedema",
            "tongue_swelling",
            "new_snoring",
            "breathless_lying_flat",
        ],
        "platelets_10e9_per_l": 60,
    },
    "context": {"urgency_category": 1, "anaesthetist": "junior", "aspiration_risk": "high"},
}


@pytest.mark.parametrize("paper", ["A4", "letter"])
def test_every_finding_at_once_still_two_pages_with_the_actions_on_page_2(paper) -> None:
    """The woman who most needs a clear plan has the tallest head (every factor, every
    preparation, the longest identifiers): the reference sections that do not fit under
    it follow the actions on page 2 instead of spilling onto a page of their own."""
    import io

    plan = plan_for(make(**EVERY_FINDING))
    reader = PdfReader(io.BytesIO(render_plan_pdf(plan, paper)))
    assert len(reader.pages) == 2
    page_2 = " ".join(reader.pages[1].extract_text().split())
    assert page_2.startswith("If it goes wrong: the sequence")


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.name)
def test_every_step_of_the_sequence_is_printed_or_said_where_it_is(
    path: Path, tmp_path: Path
) -> None:
    """The printed sequence leaves out the steps the team brief and the after-event list
    stand in for; a sequence opening at step 8 must say where steps 1-7 went."""
    plan = plan_for(read_assessment(path))
    text = _text(render_plan_pdf(plan), tmp_path)
    sequence = text.split("the sequence, with her values", 1)[1]
    for n, step in enumerate(plan.steps, 1):
        if step.phase == "before induction":
            assert "1-7 (before induction) are in the team brief" in sequence
            assert "Before induction: team brief" in text
        elif step.phase == "after the event":
            assert f"step {n} (after the event) is in the after-event list" in sequence
            assert "After a difficult or failed airway" in text
        else:
            assert f" {n} " in sequence, (n, step.title)


def test_no_plain_table_text_is_wider_than_its_column(monkeypatch, tmp_path: Path) -> None:
    """A number or word drawn past its cell runs into the next one ("> 20 min> 20 min"
    in the dense layout's oxygen table): every plain-text cell of every table, on both
    papers and in both layouts, on the clinic summary and on the ward board, fits its
    column inside the padding."""
    import csv

    import airway.render.pdf.board
    import airway.render.pdf.kit as rp
    import airway.render.pdf.plan_parts
    import airway.render.pdf.summary

    grids: list[tuple] = []
    plain_grid = rp.grid

    def recorded(rows, widths, header=True, size=rp.MIN_FONT_PT):  # type: ignore[no-untyped-def]
        table = plain_grid(rows, widths, header, size)
        grids.append((rows, table._colWidths, header, size))
        return table

    pdf = airway.render.pdf
    for module in (pdf.plan_parts, pdf.board, pdf.summary):
        monkeypatch.setattr(module, "grid", recorded)
    cases = list(_level_cases()) + [read_assessment(p) for p in EXAMPLES]
    for assessment in cases:
        for paper in ("A4", "letter"):
            render_plan_pdf(plan_for(assessment), paper)
    clinic = Path(__file__).resolve().parents[2] / "examples" / "clinic-list.csv"
    with clinic.open(encoding="utf-8") as f:
        rows = list(csv.reader(f))[:41]  # 40 women, the bad rows among them
    short = tmp_path / "list.csv"
    with short.open("w", newline="", encoding="utf-8") as f:
        csv.writer(f).writerows(rows)
    runner = CliRunner()
    out = tmp_path / "out"
    r = runner.invoke(app, ["batch", str(short), "--out", str(out), "--pdf", "--jobs", "1"])
    assert r.exit_code in (0, 2), r.output
    board = ["board", str(out), "-o", str(tmp_path / "b.pdf"), "--today", "2026-12-02"]
    assert runner.invoke(app, board).exit_code == 0
    checked = 0
    for rows_, widths, header, size in grids:
        for r_, row in enumerate(rows_):
            for cell, width in zip(row, widths, strict=True):
                if isinstance(cell, str):
                    checked += 1
                    wide = rp._text_width(cell, header and r_ == 0, size)
                    assert wide <= width - 2 * rp.CELL_PADDING_PT, (cell, size)
    assert checked > 1000 and {9} <= {g[3] for g in grids}  # the board's 9 pt was seen


# Level 2 plans that spilled a few lines onto a second A4 page even when dense (found by
# a random sweep of 10,000 plans): many findings, no height, long identifiers.
SPILLED = [
    {
        "identity": {"name": "Aaaaaaaaaaa-aaéaaaaaaéaaaaaaøaaaaøñaa"},
        "label": "L" * 112,
        "patient": {"weight_kg": 97.7, "age_years": 20, "in_labour": True},
        "airway": {"upper_lip_bite": 2, "mouth_opening_cm": 4.8, "large_breasts": True},
        "preeclampsia": {
            "status": "with_severe_features",
            "signs": ["new_snoring", "facial_oedema"],
        },
    },
    {
        "identity": {"name": "Aa'aaaaüaa aaaaa  a"},
        "label": "L" * 50,
        "patient": {
            "weight_kg": 177.0,
            "age_years": 39,
            "in_labour": True,
            "haemoglobin_g_per_l": 85,
        },
        "airway": {"upper_lip_bite": 1, "thyromental_cm": 6.0, "large_breasts": True},
        "preeclampsia": {
            "status": "with_severe_features",
            "signs": ["facial_oedema", "breathless_lying_flat"],
        },
    },
]


@pytest.mark.parametrize("data", SPILLED, ids=["first", "second"])
def test_a_dense_level_1_or_2_plan_is_set_tighter_never_smaller(data) -> None:
    """Two of the densest level 1-2 plans of a random sweep (BMI near 80 on an assumed
    height, severe pre-eclampsia, long identifiers): set with closer lines, never smaller
    type, and nothing left out; such a plan may keep a second page."""
    import io

    from airway.loading import assessment_from_mapping

    plan = plan_for(assessment_from_mapping(data))
    assert plan.risk.level <= 2
    pdf = render_plan_pdf(plan)
    assert len(PdfReader(io.BytesIO(pdf)).pages) <= 2
    assert min(_font_sizes(pdf)) >= 8  # closer lines, never smaller type


def test_every_one_page_plan_is_set_alike(tmp_path: Path) -> None:
    """Airway levels 1 and 2 are always set in the one-page layout (three columns, the
    apnoea scenarios as a table without the curve), even a plan short enough for two
    columns: each part is in the same place on every such plan. This woman's plan once
    fitted two columns with the curve. Two-page plans (levels 3 and 4) keep the curve."""
    from airway.render.pdf.plan_parts import CURVE_TITLE

    short = plan_for(
        make(
            patient={"weight_kg": 50.3, "height_cm": 170},
            context={"urgency_category": 2, "end_tidal_o2": 0.64},
        )
    )
    assert short.risk.level == 1
    text = _text(render_plan_pdf(short), tmp_path)
    assert "Minutes to SpO2 of" in text and CURVE_TITLE not in text
    high = plan_for(read_assessment(next(p for p in EXAMPLES if p.name.startswith("severe"))))
    assert high.risk.level >= 3
    assert CURVE_TITLE in _text(render_plan_pdf(high), tmp_path)


def test_unit_files_at_their_longest_still_print(tmp_path: Path) -> None:
    """A unit's checklists with every item and heading at the longest allowed, and its
    catalogue with every name at the longest allowed, still lay out: plans at levels 1
    and 4 on both papers (a cell taller than a page once made the plan impossible to
    print); a trolley sheet is one page or refused with what to cut."""
    import io
    import re

    from airway.catalogue import CATALOGUE_TEXT_MAX
    from airway.checklist import ITEM_MAX_CHARS, TITLE_MAX_CHARS
    from airway.render.pdf.sheets import render_sheet_pdf
    from airway.unit.catalogue import load_catalogue
    from airway.unit.checklists import load_checklists
    from airway.workflows.sheets import SHEETS, build_sheet

    root = Path(__file__).resolve().parents[2] / "airway" / "data"
    unit = tmp_path / "unit"
    unit.mkdir()
    for source in (root / "checklists").glob("*.md"):
        text = re.sub(
            r"^(# )(.*)$",
            lambda m: m[1] + (m[2] + " x" * 99)[:TITLE_MAX_CHARS],
            source.read_text("utf-8"),
            flags=re.M,
        )

        def longest(m: re.Match[str]) -> str:
            when = re.search(r"\s*\{when [^}]*\}\s*$", m[2])
            core = m[2][: when.start()] if when else m[2]
            return m[1] + (core + " word" * 99)[:ITEM_MAX_CHARS] + (when[0] if when else "")

        (unit / source.name).write_text(re.sub(r"^(- \[ \] |- )(.*)$", longest, text, flags=re.M))
    names = "device|videolaryngoscope|direct|short_handle|face_masks|oral_airways|bougie"
    catalogue = tmp_path / "catalogue.toml"
    catalogue.write_text(
        re.sub(
            rf'^(({names}) = ")([^"]*)"',
            lambda m: m[1] + (m[3] + " x" * 99)[:CATALOGUE_TEXT_MAX] + '"',
            (root / "equipment.toml").read_text("utf-8"),
            flags=re.M,
        )
    )
    lists, cat = load_checklists(unit), load_catalogue(catalogue)
    assert max(len(i.text) for c in lists for s in c.sections for i in s.items) == ITEM_MAX_CHARS
    for assessment in (make(), make(airway={"mallampati": 4}, preeclampsia={"signs": ["stridor"]})):
        plan = plan_for(assessment, cat, lists)
        for paper in ("A4", "letter"):
            assert render_plan_pdf(plan, paper).startswith(b"%PDF")
    # A sheet keeps its one-page promise or is refused saying how much to cut.
    from airway.render.pdf.sheets import SheetTooLongError

    for kind in SHEETS:
        try:
            pdf = render_sheet_pdf(build_sheet(kind, lists, cat, ()))
        except SheetTooLongError as exc:
            assert exc.exit_code == 2 and "cut about" in str(exc) and "one page" in str(exc)
        else:
            assert len(PdfReader(io.BytesIO(pdf)).pages) == 1
