"""The ward's airway board as a landscape PDF (one page for a ward's worth of women)."""

from __future__ import annotations

from reportlab.platypus import Spacer

from . import __version__
from .board import BoardRow, women
from .plan import CAUTION_AID, CAUTION_REASSESS, RULES_VERSION
from .render_pdf import (
    WARN,
    _grid,
    _p,
    _styles,
    build_landscape_pdf,
    font,
    landscape_width,
    use_fonts,
)
from .scoring import LEVEL_LABELS


def render_board_pdf(
    rows: list[BoardRow],
    today: str,
    max_age_days: int,
    notes: list[str],
    paper: str = "A4",
    women_count: int | None = None,
) -> bytes:
    """The board as PDF bytes; ``women_count`` when plans of one woman share the board."""
    use_fonts(rows, notes)  # before any paragraph: they resolve their faces as made
    st = _styles()
    small = st["small"]
    width = landscape_width(paper)
    table: list[list[object]] = [
        [
            "Woman (id)",
            "Airway level",
            "First tube",
            "SGA",
            "SpO2 90%",
            "If intubation fails",
            "Assessed",
            "Check",
        ]
    ]
    for r in rows:
        table.append(
            [
                _p(r.name, st["bold"]),
                _p(f"{r.level}: {LEVEL_LABELS[r.level]}", st["body"]),
                f"{r.first_tube_mm:.1f} mm",
                f"size {r.supraglottic_size:g}",
                f"{r.minutes_to_spo2_90} min",
                _p(r.decision, st["body"]),
                r.assessed_on or "not recorded",
                _p("; ".join(r.warnings), st["caution"]) if r.warnings else "",
            ]
        )
    # The decision gets the room it needs on two lines; 'Check' holds short warnings.
    fractions = (0.12, 0.14, 0.08, 0.07, 0.08, 0.24, 0.10, 0.17)
    grid = _grid(table, [width * f for f in fractions], size=9)
    grid.setStyle(
        [
            ("LEADING", (0, 0), (-1, -1), 11),
            ("TOPPADDING", (0, 0), (-1, -1), 2),
            ("BOTTOMPADDING", (0, 0), (-1, -1), 2),
            ("FONTNAME", (0, 0), (-1, 0), font(bold=True)),
        ]
    )
    for i, r in enumerate(rows, start=1):
        if r.level >= 3:
            grid.setStyle([("LINEBEFORE", (0, i), (0, i), 3, WARN)])
    story: list[object] = [
        _p(
            f"Labour ward airway board, printed {today}: "
            f"{women(len(rows) if women_count is None else women_count)}",
            st["h1"],
        ),
        _p(f"{CAUTION_AID} {CAUTION_REASSESS}", st["caution"]),
        Spacer(0, 3),
        grid,
        Spacer(0, 4),
        _p(
            f"Highest airway level first (a bar marks levels 3 and 4). 'Check' marks a plan "
            f"older than {max_age_days} days, dated after today, without an assessment date, "
            f"or made under rules other than {RULES_VERSION}: reassess and replan before "
            "relying on it; and a plan replaced by a newer one for the same record number. "
            "SpO2 90% is the predicted minutes of apnoea (model estimate); the full plan, "
            "with its sources, is in each woman's plan file.",
            small,
        ),
        *(_p(n, small) for n in notes),
    ]
    footer = (
        f"airway {__version__}, rules {RULES_VERSION}. "
        "Decision aid: not a substitute for clinical judgement."
    )
    return build_landscape_pdf(story, paper, "Labour ward airway board", footer)
