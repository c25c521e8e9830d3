"""Commands for the clinic, the ward and the trolley: batch, board, sheet, factors, schema."""

import json
import sys
from collections.abc import Callable
from datetime import date
from enum import StrEnum
from pathlib import Path
from typing import Annotated

import typer

from .app import (
    INPUT,
    OUT,
    UNIT,
    CatalogueOpt,
    ChecklistsOpt,
    ConfigOpt,
    DataFormat,
    DataFormatOpt,
    ForceOpt,
    JsonAlias,
    Paper,
    PaperOpt,
    app,
    data_format,
    errors,
    today,
)
from .help import GroupedCommand

PdfOutputOpt = Annotated[
    Path,
    typer.Option("--output", "-o", metavar="FILE", help="PDF file to write.", rich_help_panel=OUT),
]


class SheetKind(StrEnum):
    contents = "contents"
    sequence = "sequence"
    doses = "doses"


class SheetPaper(StrEnum):
    A4 = "A4"
    A3 = "A3"
    letter = "letter"
    tabloid = "tabloid"


@app.command(cls=GroupedCommand)
def sheet(
    kind: Annotated[SheetKind, typer.Argument(metavar="KIND", help="Which sheet.")],
    output: PdfOutputOpt,
    paper: Annotated[
        SheetPaper,
        typer.Option("--paper", help="A4, A3, US Letter or Tabloid.", rich_help_panel=OUT),
    ] = SheetPaper.A4,
    landscape: Annotated[
        bool, typer.Option("--landscape", help="Landscape page.", rich_help_panel=OUT)
    ] = False,
    force: ForceOpt = False,
    catalogue: CatalogueOpt = None,
    checklists: ChecklistsOpt = None,
    contacts: Annotated[
        Path | None,
        typer.Option(
            "--contacts", metavar="FILE", help="Contact list (TOML).", rich_help_panel=UNIT
        ),
    ] = None,
    config: ConfigOpt = None,
) -> None:
    """A generic laminated sheet for the difficult-airway trolley.

    Example: airway sheet doses --paper A3 -o doses-A3.pdf
    """
    from ..output import SHARED, write_atomic
    from ..unit.config import load_unit
    from ..workflows.sheets import sheet_pdf

    with errors():
        unit = load_unit(config, catalogue, checklists)
        pdf = sheet_pdf(kind.value, unit, contacts, paper.value, landscape)
        write_atomic(output, pdf, force, mode=SHARED)
        typer.echo(f"wrote {output}", err=True)


def _progress_bar() -> Callable[[int, int], None] | None:
    """A one-line bar on stderr, only when stderr is a terminal."""
    if not sys.stderr.isatty():
        return None

    def show(done: int, total: int) -> None:
        filled = 30 * done // max(total, 1)
        end = "\n" if done >= total else ""
        sys.stderr.write(f"\r[{'#' * filled}{'.' * (30 - filled)}] {done}/{total}{end}")
        sys.stderr.flush()

    return show


@app.command(cls=GroupedCommand)
def batch(
    clinic_list: Annotated[
        Path, typer.Argument(metavar="LIST.csv", help="The clinic list: one woman a row.")
    ],
    out: Annotated[
        Path,
        typer.Option("--out", metavar="DIR", help="Folder for the outputs.", rich_help_panel=OUT),
    ],
    pdf: Annotated[
        bool, typer.Option("--pdf", help="Also a PDF per woman.", rich_help_panel=OUT)
    ] = False,
    fhir: Annotated[
        bool,
        typer.Option(
            "--fhir", help="Also a FHIR R4 Bundle per woman (ID.fhir.json).", rich_help_panel=OUT
        ),
    ] = False,
    paper: PaperOpt = Paper.A4,
    force: Annotated[
        bool, typer.Option("--force", help="Replace earlier outputs.", rich_help_panel=OUT)
    ] = False,
    resume: Annotated[
        bool,
        typer.Option("--resume", help="Keep rows whose outputs are complete.", rich_help_panel=OUT),
    ] = False,
    jobs: Annotated[
        int | None,
        typer.Option(
            "--jobs",
            metavar="N",
            min=1,
            help="Processes (default: all cores for a long list).",
            rich_help_panel=OUT,
        ),
    ] = None,
    catalogue: CatalogueOpt = None,
    checklists: ChecklistsOpt = None,
    config: ConfigOpt = None,
) -> None:
    """Plan a clinic list: a plan per row and a summary.

    Columns are the assessment's field paths (see docs/clinic-lists.md); an empty
    cell is not assessed. Exit 0 when every row was planned, 2 when any row had
    bad input.

    Example: airway batch examples/clinic-list.csv --out plans --pdf
    """
    from ..unit.config import load_unit
    from ..workflows.batch import run_batch

    with errors():
        unit = load_unit(config, catalogue, checklists)
        result = run_batch(
            clinic_list, out, unit.catalogue, unit.checklists, pdf=pdf, fhir=fhir,
            paper=paper.value, force=force, resume=resume, jobs=jobs, progress=_progress_bar(),
        )  # fmt: skip
    for problem in result.problems:
        typer.echo(f"airway: {clinic_list}: {problem}", err=True)
    typer.echo(result.report(out), err=True)
    if result.bad_rows:
        raise typer.Exit(2)


