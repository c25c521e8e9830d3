"""The parts of the printed plan: the key block, the basis, equipment, oxygenation,
the decision, doses, the sequence and the checklists, each a list of flowables
that :mod:`.plan` lays out on the page."""

from reportlab.lib import colors
from reportlab.lib.styles import ParagraphStyle
from reportlab.platypus import (
    Paragraph,
    Spacer,
    Table,
    TableStyle,
)

from ...engine.decision import DECISION_TITLE, SHORT, by_category_text
from ...engine.doses import SCALAR_LABEL, Dose
from ...engine.plan_model import Plan, RenderedChecklist
from ...engine.scoring import level_heading
from ...sources import source_label
from ..text import (
    adds_text,
    assumed_lines,
    finding_label,
    minutes_text,
    shown_factors,
    weight_text,
)
from .fonts import font
from .kit import (
    ACCENT,
    INK,
    WARN,
    Sketch,
    grid,
    para,
)
from .markup import escape

CURVE_TITLE = "SpO2 % by minutes of apnoea, as assessed (model estimate)"


def _bar(value: float, largest: float, width: float) -> Sketch:
    """One horizontal bar: a factor's contribution, scaled to the largest one."""
    d = Sketch(width, 8)
    length = 0.0 if largest <= 0 else (width - 2) * value / largest
    if length > 0:
        d.box(0, 1.5, length, 6, ACCENT)
    return d


def _curve(plan: Plan, width: float) -> Sketch:
    """SpO2 against minutes of apnoea, as assessed, with the 90% line."""
    oxy = plan.oxygenation
    height = 54.0
    d = Sketch(width, height)
    x0, y0, w, h = 30.0, 14.0, width - 40.0, height - 26.0
    points = [(t / 60.0, s) for t, s in oxy.curve] or [(0.0, 100.0)]
    x_max = max(1.0, points[-1][0])
    lo, hi = 75.0, 100.0

    def xy(minutes: float, spo2: float) -> tuple[float, float]:
        clipped = min(hi, max(lo, spo2))
        return x0 + w * minutes / x_max, y0 + h * (clipped - lo) / (hi - lo)

    d.line((x0, y0, x0 + w, y0), INK, 0.5)
    d.line((x0, y0, x0, y0 + h), INK, 0.5)
    for value in (75, 80, 90, 100):
        _x, y = xy(0, value)
        d.line((x0 - 2, y, x0, y), INK, 0.5)
        d.label(x0 - 4, y - 2.8, f"{value}", "end")
    step = 1 if x_max <= 8 else 2 if x_max <= 16 else 5
    for minute in range(0, int(x_max) + 1, step):
        x, _y = xy(minute, lo)
        d.line((x, y0 - 2, x, y0), INK, 0.5)
        d.label(x, y0 - 10, f"{minute}", "middle")
    _x, y90 = xy(0, 90)
    d.line((x0, y90, x0 + w, y90), WARN, 0.8, dash=True)
    d.line([v for minutes, spo2 in points for v in xy(minutes, spo2)], ACCENT, 1.5)
    d.label(0, y0 + h + 4, CURVE_TITLE)
    return d


def _short_drug(d: Dose) -> str:
    return d.label.split(" (")[0]


def _key_cell(
    label: str, value: str, note: str, st: dict[str, ParagraphStyle], *more: str
) -> list[object]:
    cell: list[object] = [para(label, st["key_label"]), para(value, st["key_value"])]
    cell += [para(line, st["key_label"]) for line in (note, *more) if line]
    return cell


# Under the short decision in the key block, when two words need a reason.
KEY_NOTE = {"balanced": "factors even: senior decides now"}


