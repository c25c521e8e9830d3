"""The plan as Markdown, for pasting into an electronic record."""

from __future__ import annotations

from ..engine.decision import DECISION_TITLE, by_category_text
from ..engine.doses import SCALAR_LABEL, dose_text
from ..engine.plan_model import Plan
from ..engine.scoring import level_heading, thresholds_text
from .text import (
    OUTWEIGHED_NOTE,
    adds_text,
    assumed_lines,
    finding_label,
    minutes_text,
    per_kg_text,
    range_text,
    shown_factors,
    weight_text,
)


def _esc(text: str) -> str:
    """Escape characters that would change Markdown structure in table cells."""
    return text.replace("\\", "\\\\").replace("|", "\\|").replace("<", "&lt;")


# What a name or label typed by the clinic must not become: emphasis, a link, code,
# struck-out text, an entity, a table cell, the end of a heading. Each is shown as typed.
_INLINE = {c: "\\" + c for c in "`*_[]~|#"}


def _typed(text: str) -> str:
    """Text typed by the clinic (her identifiers, the label), shown exactly as typed."""
    plain = text.replace("\\", "\\\\").replace("&", "&amp;").replace("<", "&lt;")
    return "".join(_INLINE.get(c, c) for c in plain)


def render_markdown(plan: Plan) -> str:
    """The full plan as GitHub-flavoured Markdown."""
    r, b, e, d = plan.risk, plan.body, plan.equipment, plan.decision
    g = plan.generated_by
    t = e.tracheal_tube_mm
    out: list[str] = []
    add = out.append
    label = plan.assessment.label
    title = "# Airway plan" + (f": {_typed(label)}" if label else "")
    add(title)
    add("")
    who = plan.assessment.identity
    ids = [
        f"{k}: {_typed(v)}"
        for k, v in (("Name", who.name), ("Record", who.record_number), ("Born", who.date_of_birth))
        if v
    ]
    if ids:
        add(" · ".join(ids))
        add("")
    for c in [*plan.cautions[:2], *assumed_lines(plan)]:
        add(f"> {c}")
        add(">")
    out.pop()
    add("")
    if plan.changes_since is not None:
        from .comparison import change_lines, since_title

        add(f"> **{since_title(plan.changes_since)}**")
        add(">")
        for line in change_lines(plan.changes_since):
            mark, text = line[0], line[2:]  # '!' more dangerous, '-' otherwise
            add(f"> - {'**!** ' if mark == '!' else ''}{_esc(text)}")
        add("")
    add(f"## {level_heading(r.level)}")
    add("")
    add(f"Index **{r.index:.2f}** ({thresholds_text(r.thresholds)}). " + r.note)
    if r.overrides:
        add("")
        add("Forced to airway level 4 by: " + ", ".join(r.overrides) + ".")
    if r.floors:
        add("")
        add("Raised to airway level 3 at least by: " + ", ".join(r.floors) + ".")
    if range_text(r):
        add("")
        add(range_text(r))
    add("")
    add("| Factor | Finding | Weight | Adds | Source |")
    add("|---|---|---|---:|---|")
    shown = shown_factors(r)
    for f in shown:
        finding = f.detail or ("present" if f.present else "normal")
        add(
            f"| {_esc(finding_label(f))} | {_esc(finding)} | {weight_text(f)} | "
            f"{adds_text(f)} | {_esc(f.evidence)} |"
        )
    if any(not f.counted and f.role == "difficulty" for f in shown):
        add("")
        add(OUTWEIGHED_NOTE)
    if plan.not_assessed:
        add("")
        add("**Not assessed:** " + ", ".join(plan.not_assessed) + ".")
    if plan.preparation:
        add("")
        add("### Extra preparation for her findings")
        add("")
        for p in plan.preparation:
            add(f"- {_esc(p)}")
    add("")
    add("## Body size")
    add("")
    if b.bmi is None:
        add(f"Weight {b.weight_kg:g} kg; height not given.")
    else:
        add(
            f"Weight {b.weight_kg:g} kg, height {b.height_cm:g} cm, BMI {b.bmi:.1f} "
            f"({b.bmi_class}); ideal {b.ideal_weight_kg:.1f} kg, lean {b.lean_weight_kg:.1f} kg, "
            f"adjusted {b.adjusted_weight_kg:.1f} kg."
        )
    add("")
    add("Basis: " + "; ".join(b.basis) + ".")
    add("")
    oxy = plan.oxygenation
    h = oxy.horizon_minutes
    add("## Oxygenation during apnoea (model estimate)")
    add("")
    add("| Scenario | To SpO2 90% | To SpO2 80% |")
    add("|---|---:|---:|")
    for sc in oxy.scenarios:
        add(
            f"| {sc.label} | {minutes_text(sc.minutes_to_spo2_90, h)} | "
            f"{minutes_text(sc.minutes_to_spo2_80, h)} |"
        )
    add("")
    add(oxy.uncertainty + " Assumed: " + "; ".join(oxy.assumptions) + ".")
    add("")
    add("Basis: " + "; ".join(oxy.basis) + ".")
    add("")
    add("## Equipment")
    add("")
    add(
        f"Tubes **{t.first:.1f} / {t.backup:.1f} / {t.smallest:.1f} mm** (first / backup / "
        f"smallest: {t.reason}); supraglottic **size {e.supraglottic_size:g}**; front-of-neck "
        f"tube **{e.front_of_neck_tube_mm:.1f} mm**; first device: {e.first_laryngoscope}."
    )
    add("")
    for item in e.items:
        where = "open" if item.open_now else "in the room"
        add(f"- [ ] **{item.name}** ({where}): {_esc(item.detail)}. {_esc(item.why)}.")
    add("")
    add(f"Basis: tube sizes: {t.evidence}; supraglottic size: {e.supraglottic_basis}.")
    add("")
    add("## Doses (calculation aid: check and titrate)")
    add("")
    add("| Drug | Dose | Dosed on | Notes |")
    add("|---|---|---|---|")
    for dose in plan.doses:
        notes = f"{dose.rule} {dose.note}".strip()
        for alt in dose.alternatives:
            notes += (
                f" Alternative: {SCALAR_LABEL[alt.scalar]} {alt.weight_kg:g} kg gives "
                f"{alt.dose_mg_low:g}-{alt.dose_mg_high:g} mg."
            )
        add(f"| {dose.label} | {dose_text(dose)} | {per_kg_text(dose)} | {_esc(notes.strip())} |")
    add("")
    add("Basis: " + " ".join(f"{dose.label}: {dose.basis}." for dose in plan.doses))
    add("")
    add(f"## {DECISION_TITLE}")
    add("")
    add(f"Pre-made decision: **{d.headline}**." + (f" {d.rule}" if d.rule else ""))
    add("")
    add("| Factor | Finding | Points | Points to |")
    add("|---|---|---:|---|")
    for df in d.factors:
        pts = "?" if df.points_to == "unknown" else f"{df.points:+d}"
        add(
            f"| {df.name} | {_esc(df.finding)}{' (derived)' if df.derived else ''} | {pts} | "
            f"{df.points_to} |"
        )
    if d.if_category:
        add("")
        add(by_category_text(d.if_category).capitalize() + ".")
    add("")
    add("Final decision, ticked before induction: \\[ \\] wake \\[ \\] proceed")
    add("")
    for c in d.conditions:
        add(f"- {c}")
    add("")
    add("Basis: " + "; ".join(d.basis) + ".")
    add("")
    add("## Sequence")
    phase = None
    for n, s in enumerate(plan.steps, 1):
        if s.phase != phase:
            add("")
            add(f"### {s.phase.capitalize()}")
            phase = s.phase
        add("")
        add(f"{n}. **{s.title}**")
        for a in s.actions:
            add(f"   - {_esc(a)}")
        if s.basis:
            add(f"   - *Basis: {s.basis}*")
    for checklist in plan.checklists:
        add("")
        add(f"## {_esc(checklist.title)}")
        for section in checklist.sections:
            add("")
            add(f"### {_esc(section.title)}")
            add("")
            for entry in section.items:
                add(f"- {'[ ] ' if entry.checkbox else ''}{_esc(entry.text)}")
    if plan.warnings:
        add("")
        add("## Warnings: check these before relying on the plan")
        add("")
        for w in plan.warnings:
            add(f"- {_esc(w)}")
    add("")
    add("## Cautions")
    add("")
    for c in plan.cautions:
        add(f"- {c}")
    add("")
    add(f"*{g.tool} {g.version}, rules {g.rules_version}, input sha256 {plan.input_sha256}*")
    return "\n".join(out) + "\n"
