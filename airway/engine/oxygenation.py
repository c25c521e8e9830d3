"""Time to desaturation during apnoea: a small compartment model.

In the spirit of Farmery & Roe 1996: a lung gas compartment (the FRC, with its
oxygen and nitrogen) exchanges oxygen with one mixed blood pool through the
non-shunted part of the cardiac output; the body takes oxygen from the pool at
the oxygen consumption rate; arterial saturation mixes end-capillary blood
(Severinghaus's dissociation curve, P50 shifted in pregnancy) with shunted
venous blood. During apnoea gas is drawn into the shrinking lung from the
pharynx: room air without apnoeic oxygenation, oxygen-rich gas with nasal
oxygen. Fixed-step integration.

Every constant sits beside its source or is marked as common practice, from
memory, or a project calibration. The result is a model estimate with wide
uncertainty, never a guarantee; the plan says so.
"""

import math
from typing import NamedTuple

from ..assessment import Assessment
from ..sources import Evidence
from .body import ASSUMED_HEIGHT_CM

# Gas pressures (mmHg): sea-level barometric pressure, water vapour at 37 °C.
BAROMETRIC_MMHG = 760.0  # common practice
WATER_VAPOUR_MMHG = 47.0  # common practice
PACO2_NON_PREGNANT_MMHG = 40.0  # common practice
PACO2_PREGNANT_MMHG = 32.0  # Wise 2006: 40 -> about 32 mmHg at term
PACO2_RISE_MMHG_PER_MIN = 3.0  # rise during apnoea after the first minute; from memory

# Haemoglobin: P50 and the Severinghaus 1979 curve (standard P50 26.8 mmHg).
SEVERINGHAUS_P50_MMHG = 26.8
P50_PREGNANT_MMHG = 30.0  # common practice: about 26.7 -> 30 mmHg at term
HUFNER_ML_PER_G = 1.34  # O2 bound per gram of haemoglobin; from memory
O2_SOLUBILITY_ML_PER_L_PER_MMHG = 0.03  # dissolved O2 in blood; common practice
HB_NON_PREGNANT_G_PER_L = 135.0  # common practice (adult woman)
HB_PREGNANT_G_PER_L = 115.0  # common practice (physiological anaemia at term)

# Lung volume. Predicted upright FRC for women (ERS 1993, from memory):
# 2.24 x height(m) - 0.001 x age - 1.00 L. Supine and anaesthetised it is
# smaller; 0.7 of upright is a project calibration (from memory: supine about
# -0.5 to -1 L, induction a further -0.4 L).
FRC_SUPINE_ANAESTHETISED_FACTOR = 0.7
FRC_PREGNANCY_FACTOR = 0.8  # FRC falls about 20% at term (common practice)
# FRC falls exponentially with BMI (Jones & Nzekwu 2006, from memory of the
# shape); rate per kg/m² above 25 is a project calibration.
FRC_BMI_DECAY_PER_UNIT = 0.02
FRC_BMI_REFERENCE = 25.0

# Shunt fraction under anaesthesia; rises with BMI (project calibration).
SHUNT_BASE = 0.05  # from memory: 5-10% under anaesthesia
SHUNT_PER_BMI_UNIT = 0.004
SHUNT_MAX = 0.25
# Nasal oxygen reaches the glottis only through a patent upper airway, which
# obese women often lose during apnoea: apnoeic oxygenation buys only minutes
# at BMI 50 (ICSM simulator, BJA 2021: 1.8-8.5 min more with high-flow nasal
# oxygen) but hours at BMI 24. The glottic O2 fraction falls from the nasal value
# towards room air as exp(-0.02 x (BMI - 25)): a project calibration that puts the
# gain at BMI 50 in labour at about 2.4 min, inside that range, and the time to
# SpO2 90% with high flow at BMI 50 near the 4.3 min of Ellis et al. (Nottingham,
# about 2024, year from memory). Apnoea on room air is unchanged by it.
NASAL_PATENCY_DECAY_PER_BMI_UNIT = 0.02

