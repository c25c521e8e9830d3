"""The ``airway`` command line: parse, call one library function, render, exit.

Exit codes: 0 ok; 2 bad input or usage (including a refused overwrite); 1 any
other failure. Data goes to stdout, messages to stderr.
"""

from __future__ import annotations

import json
import sys
from collections.abc import Iterator
from contextlib import contextmanager
from enum import StrEnum
from importlib import resources
from pathlib import Path
from typing import TYPE_CHECKING, Annotated

import typer

from . import __version__
from .errors import AirwayError

if TYPE_CHECKING:
    from .assessment import Assessment
    from .checklists import Checklist
    from .equipment import Catalogue
    from .plan import Plan
    from .units import UnitPaths

app = typer.Typer(
    add_completion=False,
    no_args_is_help=True,
    context_settings={"help_option_names": ["-h", "--help"]},
    help="Obstetric airway plans from one bedside assessment. A decision aid: it does "
    "not replace clinical judgement, local guidelines or licensed practice.",
)


class Format(StrEnum):
    text = "text"
    markdown = "markdown"
    json = "json"


FormatOpt = Annotated[Format, typer.Option("--format", "-f", help="Output format.")]
OutputOpt = Annotated[
    Path | None, typer.Option("--output", "-o", help="Write to this file instead of stdout.")
]
ForceOpt = Annotated[bool, typer.Option("--force", help="Replace an existing output file.")]
PdfOpt = Annotated[Path | None, typer.Option("--pdf", help="Also write the plan as a PDF file.")]


class Paper(StrEnum):
    A4 = "A4"
    letter = "letter"


PaperOpt = Annotated[Paper, typer.Option("--paper", help="PDF paper size.")]
CatalogueOpt = Annotated[
    Path | None,
    typer.Option("--catalogue", help="The unit's equipment catalogue (TOML); default: shipped."),
]
ChecklistsOpt = Annotated[
    Path | None, typer.Option("--checklists", help="The unit's checklist folder (*.md).")
]
ConfigOpt = Annotated[
    Path | None, typer.Option("--config", help="Unit config file (default: ./airway.toml).")
]


@contextmanager
def _errors() -> Iterator[None]:
    """Turn library errors into a message on stderr and the right exit code."""
    try:
        yield
    except AirwayError as exc:
        typer.echo(f"airway: {exc}", err=True)
        raise typer.Exit(exc.exit_code) from None
    except OSError as exc:
        typer.echo(f"airway: {exc.filename or ''}: {exc.strerror or exc}", err=True)
        raise typer.Exit(1) from None


def _render(plan: Plan, fmt: Format, compact: bool = False) -> str:
    if fmt is Format.json:
        from .render_json import render_json

        return render_json(plan)
    if fmt is Format.markdown:
        from .render_markdown import render_markdown

        return render_markdown(plan)
    from .render_text import render_text

    return render_text(plan, compact=compact)


def _write_pdf(plan: Plan, pdf: Path | None, paper: Paper, force: bool) -> None:
    if pdf is None:
        return
    from .output import write_atomic
    from .render_pdf import render_plan_pdf

    write_atomic(pdf, render_plan_pdf(plan, paper.value), force=force)
    typer.echo(f"wrote {pdf}", err=True)


def _emit(text: str, output: Path | None, force: bool) -> None:
    if output is None or str(output) == "-":
        sys.stdout.write(text)
        return
    from .output import write_atomic

    write_atomic(output, text.encode("utf-8"), force=force)
    typer.echo(f"wrote {output}", err=True)


def _version(value: bool) -> None:
    if value:
        typer.echo(f"airway {__version__}")
        raise typer.Exit()


@app.callback()
def main_callback(
    version: Annotated[
        bool, typer.Option("--version", callback=_version, is_eager=True, help="Show the version.")
    ] = False,
) -> None:
    """Obstetric airway plans from one bedside assessment."""


def _unit(
    config: Path | None, catalogue: Path | None, checklists: Path | None
) -> tuple[Catalogue, tuple[Checklist, ...], UnitPaths]:
    """The unit's catalogue and checklists: flags, then config file, then shipped."""
    from .checklists import load_checklists
    from .equipment import load_catalogue
    from .units import load_unit_paths

    paths = load_unit_paths(config)
    return (
        load_catalogue(catalogue or paths.catalogue),
        load_checklists(checklists or paths.checklists),
        paths,
    )


