"""Clinic lists: one woman a row, bad rows reported and skipped, outputs never lost."""

from __future__ import annotations

import json
import os
import time
from pathlib import Path

import pytest

from airway import plan_for
from airway.cli import app
from airway.engine.triage import FLAGS
from airway.fields import BY_PATH, column_reference, field_specs, parse_text, read_text
from airway.workflows.clinic import read_clinic_list, sort_summary, summary_row

from ..conftest import ROOT

HEADER = "id,comment,patient.weight_kg,patient.height_cm,airway.mallampati,preeclampsia.signs\n"


def _list(tmp_path: Path, body: str, header: str = HEADER) -> Path:
    f = tmp_path / "list.csv"
    f.write_text(header + body, encoding="utf-8")
    return f


def test_every_model_field_is_a_column() -> None:
    from airway.assessment import Assessment

    expected = {
        f"{section}.{name}"
        for section, info in Assessment.model_fields.items()
        if isinstance(info.annotation, type) and hasattr(info.annotation, "model_fields")
        for name in info.annotation.model_fields  # type: ignore[union-attr]
    }
    paths = {f.path for f in field_specs()}
    assert expected <= paths and "assessed_on" in paths and "label" in paths


def test_docs_column_reference_is_generated_from_the_model() -> None:
    readme = (ROOT / "docs" / "clinic-lists.md").read_text("utf-8")
    block = readme.split("<!-- columns:start -->\n")[1].split("<!-- columns:end -->")[0]
    assert block == column_reference()


@pytest.mark.parametrize(
    ("path", "text", "value"),
    [
        ("patient.weight_kg", "80,5", 80.5),
        ("patient.weight_kg", "92 kg", 92.0),  # her unit typed out of habit
        ("patient.height_cm", "162cm", 162.0),
        ("patient.age_years", "31 years", 31),
        ("airway.mallampati", "3", 3),
        ("airway.large_breasts", "Yes", True),
        ("airway.large_breasts", "no", False),
        ("airway.large_breasts", "", None),
        ("preeclampsia.signs", "stridor; voice_change", ["stridor", "voice_change"]),
        ("assessed_on", "2026-11-30", "2026-11-30"),
    ],
)
def test_cells_read_as_their_field_kind(path: str, text: str, value: object) -> None:
    assert parse_text(BY_PATH[path], text) == value


@pytest.mark.parametrize(
    ("path", "text", "value"),
    [
        # 1 lb = 0.45359237 kg and 1 in = 2.54 cm exactly (the international yard and pound,
        # 1959); 1 stone = 14 lb; one decimal kept.
        ("patient.weight_kg", "203 lb", 92.1),
        ("patient.weight_kg", "14 st 2", 89.8),  # 198 lb
        ("patient.weight_kg", "92 kgs", 92.0),
        ("patient.height_cm", "1.62 m", 162.0),
        ("patient.height_cm", "5 ft 4", 162.6),  # 64 in
        ("patient.height_cm", "5'4\"", 162.6),
        ("airway.neck_circumference_cm", "16 in", 40.6),
        ("patient.gestation_weeks", "36+2", 36.29),  # 36 weeks and 2 days
        ("patient.haemoglobin_g_per_l", "11.2 g/dL", 112.0),
        ("preeclampsia.status", "severe", "with_severe_features"),
        ("preeclampsia.status", "without severe features", "without_severe_features"),
        (
            "preeclampsia.signs",
            "Facial edema, swollen tongue",
            ["facial_oedema", "tongue_swelling"],
        ),
        ("preeclampsia.signs", "none", []),
        ("airway.mallampati", "class III", 3),
    ],
)
def test_clinical_wording_and_other_units_are_read_converted(
    path: str, text: str, value: object
) -> None:
    read, _ = read_text(BY_PATH[path], text)
    assert read == (pytest.approx(value) if isinstance(value, float) else value)


@pytest.mark.parametrize(
    ("path", "text"),
    [
        ("patient.weight_kg", "203 lbz"),
        ("patient.height_cm", "5 yards"),
        ("patient.weight_kg", "kg"),
    ],
)
def test_a_unit_not_known_is_never_read_as_a_number(path: str, text: str) -> None:
    with pytest.raises(ValueError, match="not a number"):
        parse_text(BY_PATH[path], text)


def test_a_converted_value_says_so() -> None:
    assert read_text(BY_PATH["patient.weight_kg"], "203 lb") == (92.1, "203 lb = 92.1 kg")
    assert read_text(BY_PATH["patient.weight_kg"], "92 kg") == (92.0, None)


