"""The apnoea model against published simulations and clinical studies."""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from airway import build_plan
from airway.oxygenation import (
    FRC_PREGNANCY_FACTOR,
    P50_PREGNANT_MMHG,
    VO2_LABOUR_FACTOR,
    VO2_PREGNANCY_FACTOR,
    oxygenation_for,
    physiology,
    saturation,
    simulate,
)

from .conftest import make

# Reference woman for the simulation check values: 165 cm, 75 kg at term. The
# papers do not state their model patients' size here; this size is our choice.
REF = {"weight_kg": 75.0, "height_cm": 165.0}
# "Full" pre-oxygenation (end-tidal N2 below 1 kPa) taken as end-tidal O2 0.94.
FULL = 0.94


def _t90(**kw: object) -> float:
    course = simulate(physiology(**kw))  # type: ignore[arg-type]
    assert course.seconds_to_90 is not None
    return course.seconds_to_90


def test_mcclelland_2008_term_pregnant_292s() -> None:
    """McClelland, Bogod & Hardman 2008 (Anaesthesia): term pregnant 292 s, within ±25%."""
    assert _t90(**REF, feo2=FULL) == pytest.approx(292, rel=0.25)


def test_mcclelland_2008_non_pregnant_445s_and_ratio() -> None:
    """McClelland 2008: non-pregnant 445 s (±25%); ratio pregnant/non-pregnant 0.66 ± 0.1.
    Non-pregnant = the same woman with the pregnancy adjustments switched off."""
    preg = _t90(**REF, feo2=FULL)
    non = _t90(**REF, feo2=FULL, pregnant=False)
    assert non == pytest.approx(445, rel=0.25)
    assert preg / non == pytest.approx(0.66, abs=0.1)


def test_mcclelland_2009_labour_bmi_50_about_98s() -> None:
    """McClelland 2009 (Anaesthesia 64:371): labour with BMI 50 reaches SaO2 90% in about
    98 s, the fastest scenario; within ±35% and well below the standard term case."""
    t = _t90(weight_kg=50 * 1.65**2, height_cm=165, in_labour=True, feo2=FULL)
    assert t == pytest.approx(98, rel=0.35)
    assert t < 0.5 * _t90(**REF, feo2=FULL)


def test_benumof_1997_normal_and_obese_adults() -> None:
    """Benumof 1997 (Anesthesiology 87:979), read from its figure, from memory: normal
    70 kg adult about 8 min, obese 127 kg adult about 3 min (±1.5 min); start FAO2 0.87."""
    normal = _t90(weight_kg=70, height_cm=170, pregnant=False, feo2=0.87) / 60
    obese = _t90(weight_kg=127, height_cm=170, pregnant=False, feo2=0.87) / 60
    assert normal == pytest.approx(8, abs=1.5)
    assert obese == pytest.approx(3, abs=1.5)
    assert obese < normal


def test_berthoud_1991_morbidly_obese_vs_normal() -> None:
    """Berthoud 1991 (Br J Anaesth): 196 ± 80 s morbidly obese vs 595 ± 142 s normal
    weight to SpO2 90%: ordering, and a ratio near 0.33."""
    normal = _t90(weight_kg=65, height_cm=165, pregnant=False)
    obese = _t90(weight_kg=130, height_cm=165, pregnant=False)
    assert obese < normal
    assert obese / normal == pytest.approx(196 / 595, abs=0.15)


def test_baraka_1992_pregnant_faster_to_95() -> None:
    """Baraka 1992 (Anesth Analg 75:757): supine apnoea to SpO2 95%, pregnant 173 s
    against non-pregnant 243 s: ordering."""
    preg = simulate(physiology(**REF)).seconds_to_95
    non = simulate(physiology(**REF, pregnant=False)).seconds_to_95
    assert preg is not None and non is not None and preg < non


def test_input_facts_of_the_trade() -> None:
    """Common practice, no single source: FRC falls about 20% at term; P50 about 30 mmHg;
    O2 consumption +20-35% at term; labour +23% (Eliasson 1992)."""
    assert pytest.approx(0.8) == FRC_PREGNANCY_FACTOR
    assert P50_PREGNANT_MMHG == 30
    assert 1.20 <= VO2_PREGNANCY_FACTOR <= 1.35
    assert pytest.approx(1.23) == VO2_LABOUR_FACTOR
    preg, non = physiology(**REF), physiology(**REF, pregnant=False)
    assert preg.frc_ml / non.frc_ml == pytest.approx(0.8)


