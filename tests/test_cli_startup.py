"""Start-up: options that check values alike share one typer value checker."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest
import typer
from typer.testing import CliRunner

from airway.cli import app
from airway.cli_startup import adapter_key

ROOT = Path(__file__).resolve().parent.parent


def test_options_differing_only_in_help_share_a_key() -> None:
    a = typer.Option("--height-cm", help="Height.", rich_help_panel="Patient", metavar="CM")
    b = typer.Option("--weight-kg", help="Weight.", rich_help_panel="Other", metavar="KG")
    assert adapter_key(float | None, a) == adapter_key(float | None, b)
    assert adapter_key(float | None, a) != adapter_key(int | None, a)


def test_options_that_check_differently_do_not_share() -> None:
    plain = typer.Option("--x")
    assert adapter_key(float, plain) != adapter_key(float, typer.Option("--x", min=1))
    assert adapter_key(float, plain) != adapter_key(float, typer.Option("--x", clamp=True))
    assert adapter_key(str, plain) != adapter_key(str, typer.Option("--x", parser=str.upper))
    assert adapter_key(str, plain) != adapter_key(str, typer.Argument())


def test_unhashable_settings_are_never_shared() -> None:
    odd = typer.Option("--x")
    odd.formats = ["%Y"]  # a list: cannot be part of a key
    assert adapter_key(str, odd) is None


CASES = (
    ["quick", "--weight-kg", "90", "--mallampati", "abc"],
    ["quick", "--weight-kg", "90", "--mallampati", "7"],
    ["quick", "--weight-kg", "ninety"],
    ["quick", "--weight-kg", "90", "--neck-movement", "stiff"],
    ["quick", "--weight-kg", "90", "--signs", "hoarse"],
    ["quick", "--weight-kg", "90", "--mallampati", "3", "--in-labour", "--signs", "stridor"],
    ["quick", "--weight-kg", "90", "--height-cm", "1.6"],
    ["oxygen", "examples/clinic-raised-bmi.toml", "--end-tidal-o2", "0.8", "-f", "json"],
    ["oxygen", "examples/clinic-raised-bmi.toml", "--end-tidal-o2", "0.3"],
)


@pytest.mark.parametrize("args", CASES, ids=lambda a: " ".join(a[2:]))
def test_shared_checkers_answer_as_typer_does(args: list[str]) -> None:
    """The console command (checkers shared) and the bare app give the same output and code."""
    bare = CliRunner().invoke(
        app, args, env={"COLUMNS": "80"}, terminal_width=80, prog_name="airway"
    )
    shared = subprocess.run(
        [sys.executable, "-m", "airway", *args],
        capture_output=True,
        text=True,
        env={"COLUMNS": "80", "PATH": "/usr/bin:/bin", "PYTHONDONTWRITEBYTECODE": "1"},
        check=False,
        cwd=ROOT,
    )
    assert shared.returncode == bare.exit_code
    assert shared.stdout == bare.stdout
    assert shared.stderr == bare.stderr


def test_quick_builds_one_checker_per_kind_of_option(monkeypatch) -> None:
    """`quick` has about 30 options but few kinds of value: far fewer checkers are built."""
    from typer import _adapters

    from airway.cli_startup import share_adapters

    built: list[object] = []
    real = _adapters.try_build_adapter

    def counting(*args: object, **kwargs: object) -> object:
        built.append(kwargs.get("annotation"))
        return real(*args, **kwargs)

    monkeypatch.setattr(_adapters, "try_build_adapter", counting)
    assert share_adapters()
    result = CliRunner().invoke(app, ["quick", "--weight-kg", "90", "-f", "json"])
    assert result.exit_code == 0, result.output
    options = sum(1 for p in typer.main.get_command(app).commands["quick"].params)  # type: ignore[attr-defined]
    assert options >= 25 and 0 < len(built) <= 10


def test_only_the_console_script_turns_the_collector_off_before_typer_loads() -> None:
    """The console script turns cyclic collection off before typer and pydantic are
    imported (their start-up would set it off for nothing); airway as a library never
    touches it. The installed ``airway`` command is that script."""
    import tomllib

    probe = (
        "import builtins, gc, sys\n"
        "seen = {}\n"
        "real = builtins.__import__\n"
        "def spy(name, *a, **k):\n"
        "    if name == 'typer' and 'typer' not in seen:\n"
        "        seen['typer'] = gc.isenabled()\n"
        "    return real(name, *a, **k)\n"
        "builtins.__import__ = spy\n"
        "import MODULE\n"
        "print(seen.get('typer'), gc.isenabled())\n"
    )
    for module, expected in (("airway.console", "False False"), ("airway.cli", "True True")):
        out = subprocess.run(
            [sys.executable, "-c", probe.replace("MODULE", module)],
            capture_output=True,
            text=True,
            check=True,
            cwd=ROOT,
        )
        assert out.stdout.split() == expected.split(), module
    scripts = tomllib.loads((ROOT / "pyproject.toml").read_text())["project"]["scripts"]
    assert scripts["airway"] == "airway.console:main"


def test_command_annotations_are_objects_not_strings() -> None:
    """typer reads every command's annotations at each run; as strings they would be
    compiled and evaluated each time (cli.py has no postponed annotations)."""
    import inspect

    for info in app.registered_commands:
        assert info.callback is not None
        annotations = inspect.get_annotations(info.callback)
        assert annotations, info.callback.__name__
        text = [k for k, v in annotations.items() if isinstance(v, str)]
        assert not text, (info.callback.__name__, text)
