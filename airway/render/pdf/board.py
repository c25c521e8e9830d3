"""The ward's airway board as a landscape PDF (one page for a ward's worth of women)."""

from reportlab.platypus import Spacer

from ... import __version__
from ...engine.plan import CAUTION_AID, CAUTION_REASSESS, RULES_VERSION
from ...engine.scoring import LEVEL_LABELS
from ...workflows.board import BoardRow, women
from .fonts import font, use_fonts
from .kit import WARN, build_landscape_pdf, grid, landscape_width, para, styles


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
    st = styles()
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
                para(r.name + (" (on the ward now)" if r.on_ward else ""), st["bold"]),
                para(f"{r.level}: {LEVEL_LABELS[r.level]}", st["body"]),
                f"{r.first_tube_mm:.1f} mm",
                f"size {r.supraglottic_size:g}",
                f"{r.minutes_to_spo2_90} min",
                para(r.decision, st["body"]),
                r.assessed_on or "not recorded",
                para("; ".join(r.warnings), st["caution"]) if r.warnings else "",
            ]
        )
    # The decision gets the room it needs on two lines; 'Check' holds short warnings.
    fractions = (0.12, 0.14, 0.08, 0.07, 0.08, 0.24, 0.10, 0.17)
    ruled = grid(table, [width * f for f in fractions], size=9)
    ruled.setStyle(
        [
            ("LEADING", (0, 0), (-1, -1), 11),
            ("TOPPADDING", (0, 0), (-1, -1), 2),
            ("BOTTOMPADDING", (0, 0), (-1, -1), 2),
            ("FONTNAME", (0, 0), (-1, 0), font(bold=True)),
        ]
    )
    for i, r in enumerate(rows, start=1):
        if r.level >= 3:
            ruled.setStyle([("LINEBEFORE", (0, i), (0, i), 3, WARN)])
    story: list[object] = [
        para(
            f"Labour ward airway board, printed {today}: "
            f"{women(len(rows) if women_count is None else women_count)}",
            st["h1"],
        ),
        para(f"{CAUTION_AID} {CAUTION_REASSESS}", st["caution"]),
        Spacer(0, 3),
        ruled,
        Spacer(0, 4),
        para(
            "The women on the ward now (in labour, or assessed today or yesterday) first, "
            "then by airway level, highest first (a bar marks levels 3 and 4). 'Check' marks "
            f"a plan older than {max_age_days} days, dated after today, without an assessment "
            f"date, or made under rules other than {RULES_VERSION}: reassess and replan before "
            "relying on it; and a plan replaced by a newer one for the same record number. "
            "SpO2 90% is the predicted minutes of apnoea (model estimate); the full plan, "
            "with its sources, is in each woman's plan file.",
            small,
        ),
        *(para(n, small) for n in notes),
    ]
    footer = (
        f"airway {__version__}, rules {RULES_VERSION}. "
        "Decision aid: not a substitute for clinical judgement."
    )
    return build_landscape_pdf(story, paper, "Labour ward airway board", footer)
