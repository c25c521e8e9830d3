"""The plan on a terminal, 80 columns.

Two views of the same plan: the full one (clinic, notes) and the compact one
(``airway quick``: one screen at a category-1 caesarean section). Both show
every present factor's contribution, what was not assessed, the doses, the
pre-made decision and the cautions.
"""

from __future__ import annotations

import math
import textwrap

from ..engine.body import BODY_FORMULA_WARNING, HEIGHT_ASSUMED_TEXT
from ..engine.decision import DECISION_TITLE, at_a_glance, by_category_text
from ..engine.doses import SCALAR_LABEL, SCALAR_SHORT, Dose, dose_text, mg_text, span
from ..engine.oxygenation import Oxygenation, minutes_label
from ..engine.plan_model import Plan
from ..engine.scoring import FactorResult, Risk, level_heading, thresholds_text
from ..sources import source_label

WIDTH = 80

_KIND = {
    "relative_risk": "RR",
    "likelihood_ratio": "LR+",
    "odds_ratio_per_unit": "OR/unit",
    "project_ratio": "assumed ratio",
}


def _wrap(text: str, indent: str = "  ", first: str | None = None) -> list[str]:
    return textwrap.wrap(
        text,
        WIDTH,
        initial_indent=first if first is not None else indent,
        subsequent_indent=indent,
        break_on_hyphens=False,
    ) or [indent.rstrip()]


def _heading(title: str) -> list[str]:
    return ["", title.upper(), "-" * len(title)]


def weight_text(f: FactorResult) -> str:
    """How a factor's weight reads: 'RR 7.58', 'OR/unit 1.06', 'LR- 0.63' for a normal
    finding, 'forces airway level 4'."""
    if f.role == "override":
        return "forces airway level 4"
    if f.role == "preparation" or f.weight is None:
        return "preparation"
    if f.present is False:
        return f"LR- {math.exp(f.raw):.2f}"
    if f.kind == "relative_risk" and f.id.startswith("mallampati_"):
        # Centred on the average at term: the published ratio, and what it counts as.
        return f"{_KIND[f.kind]} {f.weight:g} vs class 1, {math.exp(f.raw):.2f} vs average"
    return f"{_KIND[f.kind]} {f.weight:g}"


def shown_factors(r: Risk) -> list[FactorResult]:
    """The findings a plan lists under its level: what forced it, what raised it, the
    normal findings that lowered it, then abnormal findings outweighed in their anatomy."""
    forcing = [f for f in r.factors if f.role == "override" and f.present]
    counted = sorted(
        (f for f in r.factors if f.counted and f.contribution != 0),
        key=lambda f: -f.contribution,
    )
    outweighed = [f for f in r.factors if f.role == "difficulty" and f.present and not f.counted]
    return forcing + counted + outweighed


def finding_label(f: FactorResult) -> str:
    """The factor's label, or for a normal finding what was found normal."""
    return f.label if f.present is not False else f"{_NORMAL.get(f.id, f.label + ': no')}"


_NORMAL = {
    "thyromental_short": "Thyromental distance 6 cm or more",
    "sternomental_short": "Sternomental distance 12.5 cm or more",
    "mouth_opening_small": "Inter-incisor gap 4 cm or more",
    "neck_movement_reduced": "Neck movement normal",
    "jaw_protrusion_limited": "Jaw protrusion normal",
    "snoring": "No history of snoring",
}


def adds_text(f: FactorResult) -> str:
    """'+0.97', '-0.46', 'rule', or '0 (outweighed)' for a finding its anatomy's stronger
    finding speaks for."""
    if f.role == "override":
        return "rule"
    if not f.counted:
        return "0"
    return f"{f.contribution:+.2f}"


OUTWEIGHED_NOTE = "Adds 0: a stronger finding of the same anatomy counts for it."


def range_text(r: Risk) -> str:
    """How far the findings not assessed could move the level; '' when they cannot."""
    low, high = r.unassessed_range
    if low == high == r.level:
        return ""
    return f"Findings not assessed could make it level {low} (all normal) to {high} (all abnormal)."


