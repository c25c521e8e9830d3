"""The ``airway`` command line: parse, call one library function, render, exit.

Exit codes: 0 ok; 2 bad input or usage (including a refused overwrite); 1 any
other failure. Data goes to stdout, messages to stderr.

No ``from __future__ import annotations`` here, on purpose: typer reads each
command's annotations at every run, and string annotations would be compiled and
evaluated again each time (about 4 ms of ``airway quick``'s start-up). Names only
imported for type checking are quoted instead.
"""

import copy
import gc
import json
import os
import sys
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from datetime import date
from enum import StrEnum
from importlib import resources
from pathlib import Path
from typing import TYPE_CHECKING, Annotated, NoReturn

import typer

from . import __version__
from .cli_help import GroupedCommand
from .cli_startup import share_adapters
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
    # Plain help (see cli_help): whole at 80 columns, options grouped under headings.
    rich_markup_mode=None,
    context_settings={"help_option_names": ["-h", "--help"], "max_content_width": 100},
    help="Obstetric airway plans from one bedside assessment. A decision aid: it does "
    "not replace clinical judgement, local guidelines or licensed practice.",
)
command = app.command


class Format(StrEnum):
    text = "text"
    markdown = "markdown"
    json = "json"


class DataFormat(StrEnum):
    text = "text"
    json = "json"


OUT, UNIT, INPUT = "Output", "Unit files", "Input"
FormatOpt = Annotated[
    Format, typer.Option("--format", "-f", help="Output format.", rich_help_panel=OUT)
]
OutputOpt = Annotated[
    Path | None,
    typer.Option(
        "--output", "-o", metavar="FILE", help="Write to FILE, not stdout.", rich_help_panel=OUT
    ),
]
ForceOpt = Annotated[
    bool, typer.Option("--force", help="Replace an existing output file.", rich_help_panel=OUT)
]
PdfOpt = Annotated[
    Path | None,
    typer.Option(
        "--pdf", metavar="FILE", help="Also print the plan to a PDF.", rich_help_panel=OUT
    ),
]


class Paper(StrEnum):
    A4 = "A4"
    letter = "letter"


PaperOpt = Annotated[Paper, typer.Option("--paper", help="PDF paper size.", rich_help_panel=OUT)]
CatalogueOpt = Annotated[
    Path | None,
    typer.Option(
        "--catalogue", metavar="FILE", help="Equipment catalogue (TOML).", rich_help_panel=UNIT
    ),
]
ChecklistsOpt = Annotated[
    Path | None,
    typer.Option(
        "--checklists", metavar="DIR", help="Folder of checklists (*.md).", rich_help_panel=UNIT
    ),
]
ConfigOpt = Annotated[
    Path | None,
    typer.Option(
        "--config",
        metavar="FILE",
        help="Unit config (default ./airway.toml).",
        rich_help_panel=UNIT,
    ),
]
JsonAlias = Annotated[bool, typer.Option("--json", hidden=True, help="Same as -f json.")]


def _alias(new: object, old: object, name: str, old_name: str) -> object:
    """An option given under its old spelling; both at once must agree."""
    if old is None or old in ((), []):
        return new
    if new is not None and new not in ((), []) and new != old:
        raise typer.BadParameter(f"{old_name} is the old name of {name}; give one of them")
    return old


@contextmanager
def _errors() -> Iterator[None]:
    """Turn library errors into a message on stderr and the right exit code."""
    try:
        yield
    except AirwayError as exc:
        typer.echo(f"airway: {exc}", err=True)
        raise typer.Exit(exc.exit_code) from None
    except OSError as exc:
        where = f"{exc.filename}: " if exc.filename else ""
        typer.echo(f"airway: {where}{exc.strerror or exc}", err=True)
        raise typer.Exit(1) from None


def _render(plan: "Plan", fmt: Format, compact: bool = False) -> str:
    if fmt is Format.json:
        from .render_json import render_json

        return render_json(plan)
    if fmt is Format.markdown:
        from .render_markdown import render_markdown

        return render_markdown(plan)
    from .render_text import render_text

    return render_text(plan, compact=compact)


def _write_pdf(plan: "Plan", pdf: Path | None, paper: Paper, force: bool) -> None:
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
) -> tuple["Catalogue", tuple["Checklist", ...], "UnitPaths"]:
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
    assessment: "Assessment",
    catalogue: Path | None,
    checklists: Path | None = None,
    config: Path | None = None,
) -> "Plan":
    from .plan import build_plan

    cat, lists, _paths = _unit(config, catalogue, checklists)
    return build_plan(assessment, cat, lists)