def test_severinghaus_curve() -> None:
    """Severinghaus 1979: saturation 50% at the P50 and about 97-98% at 100 mmHg."""
    assert saturation(26.8) == pytest.approx(0.5, abs=0.01)
    assert saturation(100) == pytest.approx(0.975, abs=0.01)
    assert saturation(30, p50_mmhg=30) == pytest.approx(0.5, abs=0.01)


_body = {"weight": st.floats(45, 200), "height": st.floats(145, 190)}


@settings(max_examples=60, deadline=None)
@given(**_body, feo2=st.floats(0.5, 0.95), drop=st.floats(0.02, 0.3))
def test_lower_end_tidal_o2_never_lengthens(weight, height, feo2, drop) -> None:
    a = simulate(physiology(weight, height, feo2=feo2)).seconds_to_90
    b = simulate(physiology(weight, height, feo2=max(0.3, feo2 - drop))).seconds_to_90
    assert b is not None and (a is None or b <= a)


@settings(max_examples=60, deadline=None)
@given(**_body, extra=st.floats(1, 60))
def test_higher_bmi_never_lengthens(weight, height, extra) -> None:
    a = simulate(physiology(weight, height)).seconds_to_90
    b = simulate(physiology(weight + extra, height)).seconds_to_90
    assert b is not None and (a is None or b <= a)


@settings(max_examples=60, deadline=None)
@given(**_body, hb=st.floats(70, 150), drop=st.floats(5, 40))
def test_labour_and_lower_haemoglobin_never_lengthen(weight, height, hb, drop) -> None:
    base = simulate(physiology(weight, height, haemoglobin_g_per_l=hb)).seconds_to_90
    labour = simulate(physiology(weight, height, in_labour=True, haemoglobin_g_per_l=hb))
    anaemic = simulate(physiology(weight, height, haemoglobin_g_per_l=max(40, hb - drop)))
    for t in (labour.seconds_to_90, anaemic.seconds_to_90):
        assert t is not None and (base is None or t <= base)


@settings(max_examples=60, deadline=None)
@given(**_body, fo2=st.sampled_from([0.5, 1.0]))
def test_apnoeic_oxygenation_never_shortens_and_times_finite(weight, height, fo2) -> None:
    base = simulate(physiology(weight, height)).seconds_to_90
    nasal = simulate(physiology(weight, height, pharyngeal_fo2=fo2)).seconds_to_90
    assert base is not None and math.isfinite(base) and base > 0
    assert nasal is None or nasal >= base


def test_plan_carries_oxygenation_and_uses_it() -> None:
    p = build_plan(make(patient={"weight_kg": 140, "height_cm": 160, "in_labour": True}))
    o = p.oxygenation
    assert o.minutes_to_spo2_90 is not None and o.minutes_to_spo2_90 < 3 and o.short
    assert [s.id for s in o.scenarios] == [
        "as_assessed",
        "poor_preoxygenation",
        "nasal_low_flow",
        "nasal_high_flow",
    ]
    assert o.curve[0][0] == 0 and o.curve[0][1] > 95
    pre = next(s for s in p.steps if s.id == "preoxygenate")
    assert any("high-flow nasal oxygen" in a for a in pre.actions)
    fona = next(i for i in p.equipment.items if i.name == "Front-of-neck kit")
    assert fona.open_now
    assert any("not a guarantee" in c for c in p.cautions)


def test_oxygen_for_missing_height_states_assumption() -> None:
    o = oxygenation_for(make(patient={"height_cm": None}))
    assert any("height not given" in a for a in o.assumptions)


def test_expected_end_tidal_o2_from_the_assessment_shortens_the_estimate() -> None:
    good = build_plan(make(), checklists=()).oxygenation
    poor = build_plan(make(context={"end_tidal_o2": 0.75}), checklists=()).oxygenation
    assert good.scenarios[0].end_tidal_o2 == 0.9 and poor.scenarios[0].end_tidal_o2 == 0.75
    assert poor.minutes_to_spo2_90 is not None and good.minutes_to_spo2_90 is not None
    assert poor.minutes_to_spo2_90 < good.minutes_to_spo2_90