def assumed_lines(plan: Plan) -> list[str]:
    """What the plan assumed in place of a finding that changes doses or the level: shown
    at the top of every format."""
    return [HEIGHT_ASSUMED_TEXT] if plan.body.height_assumed else []


def per_kg_text(d: Dose) -> str:
    """'1-1.5 mg/kg x total body weight 95 kg'."""
    per = span(d.mg_per_kg_low, d.mg_per_kg_high)
    return f"{per} mg/kg x {SCALAR_LABEL[d.scalar]} {d.scalar_weight_kg:g} kg"


def _header(plan: Plan) -> list[str]:
    g = plan.generated_by
    label = plan.assessment.label
    who = plan.assessment.identity
    ids = [v for v in (who.name, who.record_number, who.date_of_birth) if v]
    lines = [
        f"AIRWAY PLAN{' - ' + label if label else ''}",
        *([" / ".join(ids)] if ids else []),
        f"{g.tool} {g.version}, rules {g.rules_version}, input {plan.input_sha256[:12]}",
    ]
    for caution in plan.cautions[:2]:
        lines += _wrap(caution, "  ", "! ")
    for text in assumed_lines(plan):
        lines += _wrap(text, "  ", "! ")
    return lines


def _factor_lines(f: FactorResult, detail: bool) -> list[str]:
    label = finding_label(f)
    name = f"{label} ({f.detail})" if detail and f.detail else label
    src = f"{weight_text(f)}, {source_label(f.source, f.basis, short=True)}"
    return _wrap(f"{name}; {src}", " " * 9, f"  {adds_text(f):>5}  ")


def _risk(plan: Plan) -> list[str]:
    r = plan.risk
    lines = _heading(level_heading(r.level))
    lines += _wrap(f"index {r.index:.2f} ({thresholds_text(r.thresholds)})")
    if r.overrides:
        lines += _wrap("forced to airway level 4 by: " + ", ".join(r.overrides))
    if r.floors:
        lines += _wrap("raised to airway level 3 at least by: " + ", ".join(r.floors))
    shown = shown_factors(r)
    if not shown:
        lines.append("  nothing assessed that moves the index")
    for f in shown:
        lines += _factor_lines(f, detail=True)
    if any(not f.counted and f.role == "difficulty" for f in shown):
        lines += _wrap(OUTWEIGHED_NOTE)
    if any(f.kind == "project_ratio" and f.present for f in r.factors):
        lines += _wrap("An assumed ratio has no published figure behind it: a project rule.")
    lines += _wrap(r.note)
    return lines


# The one-screen plan names this many findings not assessed, then counts the rest.
COMPACT_NOT_ASSESSED = 5


def _not_assessed(plan: Plan, most: int | None = None) -> list[str]:
    names = plan.not_assessed
    if not names:
        return []
    text = ", ".join(names[:most])
    if most is not None and len(names) > most:
        text += f" and {len(names) - most} more"
    low, high = plan.risk.unassessed_range
    moves = f" (they could make it level {low}-{high})" if low != high else ""
    return _wrap(f"Not assessed{moves}: {text}.", "  ", "  ")


def _bullets(title: str, entries: tuple[str, ...]) -> list[str]:
    """A heading and one wrapped bullet per entry; nothing when there are none."""
    if not entries:
        return []
    lines = _heading(title)
    for entry in entries:
        lines += _wrap(entry, "    ", "  - ")
    return lines


def _body(plan: Plan) -> list[str]:
    b = plan.body
    lines = _heading("Body size")
    if b.bmi is None:
        lines.append(f"  weight {b.weight_kg:g} kg; height not given")
        return lines
    lines.append(
        f"  weight {b.weight_kg:g} kg, height {b.height_cm:g} cm, BMI {b.bmi:.1f} ({b.bmi_class})"
    )
    lines.append(
        f"  ideal {b.ideal_weight_kg:.1f} kg, lean {b.lean_weight_kg:.1f} kg, "
        f"adjusted {b.adjusted_weight_kg:.1f} kg"
    )
    if b.booking_bmi is not None:
        lines.append(f"  booking BMI {b.booking_bmi:.1f}")
    lines += _wrap("Basis: " + "; ".join(b.basis))
    return lines


