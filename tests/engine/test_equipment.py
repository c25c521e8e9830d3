"""Equipment: tube sizes, supraglottic bands, front-of-neck kit."""

from __future__ import annotations

from pathlib import Path
from typing import get_args

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from airway.assessment import OedemaSign
from airway.engine.body import body_size
from airway.engine.equipment import choose_equipment, choose_tubes
from airway.errors import CatalogueError
from airway.unit.catalogue import load_catalogue

from ..conftest import make

CATALOGUE = load_catalogue()


def test_front_of_neck_tube_is_6mm() -> None:
    """DAS 2015 (Frerk), from memory; corroborated by secondary sources: 6.0 mm cuffed."""
    assert CATALOGUE.front_of_neck_tube_mm == 6.0


@pytest.mark.parametrize(("weight", "size"), [(45, 3), (70, 4), (95, 5)])
def test_supraglottic_bands_match_makers_published_bands(weight: float, size: int) -> None:
    """Makers' bands as quoted in the literature (3 < 50 kg, 4 50-90 kg, 5 > 90 kg)."""
    assert CATALOGUE.supraglottic_size(weight) == size


def test_routine_tubes_within_traditional_obstetric_range() -> None:
    """Traditional obstetric range 6.0-7.0 mm; 6.0 mm still takes the usual aids
    (MGH handbook; Karmali & Rose 2020)."""
    t = choose_tubes(make(), CATALOGUE)
    assert 6.0 <= t.smallest <= t.backup <= t.first <= 7.0
    assert t.smallest == 6.0


def test_oedema_gives_smaller_tubes() -> None:
    routine = choose_tubes(make(), CATALOGUE)
    oedema = choose_tubes(make(preeclampsia={"signs": ["voice_change"]}), CATALOGUE)
    assert oedema.first < routine.first and oedema.smallest < 6.0


_STATUSES = st.sampled_from([None, "none", "without_severe_features", "with_severe_features"])
_SIGNS = st.lists(st.sampled_from(get_args(OedemaSign)), max_size=3)


@settings(max_examples=100, deadline=None)
@given(status=_STATUSES, signs=_SIGNS, more=_SIGNS)
def test_adding_preeclampsia_or_oedema_never_enlarges_first_tube(status, signs, more) -> None:
    pe = {"signs": signs} | ({"status": status} if status else {})
    before = choose_tubes(make(preeclampsia=pe), CATALOGUE)
    worse = {"status": "with_severe_features", "signs": signs + more}
    after = choose_tubes(make(preeclampsia=worse), CATALOGUE)
    assert after.first <= before.first


def test_only_stocked_sizes_are_suggested(tmp_path: Path) -> None:
    text = Path(__file__).resolve().parents[2].joinpath("airway/data/equipment.toml").read_text()
    text = text.replace("[5.0, 5.5, 6.0, 6.5, 7.0, 7.5]", "[6.0, 7.5]")
    custom = tmp_path / "unit.toml"
    custom.write_text(text)
    cat = load_catalogue(custom)
    for pe in ({}, {"status": "without_severe_features"}, {"signs": ["stridor"]}):
        t = choose_tubes(make(preeclampsia=pe), cat)
        assert {t.first, t.backup, t.smallest} <= {6.0, 7.5}


def test_catalogue_without_front_of_neck_size_is_refused(tmp_path: Path) -> None:
    text = Path(__file__).resolve().parents[2].joinpath("airway/data/equipment.toml").read_text()
    bad = tmp_path / "bad.toml"
    bad.write_text(text.replace("[5.0, 5.5, 6.0, 6.5, 7.0, 7.5]", "[7.0, 7.5]"))
    with pytest.raises(CatalogueError, match="front_of_neck_tube_mm"):
        load_catalogue(bad)


def test_catalogue_text_longer_than_two_printed_lines_is_refused(tmp_path: Path) -> None:
    text = Path(__file__).resolve().parents[2].joinpath("airway/data/equipment.toml").read_text()
    bad = tmp_path / "bad.toml"
    bad.write_text(text.replace('bougie = "', 'bougie = "' + "very long " * 20, 1))
    with pytest.raises(CatalogueError, match="bougie"):
        load_catalogue(bad)


def test_large_breasts_open_a_short_handle() -> None:
    a = make(airway={"large_breasts": True})
    eq = choose_equipment(a, body_size(80, 165), 1, CATALOGUE)
    assert any(i.name == "Short-handled laryngoscope" for i in eq.items)
    eq = choose_equipment(make(), body_size(80, 165), 1, CATALOGUE)
    assert not any(i.name == "Short-handled laryngoscope" for i in eq.items)


def test_small_tubes_come_with_an_aid_that_passes_them() -> None:
    """Oedema: 6.0 / 5.5 / 5.0 mm (expert opinion). 6.0 mm still takes the usual aids
    (Karmali & Rose 2020), so below it the plan names the shipped small-tube aid."""
    from airway.workflows.planning import plan_for

    from ..conftest import make

    plan = plan_for(
        make(preeclampsia={"status": "with_severe_features", "signs": ["voice_change"]})
    )
    assert plan.equipment.tracheal_tube_mm.smallest == 5.0
    aid = next(i for i in plan.equipment.items if i.name == "Small-tube aid")
    assert aid.open_now and "5.0 mm" in aid.why
    routine = plan_for(make())
    assert all(i.name != "Small-tube aid" for i in routine.equipment.items)


def test_a_stock_that_cannot_meet_the_plan_warns_never_silently() -> None:
    from airway.engine.plan import build_plan
    from airway.unit.catalogue import load_catalogue

    from ..conftest import make

    shipped = load_catalogue()
    adjuncts = shipped.airway_adjuncts.model_copy(
        update={"small_tube_aid": None, "small_tube_aid_fits_from_mm": None}
    )
    no_small = shipped.model_copy(
        update={"tracheal_tube_sizes_mm": (6.0, 6.5, 7.0), "airway_adjuncts": adjuncts}
    )
    plan = build_plan(make(preeclampsia={"signs": ["voice_change"]}), no_small)
    assert plan.equipment.tracheal_tube_mm.smallest == 6.0
    assert any("stocks no 5.5, 5.0 mm" in w for w in plan.warnings)
    short = build_plan(
        make(preeclampsia={"signs": ["voice_change"]}),
        shipped.model_copy(update={"airway_adjuncts": adjuncts}),
    )
    assert any("too small for the bougie" in w for w in short.warnings)
