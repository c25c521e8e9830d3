"""The ward's airway board: highest level first, old or out-of-date plans marked."""

from __future__ import annotations

import json
from datetime import date
from pathlib import Path

from pypdf import PdfReader

from airway import plan_for
from airway.cli import app
from airway.render.json import render_json
from airway.workflows.board import board_rows, load_plans

from ..conftest import make


def _save(folder: Path, name: str, **sections: object) -> None:
    (folder / f"{name}.json").write_text(render_json(plan_for(make(**sections))))


def _ward(tmp_path: Path) -> Path:
    folder = tmp_path / "ward"
    folder.mkdir()
    _save(folder, "W1", assessed_on="2026-11-30", airway={"mallampati": 1})
    _save(
        folder,
        "W2",
        assessed_on="2026-11-01",
        airway={"mallampati": 3},
        preeclampsia={"signs": ["stridor"]},
    )
    _save(folder, "W3", airway={"mallampati": 3})  # no date
    old = json.loads((folder / "W1.json").read_text())
    old["generated_by"]["rules_version"] = "2026.1.1"
    (folder / "W4.json").write_text(json.dumps(old))
    (folder / "notes.json").write_text('{"not": "a plan"}')
    (folder / "summary.json").write_text("{}")
    return folder


def test_files_that_are_not_plans_are_left_off_with_a_note(runner, tmp_path: Path) -> None:
    """Nesting far too deep for the decoder, an array, a null, bytes that are not UTF-8 and
    a plan with a field missing are each named and left off; the board is still made."""
    folder = _ward(tmp_path)
    (folder / "deep.json").write_text("[" * 100_000 + "]" * 100_000)
    (folder / "array.json").write_text("[1, 2]")
    (folder / "null.json").write_text("null")
    (folder / "binary.json").write_bytes(b"\xff\xfe\x00")
    partial = json.loads((folder / "W1.json").read_text())
    del partial["risk"]
    (folder / "partial.json").write_text(json.dumps(partial))
    plans, skipped, _edited = load_plans(folder)
    assert [n for n, _ in plans] == ["W1", "W2", "W3", "W4"]
    names = {s.split(":")[0] for s in skipped}
    assert names == {
        "deep.json",
        "array.json",
        "null.json",
        "binary.json",
        "partial.json",
        "notes.json",
    }
    out = tmp_path / "board.pdf"
    r = runner.invoke(app, ["board", str(folder), "-o", str(out), "--today", "2026-12-02"])
    assert r.exit_code == 0 and "deep.json" in r.stderr and r.exception is None


def test_rows_sorted_and_warned(tmp_path: Path) -> None:
    plans, skipped, _edited = load_plans(_ward(tmp_path))
    assert [n for n, _ in plans] == ["W1", "W2", "W3", "W4"]
    assert skipped == ["notes.json: not a plan this version can read; left off the board"]
    rows = board_rows(plans, date(2026, 12, 2), max_age_days=14)
    assert rows[0].name == "W2" and rows[0].level == 4
    by = {r.name: r for r in rows}
    assert by["W1"].warnings == ()
    assert by["W2"].warnings == ("31 days old: reassess",)
    assert by["W3"].warnings == ("no assessment date: reassess",)
    assert any("rules 2026.1.1" in w for w in by["W4"].warnings)
    assert "category" in by["W1"].decision  # a clinic plan: the choice by urgency


def test_board_command_one_landscape_page(runner, tmp_path: Path) -> None:
    out = tmp_path / "board.pdf"
    r = runner.invoke(app, ["board", str(_ward(tmp_path)), "-o", str(out), "--today", "2026-12-02"])
    assert r.exit_code == 0, r.output
    reader = PdfReader(out)
    assert len(reader.pages) == 1
    box = reader.pages[0].mediabox
    assert float(box.width) > float(box.height)  # landscape
    text = " ".join(reader.pages[0].extract_text().split())
    assert "31 days old: reassess" in text and "decision aid" in text
    assert "notes.json" in r.stderr


def test_board_bad_date_and_missing_folder_exit_2(runner, tmp_path: Path) -> None:
    out = str(tmp_path / "b.pdf")
    assert runner.invoke(app, ["board", str(tmp_path), "-o", out, "--today", "2/12"]).exit_code == 2
    assert runner.invoke(app, ["board", str(tmp_path / "no"), "-o", out]).exit_code == 2


def test_a_plan_dated_after_today_is_marked(tmp_path: Path) -> None:
    """A year typed wrong (2062 for 2026) would otherwise hide an old plan for decades."""
    folder = tmp_path / "ward"
    folder.mkdir()
    _save(folder, "F1", assessed_on="2062-11-30")
    plans, _, _edited = load_plans(folder)
    rows = board_rows(plans, date(2026, 12, 2))
    assert rows[0].warnings == ("dated after today: check the date, reassess",)


