"""How far the surface reaches: the largest distance from the nucleus where |psi|^2 = c.

The quadratures know it only to their radial spacing (about 1e-5 relative). Here it is polished:
the outermost crossing of the level along each of a few hundred directions is bracketed on a
radial scan and solved by Brent's method, and the best direction is then refined by a local
maximisation over the two angles of the root radius, which is smooth at its maximum.
"""

from __future__ import annotations

import math

import numpy as np

from orbviz.states.state import State

__all__ = ["polished_max_radius"]


def _density(state: State, points: np.ndarray) -> np.ndarray:
    psi = state.psi(points[..., 0], points[..., 1], points[..., 2], dtype=np.float64)
    return psi * psi if state.is_real else np.abs(psi) ** 2


def _direction(polar: float, azimuth: float) -> np.ndarray:
    s = math.sin(polar)
    return np.array([s * math.cos(azimuth), s * math.sin(azimuth), math.cos(polar)])


def _root(state: State, level: float, direction: np.ndarray, low: float, high: float) -> float:
    """Return the outermost radius in [low, high] along ``direction`` where |psi|^2 = level."""
    from scipy.optimize import brentq

    radii = np.linspace(low, high, 257)
    excess = _density(state, np.outer(radii, direction)) - level
    above = np.flatnonzero(excess >= 0)
    if above.size == 0:
        return 0.0
    i = int(above[-1])
    if i == radii.size - 1:
        return float(high)

    def f(r: float) -> float:
        return float(_density(state, (r * direction)[None, :])[0] - level)

    return float(brentq(f, radii[i], radii[i + 1], xtol=1e-13, rtol=1e-15))


def _one_shell(state: State, level: float, rough: float) -> float:
    """Return the reach of a one-shell state at the origin, |psi|^2 = R(r)^2 A(direction).

    The farthest point lies along the direction of largest A: found on a dense set of
    directions and refined over the two angles (cheap: no root inside), then the outermost
    root of R^2 A_max = c.
    """
    from scipy.optimize import brentq, minimize

    orbital = state.centres[0].orbital
    shell = orbital.shells[0]

    def angular(polar: np.ndarray, azimuth: np.ndarray) -> np.ndarray:
        s = np.sin(polar)
        x, y, z = s * np.cos(azimuth), s * np.sin(azimuth), np.cos(polar)
        return np.abs(orbital.shell_angular(x, y, z)[shell]) ** 2

    p, a = np.meshgrid(
        np.linspace(0, math.pi, 181), np.linspace(0, 2 * math.pi, 360), indexing="ij"
    )
    values = angular(p.ravel(), a.ravel())
    best = int(np.argmax(values))
    found = minimize(
        lambda t: -float(angular(np.array([t[0]]), np.array([t[1]]))[0]),
        np.array([p.ravel()[best], a.ravel()[best]]),
        method="Nelder-Mead",
        options={"xatol": 1e-10, "fatol": 1e-16, "maxiter": 400},
    )
    peak = max(-float(found.fun), float(values[best]))

    def excess(r: np.ndarray) -> np.ndarray:
        return peak * orbital.radial(*shell, np.atleast_1d(r)) ** 2 - level

    radii = np.linspace(0.9 * rough, 1.1 * rough, 257)
    above = np.flatnonzero(excess(radii) >= 0)
    if above.size == 0 or above[-1] == radii.size - 1:
        return rough
    i = int(above[-1])
    return float(
        brentq(lambda r: float(excess(r)[0]), radii[i], radii[i + 1], xtol=1e-13, rtol=1e-15)
    )


def polished_max_radius(state: State, level: float, rough: float) -> float:
    """Return the surface's largest distance from the nucleus, to about 1e-9 relative.

    Parameters
    ----------
    state : State
        Any kind of state.
    level : float
        The density level, bohr^-3.
    rough : float
        The quadrature's estimate (within a few per cent).
    """
    from scipy.optimize import minimize

    if not (rough > 0 and math.isfinite(rough)):
        return rough
    centres = state.centres
    if len(centres) == 1 and centres[0].z == 0.0 and len(centres[0].orbital.shells) == 1:
        return _one_shell(state, level, rough)
    low, high = 0.9 * rough, 1.1 * rough
    count = 24
    polar = np.arccos(1 - 2 * (np.arange(count) + 0.5) / count)
    azimuth = np.linspace(0.0, 2 * math.pi, 2 * count, endpoint=False)
    p, a = np.meshgrid(polar, azimuth, indexing="ij")
    dirs = np.stack([np.sin(p) * np.cos(a), np.sin(p) * np.sin(a), np.cos(p)], -1).reshape(-1, 3)
    radii = np.linspace(low, high, 65)
    dens = _density(state, dirs[:, None, :] * radii[None, :, None])
    hit = dens >= level
    outer = np.where(hit.any(axis=1), radii[::-1][np.argmax(hit[:, ::-1], axis=1)], 0.0)
    best = int(np.argmax(outer))
    if outer[best] == 0.0:
        return rough
    start = (float(p.reshape(-1)[best]), float(a.reshape(-1)[best]))

    def minus_root(angles: np.ndarray) -> float:
        return -_root(state, level, _direction(*angles), low, high)

    found = minimize(
        minus_root,
        np.array(start),
        method="Nelder-Mead",
        options={"xatol": 1e-7, "fatol": 1e-13 * rough, "maxiter": 400},
    )
    return max(-float(found.fun), _root(state, level, _direction(*start), low, high))
