"""The clinic summary as a PDF: every woman of the list, highest airway level first.

A4 (or US Letter) landscape, the column headings repeated on every page, the
rule behind each flag in the footer block. Shares fonts, styles and the page
footer with the patient plan (:mod:`airway.render_pdf`).
"""

from reportlab.lib import colors
from reportlab.platypus import Paragraph, Spacer

from ... import __version__
from ...engine.plan import CAUTION_AID, CAUTION_REASSESS, RULES_VERSION
from ...engine.scoring import LEVEL_LABELS
from ...engine.triage import FLAGS
from ...sources import source_label
from ...workflows.clinic import SummaryRow, sort_summary
from .fonts import use_fonts
from .kit import PALE, build_landscape_pdf, grid, landscape_width, para, styles
from .markup import escape

FLAG_WORDS = {f.id: f.name for f in FLAGS}


CATEGORIES = ("1", "2", "3", "4")


def _decision(r: SummaryRow) -> str:
    """'proceed / senior call / wake / wake' by urgency category, once when all agree."""
    if not r.by_category:
        return r.decision
    if len(set(r.by_category)) == 1:
        return f"{r.by_category[0]} (any category)"
    return " / ".join(r.by_category)


def _level_heading(level: int, count: int) -> str:
    women = "woman" if count == 1 else "women"
    return f"Airway level {level} of 4: {LEVEL_LABELS[level]} ({count} {women})"


def render_summary_pdf(rows: list[SummaryRow], paper: str = "A4", read_as: str = "") -> bytes:
    """The summary table as PDF bytes: bad rows first, then each airway level under a
    heading of its own, highest first. ``read_as`` names the list's text encoding."""
    use_fonts(rows)  # before any paragraph: they resolve their faces as made
    st = styles()
    small = st["small"]
    width = landscape_width(paper)
    ordered = sort_summary(rows)
    bad = sum(1 for r in rows if r.level is None)
    header = [
        "Id",
        "Level",
        "What drove it",
        "Tube mm",
        "SGA",
        "SpO2 90% (min)",
        f"If intubation fails (urgency {' / '.join(CATEGORIES)})",
        "Flags",
    ]
    table: list[list[object]] = [list(header)]
    headings: list[int] = []  # table rows that open a group
    bad_rows: list[int] = []
    groups = [(None, [r for r in ordered if r.level is None])] + [
        (level, [r for r in ordered if r.level == level]) for level in (4, 3, 2, 1)
    ]
    for level, members in groups:
        if not members:
            continue
        headings.append(len(table))
        title = (
            f"Not planned: bad input to correct ({len(members)})"
            if level is None
            else _level_heading(level, len(members))
        )
        table.append([Paragraph(f"<b>{escape(title)}</b>", small)] + [""] * 7)
        for r in members:
            if level is None:
                bad_rows.append(len(table))
                table.append([para(r.id or f"row {r.row}", small), "-", para(r.problems, small)])
                table[-1] += [""] * 5
                continue
            table.append(
                [
                    para(r.id, small),
                    str(r.level),
                    para(r.drivers, small),
                    f"{r.first_tube_mm:.1f}" if r.first_tube_mm is not None else "",
                    f"{r.supraglottic_size:g}" if r.supraglottic_size is not None else "",
                    f"{r.minutes_to_spo2_90}",
                    para(_decision(r), small),
                    para(", ".join(FLAG_WORDS[f] for f in r.flags), small),
                ]
            )
    fractions = (0.07, 0.04, 0.33, 0.05, 0.04, 0.07, 0.22, 0.18)
    ruled = grid(table, [width * f for f in fractions])
    for i in headings:
        ruled.setStyle(
            [
                ("SPAN", (0, i), (7, i)),
                ("BACKGROUND", (0, i), (7, i), PALE),
                ("LINEABOVE", (0, i), (7, i), 1.2, colors.black),
            ]
        )
    for i in bad_rows:
        ruled.setStyle([("SPAN", (2, i), (7, i))])
    flags = [
        Paragraph(
            f"<b>{escape(f.name)}</b>: {escape(f.rule)} "
            f"({escape(source_label(f.evidence.source, f.evidence.basis))}).",
            small,
        )
        for f in FLAGS
    ]
    encoding = f"; the list was read as {read_as} text" if read_as else ""
    story: list[object] = [
        para(
            f"Clinic summary: {len(rows)} rows, {bad} not planned (bad input){encoding}", st["h1"]
        ),
        para(f"{CAUTION_AID} {CAUTION_REASSESS}", st["caution"]),
        Spacer(0, 3),
        ruled,
        Spacer(0, 4),
        Paragraph("<b>What the flags mean</b>", small),
        *flags,
        Spacer(0, 2),
        para(
            "Level: the plan's airway level (1-4). Tube: the first tracheal tube. SGA: the "
            "supraglottic airway size. SpO2 90%: predicted minutes of apnoea to SpO2 90% (a "
            "model estimate). If intubation fails: the pre-made decision for each urgency "
            "category, as her plan gives it. Each woman's full plan, with its sources, is in "
            "<id>.json (and <id>.pdf).",
            small,
        ),
    ]
    footer = (
        f"airway {__version__}, rules {RULES_VERSION}. "
        "Decision aid: not a substitute for clinical judgement."
    )
    return build_landscape_pdf(story, paper, "Clinic summary: airway plans", footer)