def key_block(plan: Plan, width: float, st: dict[str, ParagraphStyle]) -> Table:
    """Every number needed in the first seconds, in one box at the top of page 1."""
    r, e, dec, oxy = plan.risk, plan.equipment, plan.decision, plan.oxygenation
    t = e.tracheal_tube_mm
    tone = WARN if r.level >= 3 else ACCENT
    t90 = minutes_text(oxy.minutes_to_spo2_90, oxy.horizon_minutes)
    quarter = width / 4
    top = [
        para(level_heading(r.level), st["level"]),
        _key_cell(
            "SpO2 falls to 90% after apnoea starts",
            f"in {t90}",
            "model estimate, not a guarantee" + ("; short: plan for it" if oxy.short else ""),
            st,
        ),
    ]
    kit = [
        _key_cell(
            "Tracheal tubes",
            f"{t.first:.1f} / {t.backup:.1f} / {t.smallest:.1f} mm",
            "first / backup / smallest",
            st,
        ),
        _key_cell(
            "Supraglottic airway",
            f"size {e.supraglottic_size:g}",
            f"by weight, {plan.body.weight_kg:g} kg",
            st,
        ),
        _key_cell("Front of neck", f"{e.front_of_neck_tube_mm:.1f} mm", "cuffed tube", st),
        _key_cell(
            "Pre-made decision if intubation fails",
            SHORT[dec.recommendation].upper(),
            KEY_NOTE.get(dec.recommendation, "")
            or (by_category_text(dec.if_category) if dec.if_category else ""),
            st,
            "final choice: ☐ wake  ☐ proceed",
        ),
    ]
    drugs = [
        _key_cell(
            _short_drug(d),
            f"{_range(d.dose_mg_low, d.dose_mg_high)} mg",
            f"{_range(d.volume_ml_low, d.volume_ml_high)} mL, {d.mg_per_ml:g} mg/mL",
            st,
            _per_kg_short(d),
        )
        for d in plan.doses
    ]
    first = Table([top], colWidths=[width * 0.56, width * 0.44])
    kit_table = Table(
        [kit], colWidths=[quarter * 1.15, quarter * 1.0, quarter * 0.7, quarter * 1.15]
    )
    drug_table = Table([drugs], colWidths=[width / len(drugs)] * len(drugs))
    inner = [
        ("FONTNAME", (0, 0), (-1, -1), font()),  # else reportlab starts cells in Helvetica
        ("VALIGN", (0, 0), (-1, -1), "TOP"),
        ("LEFTPADDING", (0, 0), (-1, -1), 3),
        ("RIGHTPADDING", (0, 0), (-1, -1), 3),
        ("TOPPADDING", (0, 0), (-1, -1), 2),
        ("BOTTOMPADDING", (0, 0), (-1, -1), 2),
    ]
    first.setStyle(TableStyle([*inner, ("BACKGROUND", (0, 0), (0, 0), tone)]))
    kit_table.setStyle(TableStyle([*inner, ("LINEAFTER", (0, 0), (-2, -1), 0.4, colors.grey)]))
    drug_table.setStyle(TableStyle([*inner, ("LINEAFTER", (0, 0), (-2, -1), 0.4, colors.grey)]))
    table = Table([[first], [kit_table], [drug_table]], colWidths=[width])
    table.setStyle(
        TableStyle(
            [
                ("FONTNAME", (0, 0), (-1, -1), font()),
                ("BOX", (0, 0), (-1, -1), 1.2, tone),
                ("LINEBELOW", (0, 0), (-1, 1), 0.6, tone),
                ("LEFTPADDING", (0, 0), (-1, -1), 0),
                ("RIGHTPADDING", (0, 0), (-1, -1), 0),
                ("TOPPADDING", (0, 0), (-1, -1), 0),
                ("BOTTOMPADDING", (0, 0), (-1, -1), 0),
            ]
        )
    )
    return table


def _per_kg_short(d: Dose) -> str:
    """'2-2.5 mg/kg × 72 kg' for the key block; which weight that is, is said below it."""
    per = _range(d.mg_per_kg_low, d.mg_per_kg_high)
    return f"{per} mg/kg × {d.scalar_weight_kg:g} kg"


def _range(low: float, high: float) -> str:
    return f"{low:g}" if low == high else f"{low:g}-{high:g}"


