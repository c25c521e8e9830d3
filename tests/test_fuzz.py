"""Hostile input of every shape: only the tool's own input error, only exit 0 or 2."""

from __future__ import annotations

import json
import os

from hypothesis import given, settings
from hypothesis import strategies as st
from typer.testing import CliRunner

from airway import plan_for
from airway.cli import app
from airway.errors import InputError
from airway.fields import field_specs
from airway.loading import parse_assessment
from airway.workflows.clinic import read_clinic_list

from .conftest import AIRWAY_FINDINGS

PATHS = [f.path for f in field_specs()]
# CI runs a few thousand cases in all; HYPOTHESIS_PROFILE=deep runs 30 times as many.
SCALE = 30 if os.environ.get("HYPOTHESIS_PROFILE") == "deep" else 1
SECTIONS = sorted({p.split(".")[0] for p in PATHS if "." in p})

scalars = st.one_of(
    st.none(),
    st.booleans(),
    st.integers(min_value=-(10**20), max_value=10**20),
    st.floats(allow_nan=True, allow_infinity=True),
    st.text(max_size=30),
)
json_values = st.recursive(
    scalars,
    lambda inner: (
        st.lists(inner, max_size=4) | st.dictionaries(st.text(max_size=12), inner, max_size=4)
    ),
    max_leaves=12,
)
# Near-valid assessments: real sections and field names, values of any type.
field_values = st.dictionaries(st.sampled_from(PATHS), json_values, max_size=8)


def _nested(flat: dict[str, object]) -> dict[str, object]:
    out: dict[str, dict[str, object] | object] = {}
    for path, value in flat.items():
        if "." in path:
            section, name = path.split(".", 1)
            target = out.setdefault(section, {})
            if isinstance(target, dict):
                target[name] = value
        else:
            out[path] = value
    return out


def _plan_or_input_error(text: str, fmt: str | None) -> None:
    try:
        assessment = parse_assessment(text, "fuzz", fmt)
    except InputError:
        return
    plan_for(assessment)  # a valid assessment must always give a plan


@settings(max_examples=600 * SCALE)
@given(field_values)
def test_near_valid_json_assessments(flat: dict[str, object]) -> None:
    _plan_or_input_error(json.dumps(_nested(flat)), "json")


@settings(max_examples=400 * SCALE)
@given(json_values)
def test_any_json_document(value: object) -> None:
    _plan_or_input_error(json.dumps(value), "json")


@settings(max_examples=600 * SCALE)
@given(st.text(max_size=300))
def test_any_text_as_toml_or_json(text: str) -> None:
    _plan_or_input_error(text, None)


toml_lines = st.lists(
    st.tuples(
        st.sampled_from(PATHS),
        st.one_of(
            st.integers(-1000, 1000).map(str),
            st.floats(-1e6, 1e6, allow_nan=False).map(repr),
            st.sampled_from(["true", "false", '"x"', "[]", '["stridor"]', "nan", "inf", "{}"]),
            st.text(max_size=10).map(json.dumps),
        ),
    ),
    max_size=10,
)


@settings(max_examples=600 * SCALE)
@given(toml_lines)
def test_near_valid_toml_assessments(lines: list[tuple[str, str]]) -> None:
    sections: dict[str, list[str]] = {}
    top: list[str] = []
    for path, value in lines:
        if "." in path:
            section, name = path.split(".", 1)
            sections.setdefault(section, []).append(f"{name} = {value}")
        else:
            top.append(f"{path} = {value}")
    text = (
        "\n".join(top)
        + "\n"
        + "".join(f"[{s}]\n" + "\n".join(body) + "\n" for s, body in sections.items())
    )
    _plan_or_input_error(text, "toml")


@settings(max_examples=300 * SCALE)
@given(
    st.lists(st.sampled_from(PATHS), min_size=1, max_size=6, unique=True),
    st.lists(st.lists(st.text(max_size=12), min_size=0, max_size=8), max_size=5),
)
def test_clinic_list_cells(columns: list[str], cells: list[list[str]]) -> None:
    import csv
    import io

    buf = io.StringIO()
    writer = csv.writer(buf)
    writer.writerow(["id", *columns])
    for i, row in enumerate(cells):
        writer.writerow([f"R{i}", *row])
    try:
        rows = read_clinic_list(buf.getvalue(), "fuzz.csv")
    except InputError:
        return
    for row in rows:
        if row.assessment is not None:
            plan_for(row.assessment)
        else:
            assert row.problems


@settings(max_examples=150 * SCALE)
@given(field_values)
def test_command_line_exit_0_or_2_never_a_traceback(flat: dict[str, object]) -> None:
    text = json.dumps(_nested(flat))
    r = CliRunner().invoke(app, ["plan", "-", "-f", "json"], input=text)
    assert r.exit_code in (0, 2), (text, r.output, r.exception)
    assert "Traceback" not in r.output


