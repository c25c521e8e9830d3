"""The clinic summary as a PDF: every woman of the list, highest airway level first.

A4 (or US Letter) landscape, the column headings repeated on every page, the
rule behind each flag in the footer block. Shares fonts, styles and the page
footer with the patient plan (:mod:`airway.render_pdf`).
"""

from __future__ import annotations

from reportlab.platypus import Paragraph, Spacer

from . import __version__
from .clinic import FLAG_RULES, SummaryRow, sort_summary
from .markup import escape
from .plan import CAUTION_AID, CAUTION_REASSESS, RULES_VERSION
from .render_pdf import (
    _grid,
    _p,
    _styles,
    build_landscape_pdf,
    font,
    landscape_width,
    use_fonts,
)
from .scoring import LEVEL_LABELS
from .sources import source_label

FLAG_WORDS = {
    "senior_review": "senior review",
    "early_epidural": "early epidural",
    "awake_or_regional": "awake / regional",
}


def render_summary_pdf(rows: list[SummaryRow], paper: str = "A4") -> bytes:
    """The summary table as PDF bytes (one page when it fits)."""
    use_fonts(rows)  # before any paragraph: they resolve their faces as made
    st = _styles()
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
                [_p(r.id or f"row {r.row}", small), "NOT PLANNED", _p(r.problems, small)] + [""] * 5
            )
            continue
        table.append(
            [
                _p(r.id, small),
                _p(f"{r.level}: {LEVEL_LABELS[r.level]}", small),
                _p(r.drivers, small),
                f"{r.first_tube_mm:.1f}" if r.first_tube_mm is not None else "",
                f"{r.supraglottic_size:g}" if r.supraglottic_size is not None else "",
                f"{r.minutes_to_spo2_90} min",
                _p(r.decision, small),
                _p(", ".join(FLAG_WORDS[f] for f in r.flags), small),
            ]
        )
    fractions = (0.10, 0.12, 0.26, 0.05, 0.04, 0.07, 0.22, 0.14)
    grid = _grid(table, [width * f for f in fractions])
    for i, r in enumerate(ordered, start=1):
        if r.level is None:
            grid.setStyle([("SPAN", (2, i), (7, i)), ("FONTNAME", (1, i), (1, i), font(bold=True))])
    rules = " ".join(
        f"<b>{escape(FLAG_WORDS[k])}</b>: {escape(text)} "
        f"({escape(source_label(e.source, e.basis))})."
        for k, (text, e) in FLAG_RULES.items()
    )
    story: list[object] = [
        _p(f"Clinic summary: {len(rows)} rows, {bad} not planned (bad input)", st["h1"]),
        _p(f"{CAUTION_AID} {CAUTION_REASSESS}", st["caution"]),
        Spacer(0, 3),
        grid,
        Spacer(0, 4),
        Paragraph("<b>Flags.</b> " + rules, small),
        _p(
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
