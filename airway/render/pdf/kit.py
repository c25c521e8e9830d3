"""The toolkit every PDF shares: the typeface, colours, paragraph styles, ruled
tables, shapes drawn on the page and the footer with "page x of y".

The layouts (:mod:`.plan`, :mod:`.sheets`, :mod:`.board`, :mod:`.summary`) build
on it. Every piece of text from the user or the plan is XML-escaped before it
reaches reportlab's paragraph markup. Output is reproducible: invariant mode fixes
the dates and the document id, so the same content gives the same bytes.
"""

import io
from collections.abc import Sequence

from reportlab.lib import colors
from reportlab.lib.pagesizes import A4, landscape, letter
from reportlab.lib.styles import ParagraphStyle
from reportlab.lib.units import mm
from reportlab.pdfbase import pdfmetrics
from reportlab.pdfgen.canvas import Canvas
from reportlab.platypus import Flowable, Paragraph, SimpleDocTemplate, Table, TableStyle

from ... import __version__
from .fonts import font
from .markup import escape

PAPER = {"A4": A4, "letter": letter}
# Dark blue and a dark orange stay distinct in greyscale and for colour-blind readers.
INK = colors.HexColor("#111111")
ACCENT = colors.HexColor("#1F4E79")
WARN = colors.HexColor("#B35900")
PALE = colors.HexColor("#E8EEF4")

# The smallest type anywhere on a page, footer included: notes are read at arm's
# length, often photocopied (project rule; 8 pt is a common floor for print).
MIN_FONT_PT = 8.0
BODY_PT = 8.5
KEY_VALUE_PT = 11.0
LEVEL_PT = 14.0


def styles(tight: bool = False) -> dict[str, ParagraphStyle]:
    """The paragraph styles; ``tight`` sets lines closer (the same sizes) for the rare
    level 1-2 plan that spills a few lines onto a second page even when dense."""
    body_leading, small_leading = (1.1, 1.05) if tight else (1.2, 1.12)
    base = ParagraphStyle(
        "body", fontName=font(), fontSize=BODY_PT, leading=BODY_PT * body_leading, textColor=INK
    )
    small = MIN_FONT_PT
    return {
        "body": base,
        "small": ParagraphStyle(
            "small", parent=base, fontSize=small, leading=small * small_leading
        ),
        "bold": ParagraphStyle("bold", parent=base, fontName=font(bold=True)),
        "h1": ParagraphStyle("h1", parent=base, fontName=font(bold=True), fontSize=13, leading=16),
        "h2": ParagraphStyle(
            "h2",
            parent=base,
            fontName=font(bold=True),
            fontSize=9,
            leading=10.5,
            spaceBefore=0.5 if tight else 2,
            spaceAfter=0.5,
            textColor=ACCENT,
        ),
        "level": ParagraphStyle(
            "level",
            parent=base,
            fontName=font(bold=True),
            fontSize=LEVEL_PT,
            leading=LEVEL_PT * 1.2,
            textColor=colors.white,
        ),
        "key_label": ParagraphStyle("key_label", parent=base, fontSize=small, leading=small * 1.2),
        "key_value": ParagraphStyle(
            "key_value",
            parent=base,
            fontName=font(bold=True),
            fontSize=KEY_VALUE_PT,
            leading=KEY_VALUE_PT * 1.2,
        ),
        "caution": ParagraphStyle("caution", parent=base, fontName=font(bold=True), textColor=WARN),
    }


def para(text: str, style: ParagraphStyle) -> Paragraph:
    """A paragraph of plain text: escaped, so never read as markup."""
    return Paragraph(escape(text), style)


CELL_PADDING_PT = 2.0  # left and right of every table cell


def _text_width(text: str, bold: bool = False, size: float = MIN_FONT_PT) -> float:
    """Width in points of one line of table text (the fonts must be registered)."""
    return float(pdfmetrics.stringWidth(text, font(bold), size))


