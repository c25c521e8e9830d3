"""Reassessment: what changed since the clinic, the most dangerous change first."""

from __future__ import annotations

import json
from pathlib import Path

from airway import plan_for
from airway.cli import app
from airway.engine.compare import compare_plans
from airway.engine.plan_model import plain

from ..conftest import make

CLINIC = make(
    assessed_on="2026-11-12",
    patient={"weight_kg": 92, "height_cm": 163, "in_labour": False},
    airway={"mallampati": 2, "thyromental_cm": 7},
    preeclampsia={"status": "none"},
)
# In labour the Mallampati class rose by one (as in 38% of women, Kodali 2008) and
# pre-eclampsia brought a voice change.
LABOUR = make(
    assessed_on="2026-11-30",
    patient={"weight_kg": 95, "height_cm": 163, "in_labour": True},
    airway={"mallampati": 3},
    preeclampsia={"status": "without_severe_features", "signs": ["voice_change"]},
    context={"urgency_category": 2},
)


def test_more_dangerous_changes_come_first() -> None:
    c = compare_plans(plan_for(CLINIC), plan_for(LABOUR))
    assert c.more_dangerous and c.plan_changed
    assert c.changes[0].kind == "level" and c.changes[0].danger > 0
    dangers = [ch.danger for ch in c.changes]
    assert dangers == sorted(dangers, reverse=True)
    what = {ch.what: ch for ch in c.changes}
    assert what["airway.mallampati"].before == "2" and what["airway.mallampati"].after == "3"
    assert what["airway.thyromental_cm"].after == "not assessed"  # assessed -> not assessed
    assert what["airway.thyromental_cm"].danger > 0
    assert what["minutes to SpO2 90% (model estimate)"].danger > 0
    assert what["tracheal tubes"].danger > 0  # smaller tubes: a narrower airway expected


def test_a_factor_not_assessed_before_is_not_called_none() -> None:
    """'was none' reads as a normal finding; a class not looked for is 'not assessed'."""
    unassessed = make(patient={"weight_kg": 92, "height_cm": 163})
    class_1 = make(patient={"weight_kg": 92, "height_cm": 163}, airway={"mallampati": 1})
    class_4 = make(patient={"weight_kg": 92, "height_cm": 163}, airway={"mallampati": 4})
    later = plan_for(class_4)
    factors = [ch.what for ch in compare_plans(plan_for(unassessed), later).changes]
    assert "Mallampati class 4 (was not assessed)" in factors
    factors = [ch.what for ch in compare_plans(plan_for(class_1), later).changes]
    assert "Mallampati class 4 (was none)" in factors


def test_same_assessment_nothing_changed() -> None:
    c = compare_plans(plan_for(CLINIC), plan_for(CLINIC))
    assert c.changes == () and not c.more_dangerous and not c.plan_changed


def test_improvement_is_not_marked_dangerous() -> None:
    c = compare_plans(plan_for(LABOUR), plan_for(CLINIC))
    assert not c.more_dangerous and c.plan_changed
    level = next(ch for ch in c.changes if ch.kind == "level")
    assert level.danger < 0


def test_different_record_numbers_warn_of_two_women() -> None:
    a = make(identity={"record_number": "A-1"})
    b = make(identity={"record_number": "B-2"})
    c = compare_plans(plan_for(a), plan_for(b))
    assert c.changes[0].kind == "identity" and "two different women" in c.changes[0].what
    text = json.dumps(plain(c))
    assert "A-1" not in text and "B-2" not in text


def _files(tmp_path: Path) -> tuple[Path, Path]:
    a, b = tmp_path / "clinic.json", tmp_path / "labour.json"
    a.write_text(CLINIC.model_dump_json(exclude_defaults=True))
    b.write_text(LABOUR.model_dump_json(exclude_defaults=True))
    return a, b


