"""Reading checklist files (Markdown with TOML front matter) into checklists.

The format is in ``checklists/README.md``. Every error names the file and the
line. The shipped checklists (``airway/data/checklists``) are parsed like a
unit's own; a unit file replaces the shipped file of the same name.
"""

import re
import tomllib
from importlib import resources
from pathlib import Path
from typing import Any

from pydantic import ValidationError

from ..assessment import refused_character
from ..checklist import (
    ITEM_MAX_CHARS,
    TITLE_MAX_CHARS,
    VALUE,
    Checklist,
    Condition,
    FrontMatter,
    Item,
    Section,
)
from ..engine.checklists import CONDITIONS, UNIT_VALUES, VALUES
from ..errors import ChecklistError, InputError
from ..loading import read_text_file

_WHEN = re.compile(r"\{when\s+(?P<body>[^{}]*)\}\s*$")
_LEVEL = re.compile(r"^level\s*>=\s*(?P<n>[1-4])$")


def _parser() -> Any:
    from markdown_it import MarkdownIt
    from mdit_py_plugins.front_matter import front_matter_plugin

    return MarkdownIt("commonmark", {"tasklists": True}).use(front_matter_plugin)


def _condition(body: str, path: str, line: int) -> Condition:
    body = " ".join(body.split())
    level = _LEVEL.match(body)
    if level:
        return Condition(min_level=int(level["n"]))
    negate = body.startswith("not ")
    name = body[4:] if negate else body
    if name not in CONDITIONS:
        known = ", ".join(sorted(CONDITIONS)) + ", level >= N"
        raise ChecklistError(path, line, f"unknown condition {name!r}; known: {known}")
    return Condition(name=name, negate=negate)


def _item(text: str, checked: bool | None, path: str, line: int) -> Item:
    condition = None
    match = _WHEN.search(text)
    if match:
        condition = _condition(match["body"], path, line)
        text = text[: match.start()].rstrip()
    for name in VALUE.findall(text):
        if name not in VALUES and name not in UNIT_VALUES:
            known = ", ".join(sorted({**VALUES, **UNIT_VALUES}))
            raise ChecklistError(path, line, f"unknown value {{{{{name}}}}}; known: {known}")
    leftover = VALUE.sub("", text)
    if "{" in leftover or "}" in leftover:
        raise ChecklistError(
            path,
            line,
            "malformed braces: use {{name}} for a value and {when name} at the end of the item",
        )
    if not text:
        raise ChecklistError(path, line, "empty item")
    if len(text) > ITEM_MAX_CHARS:
        raise ChecklistError(
            path,
            line,
            f"item is {len(text)} characters; at most {ITEM_MAX_CHARS} (one action a line)",
        )
    return Item(text=text, line=line, condition=condition, checkbox=checked is not None)


# Items in one checklist file: the shipped lists hold 10-25; a sheet of more than this
# cannot keep its one-page promise in large type (project rule, measured on A4).
ITEMS_MAX = 40


def _clean(text: str, path: str) -> None:
    """Refuse a character no printed sheet or terminal should receive, naming its line."""
    for number, line in enumerate(text.splitlines(), start=1):
        found = refused_character(line)
        if found:
            raise ChecklistError(
                path, number, f"contains {found}; checklists must be plain printable text"
            )


def parse_checklist(text: str, path: str) -> Checklist:
    """Parse one checklist file; every error names ``path`` and the line."""
    _clean(text, path)
    tokens = _parser().parse(text)
    meta: FrontMatter | None = None
    sections: list[Section] = []
    title: tuple[str, int] | None = None
    items: list[Item] = []
    depth = 0

    def close() -> None:
        if title is not None:
            if not items:
                raise ChecklistError(path, title[1], f"section {title[0]!r} has no items")
            sections.append(Section(title=title[0], line=title[1], items=tuple(items)))
            count = sum(len(x.items) for x in sections)
            if count > ITEMS_MAX:
                raise ChecklistError(
                    path,
                    title[1],
                    f"{count} items; at most {ITEMS_MAX} in one checklist so that its sheet "
                    f"stays one page: cut {count - ITEMS_MAX}",
                )

    for i, tok in enumerate(tokens):
        line = (tok.map[0] + 1) if tok.map else None
        if tok.type == "front_matter":
            try:
                meta = FrontMatter.model_validate(tomllib.loads(tok.content))
            except tomllib.TOMLDecodeError as exc:
                raise ChecklistError(path, 2, f"front matter is not TOML: {exc}") from None
            except ValidationError as exc:
                err = exc.errors(include_url=False)[0]
                where = ".".join(str(x) for x in err["loc"]) or "front matter"
                raise ChecklistError(path, 2, f"front matter {where}: {err['msg']}") from None
        elif tok.type == "heading_open":
            close()
            title, items = (tokens[i + 1].content.strip(), line or 0), []
            if len(title[0]) > TITLE_MAX_CHARS:
                raise ChecklistError(
                    path, line, f"heading is {len(title[0])} characters; at most {TITLE_MAX_CHARS}"
                )
        elif tok.type == "list_item_open":
            depth += 1
            if depth > 1:
                raise ChecklistError(path, line, "nested items are not supported")
            inline = tokens[i + 2]
            if title is None:
                raise ChecklistError(path, line, "item before any heading")
            items.append(_item(inline.content.strip(), tok.meta.get("checked"), path, line or 0))
        elif tok.type == "list_item_close":
            depth -= 1
        elif tok.type == "paragraph_open" and depth == 0:
            raise ChecklistError(path, line, "only headings and list items are allowed")
    close()
    if meta is None:
        raise ChecklistError(path, 1, "missing front matter (--- title = ... ---)")
    if not sections:
        raise ChecklistError(path, None, "no sections")
    if meta.paper not in ("A4", "A3"):
        raise ChecklistError(path, 2, f"paper must be A4 or A3 (got {meta.paper!r})")
    return Checklist(path=path, meta=meta, sections=tuple(sections))


def _shipped() -> dict[str, tuple[str, str]]:
    """The shipped checklists by file name: (the name shown in messages, the text)."""
    folder = resources.files("airway").joinpath("data/checklists")
    return {
        f.name: (f"shipped checklist {f.name}", f.read_text("utf-8"))
        for f in folder.iterdir()
        if f.name.endswith(".md")
    }


def load_checklists(folder: Path | None = None) -> tuple[Checklist, ...]:
    """Every ``*.md`` in the unit's folder, with the shipped ones as the fallback.

    A unit file replaces the shipped file of the same name; shipped files it
    does not replace stay. Ordered by file name.
    """
    found = _shipped()
    if folder is not None:
        if not folder.is_dir():
            raise ChecklistError(str(folder), None, "not a folder")
        for f in sorted(folder.glob("*.md")):
            try:
                found[f.name] = (str(f), read_text_file(f))
            except InputError as exc:
                raise ChecklistError(str(f), None, exc.problems[0].message) from None
    return tuple(parse_checklist(text, name) for _key, (name, text) in sorted(found.items()))
