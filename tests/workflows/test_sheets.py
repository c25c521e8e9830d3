"""Trolley sheets: same numbers as the engine, laminator-safe, large type."""

from __future__ import annotations

import itertools
import shutil
import subprocess
from pathlib import Path

import pytest
from pypdf import PdfReader

from airway import plan_for
from airway.cli import app
from airway.engine.doses import to_step
from airway.render.pdf.fonts import font
from airway.render.pdf.sheets import BODY_PT_A4, render_sheet_pdf, sheet_styles
from airway.unit.catalogue import load_catalogue
from airway.unit.checklists import load_checklists
from airway.unit.contacts import load_contacts
from airway.workflows.sheets import BAND_HEIGHTS_CM, BAND_WEIGHTS_KG, SHEETS, build_sheet

from ..conftest import make
from ..render.test_pdf_plan import _font_sizes


def _sheet(kind: str):  # type: ignore[no-untyped-def]
    return build_sheet(kind, load_checklists(), load_catalogue(), load_contacts())


def test_weight_bands_50_to_160_in_10kg_rows() -> None:
    assert tuple(range(50, 161, 10)) == BAND_WEIGHTS_KG


@pytest.mark.parametrize("kg", BAND_WEIGHTS_KG)
def test_weight_band_rows_equal_the_patient_plan(kg: int) -> None:
    row = next(r for r in _sheet("doses").bands if r.weight_kg == kg)
    no_height = plan_for(make(patient={"weight_kg": kg, "height_cm": None}), checklists=())
    assert row.supraglottic_size == no_height.equipment.supraglottic_size
    sux = no_height.dose("suxamethonium")
    assert row.suxamethonium_mg == (sux.dose_mg_low, sux.dose_mg_high)
    # 16 mg/kg (sugammadex label) to the nearest 100 mg (project rule)
    assert row.sugammadex_mg == no_height.dose("sugammadex").dose_mg_low == to_step(16 * kg, 100)
    for height, (lo, hi) in zip(BAND_HEIGHTS_CM, row.rocuronium_mg, strict=True):
        p = plan_for(make(patient={"weight_kg": kg, "height_cm": height}), checklists=())
        roc = p.dose("rocuronium")
        assert (lo, hi) == (roc.dose_mg_low, roc.dose_mg_high)


def test_dose_sheet_columns_never_fall_as_weight_rises() -> None:
    """Every dose column is non-decreasing down the 50-160 kg rows, at both heights."""
    bands = _sheet("doses").bands
    columns = [
        [r.suxamethonium_mg for r in bands],
        [(r.sugammadex_mg,) for r in bands],
        *([r.rocuronium_mg[i] for r in bands] for i in range(len(BAND_HEIGHTS_CM))),
    ]
    for column in columns:
        assert all(b >= a for a, b in itertools.pairwise(column)), column


def test_dose_sheet_prints_the_rows(tmp_path: Path) -> None:
    f = tmp_path / "d.pdf"
    f.write_bytes(render_sheet_pdf(_sheet("doses")))
    text = " ".join(PdfReader(f).pages[0].extract_text().split())
    for row in _sheet("doses").bands:
        assert f"{row.weight_kg} kg" in text and f"{row.sugammadex_mg:g}" in text
        assert f"{row.suxamethonium_mg[0]:g}-{row.suxamethonium_mg[1]:g}" in text


def test_body_text_at_least_14pt_at_a4() -> None:
    assert sheet_styles("A4")["body"].fontSize >= 14 == BODY_PT_A4
    assert sheet_styles("A3")["body"].fontSize > sheet_styles("A4")["body"].fontSize


def _dark_pixels_near_edge(pgm: bytes, dpi: int, mm: float) -> tuple[int, int]:
    """(dark pixels within ``mm`` of an edge, dark pixels in all) of a binary PGM."""
    header, _, rest = pgm.partition(b"\n")
    assert header == b"P5"
    dims, _, rest = rest.partition(b"\n")
    width, height = map(int, dims.split())
    _maxval, _, pixels = rest.partition(b"\n")
    band = int(mm / 25.4 * dpi) + 1
    near = total = 0
    for y in range(height):
        line = pixels[y * width : (y + 1) * width]
        dark = [x for x, v in enumerate(line) if v < 200]
        total += len(dark)
        if y < band or y >= height - band:
            near += len(dark)
        else:
            near += sum(1 for x in dark if x < band or x >= width - band)
    return near, total


@pytest.mark.skipif(shutil.which("pdftoppm") is None, reason="poppler-utils not installed")
@pytest.mark.parametrize("kind", SHEETS)
@pytest.mark.parametrize(
    ("paper", "landscape"), [("A4", False), ("A3", False), ("A4", True), ("letter", False)]
)
def test_sheet_png_not_blank_and_clear_of_laminator_edge(
    kind: str, paper: str, landscape: bool, tmp_path: Path
) -> None:
    pdf = tmp_path / "s.pdf"
    pdf.write_bytes(render_sheet_pdf(_sheet(kind), paper, landscape))
    dpi = 40
    subprocess.run(
        ["pdftoppm", "-r", str(dpi), "-gray", str(pdf), str(tmp_path / "pg")], check=True
    )
    pages = sorted(tmp_path.glob("pg*.pgm"))
    assert pages
    for page in pages:
        near, _total = _dark_pixels_near_edge(page.read_bytes(), dpi, 10)
        assert near == 0
    _first_near, first_total = _dark_pixels_near_edge(pages[0].read_bytes(), dpi, 10)
    assert first_total > 500  # something is printed