def _fitted(cell: object, width: float, bold: bool, size: float) -> object:
    """A plain-text cell wider than its column is wrapped, never drawn into the next."""
    if isinstance(cell, str) and _text_width(cell, bold, size) > width - 2 * CELL_PADDING_PT:
        style = ParagraphStyle(
            "cell",
            fontName=font(bold),
            fontSize=size,
            leading=size * 1.12,
            textColor=INK,
        )
        return para(cell, style)
    return cell


def _fit_widths(
    rows: Sequence[Sequence[object]], widths: Sequence[float], header: bool, size: float
) -> list[float]:
    """Column widths that hold every plain-text cell on one line where they can.

    A column too narrow for its widest plain text ("10" in a narrow step column,
    "> 20 min") takes the points it lacks from the column with the most to spare;
    paragraphs wrap, so a column of paragraphs spares all but nothing. Widths that
    already fit are returned unchanged.
    """
    need = [0.0] * len(widths)
    for r, row in enumerate(rows):
        for i, cell in enumerate(row):
            if isinstance(cell, str):
                text = _text_width(cell, header and r == 0, size)
                need[i] = max(need[i], text + 2 * CELL_PADDING_PT)
    fitted = list(widths)
    for i, needed in enumerate(need):
        short = needed - fitted[i]
        if short <= 0:
            continue
        donor = max(range(len(fitted)), key=lambda j: fitted[j] - need[j])
        give = min(short, fitted[donor] - need[donor]) if donor != i else 0.0
        if give > 0:
            fitted[i] += give
            fitted[donor] -= give
    return fitted


def grid(
    rows: Sequence[Sequence[object]],
    widths: Sequence[float],
    header: bool = True,
    size: float = MIN_FONT_PT,
) -> Table:
    """A ruled table; plain-text cells in ``size`` points, a bold header row."""
    widths = _fit_widths(rows, widths, header, size)
    rows = [
        [_fitted(cell, w, header and r == 0, size) for cell, w in zip(row, widths, strict=True)]
        for r, row in enumerate(rows)
    ]
    table = Table(rows, colWidths=widths, repeatRows=1 if header else 0)
    style = [
        ("FONTNAME", (0, 0), (-1, -1), font()),
        ("FONTSIZE", (0, 0), (-1, -1), size),
        ("LEADING", (0, 0), (-1, -1), size * 1.12),
        ("VALIGN", (0, 0), (-1, -1), "TOP"),
        ("LINEBELOW", (0, 0), (-1, -1), 0.25, colors.grey),
        ("TOPPADDING", (0, 0), (-1, -1), 0.3),
        ("BOTTOMPADDING", (0, 0), (-1, -1), 0.9),
        ("LEFTPADDING", (0, 0), (-1, -1), CELL_PADDING_PT),
        ("RIGHTPADDING", (0, 0), (-1, -1), CELL_PADDING_PT),
    ]
    if header:
        style += [
            ("BACKGROUND", (0, 0), (-1, 0), PALE),
            ("FONTNAME", (0, 0), (-1, 0), font(bold=True)),
        ]
    table.setStyle(TableStyle(style))
    return table


