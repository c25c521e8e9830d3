"""The typer app, the options several commands share, and the one place errors
become messages and exit codes.

Exit codes: 0 ok; 2 bad input or usage (including a refused overwrite); 1 any
other failure. Data goes to stdout, messages to stderr.
"""

import os
import sys
from collections.abc import Iterator
from contextlib import contextmanager
from datetime import date
from enum import StrEnum
from pathlib import Path
from typing import TYPE_CHECKING, Annotated, NoReturn

import typer

from .. import __version__
from ..errors import AirwayError

if TYPE_CHECKING:
    from ..engine.plan_model import Plan

app = typer.Typer(
    add_completion=False,
    no_args_is_help=True,
    # Plain help (see cli/help.py): whole at 80 columns, options grouped under headings.
    rich_markup_mode=None,
    context_settings={"help_option_names": ["-h", "--help"], "max_content_width": 100},
    help="Obstetric airway plans from one bedside assessment. A decision aid: it does "
    "not replace clinical judgement, local guidelines or licensed practice.",
)


class Format(StrEnum):
    text = "text"
    markdown = "markdown"
    json = "json"
    fhir = "fhir"


class DataFormat(StrEnum):
    text = "text"
    json = "json"


class Paper(StrEnum):
    A4 = "A4"
    letter = "letter"


OUT, UNIT, INPUT = "Output", "Unit files", "Input"
FormatOpt = Annotated[
    Format, typer.Option("--format", "-f", help="Output format.", rich_help_panel=OUT)
]
DataFormatOpt = Annotated[
    DataFormat, typer.Option("--format", "-f", help="Output format.", rich_help_panel=OUT)
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


def data_format(fmt: DataFormat, old_json: bool) -> DataFormat:
    """``-f`` as given, or json under the old ``--json`` flag."""
    return DataFormat.json if old_json else fmt


def alias(new: object, old: object, name: str, old_name: str) -> object:
    """An option given under its old spelling; both at once must agree."""
    if old is None or old in ((), []):
        return new
    if new is not None and new not in ((), []) and new != old:
        raise typer.BadParameter(f"{old_name} is the old name of {name}; give one of them")
    return old


@contextmanager
def errors() -> Iterator[None]:
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


def render(plan: "Plan", fmt: Format, compact: bool = False, pdf: bytes | None = None) -> str:
    """The plan in one of the text formats (the renderer imported only when used); a
    FHIR Bundle holds the printed plan when its ``pdf`` bytes are given."""
    if fmt is Format.fhir:
        from ..render.fhir import render_fhir

        return render_fhir(plan, pdf)
    if fmt is Format.json:
        from ..render.json import render_json

        return render_json(plan)
    if fmt is Format.markdown:
        from ..render.markdown import render_markdown

        return render_markdown(plan)
    from ..render.text import render_text

    return render_text(plan, compact=compact)


def check_outputs(force: bool, *paths: Path | None) -> None:
    """All or nothing: refuse before writing any output if one of them exists (without
    --force) or two are the same file."""
    from ..errors import OutputExistsError
    from ..output import check_writable

    named = [p for p in paths if p is not None and str(p) != "-"]
    if len({p.resolve() for p in named}) < len(named):
        raise OutputExistsError(str(named[0]), "--pdf and -o name the same file")
    for path in named:
        check_writable(path, force)


def write_pdf(plan: "Plan", pdf: Path | None, paper: Paper, force: bool) -> bytes | None:
    """Print the plan to ``pdf`` when one is named; the bytes written, or None."""
    if pdf is None:
        return None
    from ..output import write_atomic
    from ..render.pdf.plan import render_plan_pdf

    printed = render_plan_pdf(plan, paper.value)
    write_atomic(pdf, printed, force=force)
    typer.echo(f"wrote {pdf}", err=True)
    return printed


def echo_notes(notes: list[str]) -> None:
    """What the reader should know about how a file was read, on stderr."""
    for note in notes:
        typer.echo(f"airway: note: {note}", err=True)


def emit(text: str, output: Path | None, force: bool) -> None:
    """Text to stdout, or atomically to ``output``."""
    if output is None or str(output) == "-":
        sys.stdout.write(text)
        return
    from ..output import write_atomic

    write_atomic(output, text.encode("utf-8"), force=force)
    typer.echo(f"wrote {output}", err=True)


def today() -> date:
    """The clock lives here, never in the library."""
    return date.today()


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


def main() -> None:
    """Console-script entry point."""
    # PDFs carry a fixed date so the same plan gives the same bytes on every machine;
    # reportlab would stamp SOURCE_DATE_EPOCH's date instead.
    os.environ.pop("SOURCE_DATE_EPOCH", None)
    try:
        app(prog_name="airway")
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