# Paper sizes in points: ISO 216 (A4 210 x 297 mm, A3 297 x 420 mm) and ANSI (US Letter
# 8.5 x 11 in, Tabloid 11 x 17 in), at 72 points to the inch.
PAPER_POINTS = {
    "A4": (595.28, 841.89),
    "A3": (841.89, 1190.55),
    "letter": (612.0, 792.0),
    "tabloid": (792.0, 1224.0),
}


@pytest.mark.parametrize("paper", PAPER_POINTS)
@pytest.mark.parametrize("landscape", [False, True], ids=["portrait", "landscape"])
def test_every_sheet_one_page_on_every_paper_in_large_type(paper: str, landscape: bool) -> None:
    """A laminated sheet is one page. Where the paper's own type size does not fit (US
    Letter is shorter than A4; a landscape page has two columns) the type steps down,
    never below 12 pt body text; A4 and A3 portrait keep 14 pt and about 20 pt."""
    import io

    from airway.render.pdf.sheets import MIN_SHEET_BODY_PT, SCALE

    for kind in SHEETS:
        pdf = render_sheet_pdf(_sheet(kind), paper, landscape)
        reader = PdfReader(io.BytesIO(pdf))
        assert len(reader.pages) == 1, (kind, paper, landscape)
        width, height = PAPER_POINTS[paper]
        box = reader.pages[0].mediabox
        expected = (height, width) if landscape else (width, height)
        assert (float(box.width), float(box.height)) == pytest.approx(expected, abs=0.1)
        body = sorted(_font_sizes(pdf))[1]  # the smallest after the 8 pt footer
        assert body >= MIN_SHEET_BODY_PT
        if paper in ("A4", "A3") and not landscape:
            assert body == pytest.approx(BODY_PT_A4 * SCALE[paper])


def test_month_grid_day_numbers_clear_of_the_rules(monkeypatch) -> None:
    """Sixteen days across a landscape column ran together ("10111213"): every day
    number keeps its padding inside its cell, portrait and landscape, A4 and Letter."""
    from reportlab.pdfbase import pdfmetrics

    import airway.render.pdf.sheets as rs

    grids: list = []

    class Recorded(rs.Table):  # type: ignore[misc, name-defined]
        def __init__(self, rows, colWidths, **kw):  # type: ignore[no-untyped-def]
            if rows and rows[0] and rows[0][0] == "Day":
                grids.append((rows[0], list(colWidths)))
            super().__init__(rows, colWidths=colWidths, **kw)

    monkeypatch.setattr(rs, "Table", Recorded)
    for paper in ("A4", "letter"):
        for landscape in (False, True):
            grids.clear()
            pdf = render_sheet_pdf(_sheet("contents"), paper, landscape)
            size = sorted(_font_sizes(pdf))[1]
            # A sheet too long for one page is set again in smaller type: the last
            # setting is the one printed.
            last = max(i for i, (header, _) in enumerate(grids) if header[1] == "1")
            del grids[:last]
            days = [d for header, _ in grids for d in header[1:]]
            assert days == [str(d) for d in range(1, 32)]  # every day, once, in order
            for header, widths in grids:
                for day, width in zip(header[1:], widths[1:], strict=True):
                    text = pdfmetrics.stringWidth(day, font(bold=True), size)
                    assert text + 2 * rs.CELL_PADDING_PT <= width, (paper, landscape, day)


def test_sheet_pages_and_sizes(tmp_path: Path) -> None:
    for kind in SHEETS:
        for paper, size in (("A4", (595.28, 841.89)), ("A3", (841.89, 1190.55))):
            f = tmp_path / f"{kind}-{paper}.pdf"
            f.write_bytes(render_sheet_pdf(_sheet(kind), paper))
            reader = PdfReader(f)
            assert len(reader.pages) == 1
            box = reader.pages[0].mediabox
            assert (float(box.width), float(box.height)) == pytest.approx(size, abs=0.1)


def test_sheet_cli_force_and_unit_contacts(runner, tmp_path: Path) -> None:
    contacts = tmp_path / "contacts.toml"
    contacts.write_text('[[contact]]\nrole = "Airway lead"\nnumber = "bleep 1234"\n')
    out = tmp_path / "seq.pdf"
    args = ["sheet", "sequence", "-o", str(out), "--contacts", str(contacts)]
    assert runner.invoke(app, args).exit_code == 0
    assert "bleep 1234" in PdfReader(out).pages[0].extract_text()
    assert runner.invoke(app, args).exit_code == 2
    assert runner.invoke(app, [*args, "--force", "--paper", "A3"]).exit_code == 0


