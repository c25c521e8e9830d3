"""Promises kept under attack: wrong kinds, special files, unit files with impossible
values or hostile text. Each case once broke a promise of README.md or SAFETY.md."""

from __future__ import annotations

import json
import os
from pathlib import Path

import pytest

from airway.cli import app
from airway.errors import CatalogueError, ChecklistError, InputError
from airway.loading import assessment_from_mapping, read_assessment
from airway.unit.catalogue import SHIPPED, load_catalogue
from airway.unit.checklists import load_checklists
from airway.unit.contacts import load_contacts

ROOT = Path(__file__).resolve().parent.parent
EQUIPMENT = (ROOT / "airway" / SHIPPED).read_text("utf-8")


# --- 1. A boolean is never a number, a number never a date ---------------------------


@pytest.mark.parametrize(
    ("section", "key"),
    [
        ("patient", "weight_kg"),
        ("patient", "height_cm"),
        ("patient", "age_years"),
        ("airway", "mallampati"),
        ("airway", "upper_lip_bite"),
        ("airway", "neck_circumference_cm"),
        ("preeclampsia", "platelets_10e9_per_l"),
        ("context", "urgency_category"),
        ("context", "end_tidal_o2"),
    ],
)
@pytest.mark.parametrize("value", [True, False])
def test_a_boolean_is_never_taken_as_a_number(section: str, key: str, value: bool) -> None:
    data: dict = {"patient": {"weight_kg": 80}}
    data.setdefault(section, {})[key] = value
    with pytest.raises(InputError) as caught:
        assessment_from_mapping(data)
    assert "not true or false" in str(caught.value)


@pytest.mark.parametrize("value", [1_700_000_000, 0, 20261130.0])
def test_a_number_is_never_taken_as_a_date(value: float) -> None:
    with pytest.raises(InputError) as caught:
        assessment_from_mapping({"patient": {"weight_kg": 80}, "assessed_on": value})
    assert "YYYY-MM-DD" in str(caught.value)


def test_a_boolean_in_toml_and_json_files_exits_2(runner, tmp_path: Path) -> None:
    toml = tmp_path / "a.toml"
    toml.write_text("[patient]\nweight_kg = 80\n[context]\nurgency_category = true\n")
    js = tmp_path / "a.json"
    js.write_text(json.dumps({"patient": {"weight_kg": 80}, "airway": {"mallampati": True}}))
    for path in (toml, js):
        r = runner.invoke(app, ["plan", str(path)])
        assert r.exit_code == 2 and "not true or false" in r.stderr


# --- 6. Only regular files of a bounded size are read ----------------------------------


def _special(tmp_path: Path) -> list[Path]:
    fifo = tmp_path / "pipe.toml"
    os.mkfifo(fifo)
    link = tmp_path / "zero.toml"
    link.symlink_to("/dev/zero")
    return [Path("/dev/zero"), fifo, link, tmp_path]


def test_special_files_are_refused_at_once(tmp_path: Path) -> None:
    for path in _special(tmp_path):
        with pytest.raises(InputError) as caught:
            read_assessment(path)
        assert "not a regular file" in str(caught.value)
        with pytest.raises(CatalogueError):
            load_catalogue(path)
        with pytest.raises(CatalogueError):
            load_contacts(path)


def test_a_huge_file_is_refused_by_its_size(tmp_path: Path) -> None:
    big = tmp_path / "big.toml"
    with big.open("wb") as f:
        f.truncate(50_000_000)  # sparse: costs no disk
    with pytest.raises(InputError) as caught:
        read_assessment(big)
    assert "at most 1,000,000" in str(caught.value)


def test_a_special_file_in_a_checklist_folder_is_refused(tmp_path: Path) -> None:
    (tmp_path / "zz.md").symlink_to("/dev/zero")
    with pytest.raises(ChecklistError) as caught:
        load_checklists(tmp_path)
    assert "not a regular file" in str(caught.value)


