"""Laminated trolley sheets as PDF: large type, high contrast, safe margins.

Body text is 14 pt at A4 and scales with the paper (about 20 pt at A3). The
palette is black on white with one dark blue and pale grey shading, readable
in greyscale and without telling red from green. Nothing is drawn within
15 mm of the edge, clear of a laminator's sealed border.
"""

import io
from collections.abc import Sequence
from typing import Any

from reportlab.lib import colors
from reportlab.lib.pagesizes import A3, A4, TABLOID, landscape, letter, portrait
from reportlab.lib.styles import ParagraphStyle
from reportlab.lib.units import mm
from reportlab.pdfbase import pdfmetrics
from reportlab.platypus import (
    BaseDocTemplate,
    CondPageBreak,
    Frame,
    KeepTogether,
    PageTemplate,
    Spacer,
    Table,
    TableStyle,
)

from ... import __version__
from ...engine.doses import span
from ...engine.plan import RULES_VERSION
from ...errors import AirwayError
from ...workflows.sheets import BAND_HEIGHTS_CM, Sheet
from .fonts import font, use_fonts
from .kit import MIN_FONT_PT, para

PAPERS = {"A4": A4, "A3": A3, "letter": letter, "tabloid": TABLOID}
# A3 is A4 scaled by the square root of 2; US Letter is near A4, Tabloid (11 x 17 in)
# near A3.
SCALE = {"A4": 1.0, "A3": 1.41, "letter": 1.0, "tabloid": 1.41}
BODY_PT_A4 = 14.0
# A sheet that does not fit one page at its paper's type size is set smaller, step by
# step, down to this body size (project rule: still read from a step back); only a
# sheet that does not fit even then takes a second page.
MIN_SHEET_BODY_PT = 12.0
FIT_STEPS = (1.0, 0.96, 0.92, 0.88)
SAFE_MARGIN_MM = 15.0  # everything inside; the test checks nothing within 10 mm
NAVY = colors.HexColor("#1F3A5F")
SHADE = colors.HexColor("#E6E6E6")


def sheet_styles(paper: str, k: float | None = None) -> dict[str, ParagraphStyle]:
    """Type sizes for a sheet on this paper (``k``: the scale, if not the paper's own)."""
    k = SCALE[paper] if k is None else k
    body = ParagraphStyle(
        "body",
        fontName=font(),
        fontSize=BODY_PT_A4 * k,
        leading=BODY_PT_A4 * k * 1.18,
        textColor=colors.black,
    )
    return {
        "body": body,
        "title": ParagraphStyle(
            "title",
            parent=body,
            fontName=font(bold=True),
            fontSize=20 * k,
            leading=24 * k,
            textColor=colors.white,
        ),
        "h2": ParagraphStyle(
            "h2",
            parent=body,
            fontName=font(bold=True),
            fontSize=17 * k,
            leading=19 * k,
            spaceBefore=4 * k,
            spaceAfter=1.5 * k,
            textColor=NAVY,
        ),
        "cell": ParagraphStyle("cell", parent=body, fontName=font(bold=True)),
        "white": ParagraphStyle(
            "white", parent=body, fontName=font(bold=True), textColor=colors.white
        ),
    }


def _bar(text: str, width: float, st: dict[str, ParagraphStyle]) -> Table:
    t = Table([[para(text, st["title"])]], colWidths=[width])
    t.setStyle(
        TableStyle(
            [
                ("BACKGROUND", (0, 0), (-1, -1), NAVY),
                ("FONTNAME", (0, 0), (-1, -1), font()),
                ("TOPPADDING", (0, 0), (-1, -1), 6),
                ("BOTTOMPADDING", (0, 0), (-1, -1), 8),
            ]
        )
    )
    return t


def _table(
    rows: Sequence[Sequence[object]],
    widths: list[float],
    k: float,
    header: bool,
    shade: bool = False,
    heights: list[float | None] | None = None,
) -> Table:
    t = Table(rows, colWidths=widths, rowHeights=heights, repeatRows=1 if header else 0)
    style = [
        ("FONTNAME", (0, 0), (-1, -1), font()),
        ("FONTSIZE", (0, 0), (-1, -1), BODY_PT_A4 * k),
        ("LEADING", (0, 0), (-1, -1), BODY_PT_A4 * k * 1.15),
        ("VALIGN", (0, 0), (-1, -1), "MIDDLE"),
        ("GRID", (0, 0), (-1, -1), 0.8, colors.black),
        ("TOPPADDING", (0, 0), (-1, -1), 1.2 * k),
        ("BOTTOMPADDING", (0, 0), (-1, -1), 2.8 * k),
    ]
    if header:
        style += [
            ("BACKGROUND", (0, 0), (-1, 0), NAVY),
            ("TEXTCOLOR", (0, 0), (-1, 0), colors.white),
            ("FONTNAME", (0, 0), (-1, 0), font(bold=True)),
        ]
    if shade:
        style.append(("ROWBACKGROUNDS", (0, 1), (-1, -1), [colors.white, SHADE]))
    t.setStyle(TableStyle(style))
    return t


