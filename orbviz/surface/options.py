"""The mesh job's options: grid, face budget, smoothing, units and phase colours."""

from __future__ import annotations

from dataclasses import dataclass

from orbviz._defaults import DEFAULTS, LENGTH_UNITS, LIMITS
from orbviz._options import choice, integer, option
from orbviz.surface.colors import DEFAULT_PAIR, ColorPair, color_pair

__all__ = ["MeshOptions", "colors_option", "grid_option"]


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
    colors: ColorPair = colors_option()
