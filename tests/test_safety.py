"""The safety case (SAFETY.md) is backed by tests that exist, and the gaps it names are tested."""

from __future__ import annotations

import ast
import re
from pathlib import Path

from pypdf import PdfReader

from airway import plan_for
from airway.cli import app
from airway.engine.plan import RULES_VERSION
from airway.unit.checklists import load_checklists

from .conftest import ROOT, make


def _test_names() -> set[str]:
    names: set[str] = set()
    for path in (ROOT / "tests").rglob("test_*.py"):
        for node in ast.walk(ast.parse(path.read_text("utf-8"))):
            if isinstance(node, ast.FunctionDef) and node.name.startswith("test_"):
                names.add(node.name)
    return names


def _hazards() -> dict[str, set[str]]:
    text = (ROOT / "SAFETY.md").read_text("utf-8")
    parts = re.split(r"^### (H\d+)\b", text, flags=re.M)
    return {
        parts[i]: set(re.findall(r"`(test_\w+)`", parts[i + 1])) for i in range(1, len(parts), 2)
    }


def test_safety_case_has_15_hazards_each_with_existing_tests() -> None:
    hazards = _hazards()
    assert len(hazards) >= 15
    assert list(hazards) == [f"H{n}" for n in range(1, len(hazards) + 1)]
    known = _test_names()
    for hazard, tests in hazards.items():
        assert tests, f"{hazard} names no test"
        missing = tests - known
        assert not missing, f"{hazard} names tests that do not exist: {sorted(missing)}"


def test_weight_in_pounds_and_height_in_inches_are_caught(runner, tmp_path: Path) -> None:
    cases = {
        "[patient]\nweight_kg = 231\n": None,  # 231 kg is possible: accepted, printed
        "[patient]\nweight_kg = 420\n": "if this is in pounds, divide by 2.2",
        "[patient]\nweight_kg = 80\nheight_cm = 65\n": "between 120 and 210 cm",
        "[patient]\nweight_kg = 80\nheight_cm = 1.65\n": "looks like metres",
    }
    for text, message in cases.items():
        f = tmp_path / "a.toml"
        f.write_text(text)
        r = runner.invoke(app, ["plan", str(f)])
        if message is None:
            assert r.exit_code == 0 and "weight 231 kg" in r.stdout
        else:
            assert r.exit_code == 2 and message in r.stderr, (text, r.stderr)


def test_unit_checklist_cannot_remove_the_rescue_steps(tmp_path: Path) -> None:
    """A unit brief that says almost nothing still leaves the engine's rescue sequence."""
    unit = tmp_path / "unit"
    unit.mkdir()
    (unit / "10-team-brief.md").write_text(
        '---\ntitle = "Brief"\nuse = ["plan"]\nsheet = "brief"\n---\n# Only\n\n- [ ] Hello\n'
    )
    plan = plan_for(make(), checklists=load_checklists(unit))
    ids = [s.id for s in plan.steps]
    for rescue in ("intubate", "declare", "supraglottic", "wake_or_proceed", "cico"):
        assert rescue in ids
    from io import BytesIO

    from airway.render.pdf.plan import render_plan_pdf

    text = " ".join(p.extract_text() for p in PdfReader(BytesIO(render_plan_pdf(plan))).pages)
    assert "CICO" in text and "supraglottic size" in text


def test_sheet_footer_carries_the_rules_version(runner, tmp_path: Path) -> None:
    out = tmp_path / "s.pdf"
    assert runner.invoke(app, ["sheet", "sequence", "-o", str(out)]).exit_code == 0
    text = " ".join(p.extract_text() for p in PdfReader(out).pages)
    assert f"rules {RULES_VERSION}" in text


def test_age_under_16_warns() -> None:
    plan = plan_for(make(patient={"age_years": 15}))
    assert any("Age 15 years is unusual" in w for w in plan.warnings)
