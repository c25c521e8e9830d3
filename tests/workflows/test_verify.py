"""Traceability: a saved or printed plan is checked against its assessment and the rules."""

from __future__ import annotations

import json
from collections.abc import Callable
from pathlib import Path
from typing import Any

import pytest
from typer.testing import Result

from airway.cli import app

from ..conftest import EXAMPLES


@pytest.fixture
def saved(runner, tmp_path: Path) -> dict[str, Path]:
    source = EXAMPLES[0]
    out = {"json": tmp_path / "p.json", "pdf": tmp_path / "p.pdf"}
    assert (
        runner.invoke(app, ["plan", str(source), "-f", "json", "-o", str(out["json"])]).exit_code
        == 0
    )
    assert runner.invoke(app, ["plan", str(source), "--pdf", str(out["pdf"])]).exit_code == 0
    return out


@pytest.mark.parametrize("kind", ["json", "pdf"])
def test_a_fresh_plan_matches(runner, saved, kind: str) -> None:
    r = runner.invoke(app, ["verify", str(saved[kind]), str(EXAMPLES[0])])
    assert r.exit_code == 0 and "matches" in r.stdout


@pytest.mark.parametrize("kind", ["json", "pdf"])
def test_a_plan_from_another_assessment_is_caught(runner, saved, kind: str) -> None:
    r = runner.invoke(app, ["verify", str(saved[kind]), str(EXAMPLES[1])])
    assert r.exit_code == 1 and "different assessment" in r.stdout


def _verify_edited(runner, saved, edit: Callable[[dict[str, Any]], object]) -> Result:
    """Edit the saved JSON plan in place, then verify it against its assessment."""
    data = json.loads(saved["json"].read_text())
    edit(data)
    saved["json"].write_text(json.dumps(data))
    return runner.invoke(app, ["verify", str(saved["json"]), str(EXAMPLES[0])])


def test_a_plan_made_under_older_rules_is_caught(runner, saved) -> None:
    r = _verify_edited(runner, saved, lambda d: d["generated_by"].update(rules_version="2025.1.1"))
    assert r.exit_code == 1 and "rules 2025.1.1" in r.stdout and "replan" in r.stdout


def test_an_edited_value_is_caught(runner, saved) -> None:
    r = _verify_edited(
        runner, saved, lambda d: d["equipment"]["tracheal_tube_mm"].update(first=8.0)
    )
    assert r.exit_code == 1 and "values differ" in r.stdout
    assert "equipment.tracheal_tube_mm.first" in r.stdout  # says where, never the value


def _older(version: str) -> Callable[[dict[str, Any]], None]:
    """The plan as an airway that did not yet write two fields would have saved it."""

    def edit(data: dict[str, Any]) -> None:
        data["generated_by"]["version"] = version
        for dose in data["doses"]:
            del dose["rule"]
        del data["oxygenation"]["basis"]

    return edit


def test_a_plan_from_an_earlier_version_without_later_fields_matches(runner, saved) -> None:
    """The contract adds fields and never renames one: a plan saved before a field was
    added is not an edited plan, and the fields it lacks are named."""
    r = _verify_edited(runner, saved, _older("0.0.9"))
    assert r.exit_code == 0 and "matches" in r.stdout
    assert "made by airway 0.0.9, which did not yet write doses.0.rule" in r.stdout


def test_a_field_missing_from_a_plan_of_this_version_is_an_edit(runner, saved) -> None:
    from airway import __version__

    r = _verify_edited(runner, saved, _older(__version__))
    assert r.exit_code == 1 and "values differ" in r.stdout and "doses.0.rule" in r.stdout


def test_a_field_the_plan_does_not_have_is_an_edit(runner, saved) -> None:
    r = _verify_edited(runner, saved, lambda d: d["equipment"].update(note="added by hand"))
    assert r.exit_code == 1 and "equipment.note" in r.stdout and "added by hand" not in r.stdout


def test_a_plan_from_another_release_under_the_same_rules_matches(runner, saved) -> None:
    """A new release with the same rules must not make every saved plan look edited."""
    r = _verify_edited(runner, saved, lambda d: d["generated_by"].update(version="0.0.9"))
    assert r.exit_code == 0 and "matches" in r.stdout and "did not yet write" not in r.stdout


def test_not_a_plan_and_missing_file(runner, tmp_path: Path) -> None:
    other = tmp_path / "x.json"
    other.write_text("{}")
    r = runner.invoke(app, ["verify", str(other), str(EXAMPLES[0])])
    assert r.exit_code == 1 and "not a plan made by airway" in r.stdout
    r = runner.invoke(app, ["verify", str(tmp_path / "none.pdf"), str(EXAMPLES[0])])
    assert r.exit_code == 2 and "none.pdf" in r.stderr


@pytest.mark.parametrize(
    "found",
    ["[" * 100_000 + "]" * 100_000, '{"a":' * 50_000 + "1" + "}" * 50_000],
    ids=["arrays", "objects"],
)
def test_nesting_too_deep_is_not_a_plan(runner, tmp_path: Path, found: str) -> None:
    """The standard library's decoder gives up on such nesting with RecursionError: the
    file is reported as not a plan, with no traceback."""
    other = tmp_path / "deep.json"
    other.write_text(found)
    r = runner.invoke(app, ["verify", str(other), str(EXAMPLES[0])])
    assert r.exit_code == 1 and "not a plan made by airway" in r.stdout
    assert r.exception is None or isinstance(r.exception, SystemExit)
