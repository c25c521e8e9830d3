"""Start-up of the command line: share typer's value checkers between options.

Typer (0.29) builds one pydantic ``TypeAdapter`` for every option of the command
being run before it parses anything, about 0.4 ms each; ``airway quick`` has 30
options but only a handful of distinct types. An adapter depends only on the
option's annotation and the settings that change coercion (range, clamp, parser,
case sensitivity, ...), so options that agree on all of those can share one.

The key is every setting of the option except those that only change how help
is shown, so a setting typer adds later is part of the key by default. A key
that cannot be hashed is never shared. When typer is a version without this
hook, nothing is changed and start-up is only slower.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

# Settings that change the help text or the default, never how a value is checked.
_PRESENTATION_ONLY = frozenset(
    {
        "default",
        "default_factory",
        "param_decls",
        "help",
        "rich_help_panel",
        "metavar",
        "hidden",
        "show_default",
        "show_choices",
        "show_envvar",
        "envvar",
    }
)


def adapter_key(annotation: Any, parameter_info: Any) -> tuple[Any, ...] | None:
    """What an option's value checker depends on; None when it cannot be hashed."""
    settings = tuple(
        sorted((k, v) for k, v in vars(parameter_info).items() if k not in _PRESENTATION_ONLY)
    )
    key = (annotation, type(parameter_info), settings)
    try:
        hash(key)
    except TypeError:
        return None
    return key


def share_adapters() -> bool:
    """Make typer reuse one checker per distinct key. True when installed."""
    try:
        from typer import _adapters
    except ImportError:  # pragma: no cover - another typer
        return False
    build = getattr(_adapters, "try_build_adapter", None)
    if build is None or getattr(build, "airway_shared", False):
        return build is not None
    cache: dict[tuple[Any, ...], Any] = {}

    def shared(*args: Any, **kwargs: Any) -> Any:
        # Called as try_build_adapter(annotation=..., parameter_info=...); any other
        # call (a typer release that changed it) goes straight through, unshared.
        if args or set(kwargs) != {"annotation", "parameter_info"}:
            return build(*args, **kwargs)
        key = adapter_key(kwargs["annotation"], kwargs["parameter_info"])
        if key is None:
            return build(**kwargs)
        if key not in cache:
            cache[key] = build(**kwargs)
        return cache[key]

    shared_fn: Callable[..., Any] = shared
    shared_fn.airway_shared = True  # type: ignore[attr-defined]
    _adapters.try_build_adapter = shared_fn
    return True
