"""The clinic summary as a PDF: every woman of the list, highest airway level first.

A4 (or US Letter) landscape, the column headings repeated on every page, the
rule behind each flag in the footer block. Shares fonts, styles and the page
footer with the patient plan (:mod:`airway.render_pdf`).
"""

from reportlab.platypus import Paragraph, Spacer

from ... import __version__
from ...engine.plan import CAUTION_AID, CAUTION_REASSESS, RULES_VERSION
from ...engine.scoring import LEVEL_LABELS
from ...engine.triage import FLAGS
from ...sources import source_label
from ...workflows.clinic import SummaryRow, sort_summary
from .fonts import font, use_fonts
from .kit import build_landscape_pdf, grid, landscape_width, para, styles
from .markup import escape

FLAG_WORDS = {f.id: f.name for f in FLAGS}


def render_summary_pdf(rows: list[SummaryRow], paper: str = "A4") -> bytes:
    """The summary table as PDF bytes (one page when it fits)."""
    use_fonts(rows)  # before any paragraph: they resolve their faces as made
    st = styles()
    small = st["small"]
    width = landscape_width(paper)
    ordered = sort_summary(rows)
    bad = sum(1 for r in rows if r.level is None)
    table: list[list[object]] = [
        ["Id", "Airway level", "What drove it", "Tube", "SGA", "SpO2 90%", "Decision", "Flags"]
    ]
    for r in ordered:
        if r.level is None:
            table.append(
                [para(r.id or f"row {r.row}", small), "NOT PLANNED", para(r.problems, small)]
                + [""] * 5
            )
            continue
        table.append(
            [
                para(r.id, small),
                para(f"{r.level}: {LEVEL_LABELS[r.level]}", small),
                para(r.drivers, small),
                f"{r.first_tube_mm:.1f}" if r.first_tube_mm is not None else "",
                f"{r.supraglottic_size:g}" if r.supraglottic_size is not None else "",
                f"{r.minutes_to_spo2_90} min",
                para(r.decision, small),
                para(", ".join(FLAG_WORDS[f] for f in r.flags), small),
            ]
        )
    fractions = (0.10, 0.12, 0.26, 0.05, 0.04, 0.07, 0.22, 0.14)
    ruled = grid(table, [width * f for f in fractions])
    for i, r in enumerate(ordered, start=1):
        if r.level is None:
            ruled.setStyle(
                [("SPAN", (2, i), (7, i)), ("FONTNAME", (1, i), (1, i), font(bold=True))]
            )
    rules = " ".join(
        f"<b>{escape(f.name)}</b>: {escape(f.rule)} "
        f"({escape(source_label(f.evidence.source, f.evidence.basis))})."
        for f in FLAGS
    )
    story: list[object] = [
        para(f"Clinic summary: {len(rows)} rows, {bad} not planned (bad input)", st["h1"]),
        para(f"{CAUTION_AID} {CAUTION_REASSESS}", st["caution"]),
        Spacer(0, 3),
        ruled,
        Spacer(0, 4),
        Paragraph("<b>Flags.</b> " + rules, small),
        para(
            "Airway level is the plan's level (1-4); tube is the first tracheal tube (mm); "
            "SGA the supraglottic size; SpO2 90% the predicted minutes of apnoea (model "
            "estimate). Each woman's full plan, with its sources, is in <id>.json / <id>.pdf.",
            small,
        ),
    ]
    footer = (
        f"airway {__version__}, rules {RULES_VERSION}. "
        "Decision aid: not a substitute for clinical judgement."
    )
    return build_landscape_pdf(story, paper, "Clinic summary: airway plans", footer)
