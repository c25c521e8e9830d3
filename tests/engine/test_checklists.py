"""Checklist Markdown: conditions, values and every error with file and line."""

from __future__ import annotations

from pathlib import Path

import pytest

from airway import plan_for
from airway.cli import app
from airway.engine.checklists import CONDITIONS, VALUES, for_plan, generic
from airway.errors import ChecklistError
from airway.unit.checklists import load_checklists, parse_checklist

from ..conftest import make

HEAD = '---\ntitle = "T"\nuse = ["plan"]\nsheet = "brief"\n---\n\n'


def _parse(body: str):  # type: ignore[no-untyped-def]
    return parse_checklist(HEAD + body, "unit/brief.md")


def _render(body: str, **sections: object) -> list[str]:
    plan = plan_for(make(**sections), checklists=())
    return [i.text for s in for_plan(_parse(body), plan).sections for i in s.items]


def test_conditions_select_items() -> None:
    body = (
        "# S\n\n- [ ] always\n- [ ] pe only {when preeclampsia}\n"
        "- [ ] not pe {when not preeclampsia}\n- [ ] high {when level >= 3}\n"
        "- [ ] breasts {when large_breasts}\n"
    )
    assert _render(body) == ["always", "not pe"]
    got = _render(
        body, preeclampsia={"status": "without_severe_features"}, airway={"large_breasts": True}
    )
    assert got == ["always", "pe only", "breasts"]
    assert "high" in _render(body, history={"intubation": "failed"})


def test_values_are_the_plans_values() -> None:
    plan = plan_for(make(preeclampsia={"signs": ["voice_change"]}), checklists=())
    c = _parse("# S\n\n- [ ] tube {{tube_first}} mm, sugammadex {{ sugammadex_mg }} mg\n")
    (text,) = [i.text for s in for_plan(c, plan).sections for i in s.items]
    t = plan.equipment.tracheal_tube_mm.first
    assert text == f"tube {t:.1f} mm, sugammadex {plan.dose('sugammadex').dose_mg_low:g} mg"


def test_every_condition_and_value_evaluates_on_examples() -> None:
    plan = plan_for(make(), checklists=())
    for _desc, fn in CONDITIONS.values():
        assert isinstance(fn(plan), bool)
    for _desc, value in VALUES.values():
        assert isinstance(value(plan), str) and value(plan)


def test_section_without_items_is_dropped_when_conditions_remove_all() -> None:
    c = _parse("# A\n\n- [ ] x {when preeclampsia}\n\n# B\n\n- [ ] y\n")
    plan = plan_for(make(), checklists=())
    assert [s.title for s in for_plan(c, plan).sections] == ["B"]


ERRORS = {
    "unknown_condition": ("# S\n\n- [ ] x {when obesity}\n", 9, "unknown condition"),
    "unknown_value": ("# S\n\n- [ ] x {{tube_size}}\n", 9, "unknown value"),
    "malformed": ("# S\n\n- [ ] x {when preeclampsia\n", 9, "malformed braces"),
    "bad_level": ("# S\n\n- [ ] x {when level >= 7}\n", 9, "unknown condition"),
    "empty_section": ("# S\n\n# T\n\n- [ ] y\n", 7, "has no items"),
    "item_before_heading": ("- [ ] y\n", 7, "before any heading"),
    "stray_paragraph": ("# S\n\n- [ ] y\n\nloose text\n", 11, "only headings"),
    "nested": ("# S\n\n- [ ] y\n  - [ ] z\n", 10, "nested"),
    # One action a line: an item, or a heading, longer than a printed page could hold
    # made the plan impossible to lay out (an internal error, no PDF).
    "item_too_long": ("# S\n\n- [ ] " + "x" * 241 + "\n", 9, "at most 240"),
    "heading_too_long": ("# " + "S" * 121 + "\n\n- [ ] y\n", 7, "at most 120"),
}


@pytest.mark.parametrize("case", sorted(ERRORS))
def test_errors_name_file_and_line(case: str) -> None:
    body, line, message = ERRORS[case]
    with pytest.raises(ChecklistError) as exc:
        _parse(body)
    assert exc.value.path == "unit/brief.md" and exc.value.line == line
    assert message in str(exc.value) and f"unit/brief.md:{line}" in str(exc.value)


