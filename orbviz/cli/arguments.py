"""Command-line arguments made from the options model, and read back into options objects.

Each field of an options class becomes one flag, with the rule's help text, its default and its
unit; the flag's value reaches the class's own converter unchanged, so the command line checks
nothing of its own and names a bad value by its flag.
"""

from __future__ import annotations

import argparse
from typing import Any, TypeVar

from orbviz._options import Rule, build, cli_flag, rules

__all__ = ["add_options", "options_from"]

T = TypeVar("T")


def _shown(value: Any) -> str:
    """Return a default as the user would type it."""
    if value is None:
        return "none"
    if isinstance(value, bool):
        return "on" if value else "off"
    if isinstance(value, tuple) and len(value) == 2 and all(isinstance(v, tuple) for v in value):
        return ",".join("#{:02X}{:02X}{:02X}".format(*c[:3]) for c in value)  # a colour pair
    if isinstance(value, tuple) and len(value) == 2 and all(isinstance(v, int) for v in value):
        return f"{value[0]}x{value[1]}"
    if isinstance(value, tuple) and all(isinstance(v, float) for v in value):  # a view
        from orbviz.figures.options import VIEWS

        return next((name for name, angles in VIEWS.items() if angles == value), str(value))
    return f"{value:g}" if isinstance(value, float) else str(value)


def _help(rule: Rule, default: Any) -> str:
    if rule.negate or "default" in rule.help:
        return rule.help.replace("%", "%%")
    unit = f" {rule.unit}" if rule.unit and default is not None else ""
    return f"{rule.help} (default: {_shown(default)}{unit})".replace("%", "%%")


def add_options(parser: argparse.ArgumentParser, cls: type, *, skip: tuple[str, ...] = ()) -> None:
    """Add one flag per field of ``cls`` (none for the fields in ``skip``)."""
    import dataclasses

    defaults = {f.name: f.default for f in dataclasses.fields(cls)}
    group = parser.add_argument_group(cls.__name__.replace("Options", "").lower() + " options")
    for name, rule in rules(cls).items():
        if name in skip:
            continue
        flag = cli_flag(name, rule)
        common: dict[str, Any] = {"dest": f"{cls.__name__}.{name}", "default": argparse.SUPPRESS}
        if rule.switch:  # on, off, or decided later
            group.add_argument(flag, action="store_const", const=True, help=rule.help, **common)
            group.add_argument(
                "--no-" + flag[2:],
                action="store_const",
                const=False,
                help=f"leave out what {flag} draws",
                **common,
            )
        elif isinstance(defaults[name], bool):
            group.add_argument(
                flag,
                action="store_const",
                const=not rule.negate,
                help=_help(rule, defaults[name]),
                **common,
            )
        else:
            if rule.const is not None:  # the flag alone means this value
                common.update(nargs="?", const=rule.const)
            group.add_argument(
                flag,
                metavar=rule.metavar or (rule.key or name).upper(),
                help=_help(rule, defaults[name]),
                **common,
            )


def options_from(args: argparse.Namespace, cls: type[T]) -> T:
    """Build ``cls`` from the flags given (the rest keep their defaults), named by flag."""
    known = rules(cls)
    prefix = f"{cls.__name__}."
    values = {k[len(prefix) :]: v for k, v in vars(args).items() if k.startswith(prefix)}
    return build(
        cls, values, key=lambda name: cli_flag(name, known[name]) if name in known else name
    )
