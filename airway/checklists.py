"""Checklists written in Markdown, for plans and trolley sheets.

A checklist file is Markdown with TOML front matter::

    ---
    title = "Before induction: team brief"
    use = ["plan"]            # "plan", "sheet" or both
    sheet = "brief"           # which sheet or plan section it fills
    paper = "A4"              # A4 or A3, for sheets
    ---

    # Roles
    - [ ] Who calls for help is named
    - [ ] Tube {{tube_first}} mm and {{tube_smallest}} mm open {when preeclampsia}

Headings are sections; task-list items (``- [ ]``) are check items. An item
may end with ``{when NAME}``, ``{when not NAME}`` or ``{when level >= N}`` to
appear only when that holds for the plan, and may show a plan value with
``{{NAME}}``. The names form the closed lists :data:`CONDITIONS` and
:data:`VALUES`; anything else is an error naming the file and the line. On a
generic trolley sheet conditions are not applied (every item shows) and values
are not allowed.
"""

import functools
import hashlib
import json
import re
from collections.abc import Callable
from importlib import resources
from pathlib import Path
from typing import Any, NamedTuple

from pydantic import BaseModel, ConfigDict, Field, ValidationError

from .doses import BY_NAME
from .errors import ChecklistError
from .guidance import (
    CRICOID_ASLEEP_N,
    CRICOID_AWAKE_N,
    MAX_INTUBATION_ATTEMPTS,
    MAX_SGA_ATTEMPTS,
)
from .plan_model import Plan, RenderedChecklist, RenderedItem, RenderedSection

Cond = Callable[["Plan"], bool]

CONDITIONS: dict[str, tuple[str, Cond]] = {
    "preeclampsia": (
        "pre-eclampsia of any severity",
        lambda p: (
            p.assessment.preeclampsia.status in ("without_severe_features", "with_severe_features")
        ),
    ),
    "severe_preeclampsia": (
        "pre-eclampsia with severe features",
        lambda p: p.assessment.preeclampsia.status == "with_severe_features",
    ),
    "oedema_signs": ("any airway oedema sign", lambda p: bool(p.assessment.preeclampsia.signs)),
    "large_breasts": ("large breasts noted", lambda p: bool(p.assessment.airway.large_breasts)),
    "in_labour": ("in labour", lambda p: bool(p.assessment.patient.in_labour)),
    "obese": ("BMI 30 or more", lambda p: p.body.bmi is not None and p.body.bmi >= 30),
    "bmi_40": ("BMI 40 or more", lambda p: p.body.bmi is not None and p.body.bmi >= 40),
    "short_apnoea": ("predicted time to SpO2 90% under 3 min", lambda p: p.oxygenation.short),
    "category_1": ("category-1 urgency", lambda p: p.assessment.context.urgency_category == 1),
    "previous_difficulty": (
        "previous difficult or failed intubation",
        lambda p: p.assessment.history.intubation in ("difficult", "failed"),
    ),
}


# Values that do not depend on one woman: allowed on trolley sheets as well as plans.
UNIT_VALUES: dict[str, tuple[str, Callable[[float], str]]] = {
    "max_intubation_attempts": (
        "intubation attempts at most (OAA/DAS 2015)",
        lambda _f: str(MAX_INTUBATION_ATTEMPTS),
    ),
    "max_supraglottic_attempts": (
        "supraglottic insertion attempts at most",
        lambda _f: str(MAX_SGA_ATTEMPTS),
    ),
    "cricoid_awake_n": ("cricoid force awake, N", lambda _f: str(CRICOID_AWAKE_N)),
    "cricoid_asleep_n": ("cricoid force asleep, N", lambda _f: str(CRICOID_ASLEEP_N)),
    "sugammadex_mg_per_kg": (
        "sugammadex immediate-reversal dose, mg/kg",
        lambda _f: f"{BY_NAME['sugammadex'].mg_per_kg[0]:g}",
    ),
    "front_of_neck_tube": ("front-of-neck tube, mm (unit catalogue)", lambda f: f"{f:.1f}"),
}

Value = Callable[["Plan"], str]

