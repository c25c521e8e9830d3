"""The command line, as a user drives it."""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import pytest

from airway.cli import app

from .conftest import EXAMPLES

BAD = {
    "unknown_key": ("[patient]\nweight_kg = 80\n[airway]\nmalampati = 2\n", "airway.malampati"),
    "mallampati_5": ("[patient]\nweight_kg = 80\n[airway]\nmallampati = 5\n", "between 1 and 4"),
    "height_in_metres": ("[patient]\nweight_kg = 80\nheight_cm = 1.65\n", "looks like metres"),
    "gestation_60": ("[patient]\nweight_kg = 80\ngestation_weeks = 60\n", "between 20 and 44"),
    "malformed_toml": ("[patient\nweight_kg = 80\n", "line 1"),
    "empty": ("", "empty"),
    "no_weight": ("[patient]\nheight_cm = 165\n", "patient.weight_kg: required"),
}


@pytest.mark.parametrize("case", sorted(BAD))
def test_bad_input_exit_2_clear_message_no_traceback(runner, tmp_path: Path, case: str) -> None:
    text, expected = BAD[case]
    f = tmp_path / "a.toml"
    f.write_text(text)
    r = runner.invoke(app, ["plan", str(f)])
    assert r.exit_code == 2, r.output
    assert expected in r.stderr
    assert "Traceback" not in r.output and r.stdout == ""


JSON_BAD = {
    "deeply_nested": ('{"patient": ' + "[" * 100_000 + "]" * 100_000 + "}", "nested far too"),
    "key_twice": ('{"patient": {"weight_kg": 80, "weight_kg": 90}}', "'weight_kg': is given more"),
    "section_twice": (
        '{"patient": {"weight_kg": 80}, "patient": {"weight_kg": 90}}',
        "'patient': is given more",
    ),
}


@pytest.mark.parametrize("case", sorted(JSON_BAD))
def test_bad_json_exit_2_clear_message_no_traceback(runner, tmp_path: Path, case: str) -> None:
    text, expected = JSON_BAD[case]
    f = tmp_path / "a.json"
    f.write_text(text)
    r = runner.invoke(app, ["plan", str(f), "-f", "json"])
    assert r.exit_code == 2, r.output
    assert expected in r.stderr
    assert "Traceback" not in r.output and r.stdout == ""


def test_deeply_nested_toml_exit_2(runner, tmp_path: Path) -> None:
    f = tmp_path / "a.toml"
    f.write_text("x = " + "[" * 100_000 + "]" * 100_000 + "\n")
    r = runner.invoke(app, ["plan", str(f)])
    assert r.exit_code == 2 and "nested far too" in r.stderr and r.stdout == ""


@pytest.mark.parametrize("suffix", [".toml", ".json"])
def test_utf8_byte_order_mark_is_read(runner, tmp_path: Path, suffix: str) -> None:
    """Windows editors and spreadsheets often start UTF-8 files with EF BB BF."""
    body = "[patient]\nweight_kg = 80\n" if suffix == ".toml" else '{"patient": {"weight_kg": 80}}'
    f = tmp_path / f"a{suffix}"
    f.write_bytes(b"\xef\xbb\xbf" + body.encode())
    r = runner.invoke(app, ["plan", str(f), "-f", "json"])
    assert r.exit_code == 0, r.stderr
    assert json.loads(r.stdout)["assessment"]["patient"]["weight_kg"] == 80


@pytest.mark.parametrize(
    ("field", "char"),
    [
        ("name", "\\u0000"),
        ("record_number", "\\u001b"),
        ("name", "\\n"),
        ("name", "\\u202e"),  # right-to-left override: reorders what follows
    ],
)
def test_control_characters_in_identifiers_refused(runner, tmp_path: Path, field, char) -> None:
    f = tmp_path / "a.toml"
    f.write_text(f'[identity]\n{field} = "Ann{char}Other"\n[patient]\nweight_kg = 80\n')
    r = runner.invoke(app, ["plan", str(f)])
    assert r.exit_code == 2, r.output
    assert f"identity.{field}: contains the control character" in r.stderr
    assert "Ann" not in r.stderr  # identifiers are not echoed back


def test_accented_names_still_accepted(runner, tmp_path: Path) -> None:
    f = tmp_path / "a.toml"
    f.write_text('[identity]\nname = "Zoë Ñúñez-Łąka"\n[patient]\nweight_kg = 80\n')
    r = runner.invoke(app, ["plan", str(f)])
    assert r.exit_code == 0 and "Zoë Ñúñez-Łąka" in r.stdout


