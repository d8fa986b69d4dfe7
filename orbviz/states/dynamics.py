"""Superpositions in motion: psi(t) = sum_k c_k psi_k exp(-i E_k t), and the frames of its beat.

Times are in atomic units (hbar / hartree); femtoseconds come from CODATA's atomic unit of time
(scipy.constants).
"""

from __future__ import annotations

import cmath
import math
from dataclasses import dataclass, replace
from fractions import Fraction
from typing import TYPE_CHECKING

from orbviz.codata import ATOMIC_TIME_S
from orbviz.errors import StationaryError

if TYPE_CHECKING:
    from orbviz.states.orbital import Orbital

__all__ = ["Beat", "atomic_time_fs", "beat_period", "evolve"]


def atomic_time_fs() -> float:
    """Return the atomic unit of time in femtoseconds (CODATA 2022, :mod:`orbviz.codata`)."""
    return ATOMIC_TIME_S * 1e15


def evolve(orbital: Orbital, t: float, /) -> Orbital:
    """Return the state at time t (atomic units): each component turned by exp(-i E t).

    The density is unchanged by a global phase, so times are measured from the given state.
    """
    basis = tuple(
        (key, c * cmath.exp(-1j * orbital.shell_energy(key[0], key[1]) * t))
        for key, c in orbital.basis
    )
    return replace(orbital, basis=basis, notes=())


@dataclass(frozen=True)
class Beat:
    """The repeat time of a moving density.

    Attributes
    ----------
    period : float
        In atomic units of time.
    exact : bool
        True if the density repeats exactly after ``period``. That needs commensurate energy
        differences, as hydrogen-like levels have; otherwise it is the slowest pair's period.
    """

    period: float
    exact: bool

    @property
    def femtoseconds(self) -> float:
        """The period in fs."""
        return self.period * atomic_time_fs()


def _levels(energies: list[tuple[float, float]]) -> list[float]:
    """Merge sorted (energy, error) pairs into levels.

    Two energies are one level by :func:`orbviz.states.numerical.same_level` (their error
    estimates; 0 for closed forms, where it is 1e-12 relative).
    """
    from orbviz.states.numerical import same_level

    merged: list[tuple[float, float]] = []
    for e, err in energies:
        if merged:
            last, last_err = merged[-1]
            if same_level(last, last_err, e, err):
                continue
        merged.append((e, err))
    return [e for e, _ in merged]


def beat_period(orbital: Orbital, /) -> Beat:
    """Period of |psi(t)|^2.

    Hydrogen-like energies are -Z^2 mu / 2n^2, so their differences are rational multiples of
    Z^2 mu. The density repeats after 2 pi over the greatest common divisor of the differences.

    Raises
    ------
    StationaryError
        If all components have one energy (a degenerate superposition does not move).
    """
    # energies the solver cannot tell apart (within its own error estimates) are one level
    pairs = {(n, l) for (n, l, _), _ in orbital.basis}
    energies = _levels(
        sorted((orbital.shell_energy(n, l), orbital.shell_error(n, l)) for n, l in pairs)
    )
    if len(energies) < 2:
        raise StationaryError(
            f"{orbital.spec!r} does not move: every component has the energy "
            f"{energies[0]:.6g} hartree"
            + (
                ""
                if orbital.potential is None
                else " (within the numerical solver's error estimates)"
            )
            + ", so |psi|^2 is the same at all times"
        )
    if orbital.potential is None:
        scale = orbital.Z**2 * orbital.mass_ratio / 2
        levels = sorted({Fraction(1, n * n) for (n, _, _), _ in orbital.basis})
        gaps = [b - a for a, b in zip(levels, levels[1:], strict=False)]
        step = gaps[0]
        for gap in gaps[1:]:
            step = Fraction(
                math.gcd(step.numerator * gap.denominator, gap.numerator * step.denominator),
                step.denominator * gap.denominator,
            )
        return Beat(2 * math.pi / (scale * float(step)), True)
    smallest = min(b - a for a, b in zip(energies, energies[1:], strict=False))
    return Beat(2 * math.pi / smallest, len(energies) == 2)
