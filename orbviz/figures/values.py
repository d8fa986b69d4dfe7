"""Readers of figure option values: views, pixel sizes, colours, printed lengths, layouts.

Each takes a value as a caller gives it (command-line text, a TOML value, a Python value),
checks it against its supported range and returns what the figure uses, or raises
``ValueError`` with the rule in words.
"""

from __future__ import annotations

import math
import re
from typing import Any

from orbviz._defaults import LIMITS

__all__ = ["VIEWS", "background_colour", "grid_layout", "pixel_size", "print_length", "view_angles"]

VIEWS = {"iso": (35.0, 25.0), "x": (0.0, 0.0), "y": (90.0, 0.0), "z": (0.0, 90.0)}


def view_angles(raw: Any) -> tuple[float, float]:
    """``iso``, ``x``, ``y``, ``z``, ``AZ,EL`` in degrees or an (az, el) pair -> (az, el)."""
    rule = "expected iso, x, y, z or AZ,EL in degrees (elevation -90 to 90)"
    if isinstance(raw, str) and raw.strip().lower() in VIEWS:
        return VIEWS[raw.strip().lower()]
    parts: list[Any] = (
        raw.split(",")
        if isinstance(raw, str)
        else list(raw)
        if isinstance(raw, (tuple, list))
        else []
    )
    try:
        az, el = (float(v) for v in parts)
    except (TypeError, ValueError):
        raise ValueError(f"{rule}, got {raw!r}") from None
    if not (math.isfinite(az) and math.isfinite(el) and -90 <= el <= 90 and abs(az) <= 3600):
        raise ValueError(f"{rule}, got {raw!r}")
    return az, el


def pixel_size(raw: Any) -> tuple[int, int]:
    """``WIDTHxHEIGHT`` text or a (width, height) pair of pixels, each side in range."""
    low, high = LIMITS.image_side_min, LIMITS.image_side_max
    rule = f"expected WIDTHxHEIGHT in pixels like 1600x1200, each side {low} to {high}"
    if isinstance(raw, str):
        parts: list[Any] = raw.lower().split("x")
    elif isinstance(raw, (tuple, list)):
        parts = list(raw)
    else:
        parts = []
    try:
        if len(parts) != 2 or any(isinstance(v, (bool, float)) for v in parts):
            raise ValueError
        w, h = (int(v) for v in parts)
    except (TypeError, ValueError):
        raise ValueError(f"{rule}, got {raw!r}") from None
    if not (low <= w <= high and low <= h <= high):
        raise ValueError(f"{rule}, got {raw!r}")
    return w, h


def background_colour(raw: Any) -> str:
    """Return a colour name or ``#RRGGBB`` (CSS names, as Pillow knows them)."""
    from PIL import ImageColor

    if isinstance(raw, str) and len(raw) <= 40:
        try:
            ImageColor.getrgb(raw.strip())
            return raw.strip()
        except ValueError:
            pass
    raise ValueError(f"expected a colour name or #RRGGBB, got {raw!r}")


_LENGTH = re.compile(r"\s*([0-9]*\.?[0-9]+(?:e[+-]?\d+)?)\s*(mm|cm|in)\s*$", re.I)
_PER_INCH = {"mm": 25.4, "cm": 2.54, "in": 1.0}


def print_length(raw: Any) -> float | None:
    """Read a printed length, ``85mm``, ``8.5cm`` or ``3.35in`` (a bare number is mm), in mm."""
    rule = "expected a printed length from 10 mm to 1000 mm, like 85mm, 8.5cm or 3.35in"
    if raw is None or (isinstance(raw, str) and raw.strip().lower() == "none"):
        return None
    if isinstance(raw, (int, float)) and not isinstance(raw, bool):
        mm = float(raw)
    elif isinstance(raw, str) and _LENGTH.fullmatch(raw):
        match = _LENGTH.fullmatch(raw)
        assert match is not None
        mm = float(match.group(1)) * 25.4 / _PER_INCH[match.group(2).lower()]
    else:
        raise ValueError(f"{rule}, got {raw!r}")
    if not (math.isfinite(mm) and 10.0 <= mm <= 1000.0):
        raise ValueError(f"{rule}, got {raw!r}")
    return mm


def grid_layout(raw: Any) -> tuple[int, int] | None:
    """``COLSxROWS`` (each 1 to 10) -> (columns, rows); None to choose from the panel count."""
    if raw is None or (isinstance(raw, str) and raw.strip().lower() in ("none", "auto")):
        return None
    parts: list[Any] = raw.lower().split("x") if isinstance(raw, str) else list(raw)
    try:
        cols, rows = (int(v) for v in parts)
    except (TypeError, ValueError):
        cols = rows = 0
    if not (1 <= cols <= 10 and 1 <= rows <= 10):
        raise ValueError(f"expected COLSxROWS like 3x2, each 1 to 10, got {raw!r}")
    return cols, rows