def test_preoxygenation_step_states_the_technique() -> None:
    """Common practice and published guidance (Tanoubi 2009; OAA/DAS 2015): 3 min of tidal
    breathing at FiO2 1.0 or 8 vital-capacity breaths in 60 s, to end-tidal O2 0.9 or more."""
    step = next(s for s in build_plan(make(), checklists=()).steps if s.id == "preoxygenate")
    text = " ".join(step.actions)
    assert "3 min of tidal breathing" in text and "8 vital-capacity breaths in 60 s" in text
    assert "at least 0.9" in text


def _plain_simulate(p, horizon_min: float = 20.0) -> tuple:  # type: ignore[no-untyped-def]
    """The model's equations in their plain form, one call per step, as first written.

    The hand-written loop in ``oxygenation.simulate`` must give exactly these figures:
    it only moves constants out of the loop and calls out of each step.
    """
    from airway import oxygenation as o

    dry = o.BAROMETRIC_MMHG - o.WATER_VAPOUR_MMHG
    hb_cap = o.HUFNER_ML_PER_G * p.haemoglobin_g_per_l
    q, vo2 = p.cardiac_output_l_per_min / 60.0, p.vo2_ml_per_min / 60.0
    v_o2 = p.feo2 * p.frc_ml
    v_n2 = max(0.0, 1.0 - p.feo2 - p.paco2_mmhg / dry) * p.frc_ml
    pao2 = (dry - p.paco2_mmhg) * v_o2 / (v_o2 + v_n2)
    cc = hb_cap * o.saturation(pao2, p.p50_mmhg) + o.O2_SOLUBILITY_ML_PER_L_PER_MMHG * pao2
    cv = 0.0
    for _ in range(30):
        cv = max(0.0, (1 - p.shunt) * cc + p.shunt * cv - vo2 / q)
    pool, t, marks, curve, next_point = cv * p.blood_volume_l, 0.0, {}, [], 0.0
    while t <= horizon_min * 60.0:
        paco2 = p.paco2_mmhg + o.PACO2_RISE_MMHG_PER_MIN * max(0.0, t / 60.0 - 1.0)
        total = v_o2 + v_n2
        pao2 = max(0.0, (dry - paco2) * v_o2 / total) if total > 0 else 0.0
        sc = o.saturation(pao2, p.p50_mmhg)
        cc = hb_cap * sc + o.O2_SOLUBILITY_ML_PER_L_PER_MMHG * pao2
        cv = pool / p.blood_volume_l
        sao2 = (1 - p.shunt) * sc + p.shunt * min(1.0, cv / hb_cap)
        if t >= next_point:
            curve.append((int(t), round(100 * sao2, 1)))
            next_point += o.CURVE_EVERY_S
        for threshold in (0.95, 0.90, 0.80):
            if sao2 < threshold:
                marks.setdefault(threshold, t)
        if sao2 < 0.80:
            break
        dt = o.STEP_LONG_S if sao2 > o.STEP_LONG_ABOVE else o.STEP_S
        uptake = min(v_o2, max(0.0, q * (1 - p.shunt) * (cc - cv)) * dt)
        v_o2 += (p.pharyngeal_fo2 - 1.0) * uptake
        v_n2 += (1.0 - p.pharyngeal_fo2) * uptake
        pool = max(0.0, pool + uptake - vo2 * dt)
        t += dt
    return marks.get(0.95), marks.get(0.90), marks.get(0.80), tuple(curve)


LOOPS = ["python", "compiled"]