@command(cls=GroupedCommand)
def plan(
    file: Annotated[
        str | None,
        typer.Argument(
            metavar="FILE", help="Assessment (.toml, .json, a saved plan), or - for stdin."
        ),
    ] = None,
    demo: Annotated[
        bool,
        typer.Option("--demo", help="Use the built-in demo assessment.", rich_help_panel=INPUT),
    ] = False,
    fmt: FormatOpt = Format.text,
    output: OutputOpt = None,
    force: ForceOpt = False,
    pdf: PdfOpt = None,
    paper: PaperOpt = Paper.A4,
    since: Annotated[
        str | None,
        typer.Option(
            "--since",
            metavar="EARLIER",
            help="An earlier assessment of her: show what changed.",
            rich_help_panel=INPUT,
        ),
    ] = None,
    catalogue: CatalogueOpt = None,
    checklists: ChecklistsOpt = None,
    config: ConfigOpt = None,
) -> None:
    """The plan for one assessment file.

    Example: airway plan examples/routine-elective.toml -f markdown -o plan.md
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
        if since is not None:
            from .compare import compare_plans

            earlier = _plan_for(read_assessment(since), catalogue, checklists, config)
            changes = compare_plans(earlier, the_plan)
            the_plan = the_plan._replace(changes_since=changes)
        _write_pdf(the_plan, pdf, paper, force)
        if pdf is None or output is not None:
            _emit(_render(the_plan, fmt), output, force)


PAT, AIR, HIST, PE, CTX = "Patient", "Airway", "History", "Pre-eclampsia", "Context"


def _opt(names: str, metavar: str | None, help_: str, panel: str) -> typer.models.OptionInfo:
    decls = names.split(",")
    return typer.Option(*decls, metavar=metavar, help=help_, rich_help_panel=panel)


def _flag(names: str, help_: str, panel: str) -> typer.models.OptionInfo:
    return typer.Option(names, help=help_, rich_help_panel=panel, show_default=False)


def _hidden(name: str) -> typer.models.OptionInfo:
    return typer.Option(name, hidden=True)


def _ask(prompt: str) -> str:
    """One answer from the keyboard (or a pipe); the prompt goes to stderr."""
    sys.stderr.write(prompt)
    sys.stderr.flush()
    line = sys.stdin.readline()
    if line == "":
        raise EOFError
    return line.rstrip("\r\n")


@command(cls=GroupedCommand)
def assess(
    output: Annotated[
        Path | None,
        typer.Option(
            "--output",
            "-o",
            metavar="FILE",
            help="Save the assessment (TOML).",
            rich_help_panel=OUT,
        ),
    ] = None,
    force: ForceOpt = False,
    catalogue: CatalogueOpt = None,
) -> None:
    """Guided entry: each finding asked in examination order.

    Blank means not assessed; a bad answer is asked again. Ends with the one-screen
    plan; -o saves the assessment for `airway plan`. Ctrl-C saves nothing.
    """
    from .guided import Stopped, assessment_toml, guided_entry
    from .output import write_atomic

    if output is not None and output.exists() and not force:
        typer.echo(f"airway: {output} already exists; use --force to replace it", err=True)
        raise typer.Exit(2)
    try:
        assessment = guided_entry(_ask, lambda text: typer.echo(text, err=True), _today())
    except Stopped:
        typer.echo("\nairway: stopped before the end: nothing saved", err=True)
        raise typer.Exit(1) from None
    with _errors():
        the_plan = _plan_for(assessment, catalogue)
        sys.stdout.write(_render(the_plan, Format.text, compact=True))
        if output is None:
            typer.echo("not saved: give -o FILE to keep this assessment", err=True)
        else:
            write_atomic(output, assessment_toml(assessment).encode("utf-8"), force=force)
            typer.echo(f"wrote {output}", err=True)


@command(cls=GroupedCommand)
def quick(
    weight_kg: Annotated[float, _opt("--weight-kg", "KG", "Current weight, kg.", PAT)],
    height_cm: Annotated[float | None, _opt("--height-cm", "CM", "Height, cm.", PAT)] = None,
    age_years: Annotated[int | None, _opt("--age-years", "YEARS", "Age, years.", PAT)] = None,
    gestation_weeks: Annotated[
        float | None, _opt("--gestation-weeks", "WEEKS", "Gestation, weeks.", PAT)
    ] = None,
    in_labour: Annotated[
        bool | None, _flag("--in-labour/--not-in-labour", "In labour now, or not.", PAT)
    ] = None,
    mallampati: Annotated[
        int | None, _opt("--mallampati", "1-4", "Modified Mallampati class.", AIR)
    ] = None,
    upper_lip_bite: Annotated[
        int | None, _opt("--upper-lip-bite", "1-3", "Upper lip bite class.", AIR)
    ] = None,
    thyromental_cm: Annotated[
        float | None, _opt("--thyromental-cm", "CM", "Thyromental distance, cm.", AIR)
    ] = None,
    mouth_opening_cm: Annotated[
        float | None, _opt("--mouth-opening-cm", "CM", "Inter-incisor gap, cm.", AIR)
    ] = None,
    neck_movement: Annotated[
        str | None, _opt("--neck-movement", "WHICH", "normal, reduced or fixed.", AIR)
    ] = None,
    large_breasts: Annotated[
        bool | None, _flag("--large-breasts/--no-large-breasts", "Large breasts, or not.", AIR)
    ] = None,
    short_neck: Annotated[
        bool | None, _flag("--short-neck/--no-short-neck", "Short neck, or not.", AIR)
    ] = None,
    receding_mandible: Annotated[
        bool | None,
        _flag("--receding-mandible/--no-receding-mandible", "Receding mandible, or not.", AIR),
    ] = None,
    intubation: Annotated[
        str | None,
        _opt("--previous-intubation", "WHICH", "none, difficult or failed.", HIST),
    ] = None,
    snoring: Annotated[
        bool | None, _flag("--snoring/--no-snoring", "Snores, or not.", HIST)
    ] = None,
    preeclampsia: Annotated[
        str | None,
        _opt(
            "--preeclampsia",
            "STATUS",
            "none, without_severe_features or with_severe_features.",
            PE,
        ),
    ] = None,
    signs: Annotated[
        list[str] | None,
        _opt(
            "--signs",
            "SIGN",
            "Airway oedema sign, repeat for each: voice_change, stridor, facial_oedema, "
            "tongue_swelling, new_snoring, breathless_lying_flat.",
            PE,
        ),
    ] = None,
    platelets: Annotated[
        float | None, _opt("--platelets", "X10^9/L", "Platelet count, x10^9/L.", PE)
    ] = None,
    urgency_category: Annotated[
        int | None, _opt("--urgency-category", "1-4", "Caesarean urgency category.", CTX)
    ] = None,
    anaesthetist: Annotated[
        str | None, _opt("--anaesthetist", "GRADE", "senior, intermediate or junior.", CTX)
    ] = None,
    fmt: FormatOpt = Format.text,
    full: Annotated[
        bool, typer.Option("--full", help="The full plan, not one screen.", rich_help_panel=OUT)
    ] = False,
    output: OutputOpt = None,
    force: ForceOpt = False,
    pdf: PdfOpt = None,
    paper: PaperOpt = Paper.A4,
    catalogue: CatalogueOpt = None,
    old_age: Annotated[int | None, _hidden("--age")] = None,
    old_sign: Annotated[list[str] | None, _hidden("--sign")] = None,
    old_category: Annotated[int | None, _hidden("--category")] = None,
) -> None:
    """One screen for the emergency, from a few findings.

    Only --weight-kg is needed; a finding not given is shown as not assessed.

    Example: airway quick --weight-kg 98 --height-cm 165 --mallampati 3 --urgency-category 1
    """
    from .quick import quick_assessment

    with _errors():
        assessment = quick_assessment(
            weight_kg=weight_kg,
            height_cm=height_cm,
            age_years=_alias(age_years, old_age, "--age-years", "--age"),
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
            signs=_alias(signs, old_sign, "--signs", "--sign"),
            platelets_10e9_per_l=platelets,
            urgency_category=_alias(
                urgency_category, old_category, "--urgency-category", "--category"
            ),
            anaesthetist=anaesthetist,
        )
        the_plan = _plan_for(assessment, catalogue)
        _write_pdf(the_plan, pdf, paper, force)
        _emit(_render(the_plan, fmt, compact=not full), output, force)


def _data_format(fmt: DataFormat, old_json: bool) -> DataFormat:
    return DataFormat.json if old_json else fmt


DataFormatOpt = Annotated[
    DataFormat, typer.Option("--format", "-f", help="Output format.", rich_help_panel=OUT)
]


@command(cls=GroupedCommand)
def oxygen(
    file: Annotated[
        str, typer.Argument(metavar="FILE", help="Assessment (.toml or .json), or - for stdin.")
    ],
    end_tidal_o2: Annotated[
        float,
        typer.Option(
            min=0.5,
            max=0.95,
            metavar="FRACTION",
            help="End-tidal O2 fraction reached by pre-oxygenation.",
            rich_help_panel=INPUT,
        ),
    ] = 0.9,
    fmt: DataFormatOpt = DataFormat.text,
    old_json: JsonAlias = False,
) -> None:
    """Predicted minutes to desaturation: scenarios side by side.

    Example: airway oxygen examples/clinic-raised-bmi.toml --end-tidal-o2 0.8
    """
    from .loading import read_assessment
    from .oxygenation import oxygenation_for
    from .plan_model import plain
    from .render_text import oxygenation_lines

    with _errors():
        oxy = oxygenation_for(read_assessment(file), feo2=end_tidal_o2)
    if _data_format(fmt, old_json) is DataFormat.json:
        sys.stdout.write(json.dumps(plain(oxy), indent=2, sort_keys=True) + "\n")
    else:
        sys.stdout.write("\n".join(oxygenation_lines(oxy)[1:]) + "\n")


class SheetKind(StrEnum):
    contents = "contents"
    sequence = "sequence"
    doses = "doses"


class SheetPaper(StrEnum):
    A4 = "A4"
    A3 = "A3"
    letter = "letter"
    tabloid = "tabloid"


@command(cls=GroupedCommand)
def sheet(
    kind: Annotated[SheetKind, typer.Argument(metavar="KIND", help="Which sheet.")],
    output: Annotated[
        Path,
        typer.Option(
            "--output", "-o", metavar="FILE", help="PDF file to write.", rich_help_panel=OUT
        ),
    ],
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


@command(cls=GroupedCommand)
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

    Columns are the assessment's field paths (see the README); an empty cell is not
    assessed. Exit 0 when every row was planned, 2 when any row had bad input.

    Example: airway batch examples/clinic-list.csv --out plans --pdf
    """
    from .batch import run_batch

    # A long list makes many short-lived reportlab objects with reference cycles:
    # collect them (main() turns the collector off for one-shot commands).
    gc.enable()
    with _errors():
        cat, lists, _paths = _unit(config, catalogue, checklists)
        result = run_batch(
            clinic_list,
            out,
            cat,
            lists,
            pdf=pdf,
            paper=paper.value,
            force=force,
            resume=resume,
            jobs=jobs,
            progress=_progress_bar(),
        )
    for row in result.bad_rows:
        for problem in row.problems:
            typer.echo(f"airway: {clinic_list}: {problem}", err=True)
    planned = len(result.rows) - len(result.bad_rows)
    typer.echo(
        f"planned {planned} of {len(result.rows)} rows into {out} "
        f"({result.written} {'file' if result.written == 1 else 'files'} written, "
        f"{result.kept} kept)",
        err=True,
    )
    if result.bad_rows:
        raise typer.Exit(2)


