"""Commands for one woman: plan, assess, quick, oxygen, compare, verify."""

import sys
from pathlib import Path
from typing import Annotated

import typer

from .app import (
    INPUT,
    OUT,
    CatalogueOpt,
    ChecklistsOpt,
    ConfigOpt,
    DataFormat,
    DataFormatOpt,
    ForceOpt,
    Format,
    FormatOpt,
    JsonAlias,
    OutputOpt,
    Paper,
    PaperOpt,
    PdfOpt,
    alias,
    app,
    check_outputs,
    data_format,
    echo_notes,
    emit,
    errors,
    render,
    today,
    write_pdf,
)
from .help import GroupedCommand

PAT, AIR, HIST, PE, CTX = "Patient", "Airway", "History", "Pre-eclampsia", "Context"


def _opt(names: str, metavar: str | None, help_: str, panel: str) -> typer.models.OptionInfo:
    return typer.Option(*names.split(","), metavar=metavar, help=help_, rich_help_panel=panel)


def _flag(names: str, help_: str, panel: str) -> typer.models.OptionInfo:
    return typer.Option(names, help=help_, rich_help_panel=panel, show_default=False)


def _hidden(name: str) -> typer.models.OptionInfo:
    return typer.Option(name, hidden=True)


@app.command(cls=GroupedCommand)
def plan(
    file: Annotated[
        str | None,
        typer.Argument(
            metavar="FILE",
            help="Assessment (.toml, .json, a saved plan, a FHIR Bundle), or - for stdin.",
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
    from ..loading import read_assessment
    from ..unit.config import load_unit
    from ..workflows.planning import demo_assessment, plan_since

    if (file is None) == (not demo):
        raise typer.BadParameter("give an assessment FILE or --demo (not both)")
    notes: list[str] = []
    with errors():
        assessment = demo_assessment() if file is None else read_assessment(file, notes)
        unit = load_unit(config, catalogue, checklists)
        the_plan = plan_since(assessment, unit, since, notes)
        echo_notes(notes)
        check_outputs(force, pdf, output)
        printed = write_pdf(the_plan, pdf, paper, force)
        if pdf is None or output is not None or fmt is not Format.text:
            emit(render(the_plan, fmt, pdf=printed), output, force)


def _ask(prompt: str) -> str:
    """One answer from the keyboard (or a pipe); the prompt goes to stderr."""
    sys.stderr.write(prompt)
    sys.stderr.flush()
    line = sys.stdin.readline()
    if line == "":
        raise EOFError
    return line.rstrip("\r\n")


@app.command(cls=GroupedCommand)
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
    from ..unit.catalogue import load_catalogue
    from ..workflows.guided import Stopped, assessment_toml, guided_entry
    from ..workflows.planning import plan_for

    if output is not None and output.exists() and not force:
        typer.echo(f"airway: {output} already exists; use --force to replace it", err=True)
        raise typer.Exit(2)
    try:
        assessment = guided_entry(_ask, lambda text: typer.echo(text, err=True), today())
    except Stopped:
        typer.echo("\nairway: stopped before the end: nothing saved", err=True)
        raise typer.Exit(1) from None
    with errors():
        sys.stdout.write(render(plan_for(assessment, load_catalogue(catalogue)), Format.text, True))
        if output is None:
            typer.echo("not saved: give -o FILE to keep this assessment", err=True)
        else:
            emit(assessment_toml(assessment), output, force)


@app.command(cls=GroupedCommand)
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
    status: Annotated[
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
    platelets_10e9_per_l: Annotated[
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
    from ..unit.catalogue import load_catalogue
    from ..workflows.planning import plan_for
    from ..workflows.quick import SECTIONS, quick_assessment

    findings = {name: value for name, value in locals().items() if name in SECTIONS}
    findings["age_years"] = alias(age_years, old_age, "--age-years", "--age")
    findings["signs"] = alias(signs, old_sign, "--signs", "--sign")
    findings["urgency_category"] = alias(
        urgency_category, old_category, "--urgency-category", "--category"
    )
    # The one screen shows no checklist, so it is planned without them.
    one_screen = fmt is Format.text and not full and pdf is None
    with errors():
        assessment = quick_assessment(**findings)
        the_plan = plan_for(assessment, load_catalogue(catalogue), () if one_screen else None)
        check_outputs(force, pdf, output)
        printed = write_pdf(the_plan, pdf, paper, force)
        emit(render(the_plan, fmt, compact=not full, pdf=printed), output, force)


@app.command(cls=GroupedCommand)
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
    from ..engine.oxygenation import oxygenation_for
    from ..loading import read_assessment
    from ..render.json import dumps
    from ..render.text import oxygenation_lines

    notes: list[str] = []
    with errors():
        oxy = oxygenation_for(read_assessment(file, notes), feo2=end_tidal_o2)
    echo_notes(notes)
    if data_format(fmt, old_json) is DataFormat.json:
        sys.stdout.write(dumps(oxy))
    else:
        sys.stdout.write("\n".join(oxygenation_lines(oxy)[1:]) + "\n")


@app.command(cls=GroupedCommand)
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
    from ..render.comparison import render_comparison
    from ..render.json import dumps
    from ..unit.config import load_unit
    from ..workflows.planning import reassess

    notes: list[str] = []
    with errors():
        unit = load_unit(config, catalogue, checklists)
        comparison, after = reassess(earlier, later, unit, notes)
    echo_notes(notes)
    if fmt is DataFormat.json:
        sys.stdout.write(dumps(comparison))
    else:
        sys.stdout.write(render_comparison(comparison, after))


@app.command(cls=GroupedCommand)
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
    from ..loading import read_assessment
    from ..unit.config import load_unit
    from ..workflows.planning import plan_since
    from ..workflows.verify import verify_file

    notes: list[str] = []
    with errors():
        assessment = read_assessment(assessment_file, notes)
        current = plan_since(assessment, load_unit(config, catalogue, checklists))
        verdict = verify_file(saved, current)
    echo_notes(notes)
    for line in verdict.findings:
        typer.echo(f"{saved}: {line}")
    if not verdict.matches:
        raise typer.Exit(1)