# Oxygen consumption. Brody's allometric rule VO2 = 10 x kg^0.75 mL/min (from
# memory) gives about 240 mL/min at 70 kg, close to the 250 mL/min under
# anaesthesia of Sirian & Wills 2009. Pregnancy +20-35% (Can J Cardiol 2021
# review); +20% used because current weight already includes the gain.
VO2_ML_PER_MIN_PER_KG075 = 10.0
VO2_PREGNANCY_FACTOR = 1.20
VO2_LABOUR_FACTOR = 1.23  # Eliasson 1992: first stage of labour +23% over term

# Circulation. Cardiac output 5 L/min non-pregnant, +40% at term (common
# practice, range +30-50%). Blood volume by Nadler 1962 (female, from memory),
# +30% at term (common practice, range +30-50%).
CARDIAC_OUTPUT_L_PER_MIN = 5.0
# Cardiac output scales with body size like O2 consumption (common practice:
# cardiac index), so the arteriovenous O2 difference stays near 50 mL/L.
CARDIAC_OUTPUT_REFERENCE_KG = 70.0
CARDIAC_OUTPUT_PREGNANCY_FACTOR = 1.4
BLOOD_VOLUME_PREGNANCY_FACTOR = 1.3
NADLER_FEMALE = (0.3561, 0.03308, 0.1833)  # L: a*H(m)^3 + b*W(kg) + c

# Pharyngeal O2 fraction drawn into the lung during apnoea.
FO2_ROOM_AIR = 0.21
FO2_NASAL_LOW_FLOW = 0.5  # Pillai 2016: standard cannulae give 0.4-0.6 at the glottis
FO2_NASAL_HIGH_FLOW = 1.0  # Pillai 2016: glottic FiO2 1.0

FEO2_DEFAULT = 0.90  # target of pre-oxygenation (Tanoubi 2009; OAA/DAS 2015)
FEO2_POOR = 0.70

STEP_S = 1.0
STEP_LONG_S = 5.0  # used while SaO2 is above STEP_LONG_ABOVE (time constant of the pool ~50 s)
STEP_LONG_ABOVE = 0.97
HORIZON_MIN = 20.0  # longer than this is reported as "more than 20 min"
CURVE_EVERY_S = 10

MODEL_EVIDENCE = (
    Evidence("farmery1996", "from_memory", "compartment structure"),
    Evidence("severinghaus1979", "published", "oxygen-haemoglobin dissociation curve"),
    Evidence("eliasson1992", "published", "oxygen consumption +23% in the first stage"),
    Evidence("mcclelland2008", "published", "check values: 292 s pregnant, 445 s not"),
    Evidence("mcclelland2009", "published", "check value: labour with BMI 50, 98 s"),
    Evidence("pillai2016", "published", "glottic O2 fraction with nasal oxygen"),
)
# Every constant above with its evidence; tests/test_factors.py checks the ids.
CONSTANT_EVIDENCE: dict[str, Evidence] = {
    "PACO2_PREGNANT_MMHG": Evidence("wise2006", "published"),
    "PACO2_RISE_MMHG_PER_MIN": Evidence("common_practice", "from_memory"),
    "P50_PREGNANT_MMHG": Evidence("common_practice", "common_practice"),
    "HB_PREGNANT_G_PER_L": Evidence("common_practice", "common_practice"),
    "predicted_frc_upright_ml": Evidence("quanjer1993", "from_memory"),
    "FRC_SUPINE_ANAESTHETISED_FACTOR": Evidence("project", "project_rule", "calibration"),
    "FRC_PREGNANCY_FACTOR": Evidence("common_practice", "common_practice", "about -20%"),
    "FRC_BMI_DECAY_PER_UNIT": Evidence("jones2006", "from_memory", "shape; rate calibrated"),
    "SHUNT_BASE": Evidence("common_practice", "from_memory", "5-10% under anaesthesia"),
    "SHUNT_PER_BMI_UNIT": Evidence("project", "project_rule", "calibration"),
    "VO2_ML_PER_MIN_PER_KG075": Evidence(
        "brody1945", "from_memory", "about 250 mL/min at 70 kg (Sirian & Wills 2009)"
    ),
    "VO2_PREGNANCY_FACTOR": Evidence("common_practice", "common_practice", "+20-35%"),
    "VO2_LABOUR_FACTOR": Evidence("eliasson1992", "published"),
    "CARDIAC_OUTPUT_PREGNANCY_FACTOR": Evidence("common_practice", "common_practice"),
    "NADLER_FEMALE": Evidence("nadler1962", "from_memory"),
    "BLOOD_VOLUME_PREGNANCY_FACTOR": Evidence("common_practice", "common_practice"),
    "FO2_NASAL_LOW_FLOW": Evidence("pillai2016", "published", "0.4-0.6 at the glottis"),
    "FO2_NASAL_HIGH_FLOW": Evidence("pillai2016", "published"),
    "NASAL_PATENCY_DECAY_PER_BMI_UNIT": Evidence(
        "icsm2021", "project_rule", "direction published; rate calibrated"
    ),
    "FEO2_DEFAULT": Evidence("tanoubi2009", "published"),
}