def minutes_text(minutes: float | None, horizon: float) -> str:
    """'4.9 min' or '> 20 min' when the model did not reach the threshold."""
    return f"{minutes_label(minutes, horizon)} min"


def oxygenation_lines(oxy: Oxygenation) -> list[str]:
    """The scenarios side by side, with the model's inputs and its uncertainty."""
    h = oxy.horizon_minutes
    lines = _heading("Oxygenation during apnoea (model estimate)")
    lines.append(f"  {'scenario':<42} {'to SpO2 90%':>12} {'to SpO2 80%':>12}")
    for s in oxy.scenarios:
        lines.append(
            f"  {s.label[:42]:<42} {minutes_text(s.minutes_to_spo2_90, h):>12} "
            f"{minutes_text(s.minutes_to_spo2_80, h):>12}"
        )
    i = oxy.inputs
    lines += _wrap(
        f"Inputs: FRC {i['frc_ml']:g} mL, O2 use {i['vo2_ml_per_min']:g} mL/min, cardiac output "
        f"{i['cardiac_output_l_per_min']:g} L/min, blood volume {i['blood_volume_l']:g} L, "
        f"Hb {i['haemoglobin_g_per_l']:g} g/L, shunt {100 * i['shunt']:.1f}%, "
        f"P50 {i['p50_mmhg']:g} mmHg."
    )
    for a in oxy.assumptions:
        lines += _wrap(a, "    ", "  - ")
    lines += _wrap(oxy.uncertainty)
    lines += _wrap("Basis: " + "; ".join(oxy.basis))
    return lines


def _equipment(plan: Plan) -> list[str]:
    e = plan.equipment
    t = e.tracheal_tube_mm
    lines = _heading("Equipment")
    lines += _wrap(
        f"tubes {t.first:.1f} / {t.backup:.1f} / {t.smallest:.1f} mm (first / "
        f"backup / smallest: {t.reason})"
    )
    lines += _wrap(
        f"supraglottic size {e.supraglottic_size:g}; front-of-neck tube "
        f"{e.front_of_neck_tube_mm:.1f} mm; first: {e.first_laryngoscope}"
    )
    for item in e.items:
        box = "[ ]"
        lines += _wrap(
            f"{item.name}: {item.detail} ({item.why}){'' if item.open_now else ' - in the room'}",
            "      ",
            f"  {box} ",
        )
    lines += _wrap("Tube sizes: " + t.evidence)
    lines += _wrap("Supraglottic size: " + e.supraglottic_basis)
    return lines


def _doses(plan: Plan) -> list[str]:
    lines = _heading("Doses (calculation aid: check and titrate)")
    for d in plan.doses:
        lines.append(f"  {d.label:<32} {dose_text(d)}")
        lines += _wrap(per_kg_text(d), "      ", "      ")
        for alt in d.alternatives:
            lines += _wrap(
                f"alternative: {SCALAR_LABEL[alt.scalar]} {alt.weight_kg:g} kg "
                f"gives {alt.dose_mg_low:g}-{alt.dose_mg_high:g} mg",
                "      ",
            )
        for text in (d.rule, d.note):
            if text:
                lines += _wrap(text, "      ")
        lines += _wrap("Basis: " + d.basis, "      ")
    return lines


def _decision(plan: Plan) -> list[str]:
    d = plan.decision
    lines = _heading(DECISION_TITLE)
    lines += _wrap(f"Pre-made decision: {d.headline}")
    if d.rule:
        lines += _wrap(d.rule)
    for f in d.factors:
        sign = f"{f.points:+d}" if f.points_to != "unknown" else " ?"
        derived = " (derived)" if f.derived else ""
        lines += _wrap(f"{sign:>3} {f.points_to:<8} {f.name}: {f.finding}{derived}", " " * 15, "  ")
    if d.if_category:
        lines += _wrap(by_category_text(d.if_category))
    lines.append("  Final decision, ticked before induction:  [ ] wake   [ ] proceed")
    for c in d.conditions:
        lines += _wrap(c, "    ", "  - ")
    lines += _wrap("Basis: " + "; ".join(d.basis))
    return lines