def _plan_for(
    assessment: Assessment,
    catalogue: Path | None,
    checklists: Path | None = None,
    config: Path | None = None,
) -> Plan:
    from .plan import build_plan

    cat, lists, _paths = _unit(config, catalogue, checklists)
    return build_plan(assessment, cat, lists)


@app.command()
def plan(
    file: Annotated[
        str | None, typer.Argument(help="Assessment file (.toml or .json), or - for stdin.")
    ] = None,
    demo: Annotated[bool, typer.Option("--demo", help="Use the built-in demo assessment.")] = False,
    fmt: FormatOpt = Format.text,
    output: OutputOpt = None,
    force: ForceOpt = False,
    catalogue: CatalogueOpt = None,
    checklists: ChecklistsOpt = None,
    config: ConfigOpt = None,
    pdf: PdfOpt = None,
    paper: PaperOpt = Paper.A4,
) -> None:
    """The plan for one assessment file.

    Example: airway plan examples/routine-elective.toml --format markdown -o plan.md
    """
    from .loading import parse_assessment, read_assessment

    if (file is None) == (not demo):
        raise typer.BadParameter("give an assessment FILE or --demo (not both)")
    with _errors():
        if demo:
            text = resources.files("airway").joinpath("data/demo.toml").read_text("utf-8")
            assessment = parse_assessment(text, "built-in demo", "toml")
        else:
            assessment = read_assessment(file)  # type: ignore[arg-type]
        the_plan = _plan_for(assessment, catalogue, checklists, config)
        _write_pdf(the_plan, pdf, paper, force)
        if pdf is None or output is not None:
            _emit(_render(the_plan, fmt), output, force)


Flag = Annotated[bool | None, typer.Option(show_default=False)]


@app.command()
def quick(
    weight_kg: Annotated[float, typer.Option("--weight-kg", help="Current weight (kg).")],
    height_cm: Annotated[float | None, typer.Option(help="Height (cm).")] = None,
    age: Annotated[int | None, typer.Option("--age", help="Age (years).")] = None,
    gestation_weeks: Annotated[float | None, typer.Option(help="Gestation (weeks).")] = None,
    in_labour: Annotated[bool | None, typer.Option("--in-labour/--not-in-labour")] = None,
    mallampati: Annotated[int | None, typer.Option(help="Modified Mallampati 1-4.")] = None,
    upper_lip_bite: Annotated[int | None, typer.Option(help="Upper lip bite class 1-3.")] = None,
    thyromental_cm: Annotated[float | None, typer.Option()] = None,
    mouth_opening_cm: Annotated[float | None, typer.Option()] = None,
    neck_movement: Annotated[str | None, typer.Option(help="normal, reduced or fixed.")] = None,
    large_breasts: Flag = None,
    short_neck: Flag = None,
    receding_mandible: Flag = None,
    snoring: Flag = None,
    intubation: Annotated[
        str | None, typer.Option("--previous-intubation", help="none, difficult or failed.")
    ] = None,
    preeclampsia: Annotated[
        str | None, typer.Option(help="none, without_severe_features, with_severe_features.")
    ] = None,
    sign: Annotated[list[str] | None, typer.Option(help="Airway oedema sign; repeatable.")] = None,
    platelets: Annotated[float | None, typer.Option(help="Platelets (x10^9/L).")] = None,
    category: Annotated[int | None, typer.Option(help="Caesarean urgency category 1-4.")] = None,
    anaesthetist: Annotated[str | None, typer.Option(help="senior, intermediate, junior.")] = None,
    fmt: FormatOpt = Format.text,
    full: Annotated[bool, typer.Option("--full", help="The full plan, not one screen.")] = False,
    output: OutputOpt = None,
    force: ForceOpt = False,
    catalogue: CatalogueOpt = None,
    pdf: PdfOpt = None,
    paper: PaperOpt = Paper.A4,
) -> None:
    """The plan from a few flags, for the emergency: only --weight-kg is required.

    Example: airway quick --weight-kg 98 --height-cm 165 --mallampati 3 --category 1
    """
    from .quick import quick_assessment

    with _errors():
        assessment = quick_assessment(
            weight_kg=weight_kg,
            height_cm=height_cm,
            age_years=age,
            gestation_weeks=gestation_weeks,
            in_labour=in_labour,
            mallampati=mallampati,
            upper_lip_bite=upper_lip_bite,
            thyromental_cm=thyromental_cm,
            mouth_opening_cm=mouth_opening_cm,
            neck_movement=neck_movement,
            large_breasts=large_breasts,
            short_neck=short_neck,
            receding_mandible=receding_mandible,
            snoring=snoring,
            intubation=intubation,
            status=preeclampsia,
            signs=sign,
            platelets_10e9_per_l=platelets,
            urgency_category=category,
            anaesthetist=anaesthetist,
        )
        the_plan = _plan_for(assessment, catalogue)
        _write_pdf(the_plan, pdf, paper, force)
        _emit(_render(the_plan, fmt, compact=not full), output, force)


