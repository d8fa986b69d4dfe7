"""The density level whose superlevel set {|psi|^2 >= c} holds a chosen probability.

The enclosed probability P(c) is the mass of the distribution of log |psi|^2 above log c, taken
under the probability measure |psi|^2 dV. That distribution is tabulated on a fine uniform grid in
log density, independent of any mesh grid:

* an eigenstate (or any state of one (n, l) shell) factorises, |psi|^2 = R^2(r) A(direction), so
  the distribution of log |psi|^2 is the convolution of the radial and angular ones (FFT). A real
  orbital factorises further, A = F(cos polar) G(azimuth), so each factor is a fine 1D quadrature;
* a superposition of several shells about the nucleus is integrated on fans of rays, exactly
  along each ray and with a linear model across its cell of directions, and two fans are
  extrapolated to zero angular step (:mod:`orbviz.levels.ray_cells`);
* a bond or a state off the nucleus is sampled on a spherical product grid (rays times radii)
  about the midpoint (:mod:`orbviz.levels.rays`).

In the tables, each sample's mass goes to the two nearest log-grid nodes (cloud in cell), which
keeps the tabulated P(c) second-order accurate in the sample spacing; P between nodes is
interpolated linearly, and the level is read off the tabulated P directly.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np

from orbviz._defaults import DEFAULTS, LIMITS
from orbviz.errors import ParameterError
from orbviz.levels.ray_cells import RayCellLevels
from orbviz.levels.rays import RayLevels, RayQuadrature
from orbviz.levels.shell import ShellQuadrature
from orbviz.states.state import State

__all__ = [
    "Isovalue",
    "check_fraction",
    "check_isovalue",
    "enclosed_probability",
    "enclosing_isovalue",
]


@dataclass(frozen=True)
class Isovalue:
    """The level that encloses a probability.

    Attributes
    ----------
    level : float
        Probability density c in bohr^-3; the signed field is contoured at +-sqrt(c).
    fraction : float
        The probability asked for.
    enclosed_fraction : float
        P(c) recomputed on a quadrature twice as fine: the probability the level achieves (NaN
        if the level was found with ``check=False``; see :func:`check_isovalue`).
    max_radius : float
        Largest distance from the nucleus (bohr) at which |psi|^2 >= c.
    method : {"separable", "factorised", "rays"}
        Which quadrature was used.
    axis_reach : (3,) tuple of float, optional
        Largest |x|, |y| and |z| (bohr) at which |psi|^2 >= c, on a grid of directions that
        holds the axes; None where only ``max_radius`` is known (it bounds all three).
    thinnest_shell : float, optional
        Radial thickness (bohr) of the thinnest shell of {|psi|^2 >= c} along the direction of
        largest angular density, for a one-shell state; a grid coarser than about twice this
        misses the shell's shape.
    """

    level: float
    fraction: float
    enclosed_fraction: float
    max_radius: float
    method: str
    axis_reach: tuple[float, float, float] | None = None
    thinnest_shell: float | None = None


# the ray quadratures of the last level solved without its check, for check_isovalue to reuse
# (a mesh solves first and checks only when a report asks): (state, level, quadratures)
_UNCHECKED: list[tuple[State, float, RayLevels | RayCellLevels]] = []


def check_fraction(fraction: object) -> float:
    """Return ``fraction`` as a float, refusing anything outside the supported range."""
    low, high = LIMITS.fraction_min, LIMITS.fraction_max
    try:
        value = float(fraction)  # type: ignore[arg-type]
    except (TypeError, ValueError):
        value = math.nan
    if isinstance(fraction, bool) or not (math.isfinite(value) and low <= value <= high):
        raise ParameterError(
            f"fraction: expected a number from {low:g} to {high:g}, got {fraction!r}"
        )
    return value


def _one_centre(state: State) -> bool:
    """Return whether the state lies about one centre at the origin."""
    centres = state.centres
    return len(centres) == 1 and centres[0].z == 0.0


def enclosed_probability(state: State, levels: np.ndarray | float, /) -> np.ndarray:
    """Probability inside {|psi|^2 >= c} for each level c (bohr^-3), by grid-free quadrature.

    Parameters
    ----------
    state : State
        Any kind of state.
    levels : float or (K,) array_like
        Density levels in bohr^-3, > 0.

    Returns
    -------
    (K,) ndarray
        Enclosed probabilities in [0, 1]: for one shell from its table; for a superposition
        about the nucleus by the checking extrapolation of its fans of rays, level by level; for
        a bond from one ray quadrature over the whole range.
    """
    levels = np.atleast_1d(np.asarray(levels, dtype=np.float64))
    logs = np.log(levels)
    if len(state.shells) == 1:
        return ShellQuadrature(state.centres[0].orbital, 1).table.above(logs)
    if _one_centre(state):
        return np.array([RayCellLevels(state, log_level=x).achieved(x) for x in logs])
    return RayQuadrature(state, 1).table.above(logs)


def enclosing_isovalue(
    state: State, /, *, fraction: float = DEFAULTS.fraction, check: bool = True
) -> Isovalue:
    """Find the density level c whose region {|psi|^2 >= c} holds probability ``fraction``.

    Parameters
    ----------
    state : State
        Any kind of state.
    fraction : float, default: 0.9
        Probability to enclose, within the supported range (0.01 to 0.999).
    check : bool, default: True
        Also estimate the probability the level achieves by a better quadrature. Without it
        ``enclosed_fraction`` is NaN until :func:`check_isovalue` fills it in; a mesh needs only
        the level and the reach, and skips the check unless a report asks for it.

    Returns
    -------
    Isovalue
        The level, and the probability it encloses by an estimate independent of the one solved
        on (so ``enclosed_fraction - fraction`` estimates the error).

    Notes
    -----
    A one-shell state is solved on the base quadrature and checked on one twice as fine
    (typical agreement 1e-7). A superposition about the nucleus is solved on fans of rays, the
    base fan and one twice as fine extrapolated to zero step, and checked by the extrapolation
    from fans 1.5 and 2 times the base (both within 2e-6 in probability of brute-force sums for
    the mixtures in the tests, 5e-6 at f = 0.999; :class:`orbviz.levels.ray_cells.RayCellLevels`).
    A bond is solved likewise on windowed ray quadratures (:class:`orbviz.levels.rays.RayLevels`).
    """
    fraction = check_fraction(fraction)
    if len(state.shells) == 1:
        solve = ShellQuadrature(state.centres[0].orbital, 1)
        level = math.exp(solve.table.level_above(fraction))
        reach, thin = solve.axis_reach(level), solve.thinnest_shell(level)
        reach_max = solve.max_radius(level)
        iso = Isovalue(level, fraction, math.nan, reach_max, solve.method, reach, thin)
        return _checked(state, iso, None) if check else iso
    rays = _levels(state, fraction=fraction)
    log_level = rays.solve(fraction)
    for _ in range(6):  # the scout's level was off by more than the window: move it
        if log_level is not None:
            break
        rays = rays.moved(fraction)
        log_level = rays.solve(fraction)
    if log_level is None:
        raise ParameterError(
            f"isovalue: the ray quadrature could not place the level enclosing {fraction:g} of "
            f"{state.label} (its density may be too sharp for rays from the origin; for a "
            "bond, a smaller Z or R helps)"
        )
    level = math.exp(log_level)
    iso = Isovalue(level, fraction, math.nan, rays.rough_reach(level), "rays")
    if check:
        return _checked(state, iso, rays)
    _UNCHECKED[:] = [(state, level, rays)]  # a later check_isovalue reuses these quadratures
    return iso


def check_isovalue(state: State, iso: Isovalue, /) -> Isovalue:
    """Fill in ``enclosed_fraction`` of a level found with ``check=False`` (else return it).

    Parameters
    ----------
    state : State
        The state the level belongs to.
    iso : Isovalue
        Its level.

    Returns
    -------
    Isovalue
        The same level, with the better estimate of the probability it encloses.
    """
    if not math.isnan(iso.enclosed_fraction):
        return iso
    rays = None
    if len(state.shells) > 1:
        kept = [r for s, level, r in _UNCHECKED if s is state and level == iso.level]
        rays = kept[0] if kept else _levels(state, log_level=math.log(iso.level))
        _UNCHECKED.clear()
    return _checked(state, iso, rays)


def _levels(
    state: State, fraction: float | None = None, log_level: float | None = None
) -> RayLevels | RayCellLevels:
    """Fans of rays with a cell model for one centre at the origin; windowed rays otherwise."""
    if _one_centre(state):
        return RayCellLevels(state, fraction=fraction, log_level=log_level)
    return RayLevels(state, fraction=fraction, log_level=log_level)


def _checked(state: State, iso: Isovalue, rays: RayLevels | RayCellLevels | None) -> Isovalue:
    """Check a level as :func:`enclosing_isovalue` does: a finer shell table, or Richardson."""
    from orbviz.levels.reach import polished_max_radius

    if rays is None:
        shell = ShellQuadrature(state.centres[0].orbital, 2)
        achieved = float(shell.table.above(np.array([math.log(iso.level)]))[0])
        rough = shell.max_radius(iso.level)
    else:
        achieved = rays.achieved(math.log(iso.level))
        rough = rays.rough_reach(iso.level)
    reach = polished_max_radius(state, iso.level, rough)
    return dataclasses.replace(iso, enclosed_fraction=achieved, max_radius=reach)
