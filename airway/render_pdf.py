"""The patient plan as a printable PDF (reportlab platypus).

Only this module imports reportlab, and only when a PDF is asked for. Every
piece of text from the user or the plan is XML-escaped before it reaches
reportlab's paragraph markup. Output is reproducible: invariant mode fixes the
dates and the document id, so the same plan gives the same bytes.
"""

from __future__ import annotations

import io
import os
from pathlib import Path
from xml.sax.saxutils import escape

from reportlab.graphics.charts.lineplots import LinePlot
from reportlab.graphics.shapes import Drawing, Line, Rect, String
from reportlab.lib import colors
from reportlab.lib.pagesizes import A4, letter
from reportlab.lib.styles import ParagraphStyle
from reportlab.lib.units import mm
from reportlab.pdfbase import pdfmetrics
from reportlab.pdfbase.ttfonts import TTFont
from reportlab.pdfgen.canvas import Canvas
from reportlab.platypus import (
    KeepInFrame,
    KeepTogether,
    Paragraph,
    SimpleDocTemplate,
    Spacer,
    Table,
    TableStyle,
)

from .decision import DECISION_TITLE, by_category_text
from .doses import dose_text
from .errors import AirwayError
from .plan_model import Plan, RenderedChecklist
from .render_text import minutes_text, per_kg_text, weight_text
from .scoring import level_heading
from .sources import source_label

PAPER = {"A4": A4, "letter": letter}
FONT_DIRS = (
    os.environ.get("AIRWAY_FONT_DIR", ""),
    "/usr/share/fonts/truetype/dejavu",
    "/usr/share/fonts/dejavu",
)
FONT, FONT_BOLD = "DejaVuSans", "DejaVuSans-Bold"
# Dark blue and a dark orange stay distinct in greyscale and for colour-blind readers.
INK = colors.HexColor("#111111")
ACCENT = colors.HexColor("#1F4E79")
WARN = colors.HexColor("#B35900")
PALE = colors.HexColor("#E8EEF4")


class FontMissingError(AirwayError):
    """DejaVu Sans is needed to print ≥, µ, – and accented names."""


def _register_fonts() -> None:
    if FONT in pdfmetrics.getRegisteredFontNames():
        return
    for folder in FONT_DIRS:
        regular = Path(folder, "DejaVuSans.ttf")
        bold = Path(folder, "DejaVuSans-Bold.ttf")
        if folder and regular.is_file() and bold.is_file():
            pdfmetrics.registerFont(TTFont(FONT, str(regular)))
            pdfmetrics.registerFont(TTFont(FONT_BOLD, str(bold)))
            pdfmetrics.registerFontFamily(FONT, normal=FONT, bold=FONT_BOLD)
            return
    raise FontMissingError(
        "DejaVu Sans not found: install fonts-dejavu-core or set AIRWAY_FONT_DIR to a folder "
        "holding DejaVuSans.ttf and DejaVuSans-Bold.ttf"
    )


def _styles() -> dict[str, ParagraphStyle]:
    base = ParagraphStyle("body", fontName=FONT, fontSize=8, leading=9.6, textColor=INK)
    return {
        "body": base,
        "small": ParagraphStyle("small", parent=base, fontSize=6.8, leading=7.8),
        "h1": ParagraphStyle("h1", parent=base, fontName=FONT_BOLD, fontSize=12.5, leading=15),
        "h2": ParagraphStyle(
            "h2",
            parent=base,
            fontName=FONT_BOLD,
            fontSize=9.5,
            leading=11.5,
            spaceBefore=3,
            spaceAfter=1,
            textColor=ACCENT,
        ),
        "level": ParagraphStyle(
            "level",
            parent=base,
            fontName=FONT_BOLD,
            fontSize=13,
            leading=16,
            textColor=colors.white,
        ),
        "caution": ParagraphStyle("caution", parent=base, fontName=FONT_BOLD, textColor=WARN),
    }


def _p(text: str, style: ParagraphStyle) -> Paragraph:
    return Paragraph(escape(text), style)


def _grid(rows: list[list[object]], widths: list[float], header: bool = True) -> Table:
    table = Table(rows, colWidths=widths, repeatRows=1 if header else 0)
    style = [
        ("FONTNAME", (0, 0), (-1, -1), FONT),
        ("FONTSIZE", (0, 0), (-1, -1), 7),
        ("VALIGN", (0, 0), (-1, -1), "TOP"),
        ("LINEBELOW", (0, 0), (-1, -1), 0.25, colors.grey),
        ("TOPPADDING", (0, 0), (-1, -1), 0.6),
        ("BOTTOMPADDING", (0, 0), (-1, -1), 0.8),
        ("LEFTPADDING", (0, 0), (-1, -1), 2),
        ("RIGHTPADDING", (0, 0), (-1, -1), 2),
    ]
    if header:
        style += [("BACKGROUND", (0, 0), (-1, 0), PALE), ("FONTNAME", (0, 0), (-1, 0), FONT_BOLD)]
    table.setStyle(TableStyle(style))
    return table


