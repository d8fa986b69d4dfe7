"""The mesh job's options: grid, face budget, smoothing, units and phase colours."""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from typing import Any

from orbviz._defaults import DEFAULTS, LENGTH_UNITS, LIMITS
from orbviz._options import choice, integer, option
from orbviz.surface.colors import DEFAULT_PAIR, ColorPair, color_pair

__all__ = ["MeshOptions", "colors_option", "display_length", "grid_option"]

_METRES = {"m": 1.0, "cm": 0.01, "mm": 0.001}


def display_length(raw: Any) -> float | None:
    """Read a display size, ``0.2m``, ``20cm``, ``200mm`` or a number of metres (1 mm to 100 m)."""
    rule = "expected a length from 1 mm to 100 m, like 0.2m, 20cm or 200mm"
    if raw is None or (isinstance(raw, str) and raw.strip().lower() == "none"):
        return None
    if isinstance(raw, (int, float)) and not isinstance(raw, bool):  # a number is metres
        metres = float(raw)
    else:
        match = re.fullmatch(r"\s*([0-9]*\.?[0-9]+(?:e[+-]?\d+)?)\s*(m|cm|mm)\s*", str(raw), re.I)
        if match is None:
            raise ValueError(f"{rule}, got {raw!r}")
        metres = float(match.group(1)) * _METRES[match.group(2).lower()]
    if not (math.isfinite(metres) and 0.001 <= metres <= 100.0):
        raise ValueError(f"{rule}, got {raw!r}")
    return metres


def grid_option(default: int = DEFAULTS.grid) -> int:
    """Return the ``grid`` option, shared by every job that samples a field."""
    return option(  # type: ignore[no-any-return]
        default,
        "samples per axis, 16 to 1024 (memory is checked before sampling)",
        integer(LIMITS.grid_min, LIMITS.grid_max),
        metavar="N",
    )


def colors_option() -> ColorPair:
    """Return the ``colors`` option, shared by every job that colours phases."""
    return option(  # type: ignore[no-any-return]
        DEFAULT_PAIR,
        "phase colours as POSITIVE,NEGATIVE hex",
        color_pair,
        metavar="POS,NEG",
    )


@dataclass(frozen=True)
class MeshOptions:
    """How the isosurface is meshed and written.

    Attributes
    ----------
    grid : int, default: 128
        Samples per axis.
    faces : int or None, default: None
        Decimate to about this many faces over all bodies.
    smooth : int, default: 0
        Taubin smoothing iterations (0: none).
    units : {"bohr", "angstrom", "nm", "pm"}, default: "bohr"
        Length unit of the written coordinates.
    display_size : float or None, default: None
        glTF only: scale the model so that its longest side is this many metres (viewers,
        AR and room-scale, read glTF lengths as metres); None keeps ``units``.
    colors : pair of RGBA
        Positive and negative phase colours of a real state.
    """

    grid: int = grid_option()
    faces: int | None = option(
        None,
        "decimate to about N faces over all bodies, 100 to 1e7",
        integer(LIMITS.faces_min, LIMITS.faces_max, allow_none=True),
        metavar="N",
    )
    smooth: int = option(
        0,
        "Taubin smoothing iterations, 0 (none) to 1000",
        integer(0, LIMITS.smooth_max),
        metavar="ITER",
    )
    units: str = option(
        "bohr",
        "length unit of the written coordinates",
        choice(*(u for u in LENGTH_UNITS if u != "mm")),
        metavar="{bohr,angstrom,nm,pm}",
    )
    display_size: float | None = option(
        None,
        "for .glb and .gltf: scale so that the longest side is this long in AR and room-scale "
        "viewers, like 0.2m or 20cm (instead of --units)",
        display_length,
        metavar="LENGTH",
    )
    colors: ColorPair = colors_option()

    def relations(self) -> list[tuple[str, str]]:
        """Cross-option problems: a display size sets the unit, so --units cannot."""
        if self.display_size is not None and self.units != "bohr":
            return [("display_size", "sets the length unit (metres): give it or --units, not both")]
        return []
