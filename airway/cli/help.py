"""Command help as plain text, options grouped under headings, whole at any width.

Typer's boxed help truncates option names once a command has many options and
the terminal is 80 columns wide. This formatter keeps click's plain layout
(an option too long for the name column gets its help on the next line, so
nothing is ever cut) and groups options under the ``rich_help_panel`` each
declares: Patient, Airway, History, Pre-eclampsia, Context, Output, Unit files.
"""

from typing import Any

from typer.core import TyperCommand

# Options are shown in this order of headings; any other heading follows them.
HEADINGS = (
    "Patient",
    "Airway",
    "History",
    "Pre-eclampsia",
    "Context",
    "Input",
    "Output",
    "Unit files",
)
DEFAULT_HEADING = "Options"


class GroupedCommand(TyperCommand):
    """A typer command whose help lists options under their group headings."""

    def format_options(self, ctx: Any, formatter: Any) -> None:
        arguments: list[tuple[str, str]] = []
        groups: dict[str, list[tuple[str, str]]] = {}
        for param in self.get_params(ctx):
            record = param.get_help_record(ctx)
            if record is None:
                continue
            if param.param_type_name == "argument":
                arguments.append(record)
                continue
            heading = getattr(param, "rich_help_panel", None) or DEFAULT_HEADING
            groups.setdefault(heading, []).append(record)
        if arguments:
            with formatter.section("Arguments"):
                formatter.write_dl(arguments, col_max=24)
        order = [h for h in HEADINGS if h in groups]
        order += [h for h in groups if h not in HEADINGS]
        for heading in order:
            with formatter.section(heading):
                formatter.write_dl(groups[heading], col_max=24)