def test_bad_rows_named_by_row_column_and_value_others_planned(tmp_path: Path) -> None:
    rows = read_clinic_list(
        HEADER
        + "A1,,80,165,2,\n"
        + "A2,bad,ninety,165,2,\n"
        + "A3,bad,80,165,5,\n"
        + "A4,bad,80,165,1,hoarse\n"
        + "A5,,95,160,3,stridor\n",
        "list.csv",
    )
    bad = {r.id: [str(p) for p in r.problems] for r in rows if r.assessment is None}
    assert set(bad) == {"A2", "A3", "A4"}
    assert bad["A2"] == [
        "row 3, column 'patient.weight_kg': not a number; number 30-300 kg (got 'ninety')"
    ]
    pounds = read_clinic_list(HEADER + "A1,,231 lb,165,2,\n", "list.csv")
    assert pounds[0].assessment.patient.weight_kg == pytest.approx(104.8)  # 231 x 0.45359237
    assert "row 4, column 'airway.mallampati': must be between 1 and 4 (got 5)" in bad["A3"]
    assert "row 5" in bad["A4"][0] and "hoarse" in bad["A4"][0]


def test_unsafe_or_repeated_ids_refused_and_never_echoed(tmp_path: Path) -> None:
    rows = read_clinic_list(
        HEADER
        + "Ann Other,,80,165,1,\n../etc,,80,165,1,\nsummary,,80,165,1,\n"
        + "B1,,80,165,1,\nb1,,80,165,1,\n",
        "list.csv",
    )
    assert [r.assessment is None for r in rows] == [True, True, True, False, True]
    text = " ".join(str(p) for r in rows for p in r.problems)
    assert "Ann Other" not in text and "../etc" not in text
    assert "unique" in text


def test_ids_windows_keeps_for_devices_are_refused() -> None:
    """A clinic may run the list on Windows, where CON.json or com1.json cannot be a file."""
    body = "CON,,80,165,1,\nnul,,80,165,1,\nCom1.x,,80,165,1,\nCONSULT1,,80,165,1,\n"
    rows = read_clinic_list(HEADER + body, "list.csv")
    assert [r.assessment is None for r in rows] == [True, True, True, False]
    assert all("Windows keeps for a device" in str(r.problems[0]) for r in rows[:3])


def test_header_problems_stop_the_list(runner, tmp_path: Path) -> None:
    f = _list(tmp_path, "A1,,80,165,2,\n", header="id,patient.wieght_kg\n")
    r = runner.invoke(app, ["batch", str(f), "--out", str(tmp_path / "out")])
    assert r.exit_code == 2 and "unknown column" in r.stderr
    assert not (tmp_path / "out" / "A1.json").exists()


def test_row_json_is_the_same_plan_as_from_a_file(runner, tmp_path: Path) -> None:
    f = _list(tmp_path, "A1,,98,165,3,voice_change\n")
    out = tmp_path / "out"
    assert runner.invoke(app, ["batch", str(f), "--out", str(out)]).exit_code == 0
    toml = tmp_path / "a.toml"
    toml.write_text(
        "[patient]\nweight_kg = 98\nheight_cm = 165\n[airway]\nmallampati = 3\n"
        '[preeclampsia]\nsigns = ["voice_change"]\n'
    )
    single = runner.invoke(app, ["plan", str(toml), "-f", "json"]).stdout
    assert json.loads((out / "A1.json").read_text()) == json.loads(single)


def test_exit_2_with_bad_rows_and_summary_lists_them_first(runner, tmp_path: Path) -> None:
    f = _list(tmp_path, "A1,,80,165,1,\nA2,bad,80,165,7,\nA3,,120,158,4,stridor\n")
    out = tmp_path / "out"
    r = runner.invoke(app, ["batch", str(f), "--out", str(out)])
    assert r.exit_code == 2
    assert "row 3, column 'airway.mallampati'" in r.stderr and "[" not in r.stderr  # no bar
    lines = (out / "summary.csv").read_text().splitlines()
    assert [line.split(",")[0] for line in lines[1:]] == ["A2", "A3", "A1"]
    assert sorted(p.name for p in out.iterdir()) == ["A1.json", "A3.json", "summary.csv"]