@command(cls=GroupedCommand)
def compare(
    earlier: Annotated[
        str, typer.Argument(metavar="EARLIER", help="The earlier assessment, or its saved plan.")
    ],
    later: Annotated[str, typer.Argument(metavar="LATER", help="The later assessment.")],
    fmt: DataFormatOpt = DataFormat.text,
    catalogue: CatalogueOpt = None,
    checklists: ChecklistsOpt = None,
    config: ConfigOpt = None,
) -> None:
    """What changed between two assessments of the same woman.

    The changes that make the plan more dangerous come first. A saved JSON plan
    (a clinic list's plans/C001.json) stands for the assessment it was made from.

    Example: airway compare clinic.toml labour.toml
    """
    from .compare import compare_plans, render_comparison
    from .loading import read_assessment
    from .plan_model import plain

    with _errors():
        before = _plan_for(read_assessment(earlier), catalogue, checklists, config)
        after = _plan_for(read_assessment(later), catalogue, checklists, config)
    comparison = compare_plans(before, after)
    if fmt is DataFormat.json:
        sys.stdout.write(json.dumps(plain(comparison), indent=2, sort_keys=True) + "\n")
    else:
        sys.stdout.write(render_comparison(comparison, after))


def _today() -> date:
    return date.today()  # the clock lives here, never in the library