@pytest.mark.parametrize("loop", LOOPS)
def test_hand_written_loop_gives_the_plain_equations_figures_exactly(
    loop: str, monkeypatch: pytest.MonkeyPatch
) -> None:
    """Both time loops, the Python one and the compiled one, give the figures of the
    model's plain equations to the last bit."""
    import random

    from airway import oxygenation
    from airway.oxygenation import physiology, simulate

    if loop == "python":
        monkeypatch.setattr(oxygenation, "_compiled_loop", None)
    elif not oxygenation.compiled():
        pytest.skip("airway._apnoea is not built here (no C compiler at install)")
    rng = random.Random(20261202)
    for _ in range(600):
        p = physiology(
            weight_kg=rng.uniform(35, 250),
            height_cm=rng.uniform(125, 205),
            age_years=rng.uniform(14, 60),
            pregnant=rng.random() < 0.9,
            in_labour=rng.random() < 0.4,
            haemoglobin_g_per_l=rng.choice([None, rng.uniform(50, 190)]),
            feo2=rng.choice([0.9, 0.7, rng.uniform(0.5, 0.95)]),
            pharyngeal_fo2=rng.choice([0.21, 0.5, 1.0]),
        )
        course = simulate(p)
        fast = (course.seconds_to_95, course.seconds_to_90, course.seconds_to_80, course.curve)
        assert fast == _plain_simulate(p)
        quiet = simulate(p, curve=False)
        assert (quiet.seconds_to_95, quiet.seconds_to_90, quiet.seconds_to_80) == fast[:3]
        assert quiet.curve == ()


def test_compiled_loop_is_built_where_asked() -> None:
    """CI builds the compiled loop (.ci/run sets AIRWAY_REQUIRE_COMPILED): a broken
    build must fail there, not pass silently on the slower Python loop."""
    import os

    from airway import oxygenation

    if not os.environ.get("AIRWAY_REQUIRE_COMPILED"):
        pytest.skip("only where AIRWAY_REQUIRE_COMPILED is set")
    assert oxygenation.compiled()


def test_compiled_loop_refuses_a_bad_call() -> None:
    """A wrong call is a TypeError, never a crash of the process."""
    from airway import oxygenation

    if not oxygenation.compiled():
        pytest.skip("airway._apnoea is not built here")
    from airway import _apnoea

    constants = oxygenation._LOOP_CONSTANTS
    state = oxygenation.start_state(oxygenation.physiology(70, 165))
    assert len(_apnoea.run((state,), constants, 60.0, (True,), 10.0)) == 1
    with pytest.raises(TypeError):
        _apnoea.run(((1.0, 2.0),), constants, 60.0, (True,), 10.0)  # a state of 2, not 15
    with pytest.raises(TypeError):
        _apnoea.run((1.0,), constants, 60.0, (True,), 10.0)  # a number, not a state
    with pytest.raises(TypeError):
        _apnoea.run((state,), (), 60.0, (True,), 10.0)  # no constants
    with pytest.raises(TypeError):
        _apnoea.run((state,) * 9, constants, 60.0, (True,) * 9, 10.0)  # more than 8
    with pytest.raises(TypeError):
        _apnoea.run((state, state), constants, 60.0, (True,), 10.0)  # a flag short
    with pytest.raises(TypeError):
        _apnoea.run()  # type: ignore[call-arg]


@given(
    st.floats(35, 250),
    st.floats(125, 205),
    st.sampled_from([0.21, 0.5, 1.0, 0.35]),
    st.booleans(),
)
def test_nasal_o2_from_the_base_equals_working_it_all_out(weight, height, fo2, labour) -> None:
    """The scenarios derive nasal O2 from the woman's base physiology: it must be the
    same physiology, to the last bit, as working it out from scratch."""
    from airway.oxygenation import physiology, with_nasal_o2

    base = physiology(weight, height, in_labour=labour)
    direct = physiology(weight, height, in_labour=labour, pharyngeal_fo2=fo2)
    assert with_nasal_o2(base, fo2, weight, height) == direct


