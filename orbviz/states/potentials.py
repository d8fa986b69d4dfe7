"""Central potentials V(r) in hartree, r in bohr, for the numerical radial solver.

Each potential is a callable ``V(r)`` on arrays, with ``limit`` (its value at infinity, the
threshold of binding) and ``describe`` for reports.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import numpy.typing as npt

from orbviz.errors import ParameterError

__all__ = [
    "Coulomb",
    "Harmonic",
    "Potential",
    "Tabulated",
    "UserPotential",
    "Yukawa",
    "parse_potential",
]


class Potential:
    """Base class: ``V(r)`` in hartree; ``limit`` is V at infinity (inf if it grows)."""

    limit: float = 0.0

    def __call__(self, r: npt.ArrayLike) -> np.ndarray:  # noqa: D102 - see class docstring
        raise NotImplementedError

    def describe(self) -> str:
        """Short text for reports."""
        return type(self).__name__


@dataclass(frozen=True)
class Coulomb(Potential):
    """V = -Z / r (the hydrogen-like ion)."""

    Z: float = 1.0

    def __call__(self, r):  # noqa: D102
        return -self.Z / np.asarray(r, dtype=np.float64)

    def describe(self) -> str:  # noqa: D102
        return f"Coulomb, Z = {self.Z:g}"


@dataclass(frozen=True)
class Yukawa(Potential):
    """Screened Coulomb V = -Z exp(-r / length) / r (Yukawa, Debye-Hueckel)."""

    Z: float = 1.0
    length: float = 10.0

    def __post_init__(self) -> None:
        if not (math.isfinite(self.length) and self.length > 0):
            raise ParameterError(f"screening length must be > 0 bohr, got {self.length}")

    def __call__(self, r):  # noqa: D102
        r = np.asarray(r, dtype=np.float64)
        return -self.Z * np.exp(-r / self.length) / r

    def describe(self) -> str:  # noqa: D102
        return f"Yukawa, Z = {self.Z:g}, screening length {self.length:g} bohr"


@dataclass(frozen=True)
class Harmonic(Potential):
    """Isotropic harmonic well V = omega^2 r^2 / 2 (unit mass)."""

    omega: float = 1.0
    limit: float = math.inf

    def __call__(self, r):  # noqa: D102
        r = np.asarray(r, dtype=np.float64)
        return 0.5 * self.omega**2 * r * r

    def describe(self) -> str:  # noqa: D102
        return f"harmonic well, omega = {self.omega:g} hartree"


class UserPotential(Potential):
    """Any callable V(r) (vectorised over numpy arrays), with its value at infinity."""

    def __init__(
        self,
        function: Callable[[np.ndarray], np.ndarray],
        *,
        limit: float = 0.0,
        name: str = "user potential",
    ) -> None:
        self.function, self.limit, self.name = function, float(limit), name

    def __call__(self, r):  # noqa: D102
        value = np.asarray(self.function(np.asarray(r, dtype=np.float64)), dtype=np.float64)
        if not np.all(np.isfinite(value)):
            raise ParameterError(f"{self.name} is not finite at every radius asked for")
        return value

    def describe(self) -> str:  # noqa: D102
        return self.name


class Tabulated(Potential):
    """A potential from a two-column table (r in bohr, V in hartree), cubic between points.

    Below the first radius the table's first value is used, beyond the last its last value (which
    is taken as the value at infinity).
    """

    def __init__(self, r: npt.ArrayLike, v: npt.ArrayLike, *, name: str = "table") -> None:
        from scipy.interpolate import CubicSpline

        r, v = np.asarray(r, dtype=np.float64), np.asarray(v, dtype=np.float64)
        if r.ndim != 1 or r.shape != v.shape or r.size < 4:
            raise ParameterError(f"{name}: need two columns with at least 4 rows")
        if not (np.all(np.isfinite(r)) and np.all(np.isfinite(v)) and np.all(np.diff(r) > 0)):
            raise ParameterError(f"{name}: radii must be finite and increasing, values finite")
        self.r, self.v, self.name = r, v, name
        self.limit = float(v[-1])
        self._spline = CubicSpline(r, v)

    @classmethod
    def from_file(cls, path: str | Path) -> Tabulated:
        """Read whitespace- or comma-separated columns r, V (lines starting with # skipped)."""
        path = Path(path)
        try:
            data = np.loadtxt(
                path, delimiter=None if "," not in path.read_text() else ",", comments="#", ndmin=2
            )
        except (OSError, ValueError) as error:
            raise ParameterError(f"cannot read potential table {str(path)!r}: {error}") from None
        if data.shape[1] != 2:
            raise ParameterError(
                f"{path.name}: need exactly two columns (r, V), got {data.shape[1]}"
            )
        return cls(data[:, 0], data[:, 1], name=path.name)

    def __call__(self, r):  # noqa: D102
        r = np.clip(np.asarray(r, dtype=np.float64), self.r[0], self.r[-1])
        return self._spline(r)

    def describe(self) -> str:  # noqa: D102
        return f"table {self.name} ({self.r.size} points, {self.r[0]:g}-{self.r[-1]:g} bohr)"


def parse_potential(text: str, *, Z: float = 1.0) -> Potential:
    """Read ``coulomb``, ``yukawa:LENGTH``, ``harmonic:OMEGA`` or ``table:FILE`` (bohr, hartree).

    ``Z`` is the charge of the Coulomb and Yukawa potentials.
    """
    kind, _, arg = text.strip().partition(":")
    kind = kind.lower()
    if kind == "table":
        return Tabulated.from_file(arg)
    if kind == "coulomb" and not arg:
        return Coulomb(Z)
    if kind in ("yukawa", "harmonic"):
        try:
            value = float(arg)
        except ValueError:
            raise ParameterError(
                f"potential {text!r}: {kind} needs a number, e.g. {kind}:10"
            ) from None
        if not (math.isfinite(value) and value > 0):
            raise ParameterError(f"potential {text!r}: the {kind} parameter must be > 0")
        return Yukawa(Z, value) if kind == "yukawa" else Harmonic(value)
    raise ParameterError(
        f"unknown potential {text!r}; use coulomb, yukawa:LENGTH, harmonic:OMEGA or table:FILE"
    )