VALUES: dict[str, tuple[str, Value]] = {
    "level": ("airway level 1-4 (write 'airway level {{level}}')", lambda p: str(p.risk.level)),
    "level_label": ("airway level in words", lambda p: p.risk.label),
    "tube_first": (
        "first tracheal tube, mm",
        lambda p: f"{p.equipment.tracheal_tube_mm.first:.1f}",
    ),
    "tube_backup": (
        "backup tracheal tube, mm",
        lambda p: f"{p.equipment.tracheal_tube_mm.backup:.1f}",
    ),
    "tube_smallest": (
        "smallest tracheal tube, mm",
        lambda p: f"{p.equipment.tracheal_tube_mm.smallest:.1f}",
    ),
    "supraglottic_size": ("supraglottic size", lambda p: f"{p.equipment.supraglottic_size:g}"),
    "suxamethonium_mg": ("suxamethonium range, mg", lambda p: _mg(p, "suxamethonium")),
    "rocuronium_mg": ("rocuronium range, mg", lambda p: _mg(p, "rocuronium")),
    "sugammadex_mg": ("sugammadex dose, mg", lambda p: _mg(p, "sugammadex")),
    "propofol_mg": ("propofol range, mg", lambda p: _mg(p, "propofol")),
    "minutes_to_spo2_90": (
        "predicted minutes to SpO2 90%",
        lambda p: (
            "more than 20"
            if p.oxygenation.minutes_to_spo2_90 is None
            else f"{p.oxygenation.minutes_to_spo2_90:g}"
        ),
    ),
    "decision": (
        "pre-made wake-or-proceed recommendation",
        lambda p: p.decision.phrase,
    ),
}


def _mg(plan: Plan, drug: str) -> str:
    d = plan.dose(drug)
    return (
        f"{d.dose_mg_low:g}"
        if d.dose_mg_low == d.dose_mg_high
        else (f"{d.dose_mg_low:g}-{d.dose_mg_high:g}")
    )


# A checklist is read aloud and ticked in an emergency: one action a line. The limits
# also keep every item and heading shorter than a printed page (project rule).
ITEM_MAX_CHARS = 240
TITLE_MAX_CHARS = 120

_WHEN = re.compile(r"\{when\s+(?P<body>[^{}]*)\}\s*$")
_VALUE = re.compile(r"\{\{\s*(?P<name>[a-z0-9_]+)\s*\}\}")
_LEVEL = re.compile(r"^level\s*>=\s*(?P<n>[1-4])$")


class FrontMatter(BaseModel):
    model_config = ConfigDict(frozen=True, extra="forbid", defer_build=True)
    title: str = Field(min_length=1, max_length=TITLE_MAX_CHARS)
    use: tuple[str, ...] = ("sheet",)
    sheet: str
    paper: str = "A4"


class Condition(BaseModel):
    """A parsed ``{when ...}``: a name, negated or not, or a minimum level."""

    model_config = ConfigDict(frozen=True, defer_build=True)
    name: str | None = None
    negate: bool = False
    min_level: int | None = None

    def holds(self, plan: Plan) -> bool:
        if self.min_level is not None:
            return plan.risk.level >= self.min_level
        result = CONDITIONS[self.name or ""][1](plan)
        return not result if self.negate else result


class Item(BaseModel):
    model_config = ConfigDict(frozen=True, defer_build=True)
    text: str  # with {{values}} still in place
    line: int
    condition: Condition | None = None
    checkbox: bool = True


class Section(BaseModel):
    model_config = ConfigDict(frozen=True, defer_build=True)
    title: str
    line: int
    items: tuple[Item, ...]


class Checklist(BaseModel):
    model_config = ConfigDict(frozen=True, defer_build=True)
    path: str
    meta: FrontMatter
    sections: tuple[Section, ...]


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
    for name in _VALUE.findall(text):
        if name not in VALUES and name not in UNIT_VALUES:
            known = ", ".join(sorted({**VALUES, **UNIT_VALUES}))
            raise ChecklistError(path, line, f"unknown value {{{{{name}}}}}; known: {known}")
    leftover = _VALUE.sub("", text)
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