def _drawing(width: float, height: float) -> Drawing:
    # Without initialFontName the renderer starts in Helvetica, which is not embedded.
    d = Drawing(width, height)
    d.initialFontName = FONT
    return d


def _bar(value: float, largest: float, width: float) -> Drawing:
    """One horizontal bar: a factor's contribution, scaled to the largest one."""
    d = _drawing(width, 7)
    length = 0.0 if largest <= 0 else (width - 2) * value / largest
    if length > 0:
        d.add(Rect(0, 1, length, 5.5, fillColor=ACCENT, strokeColor=None))
    return d


def _curve(plan: Plan, width: float) -> Drawing:
    oxy = plan.oxygenation
    d = _drawing(width, 66)
    plot = LinePlot()
    plot.x, plot.y, plot.width, plot.height = 30, 18, width - 45, 40
    points = [(t / 60.0, s) for t, s in oxy.curve] or [(0, 100)]
    plot.data = [points]
    plot.lines[0].strokeColor = ACCENT
    plot.lines[0].strokeWidth = 1.5
    plot.xValueAxis.valueMin = 0
    plot.xValueAxis.valueMax = max(1.0, points[-1][0])
    plot.yValueAxis.valueMin = 75
    plot.yValueAxis.valueMax = 100
    plot.yValueAxis.valueSteps = [75, 80, 90, 100]
    for axis in (plot.xValueAxis, plot.yValueAxis):
        axis.labels.fontName = FONT
        axis.labels.fontSize = 7
    d.add(plot)
    y90 = plot.y + plot.height * (90 - 75) / 25
    d.add(Line(plot.x, y90, plot.x + plot.width, y90, strokeColor=WARN, strokeDashArray=[2, 2]))
    d.add(String(plot.x + plot.width, 4, "min", fontName=FONT, fontSize=7))
    d.add(String(0, plot.y + plot.height + 3, "SpO2 %", fontName=FONT, fontSize=7))
    return d


class _NumberedCanvas(Canvas):
    """Canvas that knows the page count, for 'page x of y'."""

    def __init__(self, *args: object, footer: str = "", **kwargs: object) -> None:
        super().__init__(*args, **kwargs)
        self.footer = footer
        self._pages: list[dict[str, object]] = []

    def showPage(self) -> None:
        self._pages.append(dict(self.__dict__))
        self._startPage()

    def save(self) -> None:
        total = len(self._pages)
        for state in self._pages:
            self.__dict__.update(state)
            self.setFont(FONT, 7)
            self.setFillColor(INK)
            width = self._pagesize[0]
            self.drawString(15 * mm, 10 * mm, self.footer)
            self.drawRightString(width - 15 * mm, 10 * mm, f"page {self._pageNumber} of {total}")
            super().showPage()
        super().save()


def _pair(left: object, right: object, width: float, split: float = 0.5) -> Table:
    """Two blocks side by side."""
    table = Table([[left, right]], colWidths=[width * split, width * (1 - split)])
    table.setStyle(
        TableStyle(
            [
                ("VALIGN", (0, 0), (-1, -1), "TOP"),
                ("FONTNAME", (0, 0), (-1, -1), FONT),
                ("LEFTPADDING", (0, 0), (-1, -1), 0),
                ("RIGHTPADDING", (0, 0), (-1, -1), 4),
            ]
        )
    )
    return table


def _two_columns(rows: list[list[object]], width: float) -> Table:
    """Rows of [marker, text] split over two columns (one when there is a single row)."""
    half = width / 2 - 3
    widths = [half * 0.06, half * 0.94]
    cut = (len(rows) + 1) // 2
    if len(rows) < 2:
        return _grid(rows, [width * 0.03, width * 0.97], header=False)
    return _pair(
        _grid(rows[:cut], widths, header=False), _grid(rows[cut:], widths, header=False), width
    )


def _checklist_block(
    checklist: RenderedChecklist, width: float, st: dict[str, ParagraphStyle]
) -> KeepTogether:
    """A filled-in checklist in two columns of tick boxes."""
    rows = []
    for section in checklist.sections:
        for item in section.items:
            box = "☐" if item.checkbox else "•"
            rows.append([box, _p(item.text, st["small"])])
    return KeepTogether([_p(checklist.title, st["h2"]), _two_columns(rows, width)])


