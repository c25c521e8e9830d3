"""The factor catalogue against its sources."""

from __future__ import annotations

import math

import pytest

from airway.engine import (
    body,
    decision,
    doses,
    equipment,
    factors,
    guidance,
    oxygenation,
    plan,
    scoring,
)
from airway.engine.factors import BY_ID, CATALOGUE
from airway.sources import SOURCES, Evidence


@pytest.mark.parametrize(
    ("factor_id", "ratio"),
    [
        # Rocke 1992 (Anesthesiology 77:67), relative risk against Mallampati I: published.
        ("mallampati_2", 3.23),
        ("mallampati_3", 7.58),
        ("mallampati_4", 11.3),
        # Rocke 1992, values quoted from memory: check against the paper.
        ("short_neck", 5.01),
        ("receding_mandible", 9.71),
        ("protruding_incisors", 8.0),
        # Detsky 2019 (JAMA 321:493) positive likelihood ratios.
        ("upper_lip_bite_3", 14.0),
        ("thyromental_short", 3.3),
        ("sternomental_short", 4.1),
        ("mouth_opening_small", 3.6),
        ("neck_movement_reduced", 4.2),
        ("jaw_protrusion_limited", 5.5),
        ("snoring", 3.4),
        # Quinn 2013 (Br J Anaesth 110:74) adjusted odds ratios per unit.
        ("bmi", 1.06),
        ("age", 1.07),
    ],
)
def test_published_weights(factor_id: str, ratio: float) -> None:
    assert BY_ID[factor_id].weight == ratio


def test_rocke_memory_values_are_marked_from_memory() -> None:
    for fid in ("short_neck", "receding_mandible", "protruding_incisors"):
        assert BY_ID[fid].evidence.basis == "from_memory"


def test_mallampati_weights_rise_with_class() -> None:
    """Rocke 1992: relative risk rises strictly from class I to IV."""
    w = [BY_ID[f"mallampati_{c}"].weight for c in (2, 3, 4)]
    assert 1 < w[0] < w[1] < w[2]


def test_weights_without_a_published_figure_say_so() -> None:
    for f in CATALOGUE:
        if f.kind == "project_ratio":
            assert f.evidence.basis == "project_rule"


def test_overrides_are_the_three_named_rules() -> None:
    overrides = {f.id for f in CATALOGUE if f.role == "override"}
    assert overrides == {"stridor", "previous_failed_intubation", "previous_difficult_intubation"}


def test_preparation_factors_change_preparation_not_index() -> None:
    f = BY_ID["in_labour"]
    assert f.role == "preparation" and f.weight is None
    assert "reassess Mallampati" in f.prepares


def test_large_breasts_weigh_in_the_index_and_keep_their_preparation() -> None:
    """No published ratio exists (Khan 2014 review; Datta 1981 short handle): a project
    rule, shown as such, smaller than Mallampati 2's relative risk (Rocke 1992, 3.23)."""
    f = BY_ID["large_breasts"]
    assert f.role == "difficulty" and f.kind == "project_ratio"
    assert f.evidence.basis == "project_rule"
    assert 1 < f.weight < BY_ID["mallampati_2"].weight  # type: ignore[operator]
    assert "short-handled" in f.prepares


def test_ids_unique_and_weights_positive() -> None:
    assert len(BY_ID) == len(CATALOGUE)
    for f in CATALOGUE:
        if f.weight is not None:  # Mallampati class 1 is the reference class, ratio 1
            assert f.weight >= 1 and math.isfinite(f.log_weight)
        if f.weight_normal is not None:  # a normal finding lowers the index
            assert 0 < f.weight_normal < 1


def _all_evidence() -> list[Evidence]:
    found: list[Evidence] = []
    found += list(oxygenation.CONSTANT_EVIDENCE.values())
    for module in (body, decision, doses, equipment, factors, guidance, oxygenation, plan, scoring):
        for value in vars(module).values():
            if isinstance(value, Evidence):
                found.append(value)
    found += [f.evidence for f in CATALOGUE]
    for d in doses.DRUGS:
        found += [d.dose_evidence, d.scalar_evidence]
        found += [d.ceiling.evidence] if d.ceiling else []
        found += [Evidence(src, "published") for _s, src in d.alternatives_obese]
    return found


def test_oxygenation_constants_all_have_evidence() -> None:
    for name in oxygenation.CONSTANT_EVIDENCE:
        assert hasattr(oxygenation, name), name


def test_every_constant_has_a_registered_source() -> None:
    evidence = _all_evidence()
    assert len(evidence) > 40
    for e in evidence:
        assert e.source in SOURCES, e
        assert e.basis in ("published", "from_memory", "common_practice", "project_rule")