def test_a_special_file_on_the_board_is_left_off(tmp_path: Path) -> None:
    from airway.workflows.board import load_plans

    os.mkfifo(tmp_path / "pipe.json")
    plans, skipped, _edited = load_plans(tmp_path)
    assert plans == [] and skipped and "pipe.json" in skipped[0]


# --- 3. Unit files validated like assessments ------------------------------------------


def _catalogue(tmp_path: Path, old: str, new: str) -> Path:
    assert old in EQUIPMENT, old
    path = tmp_path / "equipment.toml"
    path.write_text(EQUIPMENT.replace(old, new, 1), "utf-8")
    return path


TUBES = "tracheal_tube_sizes_mm = [5.0, 5.5, 6.0, 6.5, 7.0, 7.5]"


@pytest.mark.parametrize(
    ("old", "new", "where"),
    [
        (TUBES, "tracheal_tube_sizes_mm = [0, 6.0, 7.0]", "tracheal_tube_sizes_mm[0]"),
        (TUBES, "tracheal_tube_sizes_mm = [-1, 6.0]", "tracheal_tube_sizes_mm[0]"),
        (TUBES, "tracheal_tube_sizes_mm = [6.0, 20]", "tracheal_tube_sizes_mm[1]"),
        (TUBES, 'tracheal_tube_sizes_mm = ["six", 6.0]', "tracheal_tube_sizes_mm[0]"),
        (TUBES, "tracheal_tube_sizes_mm = [true, 6.0]", "tracheal_tube_sizes_mm[0]"),
        ("{ size = 3, min_kg = 30", "{ size = -3, min_kg = 30", "supraglottic.bands[0].size"),
        (
            "{ size = 3, min_kg = 30, max_kg = 50 }",
            "{ size = 3, min_kg = 50, max_kg = 30 }",
            "bands[0]",
        ),
        ("{ size = 4, min_kg = 50", "{ size = 4, min_kg = 60", "supraglottic"),
        ('bougie = "bougie (adult, coude tip)"', 'bougie = "bougie \\u001b[2J"', "bougie"),
        ('bougie = "bougie (adult, coude tip)"', 'bougie = "bougie \\u202e"', "bougie"),
    ],
)
def test_impossible_or_hostile_catalogues_are_refused_with_the_line(
    tmp_path: Path, old: str, new: str, where: str
) -> None:
    path = _catalogue(tmp_path, old, new)
    with pytest.raises(CatalogueError) as caught:
        load_catalogue(path)
    message = str(caught.value)
    assert str(path) in message and where in message and "line " in message


def test_hostile_contact_text_is_refused(tmp_path: Path) -> None:
    path = tmp_path / "contacts.toml"
    path.write_text('[[contact]]\nrole = "Theatre \\u001b]0;owned\\u0007"\nnumber = "1"\n')
    with pytest.raises(CatalogueError) as caught:
        load_contacts(path)
    assert "control character U+001B" in str(caught.value)


def test_hostile_checklist_text_is_refused_with_its_line(tmp_path: Path) -> None:
    (tmp_path / "20-trolley-contents.md").write_text(
        (ROOT / "airway/data/checklists/20-trolley-contents.md").read_text("utf-8")
        + "- [ ] spare \u202eetouq\u202c item\n"
    )
    with pytest.raises(ChecklistError) as caught:
        load_checklists(tmp_path)
    assert "U+202E" in str(caught.value) and "20-trolley-contents.md:" in str(caught.value)