def _story(plan: Plan, width: float, st: dict[str, ParagraphStyle]) -> list[object]:
    r, e, dec, oxy = plan.risk, plan.equipment, plan.decision, plan.oxygenation
    t = e.tracheal_tube_mm
    small = st["small"]
    story: list[object] = []
    add = story.append
    label = plan.assessment.label
    add(_p("Airway plan" + (f": {label}" if label else ""), st["h1"]))
    who = plan.assessment.identity
    add(
        _grid(
            [
                [
                    _p(f"Name: {who.name or '_' * 24}", st["body"]),
                    _p(f"Record number: {who.record_number or '_' * 12}", st["body"]),
                    _p(f"Born: {who.date_of_birth or '_' * 10}", st["body"]),
                    _p("Signed: ____________", st["body"]),
                ]
            ],
            [width * 0.34, width * 0.26, width * 0.18, width * 0.22],
            header=False,
        )
    )
    add(_p(" ".join(plan.cautions[:2]), st["caution"]))
    add(Spacer(0, 3))
    level = Table(
        [
            [
                _p(level_heading(r.level), st["level"]),
                _p(f"index {r.index:.2f} (ranks risk; not a probability)", st["body"]),
            ]
        ],
        colWidths=[width * 0.66, width * 0.34],
    )
    level.setStyle(
        TableStyle(
            [
                ("FONTNAME", (0, 0), (-1, -1), FONT),
                ("BACKGROUND", (0, 0), (0, 0), WARN if r.level >= 3 else ACCENT),
                ("BOX", (0, 0), (-1, -1), 0.8, WARN if r.level >= 3 else ACCENT),
                ("VALIGN", (0, 0), (-1, -1), "MIDDLE"),
            ]
        )
    )
    add(level)
    if r.overrides:
        add(_p("Forced to airway level 4 by: " + ", ".join(r.overrides), st["caution"]))
    present = [f for f in r.factors if f.present and f.role != "preparation"]
    largest = max((f.contribution for f in present), default=0.0)
    bar_w = width * 0.16
    rows: list[list[object]] = [["Factor found", "Weight", "Adds to index", "", "Source"]]
    for f in present:
        rows.append(
            [
                _p(f.label + (f" ({f.detail})" if f.detail else ""), small),
                _p(weight_text(f), small),
                f"{f.contribution:.2f}",
                _bar(f.contribution, largest, bar_w),
                _p(source_label(f.source, f.basis, short=True), small),
            ]
        )
    if not present:
        rows.append([_p("none among those assessed", small), "", "", "", ""])
    add(
        KeepTogether(
            [
                _p(
                    "Why this airway level: each factor, its weight, what it adds, its source",
                    st["h2"],
                ),
                _grid(
                    rows, [width * 0.33, width * 0.12, width * 0.09, bar_w + 4, width * 0.30 - 4]
                ),
            ]
        )
    )
    notes = []
    if plan.not_assessed:
        notes.append("<b>Not assessed:</b> " + escape(", ".join(plan.not_assessed)) + ".")
    notes += [
        f"<b>Prepare ({escape(f.label.lower())}):</b> {escape(f.prepares)} "
        f"({escape(source_label(f.source, f.basis, short=True))})."
        for f in r.factors
        if f.present and f.prepares and f.role == "preparation"
    ]
    notes += [
        f"<b>Prepare ({escape(f.label.lower())}):</b> {escape(f.prepares)}."
        for f in present
        if f.prepares
    ]
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
    for n in notes:
        add(Paragraph(n, small))
    half = width / 2 - 3
    eq_rows: list[list[object]] = [["", "Open or check", "Detail"]]
    for item in e.items:
        where = "OPEN" if item.open_now else "in room"
        eq_rows.append(["☐", _p(f"{item.name} ({where})", small), _p(item.detail, small)])
    equipment = [
        _p(
            f"Equipment: tubes {t.first:.1f} / {t.backup:.1f} / {t.smallest:.1f} mm, "
            f"supraglottic {e.supraglottic_size:g}, front of neck "
            f"{e.front_of_neck_tube_mm:.1f} mm",
            st["h2"],
        ),
        _p(
            f"Tubes: {t.reason}. Supraglottic size by weight {plan.body.weight_kg:g} kg from "
            "makers' bands (not evidence-based).",
            small,
        ),
        _grid(eq_rows, [half * 0.07, half * 0.3, half * 0.63]),
    ]
    dose_rows: list[list[object]] = [["Drug", "Dose", "Dosed on"]]
    for d in plan.doses:
        dose_rows.append([_p(d.label, small), _p(dose_text(d), small), _p(per_kg_text(d), small)])
    dose_notes = " ".join(f"{d.label}: {d.note}" for d in plan.doses if d.note)
    doses = [
        _p("Doses (calculation aid: check and titrate)", st["h2"]),
        _grid(dose_rows, [half * 0.28, half * 0.3, half * 0.42]),
    ]
    add(_pair(equipment, doses, width))
    add(_p("Dose notes: " + dose_notes, small))
    h = oxy.horizon_minutes
    ox_rows: list[list[object]] = [["Apnoea scenario", "SpO2 90%", "80%"]]
    for sc in oxy.scenarios:
        ox_rows.append(
            [
                _p(sc.label, small),
                minutes_text(sc.minutes_to_spo2_90, h),
                minutes_text(sc.minutes_to_spo2_80, h),
            ]
        )
    oxygen = [
        _p("Oxygenation (model estimate, not a guarantee)", st["h2"]),
        _grid(ox_rows, [half * 0.62, half * 0.2, half * 0.18]),
        _curve(plan, half),
    ]
    dec_rows: list[list[object]] = [["Decision factor", "Finding", "Points to"]]
    for df in dec.factors:
        pts = "" if df.points_to == "unknown" else f" {df.points:+d}"
        dec_rows.append([_p(df.name, small), _p(df.finding, small), f"{df.points_to}{pts}"])
    extra = by_category_text(dec.if_category).capitalize() + ". " if dec.if_category else ""
    decision = [
        _p(DECISION_TITLE, st["h2"]),
        _p(f"Pre-made decision: {dec.headline}", st["caution"]),
        _grid(dec_rows, [half * 0.4, half * 0.4, half * 0.2]),
        _p("Final decision, ticked before induction: ☐ wake  ☐ proceed", st["body"]),
        _p("Signed: ____________________", st["body"]),
    ]
    add(_pair(oxygen, decision, width))
    add(_p(extra + " ".join(dec.conditions), small))
    full = r.level == 4  # the highest level gets every action, on two pages at most
    lists = {c.sheet: c for c in plan.checklists}
    # The unit's brief and after-event checklists stand in for those steps when present,
    # so the printout says what the Markdown plan says.
    skip = {"before induction"} if "brief" in lists else set()
    if "after" in lists:
        skip.add("after the event")
    if "brief" in lists:
        add(_checklist_block(lists["brief"], width, st))
    rows_all = []
    for number, step in enumerate(plan.steps, 1):
        if step.phase in skip:
            continue
        text = " ".join(step.actions) if full else step.summary
        rows_all.append(
            [str(number), _p(step.title, small), _p(text, small)]
            if full
            else [str(number), _p(text, small)]
        )
    add(_p("If it goes wrong: the sequence, with her values", st["h2"]))
    if full:
        add(
            _grid(
                [["", "Step", "What to do"], *rows_all], [width * 0.04, width * 0.2, width * 0.76]
            )
        )
    else:
        add(_two_columns(rows_all, width))
    if "after" in lists:
        add(_checklist_block(lists["after"], width, st))
    tail = [f"<b>Check:</b> {escape(w)}" for w in plan.warnings]
    # The first two cautions head the page; the rest close it.
    tail.append("<b>Cautions:</b> " + escape(" ".join(plan.cautions[2:])))
    add(Spacer(0, 3))
    for line in tail:
        add(Paragraph(line, small))
    return story