def test_all_problems_reported_at_once(runner, tmp_path: Path) -> None:
    f = tmp_path / "a.toml"
    f.write_text(
        "[patient]\nweight_kg = 80\nheight_cm = 1.6\n[airway]\nmallampati = 7\nupper_lip_bite = 4\n"
    )
    r = runner.invoke(app, ["plan", str(f)])
    assert r.exit_code == 2 and "3 problems" in r.stderr


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.name)
@pytest.mark.parametrize("fmt", ["text", "markdown", "json"])
def test_examples_render(runner, path: Path, fmt: str) -> None:
    r = runner.invoke(app, ["plan", str(path), "--format", fmt])
    assert r.exit_code == 0, r.output
    assert "decision aid" in r.stdout and "immediately before induction" in r.stdout


def test_text_fits_80_columns(runner) -> None:
    for path in EXAMPLES:
        r = runner.invoke(app, ["plan", str(path)])
        assert max(len(line) for line in r.stdout.splitlines()) <= 80


def test_quick_with_weight_only(runner) -> None:
    r = runner.invoke(app, ["quick", "--weight-kg", "98"])
    assert r.exit_code == 0, r.output
    lines = r.stdout.splitlines()
    assert len(lines) <= 50 and max(map(len, lines)) <= 80
    assert "Not assessed" in r.stdout and "Mallampati" in r.stdout
    assert "Not scaled to lean or ideal weight" in r.stdout and "Rocuronium" in r.stdout


def test_quick_same_plan_as_file(runner, tmp_path: Path) -> None:
    f = tmp_path / "a.toml"
    f.write_text(
        "[patient]\nweight_kg = 98\nheight_cm = 165\n[airway]\nmallampati = 3\n"
        '[preeclampsia]\nstatus = "with_severe_features"\nsigns = ["voice_change"]\n'
    )
    a = runner.invoke(app, ["plan", str(f), "-f", "json"]).stdout
    b = runner.invoke(
        app,
        [
            "quick",
            "--weight-kg",
            "98",
            "--height-cm",
            "165",
            "--mallampati",
            "3",
            "--preeclampsia",
            "with_severe_features",
            "--sign",
            "voice_change",
            "-f",
            "json",
        ],
    ).stdout
    assert json.loads(a) == json.loads(b)


def test_quick_bad_flag_exit_2(runner) -> None:
    r = runner.invoke(app, ["quick", "--weight-kg", "98", "--sign", "hoarse"])
    assert r.exit_code == 2 and "voice_change" in r.stderr


def test_output_refuses_overwrite_without_force(runner, tmp_path: Path) -> None:
    out = tmp_path / "plan.md"
    assert runner.invoke(app, ["plan", "--demo", "-f", "markdown", "-o", str(out)]).exit_code == 0
    first = out.read_bytes()
    out.write_text("clinician's edits")
    r = runner.invoke(app, ["plan", "--demo", "-o", str(out)])
    assert r.exit_code == 2 and "--force" in r.stderr
    assert out.read_text() == "clinician's edits"
    assert (
        runner.invoke(
            app, ["plan", "--demo", "-f", "markdown", "-o", str(out), "--force"]
        ).exit_code
        == 0
    )
    assert out.read_bytes() == first
    assert [p.name for p in tmp_path.iterdir()] == ["plan.md"]  # no temporary left


def test_stdin(runner) -> None:
    r = runner.invoke(
        app, ["plan", "-", "-f", "json"], input='{"patient": {"weight_kg": 70, "height_cm": 165}}'
    )
    assert r.exit_code == 0 and json.loads(r.stdout)["risk"]["level"] == 1


def test_factors_schema_version(runner) -> None:
    r = runner.invoke(app, ["factors"])
    assert r.exit_code == 0 and "mallampati_4" in r.stdout and "Rocke 1992" in r.stdout
    rows = json.loads(runner.invoke(app, ["factors", "--json"]).stdout)
    assert {r["id"] for r in rows} >= {"mallampati_2", "bmi", "stridor"}
    schema = json.loads(runner.invoke(app, ["schema"]).stdout)
    assert schema["additionalProperties"] is False and "patient" in schema["required"]
    assert runner.invoke(app, ["--version"]).stdout.startswith("airway ")


def test_plan_needs_file_or_demo(runner) -> None:
    assert runner.invoke(app, ["plan"]).exit_code == 2


def test_start_up_does_not_import_reportlab() -> None:
    code = (
        "import sys, airway.cli, airway.plan, airway.render_text; "
        "sys.exit('reportlab' in sys.modules)"
    )
    assert subprocess.run([sys.executable, "-c", code]).returncode == 0
