"""What changed between two assessments, as lines of text for every output."""

import textwrap

from ..engine.plan import CAUTION_AID, CAUTION_REASSESS
from ..engine.plan_model import Comparison, Plan
from ..engine.scoring import level_heading


def change_lines(comparison: Comparison, most: int | None = None) -> list[str]:
    """One line a change: '! airway level: ... -> ...' ('!' marks more dangerous)."""
    shown = comparison.changes if most is None else comparison.changes[:most]
    lines = [
        f"{'!' if c.danger > 0 else '-'} {c.label or c.what}: {c.before} -> {c.after}"
        + (f" ({c.why})" if c.why else "")
        for c in shown
    ]
    if most is not None and len(comparison.changes) > most:
        lines.append(f"- and {len(comparison.changes) - most} more (airway compare shows all)")
    return lines or ["- no finding and no plan value changed"]


def since_title(comparison: Comparison) -> str:
    when = comparison.earlier_assessed_on or f"input {comparison.earlier_sha256[:12]}"
    verdict = (
        "more dangerous now"
        if comparison.more_dangerous
        else "plan changed"
        if comparison.plan_changed
        else "plan unchanged"
    )
    return f"Changed since the assessment of {when}: {verdict}"


def render_comparison(comparison: Comparison, later: Plan) -> str:
    """The comparison at 80 columns, with the later plan's key values and the cautions."""
    t = later.equipment.tracheal_tube_mm
    lines = [since_title(comparison).upper(), ""]
    for line in change_lines(comparison):
        lines += textwrap.wrap(line, 80, subsequent_indent="    ", break_on_hyphens=False)
    lines += [
        "",
        "Later plan: "
        + f"{level_heading(later.risk.level)}; tubes {t.first:.1f} / {t.backup:.1f} / "
        f"{t.smallest:.1f} mm; supraglottic size {later.equipment.supraglottic_size:g}; "
        f"pre-made decision: {later.decision.phrase}.",
        "'!' marks a change that makes the plan more dangerous.",
        CAUTION_AID,
        CAUTION_REASSESS,
    ]
    out: list[str] = []
    for line in lines:
        out += textwrap.wrap(line, 80, break_on_hyphens=False) or [""]
    return "\n".join(out) + "\n"
