"""Equipment to open: tube sizes, supraglottic size, laryngoscopes, front-of-neck kit.

Sizes come only from the unit's catalogue (``airway/data/equipment.toml`` by
default, or the unit's own file), so the plan never suggests a size that is not
on the trolley.
"""

from typing import NamedTuple

from ..assessment import Assessment
from ..catalogue import Catalogue
from ..sources import Evidence
from .body import BodySize

# Desired first / backup / smallest tube (ID, mm), a project rule. The traditional
# obstetric range is 6.0-6.5 mm (MGH handbook); the 7.0 mm first tube rests on the
# usual size for women outside pregnancy (7.0-7.5 mm, Karmali & Rose 2020, a
# non-obstetric review), with 6.5 and 6.0 mm from the obstetric range; 6.0 mm still
# takes the usual intubation aids (Karmali & Rose 2020).
TUBES_ROUTINE = (7.0, 6.5, 6.0)
TUBES_PREECLAMPSIA = (6.5, 6.0, 5.5)
TUBES_OEDEMA = (6.0, 5.5, 5.0)
TUBE_EVIDENCE = Evidence(
    "karmali2020",
    "project_rule",
    "7.0 mm first as for women outside pregnancy; 6.0-6.5 mm the traditional obstetric "
    "range (MGH handbook); smaller with pre-eclampsia or oedema is expert opinion",
)
SGA_EVIDENCE = Evidence(
    "avidan2015", "published", "makers' weight bands differ and are not evidence-based"
)
FONA_EVIDENCE = Evidence(
    "frerk2015", "from_memory", "scalpel (wide no. 10 blade), bougie, 6.0 mm cuffed tube"
)
# Short handle when breasts are large (Datta & Briwa 1981) or BMI is high; the
# BMI threshold is a project rule.
SHORT_HANDLE_BMI = 40.0
VIDEO_FIRST_LEVEL = 3  # project rule: videolaryngoscope as first device from level 3
DEVICE_RULE_EVIDENCE = Evidence(
    "project", "project_rule", "short handle from BMI 40; videolaryngoscope first from level 3"
)


def _snap(desired: float, stocked: tuple[float, ...]) -> float:
    """Largest stocked size not above ``desired``; the smallest stocked if none."""
    below = [s for s in stocked if s <= desired]
    return max(below) if below else min(stocked)


class TubeSizes(NamedTuple):
    first: float
    backup: float
    smallest: float
    reason: str
    evidence: str
    # Sizes the plan wanted that the unit does not stock (a larger one stands in).
    unmet: tuple[float, ...] = ()


class Item(NamedTuple):
    """One thing to have ready, and why."""

    name: str
    detail: str
    why: str
    open_now: bool  # opened on top of the trolley, not just in the room


class Equipment(NamedTuple):
    tracheal_tube_mm: TubeSizes
    supraglottic_size: float
    supraglottic_device: str
    supraglottic_basis: str
    front_of_neck_tube_mm: float
    first_laryngoscope: str
    items: tuple[Item, ...]
    warnings: tuple[str, ...] = ()  # what the unit's stock cannot give this plan


_TUBE_BASIS = TUBE_EVIDENCE.describe()
_SGA_BASIS = SGA_EVIDENCE.describe()


def choose_tubes(assessment: Assessment, catalogue: Catalogue) -> TubeSizes:
    """First, backup and smallest tube from the stocked sizes."""
    pe = assessment.preeclampsia
    signs = set(pe.signs)
    if signs or pe.status == "with_severe_features":
        desired, reason = TUBES_OEDEMA, "airway oedema signs or severe pre-eclampsia"
    elif pe.status == "without_severe_features":
        desired, reason = TUBES_PREECLAMPSIA, "pre-eclampsia"
    else:
        desired, reason = TUBES_ROUTINE, "routine obstetric sizes"
    stocked = tuple(sorted(set(catalogue.tracheal_tube_sizes_mm)))
    first = _snap(desired[0], stocked)
    backup = min(first, _snap(desired[1], stocked))
    smallest = min(backup, _snap(desired[2], stocked))
    unmet = tuple(d for d, got in zip(desired, (first, backup, smallest), strict=True) if got > d)
    return TubeSizes(
        first=first,
        backup=backup,
        smallest=smallest,
        reason=reason,
        evidence=_TUBE_BASIS,
        unmet=unmet,
    )


def stock_warnings(tubes: TubeSizes, catalogue: Catalogue) -> tuple[str, ...]:
    """What the unit's stock cannot give this plan: never a silent larger tube, never a
    small tube without an aid that passes it."""
    out = []
    if tubes.unmet:
        sizes = ", ".join(f"{s:.1f}" for s in tubes.unmet)
        out.append(
            f"The unit's catalogue stocks no {sizes} mm tracheal tube: a larger size stands in. "
            "Bring the smaller tube to theatre."
        )
    adj = catalogue.airway_adjuncts
    aid_fits = adj.small_tube_aid_fits_from_mm
    if tubes.smallest < adj.bougie_fits_from_mm and (aid_fits is None or tubes.smallest < aid_fits):
        out.append(
            f"The {tubes.smallest:.1f} mm tube is too small for the bougie, and the unit's "
            "catalogue lists no small-tube aid that passes it: bring a small bougie or an "
            "exchange catheter."
        )
    return tuple(out)