def _steps(plan: Plan) -> list[str]:
    lines = _heading("Sequence")
    phase = None
    for n, s in enumerate(plan.steps, 1):
        if s.phase != phase:
            lines.append(f"  {s.phase.upper()}")
            phase = s.phase
        lines.append(f"  {n:>2}. {s.title}")
        for a in s.actions:
            lines += _wrap(a, "        ", "      - ")
        if s.basis:
            lines += _wrap("Basis: " + s.basis, "        ")
    return lines


def _checklists(plan: Plan) -> list[str]:
    lines: list[str] = []
    for checklist in plan.checklists:
        lines += _heading(checklist.title)
        for section in checklist.sections:
            lines.append(f"  {section.title}")
            for item in section.items:
                lines += _wrap(item.text, "        ", "  [ ] " if item.checkbox else "    - ")
    return lines


# Shown elsewhere on the one screen (doses) or not needed in the moment.
_COMPACT_SKIP = ("antacid", "drugs", "after")


def _compact(plan: Plan) -> list[str]:
    """One screen: everything needed at a category-1 section, nothing more."""
    r, e, d = plan.risk, plan.equipment, plan.decision
    t = e.tracheal_tube_mm
    lines = [
        level_heading(r.level).upper(),
        f"  index {r.index:.2f} (ranks risk; not a probability)",
    ]
    if r.overrides:
        forcing = [f for f in r.factors if f.present and f.role == "override"]
        lines += _wrap(
            "forced to airway level 4 by: " + "; ".join(f"{f.label}: {f.prepares}" for f in forcing)
        )
    if r.floors:
        lines += _wrap("raised to airway level 3 at least by: " + ", ".join(r.floors))
    present = [f for f in shown_factors(r) if f.role == "difficulty"]
    for f in present:
        lines += _factor_lines(f, detail=False)
    if not present and not r.overrides:
        lines.append("  nothing assessed that moves the index")
    prep = [f.label for f in r.factors if f.present and f.prepares and f.role != "override"]
    if prep:
        lines += _wrap("prepare for: " + "; ".join(prep) + " (see full plan)")
    lines += _not_assessed(plan, most=COMPACT_NOT_ASSESSED)
    lines += _wrap(
        f"TUBES {t.first:.1f} / {t.backup:.1f} / {t.smallest:.1f} mm   SUPRAGLOTTIC size "
        f"{e.supraglottic_size:g}   FRONT-OF-NECK {e.front_of_neck_tube_mm:.1f} mm",
        "  ",
        "",
    )
    lines += _wrap(f"first: {e.first_laryngoscope}")
    oxy = plan.oxygenation
    best = oxy.scenarios[-1]
    lines += _wrap(
        f"APNOEA: SpO2 90% in {minutes_text(oxy.minutes_to_spo2_90, oxy.horizon_minutes)} "
        "(model, not a guarantee); with high-flow nasal O2 "
        f"{minutes_text(best.minutes_to_spo2_90, oxy.horizon_minutes)}"
    )
    lines.append("DOSES (calculation aid: check and titrate)")
    for dose in plan.doses:
        name = _drug_name(dose).capitalize()
        scale = f"{SCALAR_SHORT[dose.scalar]} {round(dose.scalar_weight_kg, 1):g} kg"
        lines.append(f"  {name:<14} {dose_text(dose):<33} {scale}")
    lines.append(DECISION_TITLE.upper())
    lines += _wrap(f"Pre-made decision: {d.headline}" + (f" ({d.rule})" if d.rule else ""))
    for direction in ("proceed", "wake", "neither", "unknown"):
        names = [
            f"{f.name.split(' (')[0].lower()} {f.points:+d}"
            if direction != "unknown"
            else f.name.split(" (")[0].lower()
            for f in d.factors
            if f.points_to == direction
        ]
        if names:
            lines += _wrap(f"{direction}: " + ", ".join(names), "    ", "  ")
    if d.if_category:
        lines += _wrap(by_category_text(d.if_category))
    lines.append("  Final decision, ticked before induction:  [ ] wake   [ ] proceed")
    lines.append("SEQUENCE")
    shown = [s for s in plan.steps if s.id not in _COMPACT_SKIP]
    for n, step in enumerate(shown, 1):
        lines += _wrap(step.summary, "      ", f"  {n:>2}. ")
    for w in plan.warnings:
        if w not in (BODY_FORMULA_WARNING, HEIGHT_ASSUMED_TEXT):  # the latter is at the top
            lines += _wrap(w, "  ", "! ")
    lines += _wrap(plan.cautions[2], "  ", "! ")
    return lines + _in_short(plan)