MODEL_BASIS = tuple(e.describe() for e in MODEL_EVIDENCE)

UNCERTAINTY = (
    "Desaturation times are a model estimate, not a guarantee, and real times vary "
    "widely: act on the saturation, never the clock."
)


class Physiology(NamedTuple):
    """The model's inputs for one woman in one scenario."""

    frc_ml: float
    vo2_ml_per_min: float
    cardiac_output_l_per_min: float
    blood_volume_l: float
    haemoglobin_g_per_l: float
    shunt: float
    p50_mmhg: float
    paco2_mmhg: float
    feo2: float = FEO2_DEFAULT
    pharyngeal_fo2: float = FO2_ROOM_AIR


def minutes_label(minutes: float | None, horizon: float) -> str:
    """'3.7'; '> 20' when the model did not reach the threshold within its horizon; '< 0.1'
    when it is reached at once (never '0', which reads as no time to think about)."""
    if minutes is None:
        return f"> {horizon:g}"
    return "< 0.1" if minutes < 0.1 else f"{minutes:g}"


def saturation(po2_mmhg: float, p50_mmhg: float = SEVERINGHAUS_P50_MMHG) -> float:
    """Severinghaus 1979 saturation (0-1); P50 shifted by scaling the PO2."""
    p = max(po2_mmhg, 0.0) * SEVERINGHAUS_P50_MMHG / p50_mmhg
    return 1.0 / (23400.0 / (p * p * p + 150.0 * p) + 1.0) if p > 0 else 0.0


def predicted_frc_upright_ml(height_cm: float, age_years: float) -> float:
    """Predicted upright FRC for women (ERS 1993 equation, from memory), in mL."""
    return max(800.0, (2.24 * height_cm / 100.0 - 0.001 * age_years - 1.00) * 1000.0)


def nadler_blood_volume_l(height_cm: float, weight_kg: float) -> float:
    """Nadler 1962 blood volume for women (from memory), in litres."""
    a, b, c = NADLER_FEMALE
    return a * (height_cm / 100.0) ** 3 + b * weight_kg + c


def _bmi_above_reference(weight_kg: float, height_cm: float) -> float:
    """kg/m² of BMI above the reference at which lung volume starts to fall."""
    return max(0.0, weight_kg / (height_cm / 100.0) ** 2 - FRC_BMI_REFERENCE)


def _glottic_fo2(nasal_fo2: float, bmi_above_reference: float) -> float:
    """The O2 fraction that reaches the glottis from the pharynx during apnoea: nasal
    O2 falls towards room air as the upper airway closes with obesity."""
    if nasal_fo2 <= FO2_ROOM_AIR:
        return nasal_fo2
    patency = math.exp(-NASAL_PATENCY_DECAY_PER_BMI_UNIT * bmi_above_reference)
    return FO2_ROOM_AIR + (nasal_fo2 - FO2_ROOM_AIR) * patency