def test_sheet_bad_checklist_folder_exit_2(runner, tmp_path: Path) -> None:
    (tmp_path / "20-trolley-contents.md").write_text(
        '---\ntitle = "T"\nsheet = "contents"\n---\n# Drawer\n\n- [ ] x {when nonsense}\n'
    )
    r = runner.invoke(
        app, ["sheet", "contents", "-o", str(tmp_path / "c.pdf"), "--checklists", str(tmp_path)]
    )
    assert r.exit_code == 2 and "20-trolley-contents.md:7" in r.stderr


def test_config_file_points_at_unit_files(runner, tmp_path: Path) -> None:
    (tmp_path / "people.toml").write_text('[[contact]]\nrole = "Theatre lead"\nnumber = "42"\n')
    (tmp_path / "airway.toml").write_text('contacts = "people.toml"\n')
    out = tmp_path / "seq.pdf"
    r = runner.invoke(
        app, ["sheet", "sequence", "-o", str(out), "--config", str(tmp_path / "airway.toml")]
    )
    assert r.exit_code == 0 and "Theatre lead" in PdfReader(out).pages[0].extract_text()


@pytest.mark.parametrize("kind", SHEETS)
def test_sheets_reproducible_and_fonts_embedded(kind: str, tmp_path: Path) -> None:
    a, b = render_sheet_pdf(_sheet(kind), "A3"), render_sheet_pdf(_sheet(kind), "A3")
    assert a == b
    f = tmp_path / "s.pdf"
    f.write_bytes(a)
    for page in PdfReader(f).pages:
        for face in page["/Resources"]["/Font"].values():
            descriptor = face.get_object()["/FontDescriptor"].get_object()
            assert "/FontFile2" in descriptor


@pytest.mark.parametrize("kind", SHEETS)
@pytest.mark.parametrize("paper", ["A4", "A3", "letter", "tabloid"])
@pytest.mark.parametrize("landscape", [False, True], ids=["portrait", "landscape"])
def test_sheets_have_no_text_under_8_points(kind: str, paper: str, landscape: bool) -> None:
    assert min(_font_sizes(render_sheet_pdf(_sheet(kind), paper, landscape))) >= 8.0


@pytest.mark.parametrize(("paper", "landscape"), [("A4", False), ("A4", True), ("A3", False)])
def test_dose_table_words_clear_of_the_rules_and_inside_the_page(
    paper: str, landscape: bool, monkeypatch
) -> None:
    """Read from a metre away, a header word touching a rule ("Rocuronium") is misread:
    every line of every cell keeps at least the minimum padding inside its column, and
    the table is no wider than the frame it stands in."""
    from reportlab.pdfbase import pdfmetrics

    import airway.render.pdf.sheets as rs

    tables: list = []

    class Recorded(rs.Table):  # type: ignore[misc, name-defined]
        def __init__(self, rows, colWidths, **kw):  # type: ignore[no-untyped-def]
            tables.append((rows, list(colWidths)))
            super().__init__(rows, colWidths=colWidths, **kw)

    monkeypatch.setattr(rs, "Table", Recorded)
    render_sheet_pdf(_sheet("doses"), paper, landscape)
    rows, widths = next(t for t in tables if str(t[0][0][0]) == "Weight")
    frame = max(sum(w) for _, w in tables if len(w) == 1)  # the title bar spans the frame
    assert sum(widths) <= frame + 0.01
    size = sheet_styles(paper)["body"].fontSize
    for r, row in enumerate(rows):
        for c, (cell, width) in enumerate(zip(row, widths, strict=True)):
            face = font(bold=True) if r == 0 or c == 0 else font()
            for line in str(cell).split("\n"):
                room = width - 2 * rs.MIN_CELL_PADDING_PT
                assert pdfmetrics.stringWidth(line, face, size) <= room, (line, paper)


def test_a_sheet_names_its_unit_approver_and_review_date_and_is_readable_by_all(
    runner, tmp_path: Path
) -> None:
    """Laminated sheets go to a shared print folder and carry who owns them; a patient's
    plan stays private to its owner. Nothing on a sheet says 'from memory'."""
    import stat

    from airway.cli import app

    config = tmp_path / "airway.toml"
    config.write_text(
        'unit_name = "Invented maternity unit"\napproved_by = "Airway lead"\n'
        "review_by = 2027-06-01\n"
    )
    out = tmp_path / "sequence.pdf"
    r = runner.invoke(app, ["sheet", "sequence", "--config", str(config), "-o", str(out)])
    assert r.exit_code == 0, r.stderr
    assert stat.S_IMODE(out.stat().st_mode) == 0o644
    text = _pdf_text(out)
    assert "Invented maternity unit" in text and "Airway lead" in text and "2027-06-01" in text
    assert "from memory" not in text
    plan = tmp_path / "plan.pdf"
    assert runner.invoke(app, ["plan", "--demo", "--pdf", str(plan)]).exit_code == 0
    assert stat.S_IMODE(plan.stat().st_mode) == 0o600


def _pdf_text(path: Path) -> str:
    import io

    from pypdf import PdfReader

    return " ".join(p.extract_text() for p in PdfReader(io.BytesIO(path.read_bytes())).pages)