def since_box(plan: Plan, width: float, st: dict[str, ParagraphStyle]) -> list[object]:
    """What changed since an earlier assessment: the six most dangerous changes."""
    c = plan.changes_since
    if c is None:
        return []
    from ..comparison import change_lines, since_title

    text = "<br/>".join(escape(line) for line in change_lines(c, most=6))
    box = Table(
        [[Paragraph(f"<b>{escape(since_title(c))}</b><br/>{text}", st["small"])]],
        colWidths=[width],
    )
    box.setStyle(
        TableStyle(
            [
                ("FONTNAME", (0, 0), (-1, -1), font()),
                ("BOX", (0, 0), (-1, -1), 1.0, WARN if c.more_dangerous else ACCENT),
                ("TOPPADDING", (0, 0), (-1, -1), 2),
                ("BOTTOMPADDING", (0, 0), (-1, -1), 2),
            ]
        )
    )
    return [Spacer(0, 3), box]


def header_part(plan: Plan, width: float, st: dict[str, ParagraphStyle]) -> list[object]:
    label = plan.assessment.label
    who = plan.assessment.identity
    ids = grid(
        [
            [
                para(f"Name: {who.name or '_' * 22}", st["body"]),
                para(f"Record number: {who.record_number or '_' * 12}", st["body"]),
                para(f"Born: {who.date_of_birth or '_' * 10}", st["body"]),
                para("Signed: ___________", st["body"]),
            ]
        ],
        [width * 0.36, width * 0.26, width * 0.18, width * 0.20],
        header=False,
    )
    return [
        para("Obstetric airway plan" + (f": {label}" if label else ""), st["h1"]),
        ids,
        Spacer(0, 2),
        para(" ".join([*plan.cautions[:2], *assumed_lines(plan)]), st["caution"]),
        Spacer(0, 3),
    ]


def basis_part(plan: Plan, width: float, st: dict[str, ParagraphStyle]) -> list[object]:
    r = plan.risk
    small = st["small"]
    shown = shown_factors(r)
    present = [f for f in shown if f.counted or f.role == "override"]
    outweighed = [f for f in shown if f not in present]
    largest = max((f.contribution for f in present), default=0.0)
    bar_w = width * 0.14
    rows: list[list[object]] = [["Finding", "Weight", "Adds", "", "Source"]]
    for f in present:
        rows.append(
            [
                para(finding_label(f) + (f" ({f.detail})" if f.detail else ""), small),
                para(weight_text(f), small),
                adds_text(f),
                _bar(f.contribution, largest, bar_w),
                para(source_label(f.source, f.basis, short=True), small),
            ]
        )
    if not present:
        rows.append([para("nothing assessed that moves the index", small), "", "", "", ""])
    title = f"Why airway level {r.level}: index {r.index:.2f}, each factor and its source"
    widths = [width * 0.41, width * 0.16, width * 0.07, bar_w + 4, width * 0.22 - 4]
    out: list[object] = [para(title, st["h2"]), grid(rows, widths)]
    notes = []  # the index's independence note closes the page with the other cautions
    if r.overrides:
        notes.append("<b>Forced to airway level 4 by:</b> " + escape(", ".join(r.overrides)) + ".")
    if r.floors:
        notes.append("<b>Raised to level 3 at least by:</b> " + escape(", ".join(r.floors)) + ".")
    if outweighed:
        names = ", ".join(finding_label(f) for f in outweighed)
        notes.append(
            f"<b>Also found</b> (a stronger finding of the same anatomy counts): {escape(names)}."
        )
    # An assumed ratio's source column already reads "project rule".
    if plan.not_assessed:
        low, high = r.unassessed_range
        moves = f" (could make it level {low}-{high})" if low != high else ""
        notes.append(f"<b>Not assessed{moves}:</b> " + escape(", ".join(plan.not_assessed)) + ".")
    notes += [f"<b>Prepare:</b> {escape(p)}." for p in plan.preparation]
    b = plan.body
    notes.append(
        "<b>Body size:</b> "
        + escape(
            f"weight {b.weight_kg:g} kg; height not given."
            if b.bmi is None
            else f"weight {b.weight_kg:g} kg, height {b.height_cm:g} cm, BMI {b.bmi:.1f} "
            f"({b.bmi_class}); ideal {b.ideal_weight_kg:.1f} kg, lean {b.lean_weight_kg:.1f} kg, "
            f"adjusted {b.adjusted_weight_kg:.1f} kg (Devine; Janmahasatian; IBW + 0.4 excess)."
        )
    )
    out += [Paragraph(n, small) for n in notes]
    return out