def _checklist(sheet: Sheet, width: float, st: dict[str, ParagraphStyle], k: float) -> list:
    out: list[object] = []
    assert sheet.checklist is not None
    for section in sheet.checklist.sections:
        rows = [["☐" if i.checkbox else "•", para(i.text, st["body"])] for i in section.items]
        out.append(
            KeepTogether(
                [
                    para(section.title, st["h2"]),
                    _table(rows, [12 * mm * k, width - 12 * mm * k], k, header=False),
                ]
            )
        )
    return out


def _contacts(sheet: Sheet, width: float, st: dict[str, ParagraphStyle], k: float) -> list:
    if not sheet.contacts:
        return []
    rows: list[list[object]] = [["Who to call", "Number"]]
    for c in sheet.contacts:
        rows.append([para(c.role, st["body"]), para(c.number, st["cell"]) if c.number else ""])
    return [
        KeepTogether(
            [
                para("Who to call", st["h2"]),
                _table(rows, [width * 0.62, width * 0.38], k, header=True),
            ]
        )
    ]


# reportlab's default cell padding, left and right; never less than the minimum.
CELL_PADDING_PT = 6.0
MIN_CELL_PADDING_PT = 2.0


def _month_grid(width: float, st: dict[str, ParagraphStyle], k: float) -> list:
    parts: list[object] = [
        CondPageBreak(55 * mm * k),
        para("Daily check: month ____________  year ______", st["h2"]),
    ]
    first = 30 * mm * k
    # As many days to a row as fit with their numbers clear of the rules: 16 across a
    # portrait page, fewer in a landscape column (where 16 ran together).
    day = pdfmetrics.stringWidth("31", font(bold=True), BODY_PT_A4 * k) + 2 * CELL_PADDING_PT + 2
    fit = max(1, min(16, int((width - first) // day)))
    rows_needed = -(-31 // fit)
    per_row = -(-31 // rows_needed)  # rows as even as they can be: 16 + 15, 8 + 8 + 8 + 7
    for start in range(1, 32, per_row):
        days = range(start, min(start + per_row, 32))
        w = [first] + [(width - first) / len(days)] * len(days)
        rows = [["Day", *[str(d) for d in days]], ["Initials", *[""] * len(days)]]
        parts += [_table(rows, w, k, header=True, heights=[None, 8 * mm * k]), Spacer(0, 3 * mm)]
    return parts


def _measured_widths(
    rows: list[Sequence[object]], width: float, size: float
) -> tuple[list[float], float]:
    """Column widths and the cell padding that keep every line off the rules.

    Each column is as wide as its widest line (the header and the first column in
    bold); the room left over is shared in proportion. When the lines need more than
    the width (A4 portrait), the padding shrinks instead, down to a minimum.
    """
    text = []
    for c in range(len(rows[0])):
        widest = 0.0
        for r, row in enumerate(rows):
            face = font(bold=r == 0 or c == 0)
            for line in str(row[c]).split("\n"):
                widest = max(widest, pdfmetrics.stringWidth(line, face, size))
        text.append(widest)
    over = sum(text) + 2 * CELL_PADDING_PT * len(text) - width
    padding = max(MIN_CELL_PADDING_PT, CELL_PADDING_PT - max(0.0, over) / (2 * len(text)))
    need = [t + 2 * padding for t in text]
    spare = max(0.0, width - sum(need))
    return [n + spare * n / sum(need) for n in need], padding


def _bands(sheet: Sheet, width: float, st: dict[str, ParagraphStyle], k: float, wide: bool) -> list:
    h1, h2 = (f"{h:g}" for h in BAND_HEIGHTS_CM)
    mg_ml = {k: f"{v:g} mg/mL" for k, v in sheet.strengths.items()}
    sep = ", " if wide else "\n"  # a landscape page is short: milligrams beside millilitres
    header = [
        "Weight",
        "Supra-\nglottic",
        f"Suxa-\nmethonium\n{mg_ml['suxamethonium']}",
        f"Rocuronium\n{h1} cm tall\n{mg_ml['rocuronium']}",
        f"Rocuronium\n{h2} cm tall\n{mg_ml['rocuronium']}",
        f"Sugam-\nmadex\n{mg_ml['sugammadex']}",
    ]
    rows: list[Sequence[object]] = [header]
    for r in sheet.bands:
        roc = [
            f"{span(*mg)} mg{' H' if scalar == 'boundary' else ''}{sep}{span(*ml)} mL"
            for mg, ml, scalar in zip(
                r.rocuronium_mg, r.rocuronium_ml, r.rocuronium_scalar, strict=True
            )
        ]
        rows.append(
            [
                f"{r.weight_kg} kg",
                f"size {r.supraglottic_size:g}",
                f"{span(*r.suxamethonium_mg)} mg{sep}{span(*r.suxamethonium_ml)} mL",
                *roc,
                f"{r.sugammadex_mg:g} mg{sep}{r.sugammadex_ml:g} mL",
            ]
        )
    widths, padding = _measured_widths(rows, width, BODY_PT_A4 * k)
    table = _table(rows, widths, k, header=True, shade=True)
    table.setStyle(
        TableStyle(
            [
                ("ALIGN", (1, 0), (-1, -1), "CENTER"),
                ("FONTNAME", (0, 1), (0, -1), font(bold=True)),
                ("LEFTPADDING", (0, 0), (-1, -1), padding),
                ("RIGHTPADDING", (0, 0), (-1, -1), padding),
            ]
        )
    )
    notes = [para(sheet.notes[0], st["body"])]
    notes += [para(n, st["body"]) for n in sheet.notes[1:]]
    return [table, Spacer(0, 4 * mm), *notes]


def render_sheet_pdf(sheet: Sheet, paper: str = "A4", landscape_: bool = False) -> bytes:
    """One trolley sheet as PDF bytes: one page, in the largest type that fits it."""
    use_fonts(sheet)
    pdf, pages = b"", 0
    for step in FIT_STEPS:
        k = SCALE[paper] * step
        if step != FIT_STEPS[0] and BODY_PT_A4 * k < MIN_SHEET_BODY_PT:
            break
        pdf, pages = _render(sheet, paper, landscape_, k)
        if pages == 1:
            return pdf
    items = 0 if sheet.checklist is None else sum(len(s.items) for s in sheet.checklist.sections)
    cut = -(-items * (pages - 1) // pages) if items else 0
    advice = f"; cut about {cut} of its {items} items" if cut else ""
    raise SheetTooLongError(
        f"the {sheet.kind} sheet would take {pages} pages on {paper} even in the smallest type "
        f"({MIN_SHEET_BODY_PT:g} pt), and a laminated sheet is one page{advice}"
    )


class SheetTooLongError(AirwayError):
    """A unit's lists would break a trolley sheet's one-page promise: bad input."""

    exit_code = 2


def _render(sheet: Sheet, paper: str, landscape_: bool, k: float) -> tuple[bytes, int]:
    """The sheet at scale ``k``, and how many pages it took."""
    st = sheet_styles(paper, k)
    size = landscape(PAPERS[paper]) if landscape_ else portrait(PAPERS[paper])
    margin = SAFE_MARGIN_MM * mm
    buf = io.BytesIO()
    doc = BaseDocTemplate(
        buf,
        pagesize=size,
        leftMargin=margin,
        rightMargin=margin,
        topMargin=margin,
        bottomMargin=margin + (9 if sheet.owner else 6) * mm,
        title=sheet.title,
        author="airway",
        creator=f"airway {__version__}",
        invariant=1,
        initialFontName=font(),
        lang="en-GB",
    )
    columns = 2 if landscape_ and sheet.kind != "doses" else 1
    gap = 8 * mm
    col_w = (doc.width - gap * (columns - 1)) / columns
    frames = [
        Frame(
            doc.leftMargin + i * (col_w + gap),
            doc.bottomMargin,
            col_w,
            doc.height,
            leftPadding=0,
            rightPadding=0,
            topPadding=0,
            bottomPadding=0,
        )
        for i in range(columns)
    ]
    # The rules version dates the sheet: a laminated copy older than the catalogue and
    # rules in use is replaced (`airway verify` does the same for a patient plan).
    footer = (
        "Generic sheet, not for one patient · a decision aid: local guidelines and clinical "
        "judgement come first"
    )
    footer2 = (
        "Reassess the airway immediately before every induction. "
        f"airway {__version__}, rules {RULES_VERSION}"
    )

    def on_page(canvas: Any, doc_: Any) -> None:
        footer_pt = max(MIN_FONT_PT, 8 * k)
        canvas.setFont(font(), footer_pt)
        canvas.drawString(margin, margin + 1.25 * footer_pt, footer)
        if sheet.owner:
            canvas.drawString(margin, margin + 2.5 * footer_pt, sheet.owner)
        canvas.drawString(margin, margin, footer2)
        canvas.drawRightString(size[0] - margin, margin, f"page {doc_.page}")

    doc.addPageTemplates([PageTemplate(id="sheet", frames=frames, onPage=on_page)])
    story: list[object] = [_bar(sheet.title, col_w, st), Spacer(0, 3 * mm)]
    if sheet.kind == "doses":
        story += _bands(sheet, col_w, st, k, wide=landscape_)
    else:
        story += _checklist(sheet, col_w, st, k)
        story += _contacts(sheet, col_w, st, k)
        if sheet.month_grid:
            story += _month_grid(col_w, st, k)
    doc.build(story)
    return buf.getvalue(), doc.page