@app.command()
def oxygen(
    file: Annotated[str, typer.Argument(help="Assessment file (.toml or .json), or - for stdin.")],
    end_tidal_o2: Annotated[
        float, typer.Option(min=0.5, max=0.95, help="End-tidal O2 fraction reached.")
    ] = 0.9,
    as_json: Annotated[bool, typer.Option("--json", help="As JSON.")] = False,
) -> None:
    """Predicted minutes to desaturation: scenarios side by side.

    Example: airway oxygen examples/clinic-raised-bmi.toml --end-tidal-o2 0.8
    """
    from .loading import read_assessment
    from .oxygenation import oxygenation_for
    from .render_text import oxygenation_lines

    with _errors():
        oxy = oxygenation_for(read_assessment(file), feo2=end_tidal_o2)
    if as_json:
        sys.stdout.write(json.dumps(oxy.model_dump(mode="json"), indent=2, sort_keys=True) + "\n")
    else:
        sys.stdout.write("\n".join(oxygenation_lines(oxy)[1:]) + "\n")


class SheetKind(StrEnum):
    contents = "contents"
    sequence = "sequence"
    doses = "doses"


class SheetPaper(StrEnum):
    A4 = "A4"
    A3 = "A3"


@app.command()
def sheet(
    kind: Annotated[SheetKind, typer.Argument(help="contents, sequence or doses.")],
    output: Annotated[Path, typer.Option("--output", "-o", help="PDF file to write.")],
    paper: Annotated[SheetPaper, typer.Option("--paper", help="A4 or A3.")] = SheetPaper.A4,
    landscape: Annotated[bool, typer.Option("--landscape", help="Landscape page.")] = False,
    force: ForceOpt = False,
    catalogue: CatalogueOpt = None,
    checklists: ChecklistsOpt = None,
    contacts: Annotated[
        Path | None, typer.Option("--contacts", help="The unit's contact list (TOML).")
    ] = None,
    config: ConfigOpt = None,
) -> None:
    """A generic laminated sheet for the difficult-airway trolley.

    Example: airway sheet doses --paper A3 -o doses-A3.pdf
    """
    from .output import write_atomic
    from .render_sheets import render_sheet_pdf
    from .sheets import build_sheet
    from .units import load_contacts

    with _errors():
        cat, lists, paths = _unit(config, catalogue, checklists)
        people = load_contacts(contacts or paths.contacts)
        content = build_sheet(kind.value, lists, cat, people)
        write_atomic(output, render_sheet_pdf(content, paper.value, landscape), force=force)
        typer.echo(f"wrote {output}", err=True)


@app.command()
def factors(
    as_json: Annotated[bool, typer.Option("--json", help="As JSON.")] = False,
) -> None:
    """List the risk-factor catalogue with weights and sources."""
    from .factor_table import factor_rows, render_factor_table

    rows = factor_rows()
    sys.stdout.write(json.dumps(rows, indent=2) + "\n" if as_json else render_factor_table(rows))


@app.command()
def schema() -> None:
    """Print the JSON Schema of the assessment input."""
    from .assessment import Assessment

    sys.stdout.write(json.dumps(Assessment.model_json_schema(), indent=2) + "\n")


def main() -> None:
    """Console-script entry point."""
    app(prog_name="airway")
