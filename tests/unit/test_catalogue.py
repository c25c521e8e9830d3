"""A unit's drug strengths: read from its catalogue, refused with the file and line."""

from __future__ import annotations

from pathlib import Path

import pytest

from airway.errors import CatalogueError
from airway.unit.catalogue import SHIPPED, load_catalogue

SHIPPED_TEXT = (Path(__file__).resolve().parents[2] / "airway" / SHIPPED).read_text("utf-8")


def test_shipped_catalogue_lists_a_strength_for_every_dosed_drug() -> None:
    drugs = load_catalogue().drugs
    for name in ("propofol", "thiopental", "suxamethonium", "rocuronium", "sugammadex"):
        stock = getattr(drugs, name)
        assert stock.mg_per_ml > 0 and "common strength" in (stock.form or "")


def _with(tmp_path: Path, old: str, new: str) -> Path:
    assert old in SHIPPED_TEXT
    path = tmp_path / "equipment.toml"
    path.write_text(SHIPPED_TEXT.replace(old, new), "utf-8")
    return path


def _line(text: str, needle: str) -> int:
    return next(n for n, line in enumerate(text.splitlines(), 1) if needle in line)


@pytest.mark.parametrize(
    "bad", ["mg_per_ml = 0", "mg_per_ml = -50", 'mg_per_ml = "50"', "mg_per_ml = nan"]
)
def test_a_bad_strength_is_refused_with_its_line(tmp_path: Path, bad: str) -> None:
    path = _with(tmp_path, "[drugs.suxamethonium]\nmg_per_ml = 50", f"[drugs.suxamethonium]\n{bad}")
    with pytest.raises(CatalogueError) as caught:
        load_catalogue(path)
    line = _line(path.read_text("utf-8"), bad)
    message = str(caught.value)
    assert str(path) in message and f"line {line}: drugs.suxamethonium.mg_per_ml" in message


def test_a_missing_strength_is_refused_at_its_table(tmp_path: Path) -> None:
    path = _with(tmp_path, "[drugs.rocuronium]\nmg_per_ml = 10\n", "[drugs.rocuronium]\n")
    with pytest.raises(CatalogueError) as caught:
        load_catalogue(path)
    line = _line(path.read_text("utf-8"), "[drugs.rocuronium]")
    assert f"line {line}: drugs.rocuronium.mg_per_ml: required but missing" in str(caught.value)


def test_a_unit_strength_changes_every_millilitre(tmp_path: Path) -> None:
    """20 mg/mL suxamethonium: 100-140 mg at 95 kg is 5-7 mL on the plan and the sheet."""
    from airway.engine.plan import build_plan
    from airway.workflows.sheets import weight_band_rows

    from ..conftest import make

    weak = load_catalogue(_with(tmp_path, "mg_per_ml = 50", "mg_per_ml = 20"))
    sux = build_plan(make(patient={"weight_kg": 95}), weak).dose("suxamethonium")
    assert (sux.volume_ml_low, sux.volume_ml_high, sux.mg_per_ml) == (5, 7, 20)
    row = next(r for r in weight_band_rows(weak) if r.weight_kg == 100)
    assert row.suxamethonium_ml == (5, 7.5)  # 100-150 mg at 20 mg/mL
