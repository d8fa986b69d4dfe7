"""Length units of exported coordinates.

An orbital's surface is in bohr and is written in bohr, angstrom, nm or pm; a printable model is
in millimetres and is written in millimetres. Mixing the two (an orbital "in mm") has no
meaning and is refused.
"""

from __future__ import annotations

from typing import Any

from orbviz._defaults import LENGTH_UNITS
from orbviz.codata import BOHR_RADIUS_M
from orbviz.errors import ParameterError

__all__ = ["DISPLAY_SUFFIXES", "UNITS", "display_scale", "unit_scale"]

DISPLAY_SUFFIXES = (".glb", ".gltf")  # formats whose readers take lengths as metres

_METRES = {"angstrom": 1e-10, "nm": 1e-9, "pm": 1e-12}
UNITS = LENGTH_UNITS


def unit_scale(units: str, source: str = "bohr") -> float:
    """Multiplier from ``source`` lengths (bohr or mm) to ``units`` (CODATA Bohr radius).

    Raises
    ------
    ParameterError
        For an unknown unit, or a conversion between atomic lengths and millimetres.
    """
    if units not in UNITS:
        raise ParameterError(f"units: expected {', '.join(UNITS)}, got {units!r}")
    if source == "mm" or units == "mm":
        if source != units:
            raise ParameterError(
                f"units: {units!r} does not apply to coordinates in {source}; millimetres are "
                "for printable models (orbviz model), atomic lengths for orbital meshes"
            )
        return 1.0
    if units == "bohr":
        return 1.0
    return BOHR_RADIUS_M / _METRES[units]


def display_scale(vertices: list[Any], metres: float) -> float:
    """Return the multiplier that makes the longest side of the bounding box ``metres`` long.

    Parameters
    ----------
    vertices : list of (V, 3) arrays
        Every body's vertices, in any one unit.
    metres : float
        The wanted longest side.
    """
    import numpy as np

    points = np.vstack([v for v in vertices if len(v)])
    side = float((points.max(axis=0) - points.min(axis=0)).max())
    return metres / side