def parse_checklist(text: str, path: str) -> Checklist:
    """Parse one checklist file; every error names ``path`` and the line."""
    import tomllib  # with the Markdown parser, only when a checklist is parsed

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


@functools.cache
def _shipped_texts() -> tuple[tuple[str, tuple[str, str]], ...]:
    # Package data does not change while the process runs; read it once.
    shipped = resources.files("airway").joinpath("data/checklists")
    return tuple(
        (f.name, (f"shipped checklist {f.name}", f.read_text("utf-8")))
        for f in sorted(shipped.iterdir(), key=lambda f: f.name)
        if f.name.endswith(".md")
    )


# The shipped checklists, already parsed, keyed by the SHA-256 of their text. Reading
# it spares the Markdown parser's import and work on every command (about 40 ms); an
# entry whose digest does not match its file is ignored and the file is parsed, so
# the cache can make a command faster but never different. Rewrite it with
# ``python -m airway.checklists`` after editing a shipped checklist
# (tests/test_checklists.py fails while it is stale).
CACHE_FILE = "parsed-cache.json"


def _digest(text: str) -> str:
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


@functools.cache
def _shipped_cache() -> dict[str, Any]:
    try:
        raw = resources.files("airway").joinpath("data/checklists", CACHE_FILE).read_text("utf-8")
        cache = json.loads(raw)
    except (OSError, ValueError):
        return {}
    return cache if isinstance(cache, dict) else {}


def _cached_checklist(data: dict[str, Any]) -> Checklist:
    """A shipped checklist from the parsed cache, built without validation: the cache
    is the parser's own output for the shipped file (its digest matches), and
    tests/test_checklists.py holds this equal, value and type, to validating it. The
    models' validators are then built only when a unit's own file is read."""
    meta = data["meta"]
    return Checklist.model_construct(
        path=data["path"],
        meta=FrontMatter.model_construct(**{**meta, "use": tuple(meta["use"])}),
        sections=tuple(
            Section.model_construct(
                title=section["title"],
                line=section["line"],
                items=tuple(
                    Item.model_construct(
                        text=item["text"],
                        line=item["line"],
                        condition=None
                        if item["condition"] is None
                        else Condition.model_construct(**item["condition"]),
                        checkbox=item["checkbox"],
                    )
                    for item in section["items"]
                ),
            )
            for section in data["sections"]
        ),
    )


@functools.cache
def _parsed(text: str, name: str) -> Checklist:
    entry = _shipped_cache().get(name)
    if isinstance(entry, dict) and entry.get("sha256") == _digest(text):
        try:
            return _cached_checklist(entry["checklist"])
        except (KeyError, TypeError):
            pass  # a cache from another version of the model: parse instead
    return parse_checklist(text, name)


def shipped_cache_text() -> str:
    """The cache file's content for the shipped checklists as they are now."""
    entries = {
        name: {"sha256": _digest(text), "checklist": parse_checklist(text, name).model_dump()}
        for _key, (name, text) in _shipped_texts()
    }
    return json.dumps(entries, indent=1, sort_keys=True, ensure_ascii=False) + "\n"


def load_checklists(folder: Path | None = None) -> tuple[Checklist, ...]:
    """Every ``*.md`` in the unit's folder, with the shipped ones as the fallback.

    A unit file replaces the shipped file of the same name; shipped files it
    does not replace stay.
    """
    found: dict[str, tuple[str, str]] = dict(_shipped_texts())
    if folder is not None:
        if not folder.is_dir():
            raise ChecklistError(str(folder), None, "not a folder")
        for f in sorted(folder.glob("*.md")):
            try:
                found[f.name] = (str(f), f.read_text("utf-8"))
            except UnicodeDecodeError:
                raise ChecklistError(str(f), None, "is not UTF-8 text") from None
    return tuple(_parsed(text, name) for _key, (name, text) in sorted(found.items()))


def _fill_unit_values(text: str, front_of_neck_tube_mm: float) -> str:
    """Put the unit's values in place (a trolley sheet: generic() refuses plan values
    first; a plan's items are filled by for_plan)."""
    if "{{" not in text:  # most items hold no value
        return text
    return _VALUE.sub(lambda m: UNIT_VALUES[m["name"]][1](front_of_neck_tube_mm), text)