def render_plan_pdf(plan: Plan, paper: str = "A4") -> bytes:
    """The plan as PDF bytes: one page for a routine plan, two at most."""
    _register_fonts()
    st = _styles()
    buf = io.BytesIO()
    doc = SimpleDocTemplate(
        buf,
        pagesize=PAPER[paper],
        leftMargin=12 * mm,
        rightMargin=12 * mm,
        topMargin=11 * mm,
        bottomMargin=14 * mm,
        title="Obstetric airway plan",
        author="airway",
        creator=f"airway {plan.generated_by.version}",
        invariant=1,
        initialFontName=FONT,
        lang="en-GB",
    )
    g = plan.generated_by
    footer = (
        f"{g.tool} {g.version}, rules {g.rules_version}, input "
        f"{plan.input_sha256[:16]}. Decision aid: not a substitute for clinical judgement."
    )

    def canvas(*args: object, **kwargs: object) -> _NumberedCanvas:
        return _NumberedCanvas(*args, footer=footer, **kwargs)

    story = _story(plan, doc.width, st)
    if plan.risk.level < 4:
        # A routine plan is one page: shrink to fit rather than spill (US Letter is shorter).
        flat = [x for f in story for x in (f._content if isinstance(f, KeepTogether) else [f])]
        story = [KeepInFrame(doc.width, doc.height, flat, mode="shrink")]
    doc.build(story, canvasmaker=canvas)
    return buf.getvalue()