@command(cls=GroupedCommand)
def board(
    folder: Annotated[Path, typer.Argument(metavar="DIR", help="A folder of saved JSON plans.")],
    output: Annotated[
        Path,
        typer.Option(
            "--output", "-o", metavar="FILE", help="PDF file to write.", rich_help_panel=OUT
        ),
    ],
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
    today: Annotated[
        str | None,
        typer.Option(
            "--today", metavar="YYYY-MM-DD", help="Date to age plans from.", rich_help_panel=INPUT
        ),
    ] = None,
    paper: PaperOpt = Paper.A4,
    force: ForceOpt = False,
) -> None:
    """The labour ward's airway board, from a folder of plans.

    One line per woman, highest airway level first; old plans are marked.

    Example: airway board plans -o board.pdf
    """
    from .board import board_rows, count_women, load_plans, women
    from .output import write_atomic
    from .render_board import render_board_pdf

    try:
        day = _today() if today is None else date.fromisoformat(today)
    except ValueError:
        raise typer.BadParameter("write the date as YYYY-MM-DD", param_hint="--today") from None
    if not folder.is_dir():
        raise typer.BadParameter(f"{folder} is not a folder", param_hint="DIR")
    with _errors():
        plans, notes = load_plans(folder)
        rows = board_rows(plans, day, max_age_days)
        count = count_women(plans)
        pdf = render_board_pdf(rows, day.isoformat(), max_age_days, notes, paper.value, count)
        write_atomic(output, pdf, force=force)
    for note in notes:
        typer.echo(f"airway: {note}", err=True)
    typer.echo(f"wrote {output} ({women(count)})", err=True)