def physiology(
    weight_kg: float,
    height_cm: float,
    age_years: float = 30.0,
    pregnant: bool = True,
    in_labour: bool = False,
    haemoglobin_g_per_l: float | None = None,
    feo2: float = FEO2_DEFAULT,
    pharyngeal_fo2: float = FO2_ROOM_AIR,
) -> Physiology:
    """Derive the model's inputs from body size and the state of pregnancy."""
    above = _bmi_above_reference(weight_kg, height_cm)
    frc = predicted_frc_upright_ml(height_cm, age_years) * FRC_SUPINE_ANAESTHETISED_FACTOR
    frc *= math.exp(-FRC_BMI_DECAY_PER_UNIT * above)
    vo2 = VO2_ML_PER_MIN_PER_KG075 * weight_kg**0.75
    q = CARDIAC_OUTPUT_L_PER_MIN * (weight_kg / CARDIAC_OUTPUT_REFERENCE_KG) ** 0.75
    bv = nadler_blood_volume_l(height_cm, weight_kg)
    if pregnant:
        frc *= FRC_PREGNANCY_FACTOR
        vo2 *= VO2_PREGNANCY_FACTOR
        q *= CARDIAC_OUTPUT_PREGNANCY_FACTOR
        bv *= BLOOD_VOLUME_PREGNANCY_FACTOR
    if in_labour:
        vo2 *= VO2_LABOUR_FACTOR
    pharyngeal_fo2 = _glottic_fo2(pharyngeal_fo2, above)
    hb = haemoglobin_g_per_l or (HB_PREGNANT_G_PER_L if pregnant else HB_NON_PREGNANT_G_PER_L)
    return Physiology(
        frc_ml=frc,
        vo2_ml_per_min=vo2,
        cardiac_output_l_per_min=q,
        blood_volume_l=bv,
        haemoglobin_g_per_l=hb,
        shunt=min(SHUNT_MAX, SHUNT_BASE + SHUNT_PER_BMI_UNIT * above),
        p50_mmhg=P50_PREGNANT_MMHG if pregnant else SEVERINGHAUS_P50_MMHG,
        paco2_mmhg=PACO2_PREGNANT_MMHG if pregnant else PACO2_NON_PREGNANT_MMHG,
        feo2=feo2,
        pharyngeal_fo2=pharyngeal_fo2,
    )


class Course(NamedTuple):
    """What the model predicts for one scenario."""

    seconds_to_95: float | None  # None: not reached within the horizon
    seconds_to_90: float | None
    seconds_to_80: float | None
    curve: tuple[tuple[int, float], ...]  # (seconds, SaO2 %)


def _start(p: Physiology, dry: float, hb_cap: float) -> tuple[float, float, float]:
    """Lung O2 and nitrogen (mL) and the blood pool's O2 (mL) at the end of
    pre-oxygenation, in steady state."""
    # Alveolar O2 fraction = end-tidal fraction; the rest of the dry gas is CO2 and nitrogen.
    lung_o2 = p.feo2 * p.frc_ml
    lung_n2 = max(0.0, 1.0 - p.feo2 - p.paco2_mmhg / dry) * p.frc_ml
    pao2 = (dry - p.paco2_mmhg) * lung_o2 / (lung_o2 + lung_n2)
    end_capillary = hb_cap * saturation(pao2, p.p50_mmhg) + O2_SOLUBILITY_ML_PER_L_PER_MMHG * pao2
    # Before apnoea, venous content = arterial content - VO2 / Q; arterial content
    # mixes end-capillary and shunted venous blood, so find the fixed point.
    drawn = (p.vo2_ml_per_min / 60.0) / (p.cardiac_output_l_per_min / 60.0)
    venous = 0.0
    for _ in range(30):
        arterial = (1 - p.shunt) * end_capillary + p.shunt * venous
        last, venous = venous, max(0.0, arterial - drawn)
        if venous == last:
            break
    return lung_o2, lung_n2, venous * p.blood_volume_l


