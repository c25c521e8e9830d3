"""Reassessment: what changed between two assessments of the same woman.

The Mallampati class often rises in labour (Kodali 2008) and pre-eclampsia can
swell the airway within hours, so the bedside question is "what changed since
the clinic, and does the plan change?". :func:`compare_plans` answers it from
the two plans: every finding that changed (including assessed <-> not
assessed), each factor's contribution, the airway level, tubes, supraglottic
size, doses, the decision and the predicted minutes to desaturation, the
changes that make the plan more dangerous first. Pure.
"""

from typing import Any

from ..fields import LABELS, field_specs
from .doses import dose_text
from .factors import NECK_CIRCUMFERENCE_LARGE_CM, PLATELETS_LOW_10E9
from .oxygenation import minutes_label
from .plan_model import Change, Comparison, Plan
from .scoring import finding_name, level_heading

NOT_ASSESSED = "not assessed"

# How much each kind of change weighs when ordering (project rule: the level first,
# then a possibly different woman, then oxygenation, factors, equipment, findings).
LEVEL_WEIGHT = 10.0
IDENTITY_WEIGHT = 50.0  # two plans that may not be the same woman outrank everything
MINUTES_WEIGHT = 2.0  # per minute less to SpO2 90%
LOST_FINDING_WEIGHT = 0.5  # a finding assessed before and not now: less is known
CLINICAL_WEIGHT = 3.0  # a change a clinician must hear of, whatever the index does

# The plan's own thresholds, so that a change "past a threshold" is one the plan acts on.
_ORDERED = {
    "preeclampsia.status": ("none", "without_severe_features", "with_severe_features"),
    "history.intubation": ("none", "difficult", "failed"),
    "airway.neck_movement": ("normal", "reduced", "fixed"),
}


_LOW_PLATELETS = (
    f"platelets now below {PLATELETS_LOW_10E9:g} x10^9/L: regional block may be contraindicated"
)
_LARGE_NECK = "neck now over 43 cm: mask ventilation may be difficult"
_NOW_TRUE = {
    "patient.in_labour": "now in labour: the Mallampati class rises, the stomach is full",
    "history.difficult_mask_ventilation": "difficult mask ventilation now known",
}


def _crossed_below(before: Any, after: Any, limit: float) -> bool:
    return isinstance(after, int | float) and after < limit and (before is None or before >= limit)


def clinical_reason(path: str, before: Any, after: Any) -> str:
    """Why a changed finding matters at the bedside, or '' when it does not on its own."""
    if path == "preeclampsia.signs":
        new = sorted(set(after or ()) - set(before or ()))
        return ("new sign of airway oedema: " + ", ".join(new).replace("_", " ")) if new else ""
    if path == "preeclampsia.platelets_10e9_per_l":
        return _LOW_PLATELETS if _crossed_below(before, after, PLATELETS_LOW_10E9) else ""
    if path == "airway.mallampati" and isinstance(before, int) and isinstance(after, int):
        return "Mallampati class rose" if after > before else ""
    if path == "airway.neck_circumference_cm" and isinstance(after, int | float):
        was_small = before is None or before <= NECK_CIRCUMFERENCE_LARGE_CM
        return _LARGE_NECK if after > NECK_CIRCUMFERENCE_LARGE_CM and was_small else ""
    if path in _ORDERED and before in _ORDERED[path] and after in _ORDERED[path]:
        order = _ORDERED[path]
        return "worse than before" if order.index(after) > order.index(before) else ""
    return _NOW_TRUE.get(path, "") if after is True and before is not True else ""


def _flatten(data: dict[str, Any], prefix: str = "") -> dict[str, Any]:
    out: dict[str, Any] = {}
    for key, value in data.items():
        path = f"{prefix}{key}"
        if isinstance(value, dict):
            out.update(_flatten(value, f"{path}."))
        else:
            out[path] = value
    return out


def _show(value: Any) -> str:
    if value is None or value == [] or value == ():
        return NOT_ASSESSED
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, list | tuple):
        return ", ".join(str(v).replace("_", " ") for v in value)  # 'voice change'
    if isinstance(value, str):
        return value.replace("_", " ")  # 'with severe features'
    return f"{value:g}" if isinstance(value, float) else str(value)


def _identity(earlier: Plan, later: Plan) -> list[Change]:
    a, b = earlier.assessment.identity, later.assessment.identity
    out = []
    for field in ("record_number", "date_of_birth"):
        x, y = getattr(a, field), getattr(b, field)
        if x and y and x.strip().lower() != y.strip().lower():
            # The values themselves are not repeated here: they are identifiers.
            out.append(
                Change(
                    kind="identity",
                    what=f"{field.replace('_', ' ')} differs: these may be two different women",
                    before="(earlier)",
                    after="(later)",
                    danger=IDENTITY_WEIGHT,
                )
            )
    return out


def _findings(earlier: Plan, later: Plan) -> list[Change]:
    before = _flatten(earlier.assessment.model_dump(mode="json"))
    after = _flatten(later.assessment.model_dump(mode="json"))
    out = []
    for spec in field_specs():
        if spec.section == "identity" or spec.path in ("label", "assessed_on"):
            continue
        x, y = before.get(spec.path), after.get(spec.path)
        shown = [_show(v) for v in (x, y)]
        if spec.kind == "choices":  # an empty list of signs means none was found
            shown = ["none" if v == NOT_ASSESSED else v for v in shown]
        if shown[0] == shown[1]:
            continue
        # A finding examined before and not now leaves less known; the context (urgency,
        # team) is set on the day and is not a finding.
        lost = shown[1] == NOT_ASSESSED and spec.section != "context"
        why = clinical_reason(spec.path, x, y)
        out.append(
            Change(
                kind="finding",
                what=spec.path,
                before=shown[0],
                after=shown[1],
                danger=CLINICAL_WEIGHT if why else LOST_FINDING_WEIGHT if lost else 0.0,
                label=LABELS.get(spec.path, ""),
                why=why,
            )
        )
    return out