@app.command(cls=GroupedCommand)
def board(
    folder: Annotated[Path, typer.Argument(metavar="DIR", help="A folder of saved JSON plans.")],
    output: PdfOutputOpt,
    max_age_days: Annotated[
        int,
        typer.Option(
            "--max-age-days",
            metavar="DAYS",
            min=0,
            help="Mark plans older than this.",
            rich_help_panel=INPUT,
        ),
    ] = 14,
    day: Annotated[
        str | None,
        typer.Option(
            "--today", metavar="YYYY-MM-DD", help="Date to age plans from.", rich_help_panel=INPUT
        ),
    ] = None,
    paper: PaperOpt = Paper.A4,
    force: ForceOpt = False,
    ward_only: Annotated[
        bool,
        typer.Option("--ward-only", help="Only the women on the ward now.", rich_help_panel=INPUT),
    ] = False,
) -> None:
    """The labour ward's airway board, from a folder of plans.

    The women on the ward now first, then highest airway level; old plans are marked.

    Example: airway board plans -o board.pdf
    """
    from ..output import write_atomic
    from ..workflows.board import ward_board, women

    try:
        when = today() if day is None else date.fromisoformat(day)
    except ValueError:
        raise typer.BadParameter("write the date as YYYY-MM-DD", param_hint="--today") from None
    with errors():
        made = ward_board(folder, when, max_age_days, paper.value, ward_only)
        write_atomic(output, made.pdf, force=force)
    for note in made.notes:
        typer.echo(f"airway: {note}", err=True)
    typer.echo(f"wrote {output} ({women(made.women)})", err=True)


@app.command(cls=GroupedCommand)
def factors(fmt: DataFormatOpt = DataFormat.text, old_json: JsonAlias = False) -> None:
    """List the risk-factor catalogue with weights and sources."""
    from ..render.factors import factor_rows, render_factor_table

    rows = factor_rows()
    as_json = data_format(fmt, old_json) is DataFormat.json
    sys.stdout.write(json.dumps(rows, indent=2) + "\n" if as_json else render_factor_table(rows))


@app.command(cls=GroupedCommand)
def population(
    women: Annotated[
        int,
        typer.Option(metavar="N", min=100, max=200_000, help="How many invented women to draw."),
    ] = 20_000,
    seed: Annotated[
        int, typer.Option(metavar="N", help="Seed of the draw: the same seed, the same table.")
    ] = 2026,
) -> None:
    """Level shares on a model population of women at term."""
    from ..workflows.population import chart, run, table

    shares = run(women, seed)
    typer.echo(table(shares) + "\n" + chart(shares), nl=False)
    typer.echo(
        "Invented women drawn from published prevalences (docs/method.md).\n"
        "Target: levels 3-4 between 3% and 15%, level 4 at most 4%."
    )


@app.command(cls=GroupedCommand)
def schema() -> None:
    """Print the JSON Schema of the assessment input."""
    from ..assessment import Assessment

    sys.stdout.write(json.dumps(Assessment.model_json_schema(), indent=2) + "\n")
