"""The options model: one frozen dataclass per job, one rule per option, one validator for all.

Each option is a dataclass field made by :func:`option`, carrying a :class:`Rule`: its help text,
unit and a converter that takes the value as a caller gives it (text from the command line, a
TOML value from a scene file, a Python value from the API), checks it against its supported
range and returns the value the job uses. :func:`build` turns a mapping of raw values into an
options object, naming any bad value by the caller's own key (``--scale``, ``render.scale``,
``scale``); the command-line parser is generated from the same rules, so help texts, defaults
and units come from one place.
"""

from __future__ import annotations

import dataclasses
import math
import re
from collections.abc import Callable, Mapping
from dataclasses import dataclass
from typing import Any, TypeVar

from orbviz.errors import OptionError

__all__ = [
    "Rule",
    "shown",
    "boolean",
    "build",
    "checked",
    "cli_flag",
    "external_keys",
    "choice",
    "integer",
    "number",
    "option",
    "rules",
    "size_pair",
    "text",
]

T = TypeVar("T")
Convert = Callable[[Any], Any]


@dataclass(frozen=True)
class Rule:
    """How one option is read, checked, shown and named.

    Attributes
    ----------
    help : str
        One line for ``--help`` (the default and unit are added to it).
    convert : callable
        Raw value -> checked value; raises ``ValueError`` with the rule in words.
    unit : str
        Unit of the value, for the help text.
    flag : str or None
        Command-line flag (default ``--name-with-dashes``).
    metavar : str or None
        Placeholder in the usage line.
    negate : bool
        A switch that is on by default: the flag (``--no-axes``) turns it off.
    key : str or None
        The option's name in scene files and on the command line (``size`` for the field
        ``size_mm``); default the field name.
    switch : bool
        An on/off option whose default (None) is decided later: the command line gets both
        ``--name`` and ``--no-name``.
    const : object or None
        The value of the flag given on the command line without a value (``--marks`` alone).
    """

    help: str
    convert: Convert
    unit: str = ""
    flag: str | None = None
    metavar: str | None = None
    negate: bool = False
    key: str | None = None
    switch: bool = False
    const: Any = None


def option(
    default: Any,
    help: str,
    convert: Convert,
    *,
    unit: str = "",
    flag: str | None = None,
    metavar: str | None = None,
    negate: bool = False,
    key: str | None = None,
    switch: bool = False,
    const: Any = None,
) -> Any:
    """Return a dataclass field with its :class:`Rule` (see the module docstring)."""
    rule = Rule(help, convert, unit, flag, metavar, negate, key, switch, const)
    return dataclasses.field(default=default, metadata={"rule": rule})


def rules(cls: type) -> dict[str, Rule]:
    """Return the rules of an options class, by field name, in field order."""
    return {f.name: f.metadata["rule"] for f in dataclasses.fields(cls) if "rule" in f.metadata}


def external_keys(cls: type) -> dict[str, str]:
    """Field name -> the name scene files use (the rule's key, else the field name)."""
    return {name: rule.key or name for name, rule in rules(cls).items()}


def cli_flag(name: str, rule: Rule) -> str:
    """Return the command-line flag of a field: the rule's flag, else ``--key-with-dashes``."""
    return rule.flag or "--" + (rule.key or name).replace("_", "-")


def _convert(name: str, rule: Rule, raw: Any, key: Callable[[str], str]) -> Any:
    try:
        return rule.convert(raw)
    except (ValueError, TypeError) as error:
        raise OptionError(key(name), str(error)) from None


def _relations(obj: Any, key: Callable[[str], str]) -> None:
    """Run the class's cross-option checks; ``{field}`` in a message becomes the caller's key."""
    check = getattr(type(obj), "relations", None)
    if check is None:
        return
    names = {f.name: key(f.name) for f in dataclasses.fields(obj)}
    for name, message in check(obj):
        raise OptionError(key(name), message.format(**names))


def build(
    cls: type[T],
    values: Mapping[str, Any],
    *,
    key: Callable[[str], str] = str,
    base: T | None = None,
) -> T:
    """Make options of class ``cls`` from raw values, each checked by its rule.

    Parameters
    ----------
    cls : type
        A frozen dataclass whose fields were made by :func:`option`.
    values : mapping of str to any
        Raw values by field name; fields left out keep their default (or ``base``'s value).
    key : callable, default: str
        Field name -> the name the caller knows (``--scale-bar``, ``render.scale_bar``).
    base : instance of cls, optional
        Values to start from instead of the defaults (scene defaults under an item).

    Raises
    ------
    OptionError
        For an unknown option or a value outside its rule, naming it by ``key``.
    """
    known = rules(cls)
    converted = {}
    for name, raw in values.items():
        if name not in known:
            listed = ", ".join(key(k) for k in known)
            raise OptionError(key(name), f"unknown option (known: {listed})")
        converted[name] = _convert(name, known[name], raw, key)
    obj: Any = cls(**converted)
    if base is not None:
        obj = dataclasses.replace(base, **converted)  # type: ignore[type-var]
    _relations(obj, key)
    return obj  # type: ignore[no-any-return]