SIGNS = ["voice_change", "stridor", "facial_oedema", "tongue_swelling", "new_snoring"]
# Valid assessments of every shape the clinic meets: any finding given or not, any
# identifiers up to their limits; the PDF layout has many branches (head height, dense
# and closer-set fallbacks, reference sections after the actions).
valid_assessments = st.fixed_dictionaries(
    {
        "patient": st.fixed_dictionaries(
            {"weight_kg": st.floats(40, 250)},
            optional={
                "height_cm": st.floats(135, 200),
                "age_years": st.integers(16, 55),
                "in_labour": st.booleans(),
                "haemoglobin_g_per_l": st.integers(60, 160),
            },
        )
    },
    optional={
        "identity": st.fixed_dictionaries(
            {"name": st.text(st.characters(codec="latin-1", categories=["L"]), max_size=80)}
        ),
        "label": st.text("Lm- ", max_size=120),
        "airway": AIRWAY_FINDINGS,
        "preeclampsia": st.fixed_dictionaries(
            {
                "status": st.sampled_from(
                    ["none", "without_severe_features", "with_severe_features"]
                ),
                "signs": st.lists(st.sampled_from(SIGNS), unique=True, max_size=3),
            }
        ),
        "context": st.fixed_dictionaries({"urgency_category": st.integers(1, 4)}),
    },
)


@settings(max_examples=25 * SCALE, deadline=None)
@given(data=valid_assessments, paper=st.sampled_from(["A4", "letter"]))
def test_every_valid_assessment_prints_within_its_pages(data, paper) -> None:
    """A printed plan never fails to lay out; levels 1-2 take one A4 page (Letter, which
    is shorter, may take two) and levels 3-4 at most two."""
    import io

    from pypdf import PdfReader

    from airway.loading import assessment_from_mapping
    from airway.render.pdf.plan import render_plan_pdf

    plan = plan_for(assessment_from_mapping(data))
    pages = len(PdfReader(io.BytesIO(render_plan_pdf(plan, paper))).pages)
    assert pages <= (1 if plan.risk.level <= 2 and paper == "A4" else 2)


_SHIPPED_EQUIPMENT = (
    __import__("pathlib").Path(__file__).resolve().parent.parent / "airway/data/equipment.toml"
).read_text("utf-8")
_CATALOGUE_KEYS = [
    "tracheal_tube_sizes_mm",
    "front_of_neck_tube_mm",
    "bougie_fits_from_mm",
    "small_tube_aid_fits_from_mm",
    "mg_per_ml",
    "bougie",
    "device",
]
toml_values = st.one_of(
    st.integers(-(10**6), 10**6).map(str),
    st.floats(allow_nan=False, allow_infinity=False, width=32).map(repr),
    st.sampled_from(["true", "false", "nan", "inf", "[]", "[0]", "[1, 2.5, 20]", '"x"', '""']),
    st.text(max_size=20).map(json.dumps),
)


@settings(max_examples=300 * SCALE, deadline=None)
@given(key=st.sampled_from(_CATALOGUE_KEYS), value=toml_values)
def test_unit_catalogue_values(key: str, value: str) -> None:
    """Any value for a catalogue key: the catalogue loads, or it is refused as bad input
    naming a line; a plan made with a catalogue that loads never fails."""
    import re
    import tempfile
    from pathlib import Path

    from airway.errors import CatalogueError
    from airway.unit.catalogue import load_catalogue

    line = f"{key} = {value}"
    text = re.sub(rf"(?m)^{key} = .*$", lambda _m: line, _SHIPPED_EQUIPMENT, count=1)
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "equipment.toml"
        path.write_text(text, "utf-8")
        try:
            catalogue = load_catalogue(path)
        except CatalogueError:
            return
    assert plan_for(parse_assessment("[patient]\nweight_kg = 80\n", "a.toml", "toml"), catalogue)


@settings(max_examples=200 * SCALE, deadline=None)
@given(
    path=st.lists(
        st.sampled_from(["risk", "level", "equipment", "doses", "0", "x"]), min_size=1, max_size=3
    ),
    value=json_values,
)
def test_saved_plans_with_any_value_changed(path: list[str], value: object) -> None:
    """A saved plan with any value replaced reads back as a plan (and then matches or not)
    or is refused; never a traceback."""
    from airway.render.json import render_json
    from airway.workflows.verify import verify

    plan = plan_for(parse_assessment("[patient]\nweight_kg = 80\n", "a.toml", "toml"))
    data = json.loads(render_json(plan))
    node = data
    for key in path[:-1]:
        nxt = node.get(key) if isinstance(node, dict) else None
        if not isinstance(nxt, dict):
            break
        node = nxt
    if isinstance(node, dict):
        node[path[-1]] = value
    verdict = verify(json.dumps(data).encode(), plan)
    assert isinstance(verdict.matches, bool)