@settings(max_examples=60)
@given(st.floats(40, 200), st.floats(140, 190), st.booleans())
def test_scenarios_equal_each_worked_out_from_scratch(weight, height, labour) -> None:
    """The plan's scenarios share work (one start for the nasal O2 ones): each must give
    the minutes of its physiology simulated from scratch."""
    from airway.oxygenation import (
        FEO2_DEFAULT,
        FEO2_POOR,
        FO2_NASAL_HIGH_FLOW,
        FO2_NASAL_LOW_FLOW,
        oxygenation_for,
        physiology,
        simulate,
    )

    a = make(patient={"weight_kg": weight, "height_cm": height, "in_labour": labour})
    scenarios = oxygenation_for(a).scenarios
    got = {s.id: (s.minutes_to_spo2_90, s.minutes_to_spo2_80) for s in scenarios}
    gases = {s.id: (s.end_tidal_o2, s.apnoeic_o2_fraction) for s in scenarios}
    kw = {"age_years": float(a.patient.age_years or 30), "in_labour": labour}
    cases = {
        "as_assessed": physiology(weight, height, **kw),
        "poor_preoxygenation": physiology(weight, height, **kw, feo2=FEO2_POOR),
        "nasal_low_flow": physiology(weight, height, **kw, pharyngeal_fo2=FO2_NASAL_LOW_FLOW),
        "nasal_high_flow": physiology(weight, height, **kw, pharyngeal_fo2=FO2_NASAL_HIGH_FLOW),
    }
    assert cases["as_assessed"].feo2 == FEO2_DEFAULT
    for cid, phys in cases.items():
        course = simulate(phys, curve=False)
        want = tuple(
            None if s is None else round(s / 60.0, 1)
            for s in (course.seconds_to_90, course.seconds_to_80)
        )
        assert got[cid] == want, cid
        assert gases[cid] == (phys.feo2, phys.pharyngeal_fo2), cid


def test_compiled_rounding_of_the_curve_is_pythons_round() -> None:
    """The compiled loop rounds each curve point itself; it must agree with Python's
    ``round(100 * sao2, 1)`` everywhere, most of all next to the ties it hands over to
    Python's own conversion (k + 0.05 per cent, give or take a few units in the last
    place), and on zero, negative, huge and non-finite values."""
    import math
    import random

    from airway import oxygenation

    if not oxygenation.compiled():
        pytest.skip("airway._apnoea is not built here")
    from airway import _apnoea

    rng = random.Random(3)
    values = [rng.random() for _ in range(50_000)]
    for k in range(1000):
        tie = (k + 0.5) / 1000
        values += [tie + d * 2**-53 for d in range(-4, 5)]
        values.append((k / 10 + 0.05) / 100)
    values += [0.0, -0.0, 1.0, -1e-9, -0.5, 1e-300, 5e3, 2e4, math.inf, -math.inf]
    for v in values:
        got, want = _apnoea.round_percent(v), round(100 * v, 1)
        assert got == want and math.copysign(1, got) == math.copysign(1, want), v
    assert math.isnan(_apnoea.round_percent(math.nan))


@pytest.mark.parametrize("loop", LOOPS)
def test_scenarios_run_together_equal_each_run_alone(
    loop: str, monkeypatch: pytest.MonkeyPatch
) -> None:
    """The compiled loop steps up to eight scenarios in turn in one call: each must come
    out exactly as when it runs alone, its curve recorded only when asked."""
    import random

    from airway import oxygenation
    from airway.oxygenation import _courses, physiology, simulate, start_state

    if loop == "python":
        monkeypatch.setattr(oxygenation, "_compiled_loop", None)
    elif not oxygenation.compiled():
        pytest.skip("airway._apnoea is not built here (no C compiler at install)")
    rng = random.Random(8)
    for size in (1, 2, 3, 4, 8, 5, 7, 6) * 8:
        people = [
            physiology(
                weight_kg=rng.uniform(35, 250),
                height_cm=rng.uniform(125, 205),
                in_labour=rng.random() < 0.4,
                feo2=rng.uniform(0.5, 0.95),
                pharyngeal_fo2=rng.choice([0.21, 0.5, 1.0]),
            )
            for _ in range(size)
        ]
        flags = tuple(rng.random() < 0.5 for _ in range(size))
        together = _courses(tuple(start_state(p) for p in people), flags)
        alone = tuple(simulate(p, curve=f) for p, f in zip(people, flags, strict=True))
        assert together == alone
    with pytest.raises(TypeError):
        _courses((start_state(people[0]),) * 9, (False,) * 9)


def test_records_rebuilt_with_one_field_changed_equal_replace() -> None:
    """The scenarios rebuild a record with one field changed by position (cheaper than
    ``_replace``): a field added or moved must not shift what they change."""
    from airway.oxygenation import _drawing_in, _with_feo2, physiology, start_state

    p = physiology(82.5, 161, in_labour=True, haemoglobin_g_per_l=104)
    assert _with_feo2(p, 0.7) == p._replace(feo2=0.7)
    s = start_state(p)
    assert _drawing_in(s, 0.63) == s._replace(o2_in=0.63 - 1.0, n2_in=1.0 - 0.63)
