"""Generic trolley sheets: what each sheet shows, computed by the plan's engine.

Nothing here is typed in by hand: the weight-band rows come from the same body
size, dose and supraglottic functions as a woman's plan, and the contents and
sequence sheets come from the checklist files.
"""

from pathlib import Path

from pydantic import BaseModel, ConfigDict

from ..catalogue import Catalogue
from ..checklist import Checklist
from ..engine.body import body_size
from ..engine.checklists import generic
from ..engine.doses import BY_NAME, compute_dose
from ..engine.plan_model import RenderedChecklist
from ..errors import ChecklistError
from ..unit.config import Unit
from ..unit.contacts import Contact, load_contacts

SHEETS = ("contents", "sequence", "doses")
BAND_WEIGHTS_KG = tuple(range(50, 161, 10))
# Rocuronium on lean weight needs a height; the sheet shows two reference
# heights (project rule) and tells the reader to use her own plan when known.
BAND_HEIGHTS_CM = (155.0, 170.0)


class BandRow(BaseModel):
    model_config = ConfigDict(frozen=True)
    weight_kg: int
    supraglottic_size: float
    suxamethonium_mg: tuple[float, float]
    rocuronium_mg: tuple[tuple[float, float], ...]  # one range per reference height
    rocuronium_scalar: tuple[str, ...]
    sugammadex_mg: float
    # Millilitres at the strengths the unit's catalogue stocks.
    suxamethonium_ml: tuple[float, float] = (0.0, 0.0)
    rocuronium_ml: tuple[tuple[float, float], ...] = ()
    sugammadex_ml: float = 0.0


def weight_band_rows(catalogue: Catalogue) -> tuple[BandRow, ...]:
    """One row per 10 kg from 50 to 160 kg, from the plan's own engine."""
    rows = []
    stock = catalogue.drugs
    for kg in BAND_WEIGHTS_KG:
        # Suxamethonium and sugammadex go on total weight: the height does not matter.
        body = body_size(kg, BAND_HEIGHTS_CM[0])
        sux = compute_dose(BY_NAME["suxamethonium"], body, stock.suxamethonium)
        sgx = compute_dose(BY_NAME["sugammadex"], body, stock.sugammadex)
        rocs = [
            compute_dose(BY_NAME["rocuronium"], body_size(kg, h), stock.rocuronium)
            for h in BAND_HEIGHTS_CM
        ]
        rows.append(
            BandRow(
                weight_kg=kg,
                supraglottic_size=catalogue.supraglottic_size(kg),
                suxamethonium_mg=(sux.dose_mg_low, sux.dose_mg_high),
                rocuronium_mg=tuple((r.dose_mg_low, r.dose_mg_high) for r in rocs),
                rocuronium_scalar=tuple(r.scalar for r in rocs),
                sugammadex_mg=sgx.dose_mg_low,
                suxamethonium_ml=(sux.volume_ml_low, sux.volume_ml_high),
                rocuronium_ml=tuple((r.volume_ml_low, r.volume_ml_high) for r in rocs),
                sugammadex_ml=sgx.volume_ml_low,
            )
        )
    return tuple(rows)


class Sheet(BaseModel):
    """Everything one laminated sheet shows."""

    model_config = ConfigDict(frozen=True)
    kind: str
    title: str
    checklist: RenderedChecklist | None = None
    bands: tuple[BandRow, ...] = ()
    contacts: tuple[Contact, ...] = ()
    month_grid: bool = False
    notes: tuple[str, ...] = ()
    # The dose sheet: each drug's strength as the unit's catalogue lists it (mg/mL).
    strengths: dict[str, float] = {}
    # From the unit's config: whose sheet it is, who approved it, when to review it.
    owner: str = ""


def build_sheet(
    kind: str,
    checklists: tuple[Checklist, ...],
    catalogue: Catalogue,
    contacts: tuple[Contact, ...],
) -> Sheet:
    """The content of one trolley sheet."""
    if kind == "doses":
        return Sheet(
            kind=kind,
            title="Rescue drug doses and supraglottic size by weight",
            bands=weight_band_rows(catalogue),
            strengths={
                name: getattr(catalogue.drugs, name).mg_per_ml
                for name in ("suxamethonium", "rocuronium", "sugammadex")
            },
            notes=(
                "Suxamethonium 1-1.5 mg/kg total weight; rocuronium 1-1.2 mg/kg total weight "
                "below BMI 30 at that height, and from BMI 30 held at the dose for BMI 30 "
                "(marked H) so that it never falls as weight rises (project rule; lean-weight "
                "dosing per AAGBI/SOBA 2015 would give less, see her plan); sugammadex "
                "16 mg/kg total weight for immediate reversal. Millilitres at the unit's "
                "strengths. Same calculation as the patient plan.",
                "Supraglottic sizes follow the unit's catalogue: makers' weight bands differ "
                "and are not evidence-based.",
                "A calculation aid: check every dose. Use her own plan when her height is known.",
            ),
        )
    matching = [c for c in checklists if c.meta.sheet == kind and "sheet" in c.meta.use]
    if not matching:
        raise ChecklistError(kind, None, f"no checklist file has sheet = {kind!r}")
    checklist = generic(matching[-1], catalogue.front_of_neck_tube_mm)
    return Sheet(
        kind=kind,
        title=checklist.title,
        checklist=checklist,
        contacts=contacts if kind == "sequence" else (),
        month_grid=kind == "contents",
    )


def sheet_pdf(kind: str, unit: Unit, contacts: Path | None, paper: str, landscape: bool) -> bytes:
    """One trolley sheet as PDF bytes, from the unit's files (its contacts from
    ``contacts``, the config file's list, or the shipped one)."""
    from ..render.pdf.sheets import render_sheet_pdf

    people = load_contacts(contacts or unit.paths.contacts)
    content = build_sheet(kind, unit.checklists, unit.catalogue, people)
    return render_sheet_pdf(
        content.model_copy(update={"owner": owner_line(unit)}), paper, landscape
    )


def owner_line(unit: Unit) -> str:
    """'Maternity unit A · approved by the obstetric anaesthesia lead · review by 2027-06-01',
    or a line to write on when the config says nothing."""
    p = unit.paths
    return (
        f"{p.unit_name or 'Unit: ____________'} · approved by {p.approved_by or '____________'}"
        f" · review by {p.review_by.isoformat() if p.review_by else '__________'}"
    )