def test_summary_sorted_by_level_and_flags_follow_their_rules() -> None:
    rows = read_clinic_list(
        HEADER + "L1,,70,165,1,\nL4,,80,165,3,stridor\nL2,,100,165,4,\n", "list.csv"
    )
    summary = [summary_row(r, plan_for(r.assessment)) for r in rows]  # type: ignore[arg-type]
    ordered = sort_summary(summary)
    assert [s.id for s in ordered] == ["L4", "L2", "L1"]
    top = ordered[0]
    assert top.level == 4 and set(top.flags) == {f.id for f in FLAGS}
    assert "Stridor" in top.drivers
    assert ordered[-1].flags == ()


def test_summary_gives_the_decision_as_the_board_does() -> None:
    """A clinic plan has no urgency yet, so its decision is the choice by urgency
    category; 'decide on the day' in every row of a summary tells the reader nothing.
    With the urgency known (category 1 on the list) it is the decision itself."""
    header = HEADER.rstrip("\n") + ",context.urgency_category\n"
    rows = read_clinic_list(header + "A,,80,165,3,,\nB,,80,165,3,,1\n", "list.csv")
    by_id = {r.id: (r, plan_for(r.assessment)) for r in rows}  # type: ignore[arg-type]
    clinic_row, clinic_plan = by_id["A"]
    assert clinic_plan.decision.recommendation == "decide_on_the_day"
    text = summary_row(clinic_row, clinic_plan).decision
    for category, choice in clinic_plan.decision.if_category.items():
        assert category in text and choice in text
    assert "decide on the day" not in text
    known_row, known_plan = by_id["B"]
    assert not known_plan.decision.if_category
    assert summary_row(known_row, known_plan).decision in {"wake", "proceed", "senior call"}


def test_rerun_refused_force_replaces_resume_keeps_and_redoes_changed(runner, tmp_path: Path):
    f = _list(tmp_path, "A1,,80,165,1,\nA2,,90,160,2,\n")
    out = tmp_path / "out"
    assert runner.invoke(app, ["batch", str(f), "--out", str(out)]).exit_code == 0
    first = (out / "A1.json").read_bytes()
    r = runner.invoke(app, ["batch", str(f), "--out", str(out)])
    assert r.exit_code == 2 and "--force" in r.stderr and "--resume" in r.stderr
    (out / "A2.json").write_text('{"truncated')  # as if killed mid-write by another tool
    stale = out / ".A1.json.abc123.tmp"
    stale.write_text("left by a killed run")
    old = time.time() - 600
    os.utime(stale, (old, old))
    f.write_text(HEADER + "A1,,80,165,1,\nA2,,90,160,3,\n")  # A2 reassessed
    r = runner.invoke(app, ["batch", str(f), "--out", str(out), "--resume"])
    assert r.exit_code == 0 and "1 kept" in r.stderr
    assert (out / "A1.json").read_bytes() == first
    assert json.loads((out / "A2.json").read_text())["assessment"]["airway"]["mallampati"] == 3
    assert not list(out.glob(".*.tmp"))
    assert runner.invoke(app, ["batch", str(f), "--out", str(out), "--force"]).exit_code == 0


@pytest.mark.parametrize(
    "found",
    ["[1, 2]", "null", "[" * 100_000 + "]" * 100_000, "\udcff"],
    ids=["array", "null", "deep", "not-utf8"],
)
def test_resume_redoes_a_row_whose_saved_plan_is_not_a_plan(runner, tmp_path: Path, found):
    """An array, a null, nesting far too deep for the decoder, bytes that are not UTF-8:
    none is a finished plan, so --resume plans the row again (no traceback)."""
    f = _list(tmp_path, "A1,,80,165,1,\n")
    out = tmp_path / "out"
    assert runner.invoke(app, ["batch", str(f), "--out", str(out)]).exit_code == 0
    good = (out / "A1.json").read_bytes()
    (out / "A1.json").write_bytes(found.encode("utf-8", "surrogateescape"))
    r = runner.invoke(app, ["batch", str(f), "--out", str(out), "--resume"])
    assert r.exit_code == 0 and "0 kept" in r.stderr, r.output
    assert (out / "A1.json").read_bytes() == good


def _pdf_text(path: Path) -> str:
    from pypdf import PdfReader

    return "\n".join(page.extract_text() for page in PdfReader(path).pages)