class Sketch(Flowable):
    """A few boxes, lines and labels set straight on the page: the factors' bars and
    the SpO2 curve. reportlab's graphics package would draw the same, but loading it
    costs start-up time that these few shapes do not need. Drawn in that order:
    boxes, then lines, then labels on top."""

    def __init__(self, width: float, height: float) -> None:
        super().__init__()
        self.width, self.height = width, height
        self.boxes: list[tuple[float, float, float, float, colors.Color]] = []
        self.lines: list[tuple[tuple[float, ...], colors.Color, float, bool]] = []
        self.labels: list[tuple[float, float, str, str]] = []

    def wrap(self, availWidth: float, availHeight: float) -> tuple[float, float]:
        return self.width, self.height

    def box(self, x: float, y: float, w: float, h: float, colour: colors.Color) -> None:
        self.boxes.append((x, y, w, h, colour))

    def line(
        self, points: Sequence[float], colour: colors.Color, width: float, dash: bool = False
    ) -> None:
        """A line through ``points`` (x0, y0, x1, y1, ...)."""
        self.lines.append((tuple(points), colour, width, dash))

    def label(self, x: float, y: float, text: str, anchor: str = "start") -> None:
        """Text at (x, y), which is where it starts, ends ("end") or its middle ("middle")."""
        self.labels.append((x, y, text, anchor))

    def draw(self) -> None:
        c = self.canv
        c.saveState()
        for x, y, w, h, colour in self.boxes:
            c.setFillColor(colour)
            c.rect(x, y, w, h, stroke=0, fill=1)
        for points, colour, width, dash in self.lines:
            c.setStrokeColor(colour)
            c.setLineWidth(width)
            c.setDash([2, 2] if dash else [])
            path = c.beginPath()
            path.moveTo(points[0], points[1])
            for n in range(2, len(points) - 1, 2):
                path.lineTo(points[n], points[n + 1])
            c.drawPath(path, stroke=1, fill=0)
        c.setFillColor(INK)
        c.setFont(font(), MIN_FONT_PT)
        for x, y, text, anchor in self.labels:
            if anchor == "end":
                c.drawRightString(x, y, text)
            elif anchor == "middle":
                c.drawCentredString(x, y, text)
            else:
                c.drawString(x, y, text)
        c.restoreState()


class NumberedCanvas(Canvas):
    """Canvas that knows the page count, for 'page x of y'."""

    def __init__(
        self, *args: object, footer: str = "", pages: list[int] | None = None, **kwargs: object
    ) -> None:
        super().__init__(*args, **kwargs)
        self.footer = footer
        self.page_count = pages if pages is not None else []
        self._pages: list[dict[str, object]] = []

    def showPage(self) -> None:
        self._pages.append(dict(self.__dict__))
        self._startPage()

    def save(self) -> None:
        total = len(self._pages)
        self.page_count.append(total)
        for state in self._pages:
            self.__dict__.update(state)
            self.setFont(font(), MIN_FONT_PT)
            self.setFillColor(INK)
            width = self._pagesize[0]
            self.drawString(10 * mm, 6.5 * mm, self.footer)
            self.drawRightString(width - 10 * mm, 6.5 * mm, f"page {self._pageNumber} of {total}")
            super().showPage()
        super().save()


# ----


LANDSCAPE_MARGINS_MM = (10.0, 10.0, 9.0, 13.0)  # left, right, top, bottom


def landscape_width(paper: str) -> float:
    """The text width of a landscape page with :data:`LANDSCAPE_MARGINS_MM`."""
    left, right, _top, _bottom = LANDSCAPE_MARGINS_MM
    return PAPER[paper][1] - (left + right) * mm


def build_landscape_pdf(story: list[object], paper: str, title: str, footer: str) -> bytes:
    """A landscape document (clinic summary, ward board): footer, page x of y. The
    caller has chosen the fonts (:func:`use_fonts`) before making the story."""
    left, right, top, bottom = LANDSCAPE_MARGINS_MM
    buf = io.BytesIO()
    doc = SimpleDocTemplate(
        buf,
        pagesize=landscape(PAPER[paper]),
        leftMargin=left * mm,
        rightMargin=right * mm,
        topMargin=top * mm,
        bottomMargin=bottom * mm,
        title=title,
        author="airway",
        creator=f"airway {__version__}",
        invariant=1,
        initialFontName=font(),
        lang="en-GB",
    )

    def canvas(*args: object, **kwargs: object) -> NumberedCanvas:
        return NumberedCanvas(*args, footer=footer, pages=[], **kwargs)

    doc.build(story, canvasmaker=canvas)
    return buf.getvalue()