def checked(obj: T, *, key: Callable[[str], str] = str) -> T:
    """Check every field of an options object built directly (as the API may) by its rule."""
    values = {name: getattr(obj, name) for name in rules(type(obj))}
    return build(type(obj), values, key=key)


# ------------------------------------------------------------------------ converters
def shown(raw: Any) -> str:
    """Return a value as a message shows it: quoted text, cut short if it is long."""
    words = repr(raw) if isinstance(raw, str) else str(raw)
    return words if len(words) <= 80 else f"{words[:60]}... ({len(words)} characters)"


def _nullable(allow_none: bool, convert: Convert) -> Convert:
    def read(raw: Any) -> Any:
        if raw is None or (isinstance(raw, str) and raw.strip().lower() == "none"):
            if allow_none:
                return None
            raise ValueError("a value is required, got none")
        return convert(raw)

    return read


def number(
    low: float,
    high: float,
    *,
    low_open: bool = False,
    allow_none: bool = False,
    unit: str = "",
) -> Convert:
    """Return a finite real number in [low, high] (or (low, high] with ``low_open``)."""
    suffix = f" {unit}" if unit else ""
    span = f"{'above' if low_open else 'from'} {low:g} to {high:g}{suffix}"

    def read(raw: Any) -> float:
        if isinstance(raw, bool) or not isinstance(raw, (int, float, str)):
            raise ValueError(f"expected a number {span}, got {shown(raw)}")
        try:
            value = float(raw)
        except ValueError:
            raise ValueError(f"expected a number {span}, got {shown(raw)}") from None
        inside = (low < value if low_open else low <= value) and value <= high
        if not (math.isfinite(value) and inside):
            raise ValueError(f"expected a number {span}, got {shown(raw)}")
        return value

    return _nullable(allow_none, read)


def integer(low: int, high: int, *, allow_none: bool = False) -> Convert:
    """Return a whole number in [low, high]."""

    def read(raw: Any) -> int:
        value: Any = raw
        if isinstance(raw, str):
            try:
                value = int(raw.strip())
            except ValueError:
                value = None
        elif isinstance(raw, float) and raw.is_integer():
            value = int(raw)
        if isinstance(value, bool) or not isinstance(value, int) or not low <= value <= high:
            raise ValueError(f"expected a whole number from {low} to {high}, got {shown(raw)}")
        return value

    return _nullable(allow_none, read)


def boolean() -> Convert:
    """Read true or false (text: true, false, yes, no, on, off)."""
    words = {"true": True, "yes": True, "on": True, "false": False, "no": False, "off": False}

    def read(raw: Any) -> bool:
        if isinstance(raw, bool):
            return raw
        if isinstance(raw, str) and raw.strip().lower() in words:
            return words[raw.strip().lower()]
        raise ValueError(f"expected true or false, got {shown(raw)}")

    return read


def choice(*values: str, allow_none: bool = False) -> Convert:
    """One of the named values (case-insensitive); ``none`` too when ``allow_none``."""
    names = [*values, "none"] if allow_none else list(values)
    listed = ", ".join(names[:-1]) + " or " + names[-1] if len(names) > 1 else names[0]

    def read(raw: Any) -> str:
        if isinstance(raw, str) and raw.strip().lower() in values:
            return raw.strip().lower()
        raise ValueError(f"expected {listed}, got {shown(raw)}")

    if "none" in values:  # "none" is one of the choices here, not a missing value
        return read
    return _nullable(allow_none, read)


_CONTROL = re.compile(r"[\x00-\x1f\x7f]")


def size_pair(
    low: tuple[float, float],
    high: tuple[float, float],
    *,
    allow_none: bool = False,
    example: str = "6x3mm",
) -> Convert:
    """Two lengths in mm written ``AxB`` or ``AxBmm`` (``6x3mm``), each within its range."""
    pattern = re.compile(r"^\s*([0-9]*\.?[0-9]+)\s*x\s*([0-9]*\.?[0-9]+)\s*(mm)?\s*$", re.I)

    def read(raw: Any) -> tuple[float, float]:
        if isinstance(raw, (list, tuple)) and len(raw) == 2:
            raw = f"{raw[0]}x{raw[1]}"
        found = pattern.match(raw) if isinstance(raw, str) else None
        if found is None:
            raise ValueError(f"expected two lengths in mm such as {example}, got {shown(raw)}")
        pair = (float(found.group(1)), float(found.group(2)))
        for value, lo, hi in zip(pair, low, high, strict=True):
            if not lo <= value <= hi:
                raise ValueError(
                    f"expected {low[0]:g} to {high[0]:g} mm by {low[1]:g} to {high[1]:g} mm, "
                    f"got {shown(raw)}"
                )
        return pair

    return _nullable(allow_none, read)


def text(max_chars: int, *, allow_none: bool = False, single_line: bool = True) -> Convert:
    """Text of at most ``max_chars`` characters, on one line."""

    def read(raw: Any) -> str:
        if not isinstance(raw, str):
            raise ValueError(f"expected text, got {shown(raw)}")
        if len(raw) > max_chars:
            raise ValueError(f"expected at most {max_chars} characters, got {len(raw)}")
        if single_line and _CONTROL.search(raw):
            raise ValueError(f"expected one line of text without control characters, got {raw!r}")
        return raw

    return _nullable(allow_none, read)