def test_pdfs_in_parallel_and_summary_pdf(runner, tmp_path: Path) -> None:
    f = _list(tmp_path, "".join(f"P{i},,{60 + 5 * i},165,{1 + i % 4},\n" for i in range(6)))
    out = tmp_path / "out"
    r = runner.invoke(app, ["batch", str(f), "--out", str(out), "--pdf", "--jobs", "2"])
    assert r.exit_code == 0, r.output
    for i in range(6):
        assert (out / f"P{i}.pdf").read_bytes().startswith(b"%PDF")
    assert (out / "summary.pdf").read_bytes().startswith(b"%PDF")


def test_the_summary_pdf_heads_each_level_and_says_the_decision_once_a_category(
    runner, tmp_path: Path
) -> None:
    """Bad rows, then each level under a heading of its own with its count; the decision
    by urgency category in a word each, never the same sentence on every row."""
    out = tmp_path / "out"
    listed = ROOT / "examples" / "clinic-list.csv"
    assert runner.invoke(app, ["batch", str(listed), "--out", str(out), "--pdf"]).exit_code == 2
    text = _pdf_text(out / "summary.pdf")
    summary = list(csv_rows(out / "summary.csv"))
    for level, label in ((4, "senior-led plan"), (3, "difficulty likely"), (1, "standard care")):
        count = sum(1 for r in summary if r["airway_level"] == str(level))
        assert f"Airway level {level} of 4: {label} ({count} women)" in text
    assert text.index("Not planned: bad input") < text.index("Airway level 4 of 4")
    assert text.index("Airway level 4 of 4") < text.index("Airway level 1 of 4")
    assert "if urgency category" not in text
    assert "proceed / senior call / wake / wake" in text


def csv_rows(path: Path):  # type: ignore[no-untyped-def]
    import csv

    with path.open(encoding="utf-8") as handle:
        yield from csv.DictReader(handle)


def test_example_clinic_list_has_200_rows_six_marked_bad() -> None:
    rows = read_clinic_list((ROOT / "examples" / "clinic-list.csv").read_text("utf-8"), "x")
    assert len(rows) == 200
    bad = [r for r in rows if r.assessment is None]
    assert len(bad) == 6
    levels = {plan_for(r.assessment).risk.level for r in rows[:60] if r.assessment}
    assert levels == {1, 2, 3, 4}


@pytest.mark.parametrize(("mark", "name"), [("\t", "tabs")])
def test_a_list_exported_with_another_separator_says_so(runner, tmp_path, mark, name) -> None:
    """Spreadsheets set to a decimal comma write ';' between columns: say what to change
    instead of calling the whole header one unknown column."""
    f = _list(tmp_path, f"A1{mark}80\n", header=f"id{mark}patient.weight_kg\n")
    r = runner.invoke(app, ["batch", str(f), "--out", str(tmp_path / "out")])
    assert r.exit_code == 2
    assert f"separated by {name}; save the list as comma-separated CSV" in r.stderr
    assert "unknown column" not in r.stderr


def test_a_cell_too_long_for_the_csv_reader_is_bad_input(runner, tmp_path: Path) -> None:
    """Python's csv module stops at 131,072 characters a cell: exit 2 naming the row."""
    f = _list(tmp_path, "A1,,80,165,1,\n" + "A2," + "x" * 200_000 + ",80,165,1,\n")
    r = runner.invoke(app, ["batch", str(f), "--out", str(tmp_path / "out")])
    assert r.exit_code == 2 and "row 3: cannot be read as CSV" in r.stderr
    assert "xxxx" not in r.stderr


def test_out_naming_a_file_is_bad_input(runner, tmp_path: Path) -> None:
    f = _list(tmp_path, "A1,,80,165,1,\n")
    (tmp_path / "plans").write_text("not a folder")
    r = runner.invoke(app, ["batch", str(f), "--out", str(tmp_path / "plans")])
    assert r.exit_code == 2 and "is a file; give a folder" in r.stderr
    assert (tmp_path / "plans").read_text() == "not a folder"


def test_column_reference_is_a_table_of_three_columns_in_every_row() -> None:
    """A bare '|' in a cell ('yes | no') starts a new column: the docs table read
    'no' as the meaning. Parsed here by markdown-it-py as GitHub would."""
    from markdown_it import MarkdownIt

    tokens = MarkdownIt("commonmark").enable("table").parse(column_reference())
    cells: list[int] = []
    for token in tokens:
        if token.type == "tr_open":
            cells.append(0)
        elif token.type in ("th_open", "td_open"):
            cells[-1] += 1
    assert len(cells) == len(field_specs()) + 3  # header, id, every field, comment
    assert set(cells) == {3}
    rows = {line.split("|")[1].strip(" `"): line for line in column_reference().splitlines()}
    labour = rows["patient.in_labour"]
    assert "yes \\| no" in labour and "In labour now" in labour