def simulate(p: Physiology, horizon_min: float = HORIZON_MIN, curve: bool = True) -> Course:
    """Integrate apnoea from the end of pre-oxygenation.

    Each step: alveolar PO2 from the lung's gas, end-capillary saturation from
    :func:`saturation`, arterial saturation mixing in shunted venous blood; the
    blood takes up O2 from the lung and the body uses it; the lung shrinks by the
    uptake and draws in the same volume of pharyngeal gas. ``curve=False`` skips
    recording the SpO2 curve; the times are the same either way.
    """
    dry = BAROMETRIC_MMHG - WATER_VAPOUR_MMHG
    hb_cap = HUFNER_ML_PER_G * p.haemoglobin_g_per_l  # mL O2 per L at full saturation
    flow = p.cardiac_output_l_per_min / 60.0 * (1 - p.shunt)  # non-shunted, L/s
    vo2 = p.vo2_ml_per_min / 60.0  # mL/s
    shunt, p50, inspired = p.shunt, p.p50_mmhg, p.pharyngeal_fo2
    lung_o2, lung_n2, pool = _start(p, dry, hb_cap)
    times: dict[float, float] = {}  # threshold -> seconds at which SaO2 fell below it
    ahead = [0.95, 0.90, 0.80]  # thresholds not yet crossed, highest first
    points: list[tuple[int, float]] = []
    t, next_point, end = 0.0, 0.0, horizon_min * 60.0
    # Bounds are written as comparisons rather than min() and max(): a plan runs about a
    # thousand steps, and those calls cost more than the arithmetic of a step.
    while t <= end:
        rise = PACO2_RISE_MMHG_PER_MIN * (t / 60.0 - 1.0)  # CO2 rises after the first minute
        paco2 = p.paco2_mmhg + (rise if rise > 0.0 else 0.0)
        lung = lung_o2 + lung_n2
        pao2 = (dry - paco2) * lung_o2 / lung if lung > 0 else 0.0
        pao2 = pao2 if pao2 > 0.0 else 0.0
        end_capillary_sat = saturation(pao2, p50)
        end_capillary = hb_cap * end_capillary_sat + O2_SOLUBILITY_ML_PER_L_PER_MMHG * pao2
        venous = pool / p.blood_volume_l
        venous_sat = venous / hb_cap if venous < hb_cap else 1.0
        sao2 = (1 - shunt) * end_capillary_sat + shunt * venous_sat
        if curve and t >= next_point:
            points.append((int(t), round(100 * sao2, 1)))
            next_point += CURVE_EVERY_S
        while ahead and sao2 < ahead[0]:  # a fall past a lower one passes the higher too
            times[ahead.pop(0)] = t
        if not ahead:
            break
        # Long steps while saturation is high and changes slowly, short near the thresholds.
        dt = STEP_LONG_S if sao2 > STEP_LONG_ABOVE else STEP_S
        offered = flow * (end_capillary - venous) * dt  # mL the blood could take this step
        uptake = 0.0 if offered <= 0.0 else offered if offered < lung_o2 else lung_o2
        lung_o2 += (inspired - 1.0) * uptake
        lung_n2 += (1.0 - inspired) * uptake
        pool += uptake - vo2 * dt
        pool = pool if pool > 0.0 else 0.0
        t += dt
    return Course(
        seconds_to_95=times.get(0.95),
        seconds_to_90=times.get(0.90),
        seconds_to_80=times.get(0.80),
        curve=tuple(points),
    )


class Scenario(NamedTuple):
    id: str
    label: str
    end_tidal_o2: float
    apnoeic_o2_fraction: float
    minutes_to_spo2_90: float | None
    minutes_to_spo2_80: float | None


class Oxygenation(NamedTuple):
    """The plan's oxygenation section."""

    minutes_to_spo2_90: float | None  # as assessed; None = more than the horizon
    minutes_to_spo2_80: float | None
    horizon_minutes: float
    short: bool  # predicted time under SHORT_MINUTES: plan for it
    scenarios: tuple[Scenario, ...]
    curve: tuple[tuple[int, float], ...]  # as assessed: (seconds, SaO2 %)
    inputs: dict[str, float]
    assumptions: tuple[str, ...]
    uncertainty: str
    basis: tuple[str, ...]


SHORT_MINUTES = 3.0  # project rule: below this, plan high-flow nasal O2 and fewer attempts
SHORT_EVIDENCE = Evidence("project", "project_rule", "3 min threshold for a short apnoea time")


def _minutes(seconds: float | None) -> float | None:
    return None if seconds is None else round(seconds / 60.0, 1)