GAP = 9.0  # points between the two columns
FIT_SLACK = 0.94  # share of the columns' room that measured content may fill
MARGINS_MM = {"left": 10.0, "right": 10.0, "top": 8.0, "bottom": 12.0}


def column_width(width: float, columns: int = 2) -> float:
    return (width - GAP * (columns - 1)) / columns


def equipment_part(
    plan: Plan, col: float, st: dict[str, ParagraphStyle], dense: bool
) -> list[object]:
    e = plan.equipment
    small = st["small"]
    if dense:  # names only, run on: the sizes are in the key block, the rest on the trolley sheet
        items = [
            f"☐\u00a0{escape(i.name)} ({'open' if i.open_now else 'in the room'})" for i in e.items
        ]
        listing: object = Paragraph("   ".join(items), small)
    else:
        rows: list[list[object]] = []
        for item in e.items:
            where = "open" if item.open_now else "in the room"
            text = f"<b>{escape(item.name)}</b> ({where}): {escape(item.detail)}"
            rows.append(["☐", Paragraph(text, small)])
        listing = grid(rows, [col * 0.07, col * 0.93], header=False)
    return [
        para("Equipment: tick when ready", st["h2"]),
        listing,
        para(f"Tubes: {e.tracheal_tube_mm.reason}. {e.supraglottic_basis}.", small),
    ]


def oxygen_part(plan: Plan, col: float, st: dict[str, ParagraphStyle], curve: bool) -> list[object]:
    oxy = plan.oxygenation
    h = oxy.horizon_minutes
    rows: list[list[object]] = [["Minutes to SpO2 of", "90%", "80%"]]
    for sc in oxy.scenarios:
        rows.append(
            [
                para(sc.label, st["small"]),
                minutes_text(sc.minutes_to_spo2_90, h),
                minutes_text(sc.minutes_to_spo2_80, h),
            ]
        )
    out: list[object] = [
        para("Oxygenation: a model estimate", st["h2"]),
        grid(rows, [col * 0.64, col * 0.18, col * 0.18]),
    ]
    return [*out, _curve(plan, col)] if curve else out


# How the decision's factors are listed, in this order.
DIRECTIONS = (
    ("proceed", "Points to proceeding:"),
    ("wake", "Points to waking:"),
    ("neither", "Points neither way:"),
    ("unknown", "Not known yet:"),
)


def decision_part(plan: Plan, st: dict[str, ParagraphStyle], dense: bool) -> list[object]:
    dec = plan.decision
    small = st["small"]
    out: list[object] = [
        para(DECISION_TITLE, st["h2"]),
        para(
            f"Pre-made decision: {SHORT[dec.recommendation].upper()} (points total {dec.total:+d})",
            st["caution"],
        ),
    ]
    if dec.rule:
        out.append(para(dec.rule, st["caution"]))
    for direction, heading in DIRECTIONS:
        found = [
            # "category 2: she or the baby..." reads "category 2" here: the key says the rest.
            f"{df.name.lower()}: {df.finding.split(': ')[0]}"
            + ("" if direction == "unknown" else f" {df.points:+d}")
            for df in dec.factors
            if df.points_to == direction
        ]
        if found:
            out.append(Paragraph(f"<b>{heading}</b> " + escape("; ".join(found)) + ".", small))
    if dec.if_category:
        out.append(para(by_category_text(dec.if_category).capitalize() + ".", small))
    # Dense: the condition that governs proceeding; the sequence covers the others.
    out += [para(c, small) for c in (dec.conditions[:1] if dense else dec.conditions)]
    return out