def test_a_checklist_too_long_for_its_sheet_is_refused_saying_what_to_cut(runner, tmp_path):
    shipped = (ROOT / "airway/data/checklists/20-trolley-contents.md").read_text("utf-8")
    extra = "".join(f"- [ ] Spare item {n}, checked weekly\n" for n in range(12))
    (tmp_path / "20-trolley-contents.md").write_text(shipped + extra)
    out = tmp_path / "sheet.pdf"
    r = runner.invoke(app, ["sheet", "contents", "--checklists", str(tmp_path), "-o", str(out)])
    assert r.exit_code == 2 and "cut about" in r.stderr and not out.exists()
    many = "".join(f"- [ ] item {n}\n" for n in range(10_000))
    (tmp_path / "20-trolley-contents.md").write_text(shipped + many)
    with pytest.raises(ChecklistError) as caught:
        load_checklists(tmp_path)
    assert "at most 40" in str(caught.value)


# --- 4. A value plausible in another unit ----------------------------------------------


def test_a_neck_circumference_in_inches_is_refused_with_its_meaning() -> None:
    """21 in is 53 cm: taken as 21 cm, the large-neck preparation would vanish."""
    with pytest.raises(InputError) as caught:
        assessment_from_mapping(
            {"patient": {"weight_kg": 130}, "airway": {"neck_circumference_cm": 21}}
        )
    assert "looks like inches (21 in is 53 cm)" in str(caught.value)


def test_a_distance_short_enough_to_be_inches_is_warned() -> None:
    from airway import plan_for

    plan = plan_for(
        assessment_from_mapping({"patient": {"weight_kg": 80}, "airway": {"thyromental_cm": 2.5}})
    )
    assert any("if it was measured in inches it is 6.3 cm" in w for w in plan.warnings)


# --- 5. Identifiers never repeated; echoed values short --------------------------------


def test_identifiers_outside_the_identity_section_are_never_echoed(runner, tmp_path) -> None:
    path = tmp_path / "a.toml"
    path.write_text(
        '[patient]\nweight_kg = 80\nname = "Zelda Quorn"\nrecord_number = "RX99871"\n'
        '[airway]\ndate_of_birth = "1990-02-03"\n'
    )
    r = runner.invoke(app, ["plan", str(path)])
    assert r.exit_code == 2
    for secret in ("Zelda", "RX99871", "1990-02-03"):
        assert secret not in r.stderr and secret not in r.stdout


def test_an_echoed_value_is_short_and_the_message_bounded(runner, tmp_path) -> None:
    path = tmp_path / "a.toml"
    path.write_text('label = "' + "\\u001b" + "A" * 5000 + '"\n[patient]\nweight_kg = 80\n')
    r = runner.invoke(app, ["plan", str(path)])
    assert r.exit_code == 2 and len(r.stderr) < 600 and "\x1b" not in r.stderr
    many = {"patient": {"weight_kg": 80}, "airway": {f"x{n}": 1 for n in range(500)}}
    js = tmp_path / "b.json"
    js.write_text(json.dumps(many))
    r = runner.invoke(app, ["plan", str(js)])
    assert r.exit_code == 2 and "and 480 more" in r.stderr and len(r.stderr.splitlines()) < 30


# --- 2. A saved plan is never trusted --------------------------------------------------


def _edited_pdf(pdf: bytes, old: bytes, new: bytes) -> bytes:
    """The PDF with one page's drawn text changed, stream re-encoded as airway writes it."""
    import base64
    import re
    import zlib

    def swap(m: re.Match[bytes]) -> bytes:
        try:
            page = zlib.decompress(base64.a85decode(m[1].strip().removesuffix(b"~>")))
        except ValueError:  # a font stream, not a page
            return m[0]
        if old not in page:
            return m[0]
        again = base64.a85encode(zlib.compress(page.replace(old, new))) + b"~>"
        return b"stream\n" + again + b"\nendstream"

    return re.sub(rb"stream\r?\n(.*?)\s*endstream", swap, pdf, flags=re.S)