def _in_short(plan: Plan) -> list[str]:
    """The numbers of the first seconds again, last: on a 24-line terminal the top of
    the one-screen plan has scrolled away by the time the prompt returns."""
    r, e, d, oxy = plan.risk, plan.equipment, plan.decision, plan.oxygenation
    t = e.tracheal_tube_mm
    by_role: dict[str, list[str]] = {}
    for dose in plan.doses:
        by_role.setdefault(dose.role, []).append(f"{_drug_name(dose)} {mg_text(dose)}")
    drugs = [" or ".join(names) for names in by_role.values()]
    # For a clinic plan, 'by urgency category 1 or 2: proceed; ...' after the colon.
    decision = at_a_glance(d.recommendation, d.if_category).replace("if urgency", "by urgency", 1)
    lines = _wrap(
        f"IN SHORT: {level_heading(r.level).lower()}; SpO2 90% in "
        f"{minutes_text(oxy.minutes_to_spo2_90, oxy.horizon_minutes)} (model)"
        + ("; HEIGHT ASSUMED 150 cm: measure it" if plan.body.height_assumed else ""),
        "  ",
        "",
    )
    for text in (
        f"tubes {t.first:.1f} / {t.backup:.1f} / {t.smallest:.1f} mm; supraglottic size "
        f"{e.supraglottic_size:g}; front-of-neck {e.front_of_neck_tube_mm:.1f} mm",
        drugs[0],  # induction
        "; ".join(drugs[1:]),  # neuromuscular block; its reversal
        f"failed intubation: {decision}",
    ):
        lines += _wrap(text)
    return lines


def _drug_name(dose: Dose) -> str:
    """'sugammadex' for 'Sugammadex (immediate reversal)'."""
    return dose.label.split(" (")[0].lower()


def _since(plan: Plan, most: int | None = None) -> list[str]:
    """The 'changed since' box, when the plan was made with --since."""
    c = plan.changes_since
    if c is None:
        return []
    from .comparison import change_lines, since_title

    lines = ["", "+" + "-" * 78, f"| {since_title(c).upper()}"]
    for line in change_lines(c, most):
        lines += _wrap(line, "|     ", "| ")
    return [*lines, "+" + "-" * 78]


def render_text(plan: Plan, compact: bool = False) -> str:
    """The plan as plain text at 80 columns; ``compact`` for one screen."""
    if compact:
        g = plan.generated_by
        lines = [
            f"AIRWAY PLAN (one screen)  {g.tool} {g.version}, rules {g.rules_version}, "
            f"input {plan.input_sha256[:8]}"
        ]
        lines += _wrap(" ".join(plan.cautions[:2]), "  ", "! ")
        for text in assumed_lines(plan):
            lines += _wrap(text, "  ", "! ")
        lines += _since(plan, most=6)
        lines += _compact(plan)
    else:
        lines = _header(plan) + _since(plan)
        lines += (
            _risk(plan)
            + _not_assessed(plan)
            + _bullets("Extra preparation for her findings", plan.preparation)
            + _body(plan)
            + oxygenation_lines(plan.oxygenation)
            + _equipment(plan)
            + _doses(plan)
            + _decision(plan)
            + _steps(plan)
            + _checklists(plan)
            + _bullets("Warnings: check these before relying on the plan", plan.warnings)
            + _bullets("Cautions", plan.cautions)
        )
    return "\n".join(line.rstrip() for line in lines) + "\n"
