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
    "YUKAWA_RANGE",
    "HARMONIC_RANGE",
    "TABLE_BYTES",
    "Coulomb",
    "Harmonic",
    "Potential",
    "Tabulated",
    "UserPotential",
    "Yukawa",
    "check_potential_text",
    "parse_potential",
]

# Supported parameter ranges (docs/limits.md): the solver's log grid reaches 1e-10..4e5 bohr, so
# a screening length or a well width must fall well inside it.
YUKAWA_RANGE = (0.05, 1e4)  # bohr
HARMONIC_RANGE = (1e-3, 1e3)  # hartree
_TABLE_V_MAX = 1e6  # |V| min(r, 1) in hartree (bohr): a Coulomb-like core up to charge 1e6
TABLE_BYTES = 50_000_000  # largest table file


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
        low, high = YUKAWA_RANGE
        if not (math.isfinite(self.length) and low <= self.length <= high):
            raise ParameterError(
                f"screening length must be from {low:g} to {high:g} bohr, got {self.length:g}"
            )

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
        if r[0] <= 0 or r[-1] > 1e6 or np.max(np.abs(v) * np.minimum(r, 1.0)) > _TABLE_V_MAX:
            raise ParameterError(
                f"{name}: need radii in (0, 1e6] bohr and |V| min(r, 1) <= {_TABLE_V_MAX:g} "
                "hartree bohr (the solver's supported range)"
            )
        self.r, self.v, self.name = r, v, name
        self.limit = float(v[-1])
        self._spline = CubicSpline(r, v)

    @classmethod
    def from_file(cls, path: str | Path) -> Tabulated:
        """Read whitespace- or comma-separated columns r, V (lines starting with # skipped)."""
        path = Path(path)
        try:
            with path.open("rb") as handle:  # at most the limit: /dev/zero has no size
                raw = handle.read(TABLE_BYTES + 1)
            if len(raw) > TABLE_BYTES:
                raise ValueError(f"larger than {TABLE_BYTES // 10**6} MB")
            rows = [line.split("#", 1)[0] for line in raw.decode("utf-8").splitlines()]
            if not any(row.strip() for row in rows):
                raise ValueError("no rows of numbers")
            comma = any("," in row for row in rows)  # sniff data rows only, not comments
            try:
                data = np.loadtxt(rows, delimiter="," if comma else None, ndmin=2)
            except ValueError:
                raise ValueError(_first_bad_line(rows, comma)) from None
        except UnicodeDecodeError as error:
            raise ParameterError(
                f"cannot read potential table {path.name!r}: not UTF-8 text (byte {error.start})"
            ) from None
        except (OSError, ValueError) as error:
            reason = error.strerror if isinstance(error, OSError) and error.strerror else error
            raise ParameterError(f"cannot read potential table {path.name!r}: {reason}") from None
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


def _first_bad_line(rows: list[str], comma: bool) -> str:
    """Name the first line that is not two numbers (lines counted from 1, comments cut)."""
    for number, row in enumerate(rows, start=1):
        if not row.strip():
            continue
        cells = [c.strip() for c in row.split(",")] if comma else row.split()
        try:
            if len(cells) != 2:
                raise ValueError
            [float(c) for c in cells]
        except ValueError:
            shown = row.strip() if len(row.strip()) <= 60 else row.strip()[:60] + "..."
            return f"line {number}: expected two numbers r, V, got {shown!r}"
    return "rows of unequal length"


def check_potential_text(raw: object) -> str:
    """Check the form of a potential's text without reading any table (a converter)."""
    if not isinstance(raw, str):
        raise ValueError(f"expected text such as yukawa:10, got {raw!r}")
    kind, _, arg = raw.strip().partition(":")
    kind = kind.lower()
    if kind == "table" and arg.strip():
        return raw.strip()
    if kind == "coulomb" and not arg:
        return raw.strip()
    if kind in ("yukawa", "harmonic"):
        low, high = YUKAWA_RANGE if kind == "yukawa" else HARMONIC_RANGE
        try:
            value = float(arg)
        except ValueError:
            value = math.nan
        if math.isfinite(value) and low <= value <= high:
            return raw.strip()
        unit = "bohr" if kind == "yukawa" else "hartree"
        raise ValueError(f"{kind} takes a number from {low:g} to {high:g} {unit}, got {raw!r}")
    raise ValueError(f"expected coulomb, yukawa:LENGTH, harmonic:OMEGA or table:FILE, got {raw!r}")


def parse_potential(text: str, *, Z: float = 1.0) -> Potential:
    """Read ``coulomb``, ``yukawa:LENGTH``, ``harmonic:OMEGA`` or ``table:FILE`` (bohr, hartree).

    ``Z`` is the charge of the Coulomb and Yukawa potentials.
    """
    try:
        text = check_potential_text(text)
    except ValueError as error:
        raise ParameterError(f"potential: {error}") from None
    kind, _, arg = text.partition(":")
    kind = kind.lower()
    if kind == "table":
        return Tabulated.from_file(arg)
    if kind == "coulomb":
        return Coulomb(Z)
    return Yukawa(Z, float(arg)) if kind == "yukawa" else Harmonic(float(arg))