PlanValue = Callable[[Plan], str]


class _Ready(NamedTuple):
    """One item made ready to fill: its condition as a test of the plan, and its text
    as pieces, each a string or a function of the plan (a value)."""

    holds: Callable[[Plan], object] | None  # None: always shown
    pieces: tuple[str | PlanValue, ...]
    checkbox: bool
    fixed: RenderedItem | None  # the whole item, when its text holds no value


def _value_of(name: str) -> PlanValue:
    if name in UNIT_VALUES:
        unit_value = UNIT_VALUES[name][1]
        return lambda plan: unit_value(plan.equipment.front_of_neck_tube_mm)
    return VALUES[name][1]


def _test(condition: Condition | None) -> Callable[[Plan], object] | None:
    """``condition.holds`` as one function, its name looked up once."""
    if condition is None:
        return None
    if condition.min_level is not None:
        least = condition.min_level
        return lambda plan: plan.risk.level >= least
    test = CONDITIONS[condition.name or ""][1]
    return (lambda plan: not test(plan)) if condition.negate else test


def _ready(item: Item) -> _Ready:
    # split() with one group gives text, name, text, name, ..., text.
    parts = _VALUE.split(item.text)
    pieces = tuple(
        _value_of(part) if n % 2 else part for n, part in enumerate(parts) if n % 2 or part
    )
    fixed = RenderedItem(text=item.text, checkbox=item.checkbox) if len(parts) == 1 else None
    return _Ready(holds=_test(item.condition), pieces=pieces, checkbox=item.checkbox, fixed=fixed)


# Each checklist made ready once per process (a clinic list fills the same ones for
# every woman), keyed by identity; the checklist is kept so its id is never reused.
_READY: dict[int, tuple[Checklist, tuple[tuple[str, tuple[_Ready, ...]], ...]]] = {}


def _ready_sections(checklist: Checklist) -> tuple[tuple[str, tuple[_Ready, ...]], ...]:
    entry = _READY.get(id(checklist))
    if entry is None or entry[0] is not checklist:
        ready = tuple((s.title, tuple(_ready(i) for i in s.items)) for s in checklist.sections)
        entry = _READY[id(checklist)] = (checklist, ready)
    return entry[1]


def for_plan(checklist: Checklist, plan: Plan) -> RenderedChecklist:
    """Apply conditions and fill values for one woman's plan."""
    sections = []
    for title, ready in _ready_sections(checklist):
        items = tuple(
            [
                r.fixed
                or RenderedItem(
                    "".join([p if isinstance(p, str) else p(plan) for p in r.pieces]), r.checkbox
                )
                for r in ready
                if r.holds is None or r.holds(plan)
            ]
        )
        if items:
            sections.append(RenderedSection(title=title, items=items))
    return RenderedChecklist(
        title=checklist.meta.title, sheet=checklist.meta.sheet, sections=tuple(sections)
    )


def generic(checklist: Checklist, front_of_neck_tube_mm: float) -> RenderedChecklist:
    """For a trolley sheet: every item shows; only values not tied to one woman."""
    for s in checklist.sections:
        for i in s.items:
            for name in _VALUE.findall(i.text):
                if name not in UNIT_VALUES:
                    raise ChecklistError(
                        checklist.path,
                        i.line,
                        f"{{{{{name}}}}} belongs to one woman's plan; a trolley sheet can use "
                        "only " + ", ".join(sorted(UNIT_VALUES)),
                    )
    return RenderedChecklist(
        title=checklist.meta.title,
        sheet=checklist.meta.sheet,
        sections=tuple(
            RenderedSection(
                title=s.title,
                items=tuple(
                    RenderedItem(
                        text=_fill_unit_values(i.text, front_of_neck_tube_mm), checkbox=i.checkbox
                    )
                    for i in s.items
                ),
            )
            for s in checklist.sections
        ),
    )


if __name__ == "__main__":  # python -m airway.checklists: rewrite the shipped cache
    target = Path(__file__).parent / "data" / "checklists" / CACHE_FILE
    target.write_text(shipped_cache_text(), encoding="utf-8")
    print(f"wrote {target}")