def test_verify_reads_what_is_printed_not_only_the_metadata(tmp_path: Path) -> None:
    from airway import plan_for
    from airway.render.pdf.plan import render_plan_pdf
    from airway.workflows.verify import verify

    assessment = read_assessment(ROOT / "examples" / "routine-elective.toml")
    plan = plan_for(assessment)
    pdf = render_plan_pdf(plan)
    assert verify(pdf, plan).matches
    forged = _edited_pdf(pdf, b"(7.0 / 6.5 / 6.0 mm)", b"(8.0 / 7.5 / 7.0 mm)")
    assert forged != pdf
    verdict = verify(forged, plan)
    assert not verdict.matches and "page 1 differs" in verdict.findings[0]


def test_verify_refuses_a_saved_plan_with_a_duplicate_key() -> None:
    from airway import plan_for
    from airway.render.json import render_json
    from airway.workflows.verify import verify

    plan = plan_for(read_assessment(ROOT / "examples" / "routine-elective.toml"))
    text = render_json(plan)
    doubled = text.replace('"risk": {', '"risk": {"level": 4, ', 1)
    assert not verify(doubled.encode(), plan).matches


def test_the_board_shows_what_the_assessment_gives_not_what_the_file_claims(tmp_path) -> None:
    from datetime import date

    from airway import plan_for
    from airway.render.json import render_json
    from airway.workflows.board import EDITED, board_rows, load_plans

    plan = plan_for(read_assessment(ROOT / "examples" / "routine-elective.toml"))
    data = json.loads(render_json(plan))
    assert data["risk"]["level"] == 1
    data["risk"]["level"] = 4  # a forged claim; its own factors say level 1
    data["equipment"]["tracheal_tube_mm"]["first"] = 8.0
    (tmp_path / "W1.json").write_text(json.dumps(data))
    plans, notes, edited = load_plans(tmp_path)
    rows = board_rows(plans, date(2026, 12, 3), edited=edited)
    assert rows[0].level == 1 and rows[0].first_tube_mm == 7.0 and EDITED in rows[0].warnings
    assert edited == {"W1"} and "W1.json" in notes[0]


# --- 9. The smaller promises ------------------------------------------------------------


def test_pdf_and_output_are_all_or_nothing(runner, tmp_path: Path) -> None:
    existing = tmp_path / "plan.json"
    existing.write_text("mine")
    pdf = tmp_path / "new.pdf"
    r = runner.invoke(app, ["plan", "--demo", "--pdf", str(pdf), "-o", str(existing), "-f", "json"])
    assert r.exit_code == 2 and not pdf.exists() and existing.read_text() == "mine"
    r = runner.invoke(app, ["quick", "--weight-kg", "80", "--pdf", str(pdf), "-o", str(existing)])
    assert r.exit_code == 2 and not pdf.exists()


def test_a_disk_error_names_the_output_not_the_temporary(tmp_path: Path, monkeypatch) -> None:
    import airway.output as output

    def full(src: str, dst: str) -> None:
        raise OSError(28, "No space left on device", src)

    monkeypatch.setattr(output.os, "replace", full)
    target = tmp_path / "plan.pdf"
    with pytest.raises(OSError) as caught:
        output.write_atomic(target, b"%PDF", force=True)
    assert caught.value.filename == str(target)
    assert list(tmp_path.iterdir()) == []


def test_an_empty_clinic_list_is_called_empty(runner, tmp_path: Path) -> None:
    f = tmp_path / "list.csv"
    f.write_text("\n")
    r = runner.invoke(app, ["batch", str(f), "--out", str(tmp_path / "out")])
    assert r.exit_code == 2 and "the list is empty" in r.stderr


def test_source_date_epoch_does_not_change_the_pdf(tmp_path: Path) -> None:
    import subprocess
    import sys

    outs = []
    for n, env in enumerate(({}, {"SOURCE_DATE_EPOCH": "1000000000"})):
        out = tmp_path / f"p{n}.pdf"
        subprocess.run(
            [sys.executable, "-m", "airway", "plan", "--demo", "--pdf", str(out)],
            check=True,
            capture_output=True,
            env={**os.environ, **env},
        )
        outs.append(out.read_bytes())
    assert outs[0] == outs[1]