def test_compare_command_text_and_json(runner, tmp_path: Path) -> None:
    a, b = _files(tmp_path)
    r = runner.invoke(app, ["compare", str(a), str(b)])
    assert r.exit_code == 0, r.output
    assert "MORE DANGEROUS NOW" in r.stdout and "! airway level" in r.stdout
    assert "decision aid" in r.stdout and "immediately before induction" in r.stdout
    assert max(map(len, r.stdout.splitlines())) <= 80
    data = json.loads(runner.invoke(app, ["compare", str(a), str(b), "-f", "json"]).stdout)
    assert data["more_dangerous"] is True and data["changes"][0]["kind"] == "level"


def test_plan_since_carries_the_box_in_every_format(runner, tmp_path: Path) -> None:
    a, b = _files(tmp_path)
    for fmt in ("text", "markdown"):
        r = runner.invoke(app, ["plan", str(b), "--since", str(a), "-f", fmt])
        assert r.exit_code == 0 and "Changed since the assessment of 2026-11-12".lower() in (
            r.stdout.lower()
        )
    data = json.loads(runner.invoke(app, ["plan", str(b), "--since", str(a), "-f", "json"]).stdout)
    assert data["changes_since"]["earlier_assessed_on"] == "2026-11-12"
    pdf = tmp_path / "p.pdf"
    assert runner.invoke(app, ["plan", str(b), "--since", str(a), "--pdf", str(pdf)]).exit_code == 0
    from pypdf import PdfReader

    text = " ".join(p.extract_text() for p in PdfReader(pdf).pages)
    assert "Changed since the assessment of 2026-11-12" in " ".join(text.split())


def test_a_saved_clinic_plan_stands_for_its_assessment(runner, tmp_path: Path) -> None:
    """The clinic files plans (a clinic list writes <id>.json), not assessments: at the
    reassessment in labour the saved plan is what there is. `compare`, `--since` and
    replanning read the assessment inside it: the same changes, the same plan."""
    clinic_file, labour_file = _files(tmp_path)
    saved = tmp_path / "C001.json"
    saved.write_text(runner.invoke(app, ["plan", str(clinic_file), "-f", "json"]).stdout)
    from_assessment = runner.invoke(app, ["compare", str(clinic_file), str(labour_file)])
    from_saved = runner.invoke(app, ["compare", str(saved), str(labour_file)])
    assert from_saved.exit_code == 0, from_saved.output
    assert from_saved.stdout == from_assessment.stdout
    since = runner.invoke(app, ["plan", str(labour_file), "--since", str(saved)])
    assert since.exit_code == 0 and "MORE DANGEROUS NOW" in since.stdout
    replanned = json.loads(runner.invoke(app, ["plan", str(saved), "-f", "json"]).stdout)
    assert replanned == json.loads(saved.read_text())


def test_a_saved_plan_without_a_readable_assessment_is_bad_input(runner, tmp_path) -> None:
    bad = tmp_path / "bad.json"
    bad.write_text('{"assessment": [], "generated_by": {}, "input_sha256": "x"}')
    r = runner.invoke(app, ["plan", str(bad)])
    assert r.exit_code == 2 and "the assessment inside this saved plan" in r.output


def test_clinically_important_changes_are_marked_and_named_in_clinical_words() -> None:
    """A new voice change and platelets falling from 85 to 62 (below the 70 x10^9/L the
    plan acts on; SOAP 2021 consensus, from memory) are marked '!' and say why, in words."""
    from airway.render.comparison import change_lines

    clinic = make(
        assessed_on="2026-11-20",
        airway={"mallampati": 2},
        preeclampsia={"status": "without_severe_features", "platelets_10e9_per_l": 85},
    )
    labour = make(
        assessed_on="2026-11-30",
        airway={"mallampati": 3},
        preeclampsia={
            "status": "without_severe_features",
            "platelets_10e9_per_l": 62,
            "signs": ["voice_change"],
        },
    )
    c = compare_plans(plan_for(clinic), plan_for(labour))
    lines = change_lines(c, most=8)
    for words in (
        "new sign of airway oedema: voice change",
        "platelets now below 70",
        "Mallampati class rose",
    ):
        line = next(x for x in lines if words in x)
        assert line.startswith("! ") and "preeclampsia." not in line and "airway." not in line