def choose_equipment(
    assessment: Assessment,
    body: BodySize,
    level: int,
    catalogue: Catalogue,
    short_apnoea: bool = False,
) -> Equipment:
    """Everything to open for this woman, each item with its reason."""
    tubes = choose_tubes(assessment, catalogue)
    sga = catalogue.supraglottic_size(body.weight_kg)
    lar = catalogue.laryngoscopes
    adj = catalogue.airway_adjuncts
    high_bmi = body.bmi is not None and body.bmi >= SHORT_HANDLE_BMI
    breasts = bool(assessment.airway.large_breasts)
    video_first = level >= VIDEO_FIRST_LEVEL or high_bmi
    fona_open = level == 4 or short_apnoea
    high_flow = (
        short_apnoea
        or level >= VIDEO_FIRST_LEVEL
        or bool(assessment.history.obstructive_sleep_apnoea)
    )
    items = [
        Item(
            name="Tracheal tubes (cuffed)",
            detail=f"{tubes.first:.1f} mm first, {tubes.backup:.1f} mm backup, "
            f"{tubes.smallest:.1f} mm smallest",
            why=tubes.reason,
            open_now=True,
        ),
        Item(
            name="Videolaryngoscope",
            detail=lar.videolaryngoscope,
            why=f"first device: airway level {level}{', BMI 40 or more' if high_bmi else ''}"
            if video_first
            else "in the room, on and checked",
            open_now=video_first,
        ),
    ]
    if breasts or high_bmi:
        why = "large breasts" if breasts else "BMI 40 or more"
        items.append(
            Item(
                name="Short-handled laryngoscope",
                detail=lar.short_handle,
                why=f"{why}: a standard handle may foul the chest (Datta & Briwa 1981)",
                open_now=True,
            )
        )
    items += [
        Item(
            name="Direct laryngoscope", detail=lar.direct, why="standard", open_now=not video_first
        ),
        Item(name="Bougie", detail=adj.bougie, why="first-attempt aid", open_now=True),
        *_small_tube_aid(tubes, catalogue),
        Item(
            name="Supraglottic airway",
            detail=f"size {sga:g}, {catalogue.supraglottic.device}",
            why=f"rescue after failed intubation; size by weight {body.weight_kg:g} kg "
            "(makers' bands, not evidence-based)",
            open_now=True,
        ),
        Item(
            name="Face mask and oral airways",
            detail=f"{adj.face_masks}; {adj.oral_airways}",
            why="pre-oxygenation and two-person mask rescue",
            open_now=True,
        ),
        Item(
            name="Front-of-neck kit",
            detail=f"scalpel with a wide (no. 10) blade, bougie, "
            f"{catalogue.front_of_neck_tube_mm:.1f} mm cuffed tube",
            why="can't intubate, can't oxygenate"
            + ("; opened and within reach" if fona_open else ""),
            open_now=fona_open,
        ),
        Item(
            name="Nasal oxygen",
            detail="nasal cannulae; high-flow nasal oxygen set up"
            if high_flow
            else "nasal cannulae at low flow",
            why="apnoeic oxygenation"
            + ("; short predicted time to desaturation" if short_apnoea else ""),
            open_now=True,
        ),
    ]
    return Equipment(
        tracheal_tube_mm=tubes,
        supraglottic_size=sga,
        supraglottic_device=catalogue.supraglottic.device,
        supraglottic_basis=_SGA_BASIS,
        front_of_neck_tube_mm=catalogue.front_of_neck_tube_mm,
        first_laryngoscope="videolaryngoscope"
        if video_first
        else "direct laryngoscope (videolaryngoscope on and ready)",
        items=tuple(items),
        warnings=stock_warnings(tubes, catalogue),
    )


def _small_tube_aid(tubes: TubeSizes, catalogue: Catalogue) -> list[Item]:
    """The aid that passes the smallest tube, when the bougie does not (and one is stocked)."""
    adj = catalogue.airway_adjuncts
    fits = adj.small_tube_aid_fits_from_mm
    if tubes.smallest >= adj.bougie_fits_from_mm or adj.small_tube_aid is None or fits is None:
        return []
    if tubes.smallest < fits:
        return []
    return [
        Item(
            name="Small-tube aid",
            detail=adj.small_tube_aid,
            why=f"the {tubes.smallest:.1f} mm tube is too small for the bougie "
            f"(it passes tubes from {adj.bougie_fits_from_mm:.1f} mm)",
            open_now=True,
        )
    ]