def test_a_run_removes_only_its_own_stale_temporaries(runner, tmp_path: Path) -> None:
    """Another run's fresh temporary and a user's own '.notes.tmp' are left alone."""
    f = tmp_path / "list.csv"
    f.write_text(HEADER + "A1,,80,165,1,\n")
    out = tmp_path / "out"
    out.mkdir()
    young = out / ".A1.json.other.tmp"
    young.write_text("another run, still writing")
    mine = out / ".notes.tmp"
    mine.write_text("the user's own")
    old = time.time() - 600
    os.utime(mine, (old, old))
    assert runner.invoke(app, ["batch", str(f), "--out", str(out)]).exit_code == 0
    assert young.exists() and mine.exists()


def test_a_second_run_into_a_busy_folder_is_refused(runner, tmp_path: Path) -> None:
    """One run, one owner: a live run's lock refuses the second (exit 2); a lock left by
    a process that is gone is taken over."""
    from airway.output import LOCK_NAME

    f = tmp_path / "list.csv"
    f.write_text(HEADER + "A1,,80,165,1,\n")
    out = tmp_path / "out"
    out.mkdir()
    (out / LOCK_NAME).write_text(str(os.getppid()))  # a live process holds it
    r = runner.invoke(app, ["batch", str(f), "--out", str(out)])
    assert r.exit_code == 2 and "another airway run" in r.stderr
    assert not (out / "A1.json").exists()
    (out / LOCK_NAME).write_text("999999999")  # no such process
    assert runner.invoke(app, ["batch", str(f), "--out", str(out)]).exit_code == 0
    assert (out / "A1.json").exists() and not (out / LOCK_NAME).exists()


def test_resume_replans_a_saved_plan_whose_values_were_edited(runner, tmp_path: Path) -> None:
    f = tmp_path / "list.csv"
    f.write_text(HEADER + "A1,,80,165,1,\n")
    out = tmp_path / "out"
    assert runner.invoke(app, ["batch", str(f), "--out", str(out)]).exit_code == 0
    good = (out / "A1.json").read_bytes()
    (out / "A1.json").write_bytes(good.replace(b'"level": 1', b'"level": 4', 1))
    r = runner.invoke(app, ["batch", str(f), "--out", str(out), "--resume"])
    assert r.exit_code == 0 and "0 kept" in r.stderr
    assert (out / "A1.json").read_bytes() == good


def test_a_list_as_excel_saves_it_on_windows_is_read(runner, tmp_path: Path) -> None:
    """Excel on Windows: Windows-1252 text, CRLF line ends, semicolons between columns (a
    decimal-comma locale, so '80,5' kg), dates written DD/MM/YYYY."""
    text = (
        "id;comment;patient.weight_kg;assessed_on\r\n"
        "A1;Zoë, referred by the midwife;80,5;02/11/2026\r\n"
        "A2;;92;2026-11-03\r\n"
    )
    f = tmp_path / "list.csv"
    f.write_bytes(text.encode("cp1252"))
    out = tmp_path / "out"
    r = runner.invoke(app, ["batch", str(f), "--out", str(out), "--pdf"])
    assert r.exit_code == 0, r.stderr
    saved = json.loads((out / "A1.json").read_text("utf-8"))
    assert saved["assessment"]["patient"]["weight_kg"] == 80.5
    assert saved["assessment"]["assessed_on"] == "2026-11-02"
    assert "read as Windows-1252" in r.stderr
    assert "read as Windows-1252 text" in _pdf_text(out / "summary.pdf")


def test_a_clinic_list_with_fhir_gives_each_woman_a_bundle_that_reads_back(
    runner, tmp_path: Path
) -> None:
    from airway.loading import read_assessment

    out = tmp_path / "out"
    listed = ROOT / "examples" / "clinic-list.csv"
    r = runner.invoke(app, ["batch", str(listed), "--out", str(out), "--fhir"])
    assert r.exit_code in (0, 2), r.output
    plans = sorted(out.glob("*.fhir.json"))
    assert plans
    for bundle in plans[:5]:
        saved = json.loads((out / bundle.name.replace(".fhir.json", ".json")).read_text("utf-8"))
        assert saved["input_sha256"] == plan_for(read_assessment(bundle)).input_sha256
