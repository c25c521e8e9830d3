"""The package's internal imports run one way: no module imports one that imports it back."""

from __future__ import annotations

import ast
from pathlib import Path

PACKAGE = Path(__file__).resolve().parent.parent / "airway"


def _graph() -> dict[str, set[str]]:
    """Module -> the package modules it imports, anywhere in the file (type-only too)."""
    graph: dict[str, set[str]] = {}
    for path in PACKAGE.glob("*.py"):
        name = path.stem
        graph[name] = set()
        for node in ast.walk(ast.parse(path.read_text("utf-8"))):
            if isinstance(node, ast.ImportFrom) and node.level == 1:
                if node.module:
                    graph[name].add(node.module.split(".")[0])
                else:  # from . import x
                    graph[name].update(a.name for a in node.names)
        graph[name].discard("__init__")
    return graph


def _cycle(graph: dict[str, set[str]]) -> list[str] | None:
    state: dict[str, int] = {}
    stack: list[str] = []

    def visit(n: str) -> list[str] | None:
        state[n] = 1
        stack.append(n)
        for m in sorted(graph.get(n, ())):
            if state.get(m) == 1:
                return [*stack[stack.index(m) :], m]
            if m not in state and (found := visit(m)):
                return found
        stack.pop()
        state[n] = 2
        return None

    for n in sorted(graph):
        if n not in state and (found := visit(n)):
            return found
    return None


def test_no_import_cycles_in_the_package() -> None:
    cycle = _cycle(_graph())
    assert cycle is None, " -> ".join(cycle or [])


def test_cycle_finder_finds_a_planted_cycle() -> None:
    assert _cycle({"a": {"b"}, "b": {"c"}, "c": {"a"}}) == ["a", "b", "c", "a"]


def test_plan_and_checklists_one_way() -> None:
    graph = _graph()
    assert "checklists" in graph["plan"]
    assert "plan" not in graph["checklists"]


def test_quick_to_the_terminal_imports_no_pdf_markdown_or_rich_code() -> None:
    """The emergency path stays light: reportlab only for a PDF, markdown-it only for a
    unit's own checklists (the shipped ones come from their parse cache), rich never."""
    import subprocess
    import sys

    code = (
        "import sys, io, contextlib\n"
        "sys.argv = ['airway', 'quick', '--weight-kg', '90']\n"
        "from airway.cli import main\n"
        "with contextlib.redirect_stdout(io.StringIO()):\n"
        "    try:\n"
        "        main()\n"
        "    except SystemExit:\n"
        "        pass\n"
        "heavy = [m for m in ('reportlab', 'markdown_it', 'rich') if m in sys.modules]\n"
        "print(' '.join(heavy))\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == ""


def test_a_plan_pdf_with_bars_and_curve_loads_no_reportlab_graphics(tmp_path) -> None:
    """The factors' bars and the SpO2 curve are drawn straight on the page: a two-page
    plan, which has both, never loads reportlab's graphics package."""
    import subprocess
    import sys
    from pathlib import Path

    example = Path(__file__).parent.parent / "examples" / "severe-preeclampsia-category1.toml"
    code = (
        "import sys\n"
        "from airway import build_plan, read_assessment\n"
        "from airway.render_pdf import render_plan_pdf\n"
        f"plan = build_plan(read_assessment({str(example)!r}))\n"
        "assert plan.risk.level >= 3 and plan.risk.factors\n"
        "render_plan_pdf(plan)\n"
        "print(' '.join(m for m in sys.modules if m.startswith('reportlab.graphics')))\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == ""


def test_named_tuple_fields_are_annotated_with_objects_not_strings() -> None:
    """typing's NamedTuple compiles every string annotation it is given when the class
    is made: the modules that define the engine's records, all imported at start-up,
    do without postponed annotations (about 2 ms of `airway quick`)."""
    import importlib
    import pkgutil
    import typing

    import airway

    checked = 0
    for info in pkgutil.iter_modules(airway.__path__):
        if info.name.startswith("__"):
            continue
        module = importlib.import_module(f"airway.{info.name}")
        for value in vars(module).values():
            if (
                isinstance(value, type)
                and issubclass(value, tuple)
                and hasattr(value, "_fields")
                and value.__module__ == module.__name__
            ):
                checked += 1
                # a string annotation is kept as a ForwardRef, compiled at class creation
                text = [
                    k
                    for k, v in value.__annotations__.items()
                    if isinstance(v, str | typing.ForwardRef)
                ]
                assert not text, (value.__qualname__, text)
    assert checked > 25