_HB_ASSUMED = f"haemoglobin not given: {HB_PREGNANT_G_PER_L:g} g/L assumed"
_POOR_LABEL = f"poor pre-oxygenation (end-tidal O2 {FEO2_POOR:g})"
_NASAL_LABELS = (
    "plus low-flow nasal O2 through apnoea",
    "plus high-flow nasal O2 through apnoea",
)


def _scenario(cid: str, label: str, feo2: float, fo2: float, course: Course) -> Scenario:
    return Scenario(
        id=cid,
        label=label,
        end_tidal_o2=feo2,
        apnoeic_o2_fraction=fo2,
        minutes_to_spo2_90=_minutes(course.seconds_to_90),
        minutes_to_spo2_80=_minutes(course.seconds_to_80),
    )


def oxygenation_for(assessment: Assessment, feo2: float = FEO2_DEFAULT) -> Oxygenation:
    """All scenarios for one assessment."""
    pt = assessment.patient
    assumptions = []
    height = pt.height_cm
    if height is None:
        height = ASSUMED_HEIGHT_CM
        assumptions.append(f"height not measured: {ASSUMED_HEIGHT_CM:g} cm assumed (cautious)")
    if pt.age_years is None:
        assumptions.append("age not given: 30 years assumed")
    if pt.haemoglobin_g_per_l is None:
        assumptions.append(_HB_ASSUMED)
    if pt.in_labour is None:
        assumptions.append("labour status not given: not in labour assumed")
    assumptions.append("supine, airway open to room air during apnoea unless nasal O2 is on")
    assumptions.append(
        "pre-eclampsia is not modelled (a published simulation found it "
        "slowed desaturation; the estimate is not lengthened for it)"
    )
    weight = pt.weight_kg
    base = physiology(
        weight,
        height,
        float(pt.age_years or 30),
        True,
        bool(pt.in_labour),
        pt.haemoglobin_g_per_l,
        feo2,
    )
    above = _bmi_above_reference(weight, height)
    # Nasal O2 changes only the gas drawn in during apnoea, not the start.
    low = _glottic_fo2(FO2_NASAL_LOW_FLOW, above)
    high = _glottic_fo2(FO2_NASAL_HIGH_FLOW, above)
    assessed = simulate(base)
    poor = simulate(base._replace(feo2=FEO2_POOR), curve=False)
    low_flow = simulate(base._replace(pharyngeal_fo2=low), curve=False)
    high_flow = simulate(base._replace(pharyngeal_fo2=high), curve=False)
    room = base.pharyngeal_fo2
    scenarios = (
        _scenario("as_assessed", f"pre-oxygenated to end-tidal O2 {feo2:g}", feo2, room, assessed),
        _scenario("poor_preoxygenation", _POOR_LABEL, FEO2_POOR, room, poor),
        _scenario("nasal_low_flow", _NASAL_LABELS[0], feo2, low, low_flow),
        _scenario("nasal_high_flow", _NASAL_LABELS[1], feo2, high, high_flow),
    )
    curve = assessed.curve
    t90, t80 = scenarios[0].minutes_to_spo2_90, scenarios[0].minutes_to_spo2_80  # as assessed
    return Oxygenation(
        minutes_to_spo2_90=t90,
        minutes_to_spo2_80=t80,
        horizon_minutes=HORIZON_MIN,
        short=t90 is not None and t90 < SHORT_MINUTES,
        scenarios=scenarios,
        curve=curve,
        inputs={
            "frc_ml": float(round(base.frc_ml)),
            "vo2_ml_per_min": float(round(base.vo2_ml_per_min)),
            "cardiac_output_l_per_min": round(base.cardiac_output_l_per_min, 1),
            "blood_volume_l": round(base.blood_volume_l, 2),
            "haemoglobin_g_per_l": base.haemoglobin_g_per_l,
            "shunt": round(base.shunt, 3),
            "p50_mmhg": base.p50_mmhg,
        },
        assumptions=tuple(assumptions),
        uncertainty=UNCERTAINTY,
        basis=MODEL_BASIS,
    )