@command(cls=GroupedCommand)
def verify(
    saved: Annotated[Path, typer.Argument(metavar="PLAN", help="A saved plan: .json or .pdf.")],
    assessment_file: Annotated[
        str, typer.Argument(metavar="ASSESSMENT", help="The assessment it claims to come from.")
    ],
    catalogue: CatalogueOpt = None,
    checklists: ChecklistsOpt = None,
    config: ConfigOpt = None,
) -> None:
    """Check a saved or printed plan against its assessment.

    Says whether it came from that assessment and the current rules.

    Exit 0 when it matches, 1 when it does not (as diff does), 2 for bad input.
    """
    from .errors import InputError, Problem
    from .loading import read_assessment
    from .verify import verify as check

    with _errors():
        current = _plan_for(read_assessment(assessment_file), catalogue, checklists, config)
        try:
            data = saved.read_bytes()
        except OSError as exc:
            raise InputError(str(saved), [Problem("(file)", exc.strerror or str(exc))]) from None
        verdict = check(data, current)
    for line in verdict.findings:
        typer.echo(f"{saved}: {line}")
    if not verdict.matches:
        raise typer.Exit(1)


@command(cls=GroupedCommand)
def factors(fmt: DataFormatOpt = DataFormat.text, old_json: JsonAlias = False) -> None:
    """List the risk-factor catalogue with weights and sources."""
    from .factor_table import factor_rows, render_factor_table

    rows = factor_rows()
    as_json = _data_format(fmt, old_json) is DataFormat.json
    sys.stdout.write(json.dumps(rows, indent=2) + "\n" if as_json else render_factor_table(rows))


@command(cls=GroupedCommand)
def schema() -> None:
    """Print the JSON Schema of the assessment input."""
    from .assessment import Assessment

    sys.stdout.write(json.dumps(Assessment.model_json_schema(), indent=2) + "\n")


def main() -> None:
    """Console-script entry point."""
    # One command, then the process ends: cyclic garbage collection would only cost
    # start-up time (pydantic builds many objects). Reference counting still frees
    # memory; the library itself never changes the collector.
    gc.disable()
    share_adapters()
    try:
        _app_for(sys.argv[1:])(prog_name="airway")
    except Exception as exc:  # bad input never gets here: it exits 2 with its message
        _internal_error(exc)


def _internal_error(exc: Exception) -> NoReturn:
    """A fault in airway itself: one plain message and exit 1, not a traceback on the
    screen of someone about to anaesthetise. The exception's text is left out, since
    it may hold what was typed (her identifiers); AIRWAY_TRACEBACK=1 shows it all."""
    if os.environ.get("AIRWAY_TRACEBACK"):
        raise exc
    sys.stderr.write(
        f"airway: internal error ({type(exc).__name__}): a fault in airway, not in what was "
        "entered. No file is left half-written. Use the printed trolley sheets and local "
        "guidelines; set AIRWAY_TRACEBACK=1 to see the details and report them.\n"
    )
    sys.exit(1)


def _app_for(args: list[str]) -> typer.Typer:
    """The app to run: only the named command when the first argument names one.

    Typer turns every command's options into click parameters before it parses
    anything (about 15 ms for eleven commands); one command, one screen, so build
    only the one asked for. Help for that command reads the same (a test compares);
    anything else (no command, ``--help``, a mistyped name) gets the whole app.
    """
    if not args:
        return app
    chosen = [c for c in app.registered_commands if _command_name(c) == args[0]]
    if not chosen:
        return app
    one = copy.copy(app)  # same settings, callback and --version; one command
    one.registered_commands = chosen
    return one


def _command_name(info: typer.models.CommandInfo) -> str:
    if info.name:
        return info.name
    return info.callback.__name__.replace("_", "-") if info.callback else ""