@pytest.mark.parametrize(
    ("text", "message"),
    [
        ("# S\n\n- [ ] y\n", "missing front matter"),
        ('---\ntitle = "T"\nsheet = "x"\ncolour = "red"\n---\n# S\n- y\n', "colour"),
        ('---\ntitle = "T"\nsheet = "x"\npaper = "A5"\n---\n# S\n- y\n', "A4 or A3"),
        ("---\ntitle = \n---\n# S\n- y\n", "not TOML"),
    ],
)
def test_front_matter_errors(text: str, message: str) -> None:
    with pytest.raises(ChecklistError, match=message):
        parse_checklist(text, "x.md")


def test_hostile_item_text_is_kept_verbatim() -> None:
    c = _parse("# S\n\n- [ ] <b>O'Neil & Co</b> µg ≥ 3\n")
    plan = plan_for(make(), checklists=())
    assert for_plan(c, plan).sections[0].items[0].text == "<b>O'Neil & Co</b> µg ≥ 3"


def test_shipped_checklists_parse_and_cover_the_sheets() -> None:
    sheets = {c.meta.sheet for c in load_checklists()}
    assert {"brief", "contents", "sequence", "after"} <= sheets


def test_unit_folder_overrides_by_name_and_keeps_the_rest(tmp_path: Path) -> None:
    (tmp_path / "40-after-the-event.md").write_text(
        '---\ntitle = "Our after-event list"\nuse = ["plan"]\nsheet = "after"\n---\n'
        "# Ours\n\n- [ ] Ring the airway lead\n"
    )
    lists = {c.meta.sheet: c for c in load_checklists(tmp_path)}
    assert lists["after"].meta.title == "Our after-event list"
    assert "brief" in lists


def test_trolley_sheet_refuses_plan_values() -> None:
    with pytest.raises(ChecklistError, match="belongs to one woman's plan"):
        generic(_parse("# S\n\n- [ ] tube {{tube_first}}\n"), 6.0)


def test_unit_values_fill_sheets_and_plans_from_the_guidance_constants() -> None:
    """OAA/DAS 2015: at most two intubation attempts; front-of-neck tube from the catalogue."""
    body = "# S\n\n- At most {{max_intubation_attempts}} attempts, tube {{front_of_neck_tube}} mm\n"
    sheet = generic(_parse(body), 6.0)
    assert sheet.sections[0].items[0].text == "At most 2 attempts, tube 6.0 mm"
    assert _render(body) == ["At most 2 attempts, tube 6.0 mm"]


def test_markdown_plan_and_pdf_share_checklist_content(tmp_path: Path) -> None:
    from pypdf import PdfReader

    from airway.render.markdown import render_markdown
    from airway.render.pdf.plan import render_plan_pdf

    plan = plan_for(make(airway={"large_breasts": True}))
    md = render_markdown(plan)
    f = tmp_path / "p.pdf"
    f.write_bytes(render_plan_pdf(plan))
    pdf = " ".join(" ".join(p.extract_text().split()) for p in PdfReader(f).pages)
    brief = next(c for c in plan.checklists if c.sheet == "brief")
    for section in brief.sections:
        for item in section.items:
            assert item.text in md
            assert " ".join(item.text.split()) in pdf


def test_example_unit_folder_parses_and_applies() -> None:
    from airway.unit.config import load_unit_paths
    from airway.unit.contacts import load_contacts

    root = Path(__file__).resolve().parents[2] / "checklists" / "example-unit"
    paths = load_unit_paths(root / "airway.toml")
    lists = {c.meta.sheet: c for c in load_checklists(paths.checklists)}
    assert "example unit" in lists["after"].meta.title
    assert load_contacts(paths.contacts)[0].number == "bleep 0000"


def test_unit_checklist_not_utf8_exit_2(runner, tmp_path) -> None:
    (tmp_path / "10-team-brief.md").write_bytes(b"\xff\xfe not utf-8")
    r = runner.invoke(app, ["plan", "--demo", "--checklists", str(tmp_path)])
    assert r.exit_code == 2 and "not UTF-8" in r.stderr and "Traceback" not in r.output


def test_no_unit_config_gives_the_default_paths() -> None:
    from airway.unit.config import UnitPaths

    assert UnitPaths.model_construct() == UnitPaths()
