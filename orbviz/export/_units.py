"""Length units of exported coordinates (internal coordinates are bohr)."""

from __future__ import annotations

from orbviz.errors import ParameterError

__all__ = ["UNITS", "unit_scale"]

_METRES = {"angstrom": 1e-10, "nm": 1e-9, "pm": 1e-12}
UNITS = ("bohr", "angstrom", "nm", "pm")


def unit_scale(units: str) -> float:
    """Multiplier from bohr to ``units`` (CODATA Bohr radius via scipy.constants)."""
    if units == "bohr":
        return 1.0
    if units not in _METRES:
        raise ParameterError(f"unknown length unit {units!r}; use one of {', '.join(UNITS)}")
    from scipy.constants import physical_constants

    return physical_constants["Bohr radius"][0] / _METRES[units]