def doses_part(plan: Plan, st: dict[str, ParagraphStyle]) -> list[object]:
    small = st["small"]
    scalars: dict[str, list[str]] = {}
    for d in plan.doses:
        if not d.rule:
            scalars.setdefault(SCALAR_LABEL[d.scalar], []).append(_short_drug(d).lower())
    dosed_on = "; ".join(f"{', '.join(v)} on {k}" for k, v in scalars.items())
    held = [d for d in plan.doses if d.rule]
    if held:  # one sentence for every held drug, not one each
        names = ", ".join(_short_drug(d).lower() for d in held)
        dosed_on += f"; {names}: {held[0].rule[0].lower()}{held[0].rule[1:].rstrip('.')}"
    out: list[object] = [
        para("Doses: a calculation aid, check and titrate", st["h2"]),
        para(f"Dosed on: {dosed_on}.", small),
    ]
    by_scalar: dict[tuple[str, float], list[str]] = {}
    for d in plan.doses:
        for a in d.alternatives:
            by_scalar.setdefault((a.scalar, a.weight_kg), []).append(
                f"{_short_drug(d).lower()} {_range(a.dose_mg_low, a.dose_mg_high)} mg"
            )
    if by_scalar:
        alternatives = "; ".join(
            f"{SCALAR_LABEL[scalar]} {kg:g} kg: {', '.join(doses)}"
            for (scalar, kg), doses in by_scalar.items()
        )
        out.append(Paragraph(f"<b>On other scalars:</b> {escape(alternatives)}.", small))
    out.append(para(" ".join(f"{_short_drug(d)}: {d.note}" for d in plan.doses if d.note), small))
    return out


def steps_part(plan: Plan, width: float, st: dict[str, ParagraphStyle], full: bool) -> list[object]:
    small = st["small"]
    lists = {c.sheet: c for c in plan.checklists}
    # The unit's brief and after-event checklists stand in for those steps when present,
    # so the printout says what the Markdown plan says.
    skip = {"before induction"} if "brief" in lists else set()
    if "after" in lists:
        skip.add("after the event")
    title = para("If it goes wrong: the sequence, with her values", st["h2"])
    numbered = [(n, s) for n, s in enumerate(plan.steps, 1) if s.phase not in skip]
    head = [title, *_skipped_steps_note(plan, skip, small)]
    if full:
        rows: list[list[object]] = [["", "Step", "What to do"]]
        rows += [
            [str(n), para(s.title, small), para(" ".join(s.actions), small)] for n, s in numbered
        ]
        return [*head, grid(rows, [width * 0.04, width * 0.2, width * 0.76])]
    rows = [[str(n), para(s.summary, small)] for n, s in numbered]
    return [*head, grid(rows, [width * 0.07, width * 0.93], header=False)]


# Where a step left out of the printed sequence is found instead.
STANDS_IN = {"before induction": "the team brief", "after the event": "the after-event list"}


def _skipped_steps_note(plan: Plan, skip: set[str], style: ParagraphStyle) -> list[object]:
    """'Steps 1-7 (before induction) are in the team brief; ...': without it a printed
    sequence opening at step 8 reads as if its first page were lost."""
    parts = []
    for phase, where in STANDS_IN.items():
        numbers = [n for n, s in enumerate(plan.steps, 1) if s.phase == phase]
        if phase in skip and numbers:
            first, last = numbers[0], numbers[-1]
            which = f"step {first}" if first == last else f"steps {first}-{last}"
            verb = "is" if first == last else "are"
            parts.append(f"{which} ({phase}) {verb} in {where}")
    text = "; ".join(parts) + "."
    return [para(text[0].upper() + text[1:], style)] if parts else []


def checklist_part(
    checklist: RenderedChecklist, col: float, st: dict[str, ParagraphStyle], dense: bool = False
) -> list[object]:
    if dense:  # items run on in one paragraph, each behind its own box
        items = [
            ("☐" if item.checkbox else "•") + "\u00a0" + escape(item.text)
            for section in checklist.sections
            for item in section.items
        ]
        return [para(checklist.title, st["h2"]), Paragraph("   ".join(items), st["small"])]
    rows: list[list[object]] = [
        ["☐" if item.checkbox else "•", para(item.text, st["small"])]
        for section in checklist.sections
        for item in section.items
    ]
    return [para(checklist.title, st["h2"]), grid(rows, [col * 0.07, col * 0.93], header=False)]


def closing_part(plan: Plan, st: dict[str, ParagraphStyle]) -> list[object]:
    small = st["small"]
    top = assumed_lines(plan)  # already at the head of the page
    out: list[object] = [
        Paragraph(f"<b>Check:</b> {escape(w)}", small) for w in plan.warnings if w not in top
    ]
    # The first two cautions head the page; the rest close it.
    out.append(Paragraph("<b>Cautions:</b> " + escape(" ".join(plan.cautions[2:])), small))
    return out