def _factors(earlier: Plan, later: Plan) -> list[Change]:
    before = {f.id: f for f in earlier.risk.factors}
    out = []
    for f in later.risk.factors:
        e = before.get(f.id)
        if e is None:
            continue
        if f.role == "override":
            if bool(e.present) != bool(f.present):
                out.append(
                    Change(
                        kind="factor",
                        what=f"{f.label} (forces airway level 4)",
                        before="present" if e.present else "absent",
                        after="present" if f.present else "absent",
                        danger=LEVEL_WEIGHT if f.present else -LEVEL_WEIGHT,
                    )
                )
            continue
    # Factors that read one finding (Mallampati 2/3/4, the two pre-eclampsia grades)
    # are compared as one: their net contribution.
    groups: dict[str, list[tuple[float, float, str]]] = {}
    unassessed: dict[str, tuple[bool, bool]] = {}  # finding: (not assessed before, now)
    for f in later.risk.factors:
        e = before.get(f.id)
        if e is None or f.role == "override":
            continue
        name = finding_name(f.id)
        groups.setdefault(name, []).append((e.contribution, f.contribution, f.label))
        unassessed[name] = (e.present is None, f.present is None)
    for name, members in groups.items():
        old = sum(m[0] for m in members)
        new = sum(m[1] for m in members)
        delta = round(new - old, 2)
        if not delta:
            continue
        # "none" would read as a normal finding where the finding was not assessed.
        empty_before, empty_now = ("not assessed" if u else "none" for u in unassessed[name])
        was = [m[2] for m in members if m[0] > 0]
        now = [m[2] for m in members if m[1] > 0]
        if len(members) == 1 or was == now:
            what = members[0][2] if len(members) == 1 else now[0]
        else:  # "Mallampati class 3 (was Mallampati class 2)"
            what = f"{now[0] if now else empty_now} (was {was[0] if was else empty_before})"
        out.append(
            Change(
                kind="factor", what=what, before=f"+{old:.2f}", after=f"+{new:.2f}", danger=delta
            )
        )
    return out


def _plan_values(earlier: Plan, later: Plan) -> list[Change]:
    out = []
    if earlier.risk.level != later.risk.level:
        out.append(
            Change(
                kind="level",
                what="airway level",
                before=level_heading(earlier.risk.level),
                after=level_heading(later.risk.level),
                danger=LEVEL_WEIGHT * (later.risk.level - earlier.risk.level),
            )
        )
    t0, t1 = earlier.equipment.tracheal_tube_mm, later.equipment.tracheal_tube_mm
    tubes0 = f"{t0.first:.1f} / {t0.backup:.1f} / {t0.smallest:.1f} mm"
    tubes1 = f"{t1.first:.1f} / {t1.backup:.1f} / {t1.smallest:.1f} mm"
    if tubes0 != tubes1:
        # Smaller tubes are chosen because the airway is expected to be narrower.
        out.append(
            Change(
                kind="equipment",
                what="tracheal tubes",
                before=tubes0,
                after=tubes1,
                danger=t0.first - t1.first,
            )
        )
    m0, m1 = earlier.oxygenation.minutes_to_spo2_90, later.oxygenation.minutes_to_spo2_90
    horizon = later.oxygenation.horizon_minutes
    if m0 != m1:
        a = horizon if m0 is None else m0
        b = horizon if m1 is None else m1
        out.append(
            Change(
                kind="oxygenation",
                what="minutes to SpO2 90% (model estimate)",
                before=minutes_label(m0, horizon),
                after=minutes_label(m1, horizon),
                danger=round(MINUTES_WEIGHT * (a - b), 2),
            )
        )
    # Changes that neither add nor take away danger on their own: shown, not ranked.
    e0, e1 = earlier.equipment, later.equipment
    neutral = [
        (
            "equipment",
            "supraglottic size",
            f"{e0.supraglottic_size:g}",
            f"{e1.supraglottic_size:g}",
        ),
        ("equipment", "first device", e0.first_laryngoscope, e1.first_laryngoscope),
        *(
            ("dose", d.label, dose_text(e).split(" (")[0], dose_text(d).split(" (")[0])
            for e, d in zip(earlier.doses, later.doses, strict=True)
        ),
        ("decision", "pre-made decision", earlier.decision.phrase, later.decision.phrase),
    ]
    out += [
        Change(kind=kind, what=what, before=x, after=y, danger=0.0)
        for kind, what, x, y in neutral
        if x != y
    ]
    return out


def compare_plans(earlier: Plan, later: Plan) -> Comparison:
    """Every change from ``earlier`` to ``later``, the most dangerous first."""
    changes = [
        *_identity(earlier, later),
        *_plan_values(earlier, later),
        *_factors(earlier, later),
        *_findings(earlier, later),
    ]
    # Stable: equal danger keeps the order above (identity, plan values, factors, findings).
    ordered = sorted(changes, key=lambda c: -c.danger)
    plan_kinds = {"level", "equipment", "dose", "decision"}
    a, b = earlier.assessment.assessed_on, later.assessment.assessed_on
    return Comparison(
        earlier_sha256=earlier.input_sha256,
        earlier_assessed_on=None if a is None else a.isoformat(),
        later_assessed_on=None if b is None else b.isoformat(),
        more_dangerous=any(c.danger > 0 for c in ordered),
        plan_changed=any(c.kind in plan_kinds for c in ordered),
        changes=tuple(ordered),
    )
