"""The patient plan as a printable PDF (reportlab platypus), readable in the notes.

Layout, from the top of page 1: her identifiers, the two cautions, then one
boxed block with every number needed in the first seconds (airway level, tube
sizes, supraglottic size, front-of-neck tube, doses in mg and mL, sugammadex,
minutes to SpO2 90%, the pre-made decision); below it the basis (factors with
their weights and sources), equipment, oxygenation, the decision's factors,
the sequence and the unit's checklists. No text is set below
:data:`MIN_FONT_PT`. Airway levels 1 and 2 fit one page; levels 3 and 4 use
two at most, the second for the full sequence.

The SpO2 curve and the factors' bars are drawn straight on the page (see
:class:`.kit.Sketch`).
"""

import io

from reportlab.lib.styles import ParagraphStyle
from reportlab.lib.units import mm
from reportlab.platypus import (
    BaseDocTemplate,
    Frame,
    FrameBreak,
    NextPageTemplate,
    PageBreak,
    PageTemplate,
)
from reportlab.platypus.doctemplate import LayoutError

from ...engine.plan_model import Plan
from ...errors import AirwayError
from .fonts import font, use_fonts
from .kit import (
    PAPER,
    NumberedCanvas,
    styles,
)
from .plan_parts import (
    FIT_SLACK,
    GAP,
    MARGINS_MM,
    basis_part,
    checklist_part,
    closing_part,
    column_width,
    decision_part,
    doses_part,
    equipment_part,
    header_part,
    key_block,
    oxygen_part,
    since_box,
    steps_part,
)

ONE_PAGE_UP_TO_LEVEL = 2  # levels 1-2 on one page; 3-4 on two at most


def traceability_subject(plan: Plan) -> str:
    """The PDF's Subject: tool version, rules version and the input's full digest."""
    g = plan.generated_by
    return f"airway {g.version}; rules {g.rules_version}; input sha256 {plan.input_sha256}"


class PdfLayoutError(AirwayError):
    """The plan could not be laid out on paper (for example, a unit checklist item
    too long for a column)."""


def _height(flowables: list[object], width: float, stop_above: float = float("inf")) -> float:
    """How tall these flowables stand, one under the other, at this width.

    Measuring stops once the total passes ``stop_above``: the caller only asks
    whether they fit, and the rest need not be wrapped.
    """
    total = 0.0
    for f in flowables:
        _w, h = f.wrap(width, 10_000)  # type: ignore[attr-defined]
        total += h + f.getSpaceBefore() + f.getSpaceAfter()  # type: ignore[attr-defined]
        if total > stop_above:
            break
    return total


def _template(name: str, size: tuple[float, float], top: float, columns: int = 2) -> PageTemplate:
    """A page: a full-width frame ``top`` points tall, then columns under it."""
    page_w, page_h = size
    left, right = MARGINS_MM["left"] * mm, MARGINS_MM["right"] * mm
    upper, lower = MARGINS_MM["top"] * mm, MARGINS_MM["bottom"] * mm
    width = page_w - left - right
    col = column_width(width, columns)
    pad = {"leftPadding": 0, "rightPadding": 0, "topPadding": 0, "bottomPadding": 0}
    frames = []
    if top > 0:
        frames.append(Frame(left, page_h - upper - top, width, top, id=f"{name}-top", **pad))
    column_h = page_h - upper - lower - top - (4 if top > 0 else 0)
    frames += [
        Frame(left + n * (col + GAP), lower, col, column_h, id=f"{name}-{n}", **pad)
        for n in range(columns)
    ]
    return PageTemplate(id=name, frames=frames)


