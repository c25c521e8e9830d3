"""The house's rules: which package may import which, what each may import from
outside, and the size of modules and command bodies (conventions.md, the start-up budgets)."""

import ast
import subprocess
import sys
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parent.parent / "airway"
LAYERS = ("engine", "unit", "workflows", "render", "cli", "web")


def _modules() -> dict[str, Path]:
    return {
        ".".join(p.relative_to(PACKAGE.parent).with_suffix("").parts): p
        for p in PACKAGE.rglob("*.py")
    }


def _imports(name: str, path: Path) -> set[str]:
    """Absolute names of every module a file imports, anywhere in it (lazy ones too)."""
    package = name.rsplit(".", 1)[0] if path.name != "__init__.py" else name
    found: set[str] = set()
    for node in ast.walk(ast.parse(path.read_text("utf-8"))):
        if isinstance(node, ast.Import):
            found.update(a.name for a in node.names)
        elif isinstance(node, ast.ImportFrom):
            if node.level:
                base = package.split(".")[: len(package.split(".")) - node.level + 1]
                target = ".".join(base + ([node.module] if node.module else []))
            else:
                target = node.module or ""
            found.add(target)
            found.update(f"{target}.{a.name}" for a in node.names)
    return found


def _layer(module: str) -> str:
    parts = module.split(".")
    return parts[1] if len(parts) > 2 and parts[1] in LAYERS else "top"


def _importers(third_party: str) -> set[str]:
    return {
        n
        for n, p in _modules().items()
        if any(i == third_party or i.startswith(third_party + ".") for i in _imports(n, p))
    }


def test_the_engine_imports_nothing_below_it_nor_any_interface_library() -> None:
    for name, path in _modules().items():
        if _layer(name) != "engine":
            continue
        for target in _imports(name, path):
            if target.startswith("airway."):
                assert _layer(target) in ("engine", "top"), f"{name} imports {target}"
            root = target.split(".")[0]
            assert root not in ("reportlab", "typer", "markdown_it", "mdit_py_plugins"), name


def test_the_input_models_at_the_top_import_no_package_below() -> None:
    for name, path in _modules().items():
        if _layer(name) == "top" and name not in ("airway", "airway.__main__"):
            below = {t for t in _imports(name, path) if _layer(t) != "top"}
            assert not below, f"{name} imports {sorted(below)}"


def test_only_render_pdf_imports_reportlab() -> None:
    assert all(n.startswith("airway.render.pdf.") for n in _importers("reportlab"))


def test_only_the_fhir_exchange_imports_the_fhir_models() -> None:
    assert _importers("fhir") == {"airway.fhir_read", "airway.render.fhir"}


def test_only_unit_files_parse_markdown_and_only_the_cli_imports_typer() -> None:
    # A unit's checklists are parsed; the web page shows the plan's Markdown as HTML.
    assert _importers("markdown_it") <= {"airway.unit.checklists", "airway.web.app"}
    assert all(n.startswith("airway.cli") for n in _importers("typer"))


def test_no_module_over_600_lines() -> None:
    long = {n: c for n, p in _modules().items() if (c := len(p.read_text().splitlines())) > 600}
    assert not long


def test_every_command_body_at_most_20_lines() -> None:
    """The body after the docstring: parse, call the library, render, map errors."""
    for name, path in _modules().items():
        if not name.startswith("airway.cli."):
            continue
        for node in ast.parse(path.read_text("utf-8")).body:
            if isinstance(node, ast.FunctionDef) and any(
                "command" in ast.unparse(d) for d in node.decorator_list
            ):
                body = node.body[1:] if isinstance(node.body[0], ast.Expr) else node.body
                lines = body[-1].end_lineno - body[0].lineno + 1  # type: ignore[operator]
                assert lines <= 20, f"{node.name}: {lines} lines"


@pytest.mark.parametrize("command", [["quick", "--weight-kg", "90"], ["--help"]])
def test_the_terminal_path_loads_no_pdf_web_or_fhir_code(command: list[str]) -> None:
    code = (
        "import sys, io, contextlib\n"
        f"sys.argv = ['airway', *{command!r}]\n"
        "from airway.cli import main\n"
        "with contextlib.redirect_stdout(io.StringIO()):\n"
        "    try:\n"
        "        main()\n"
        "    except SystemExit:\n"
        "        pass\n"
        "heavy = [m for m in ('reportlab', 'fastapi', 'starlette', 'uvicorn', 'jinja2', 'fhir')"
        " if m in sys.modules]\n"
        "print(' '.join(heavy))\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == ""
