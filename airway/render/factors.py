"""The factor catalogue as rows, for ``airway factors`` and the documentation."""

from __future__ import annotations

import math
import textwrap

from ..engine.factors import CATALOGUE
from ..sources import BASIS_LABEL, SOURCES


def factor_rows() -> list[dict[str, object]]:
    """One dict per catalogued factor: id, label, role, weight, log weight, source."""
    return [
        {
            "id": f.id,
            "label": f.label,
            "role": f.role,
            "kind": f.kind,
            "weight": f.weight,
            "log_weight": None if f.weight is None else round(math.log(f.weight), 4),
            "source": f.evidence.source,
            "citation": SOURCES[f.evidence.source].citation,
            "basis": f.evidence.basis,
            "note": f.evidence.note,
            "prepares": f.prepares,
        }
        for f in CATALOGUE
    ]


def render_factor_table(rows: list[dict[str, object]]) -> str:
    """The catalogue as text at 80 columns."""
    lines = ["RISK FACTORS (weight: ratio; ln: what one unit adds to the index)", ""]
    for r in rows:
        weight = (
            "forces airway level 4"
            if r["role"] == "override"
            else (
                "preparation only"
                if r["weight"] is None
                else f"{r['weight']:g} (ln {r['log_weight']:.2f})"
            )
        )
        lines.append(f"{r['id']:<30} {weight}")
        src = f"{r['label']}. {SOURCES[str(r['source'])].short} [{BASIS_LABEL[str(r['basis'])]}]"
        if r["note"]:
            src += f": {r['note']}"
        lines += textwrap.wrap(src, 80, initial_indent="    ", subsequent_indent="    ")
    return "\n".join(lines) + "\n"