def _layout(
    plan: Plan,
    size: tuple[float, float],
    st: dict[str, ParagraphStyle],
    dense: bool,
    head: tuple[list[object], float],
) -> tuple[list[PageTemplate], list[object]]:
    """Page templates and the story that flows through them."""
    width = size[0] - (MARGINS_MM["left"] + MARGINS_MM["right"]) * mm
    usable = size[1] - (MARGINS_MM["top"] + MARGINS_MM["bottom"]) * mm
    # Dense (every one-page plan, and a two-page plan that would spill): three
    # narrower columns waste less of each line on short checklist items.
    columns = 3 if dense else 2
    col = column_width(width, columns)
    lists = {c.sheet: c for c in plan.checklists}
    brief = checklist_part(lists["brief"], col, st, dense) if "brief" in lists else []
    after = checklist_part(lists["after"], col, st, dense) if "after" in lists else []
    top, top_h = head
    sections = [
        equipment_part(plan, col, st, dense),
        oxygen_part(plan, col, st, curve=not dense),
        decision_part(plan, st, dense),
        doses_part(plan, st),
    ]
    reference = [f for s in sections for f in s]
    room = columns * (usable - top_h - 4)
    templates = [
        _template("first", size, top_h, columns),
        _template("columns", size, 0, columns),
    ]
    story: list[object] = [NextPageTemplate("columns"), *top, FrameBreak()]
    if plan.risk.level <= ONE_PAGE_UP_TO_LEVEL:
        steps = steps_part(plan, col, st, full=False)
        return templates, [*story, *reference, *brief, *steps, *after, *closing_part(plan, st)]
    # Higher levels: page 2 opens with every action of the sequence, full width. The
    # reference sections that do not fit under a tall head (many findings) follow the
    # actions there, whole, rather than spill onto a page of their own.
    steps = steps_part(plan, width, st, full=True)
    steps_h = min(usable, _height(steps, width) + 2)
    templates.append(_template("actions", size, steps_h))
    first, later = _sections_that_fit(sections, col, FIT_SLACK * room)
    story += [*first, NextPageTemplate("actions"), PageBreak(), *steps, FrameBreak()]
    story += [NextPageTemplate("columns"), *later, *brief, *after, *closing_part(plan, st)]
    return templates, story


def _sections_that_fit(
    sections: list[list[object]], width: float, room: float
) -> tuple[list[object], list[object]]:
    """The sections, in order and whole, that fit in ``room``, and the rest."""
    used = 0.0
    for n, section in enumerate(sections):
        used += _height(section, width, stop_above=room - used)
        if used > room:
            return [f for s in sections[:n] for f in s], [f for s in sections[n:] for f in s]
    return [f for s in sections for f in s], []


def render_plan_pdf(plan: Plan, paper: str = "A4") -> bytes:
    """The plan as PDF bytes: one page up to airway level 2, two at most."""
    use_fonts(plan)
    st = styles()
    size = PAPER[paper]
    g = plan.generated_by
    footer = (
        f"{g.tool} {g.version}, rules {g.rules_version}, input "
        f"{plan.input_sha256[:16]}. Decision aid: not a substitute for clinical judgement."
    )
    pages: list[int] = []

    def canvas(*args: object, **kwargs: object) -> NumberedCanvas:
        return NumberedCanvas(*args, footer=footer, pages=pages, **kwargs)

    width = size[0] - (MARGINS_MM["left"] + MARGINS_MM["right"]) * mm
    usable = size[1] - (MARGINS_MM["top"] + MARGINS_MM["bottom"]) * mm

    def make_head() -> tuple[list[object], float]:
        """The head of page 1, the same in either layout, and its measured height."""
        top = [
            *header_part(plan, width, st),
            key_block(plan, width, st),
            *since_box(plan, width, st),
            *basis_part(plan, width, st),
        ]
        return top, min(usable, _height(top, width) + 2)

    head = make_head()

    def build(dense: bool) -> bytes:
        buf = io.BytesIO()
        templates, story = _layout(plan, size, st, dense, head)
        doc = BaseDocTemplate(
            buf,
            pagesize=size,
            pageTemplates=templates,
            title="Obstetric airway plan",
            author="airway",
            creator=f"airway {plan.generated_by.version}",
            # Read back by `airway verify`: which rules and which assessment made it.
            subject=traceability_subject(plan),
            invariant=1,
            initialFontName=font(),
            lang="en-GB",
        )
        try:
            doc.build(story, canvasmaker=canvas)
        except LayoutError as exc:
            raise PdfLayoutError(f"the plan could not be laid out on paper: {exc}") from None
        return buf.getvalue()

    # Levels 1 and 2 belong on one page, every one of them set alike: three columns,
    # the apnoea scenarios as a table without the curve, equipment by name (its sizes
    # are in the key block, the rest on the trolley sheet).
    one_page = plan.risk.level <= ONE_PAGE_UP_TO_LEVEL
    pdf = build(dense=one_page)
    if not one_page and pages[-1] > 2:
        # Levels 3 and 4 belong on two pages: a plan that would need a third is set
        # dense too. The first build has drawn the head's flowables; lay out fresh ones.
        head = make_head()
        pdf = build(dense=True)
    if one_page and pages[-1] > 1:
        # A few lines over: the same type with its lines set closer. A plan that
        # spills even so keeps its second page; nothing is ever left out.
        st = styles(tight=True)
        head = make_head()
        pdf = build(dense=True)
    return pdf
