"""The options of an interactive page: the levels it switches among, its arrangement, weight."""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from typing import Any

from orbviz._defaults import LIMITS
from orbviz._options import choice, integer, option, shown

__all__ = ["MAX_GRID", "MAX_PANELS", "PageOptions", "arrangement_of", "fractions"]

_DECIMAL = re.compile(r"\s*[0-9]*\.?[0-9]+(e[+-]?[0-9]+)?\s*", re.I)  # plain ASCII decimals
MAX_LEVELS = 5  # each level is a surface per panel: five keep a page's weight in bounds
MAX_PANELS = 24  # as a sheet: the 4f and 5f sets and more
# a grid draws each panel on its own WebGL canvas; browsers keep about 16 contexts a page
# (common practice, no source), and a phone far fewer
MAX_GRID = 8


def fractions(raw: Any) -> tuple[float, ...]:
    """Read enclosed fractions, ``0.5,0.9,0.99`` or a sequence: 1 to 5, each in range, sorted."""
    low, high = LIMITS.fraction_min, LIMITS.fraction_max
    rule = f"expected 1 to {MAX_LEVELS} fractions from {low:g} to {high:g}, like 0.5,0.9,0.99"
    parts: list[Any] = []
    if isinstance(raw, str):
        parts = raw.split(",")
    elif isinstance(raw, (list, tuple)):
        parts = list(raw)
    try:
        if not 1 <= len(parts) <= MAX_LEVELS or any(
            isinstance(v, bool) or (isinstance(v, str) and not _DECIMAL.fullmatch(v)) for v in parts
        ):
            raise ValueError
        values = sorted({float(v) for v in parts})
    except (TypeError, ValueError):
        raise ValueError(f"{rule}, got {shown(raw)}") from None
    if not all(math.isfinite(v) and low <= v <= high for v in values):
        raise ValueError(f"{rule}, got {shown(raw)}")
    return tuple(values)


@dataclass(frozen=True)
class PageOptions:
    """An interactive page's own options (how it looks comes from the figure options).

    Attributes
    ----------
    levels : tuple of float, default: (0.5, 0.9, 0.99)
        Enclosed fractions the page switches among; the figure's fraction is added and shown
        first.
    faces : int, default: 20000
        Faces of each surface on the page (decimated): the page's weight.
    dots : int, default: 10000
        Exact samples of |psi|^2 each orbital carries, shown as a cloud of dots by a toggle
        (0: no cloud).
    arrangement : {"grid", "chooser"} or None, default: None
        Several orbitals side by side sharing the camera, or one at a time with a chooser;
        None: a grid of up to four, a chooser beyond.
    """

    levels: tuple[float, ...] = option(
        (0.5, 0.9, 0.99),
        f"enclosed fractions a page switches among, 1 to {MAX_LEVELS}, like 0.5,0.9,0.99",
        fractions,
        metavar="F,F,...",
    )
    faces: int = option(
        20000,
        "faces of each surface on a page (its weight), 1000 to 200000",
        integer(1000, 200000),
        flag="--page-faces",
        metavar="N",
    )
    dots: int = option(
        10_000,
        "dots of the cloud a page can show instead of the surface, 0 (none) to 100000",
        integer(0, 100_000),
        flag="--page-dots",
        metavar="N",
    )
    arrangement: str | None = option(
        None,
        "a page of several orbitals: side by side (grid) or one at a time (chooser)",
        choice("grid", "chooser", allow_none=True),
        metavar="{grid,chooser}",
    )


def arrangement_of(count: int, options: PageOptions) -> str:
    """Return ``grid`` or ``chooser`` for a page of ``count`` orbitals, checked.

    Raises
    ------
    ParameterError
        For more than MAX_PANELS orbitals.
    OptionError
        For a grid of more than MAX_GRID.
    """
    from orbviz.errors import OptionError, ParameterError

    if count > MAX_PANELS:
        raise ParameterError(f"a page holds at most {MAX_PANELS} orbitals, not {count}")
    arrangement = options.arrangement or ("grid" if count <= 4 else "chooser")
    if arrangement == "grid" and count > MAX_GRID:
        raise OptionError(
            "arrangement",
            f"a grid page holds at most {MAX_GRID} orbitals (one WebGL canvas each), not "
            f"{count}; use chooser",
        )
    return arrangement
