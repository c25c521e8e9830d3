"""The Markdown plan: what the clinic typed shows as typed, whatever it holds."""

from __future__ import annotations

from hypothesis import example, given, settings
from hypothesis import strategies as st
from markdown_it import MarkdownIt

from airway import plan_for
from airway.render.markdown import render_markdown

from ..conftest import make

MD = MarkdownIt("commonmark").enable(["table", "strikethrough"])
HOSTILE = "Clinic | 4 *bold* _it_ `code` ~~gone~~ [link](http://x) <b>x</b> &amp; \\*"


def _first_line_inline(text: str) -> list[object]:
    """The inline tokens of the plan's title (its first line)."""
    tokens = MD.parse(text.splitlines()[0])
    return next(t for t in tokens if t.type == "inline").children or []


def _shown(children: list[object]) -> str:
    return "".join(c.content for c in children if c.type in ("text", "code_inline"))  # type: ignore[attr-defined]


def test_a_hostile_label_is_shown_as_typed_not_as_markup() -> None:
    text = render_markdown(plan_for(make(label=HOSTILE)))
    children = _first_line_inline(text)
    kinds = {c.type for c in children}  # type: ignore[attr-defined]
    assert kinds <= {"text"}, kinds  # no emphasis, link, code, strike or HTML
    assert _shown(children) == f"Airway plan: {HOSTILE}"


ASCII_PRINTABLE = st.characters(codec="ascii", categories=["P", "S", "L", "N", "Zs"])


@settings(max_examples=300, deadline=None)
@given(st.text(alphabet=ASCII_PRINTABLE, min_size=1, max_size=60))
@example("Room 4 #")  # a closing '#' would end the heading and vanish
def test_any_printable_label_round_trips(label: str) -> None:
    label = label.strip()
    if not label:
        return
    text = render_markdown(plan_for(make(label=label)))
    assert _shown(_first_line_inline(text)) == f"Airway plan: {label}"