def test_one_woman_is_one_woman(runner, tmp_path: Path) -> None:
    folder = tmp_path / "ward"
    folder.mkdir()
    _save(folder, "W1", assessed_on="2026-11-30")
    out = tmp_path / "board.pdf"
    r = runner.invoke(app, ["board", str(folder), "-o", str(out), "--today", "2026-12-02"])
    assert r.exit_code == 0 and "(1 woman)" in r.stderr
    assert ": 1 woman" in " ".join(PdfReader(out).pages[0].extract_text().split())


def test_boards_of_every_size_up_to_a_busy_ward_print(tmp_path: Path) -> None:
    """A board of 13 women once failed with an internal error: the closing note met the
    foot of page 1 with room for one line, and a paragraph moved on whole could not be
    drawn. Every board from 1 to 45 women, levels and ages mixed, must print."""
    from airway.render.pdf.board import render_board_pdf

    folder = tmp_path / "ward"
    folder.mkdir()
    for i in range(45):
        (folder / f"W{i:02d}.json").write_text(
            render_json(
                plan_for(
                    make(
                        assessed_on=f"2026-11-{1 + i % 30:02d}",
                        patient={"weight_kg": 60 + i * 2, "height_cm": 150 + i % 30},
                        airway={"mallampati": 1 + i % 4, "large_breasts": i % 3 == 0},
                    )
                )
            )
        )
    plans, skipped, _edited = load_plans(folder)
    assert len(plans) == 45 and not skipped
    for n in range(1, 46):
        rows = board_rows(plans[:n], date(2026, 12, 2), max_age_days=14)
        assert render_board_pdf(rows, "2026-12-02", 14, []).startswith(b"%PDF"), n


def test_a_womans_older_plan_is_marked_replaced_by_her_newer_one(runner, tmp_path: Path) -> None:
    """The clinic plan and the labour plan of one woman (one record number) side by side:
    the older is marked replaced by the newer, so it is not the one read at 3 a.m.; two
    of the same date are marked to be checked; she counts once; her number is never
    printed."""
    folder = tmp_path / "ward"
    folder.mkdir()
    mine = {"record_number": "RN-4471"}
    _save(folder, "clinic", identity=mine, assessed_on="2026-11-10", airway={"mallampati": 4})
    _save(folder, "labour", identity={"record_number": " rn-4471 "}, assessed_on="2026-11-30")
    twin = {"record_number": "RN-9"}
    _save(folder, "T1", identity=twin, assessed_on="2026-11-29")
    _save(folder, "T2", identity=twin, assessed_on="2026-11-29")
    _save(folder, "other", assessed_on="2026-11-29")
    plans, _, _edited = load_plans(folder)
    rows = board_rows(plans, date(2026, 12, 2), max_age_days=14)
    assert rows[-1].name == "clinic"  # replaced: at the foot, whatever its level
    by = {r.name: r for r in rows}
    assert by["clinic"].warnings[-1].startswith("replaced by labour (same record number)")
    assert not any("record number" in w for w in by["labour"].warnings)
    assert "same record number and date as T2" in by["T1"].warnings[-1]
    assert "same record number and date as T1" in by["T2"].warnings[-1]
    assert by["other"].warnings == ()
    r = runner.invoke(app, ["board", str(folder), "-o", str(tmp_path / "b.pdf")])
    assert r.exit_code == 0 and "(3 women)" in r.output
    text = " ".join(p.extract_text() for p in PdfReader(tmp_path / "b.pdf").pages)
    assert "3 women" in text and "replaced by labour" in " ".join(text.split())
    assert "4471" not in text and "RN-9" not in text


def test_the_women_on_the_ward_now_come_first_whatever_their_level(tmp_path: Path) -> None:
    """'Who on the ward carries airway risk tonight': a woman in labour at level 1 and one
    assessed today come before a level-4 clinic plan of a woman not yet admitted."""
    from datetime import date

    from airway import plan_for

    from ..conftest import make

    today = date(2026, 12, 3)
    plans = [
        ("clinic", plan_for(make(assessed_on="2026-11-20", history={"intubation": "failed"}))),
        ("labour", plan_for(make(assessed_on="2026-11-28", patient={"in_labour": True}))),
        ("today", plan_for(make(assessed_on="2026-12-03"))),
    ]
    rows = board_rows(plans, today)
    assert [r.name for r in rows] == ["labour", "today", "clinic"]
    assert rows[0].on_ward and rows[1].on_ward and not rows[2].on_ward and rows[2].level == 4
