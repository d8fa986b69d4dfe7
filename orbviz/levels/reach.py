"""How far the surface reaches: the largest distance from the nucleus where |psi|^2 = c.

The quadratures know it only to their radial spacing (about 1e-5 relative). Here it is polished:
the outermost crossing of the level along each of a thousand directions is placed on a radial
scan and solved on the local cubic, and the best directions are then climbed on shrinking
patches of directions (the root radius is smooth at its maximum), all vectorised.
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


def _outer_roots(
    state: State, level: float, dirs: np.ndarray, low: float, high: float, count: int = 33
) -> np.ndarray:
    """Outermost radius in [low, high] along each direction where |psi|^2 = level (0: none).

    |psi|^2 is sampled at ``count`` radii; in the cell where it last falls through the level,
    the cubic through the four nearest samples is solved by Newton steps from the linear
    estimate (error ~ (cell / r)^4 relative, under 1e-10 at 33 samples over +-10%). A direction
    still above the level at ``high`` gets ``high``.
    """
    radii = np.linspace(low, high, count)
    excess = _density(state, dirs[:, None, :] * radii[None, :, None]) - level
    above = excess >= 0
    last = count - 1 - np.argmax(above[:, ::-1], axis=1)
    found = above.any(axis=1) & (last < count - 1)
    i = np.clip(last, 1, count - 3)[:, None] + np.arange(-1, 3)[None, :]  # 4 nodes around
    x = radii[i]
    y = np.take_along_axis(excess, i, axis=1)
    # linear start inside the crossing cell [last, last + 1]
    j = np.clip(last, 0, count - 2)
    y0, y1 = excess[np.arange(len(j)), j], excess[np.arange(len(j)), j + 1]
    with np.errstate(divide="ignore", invalid="ignore"):
        r = radii[j] + (radii[1] - radii[0]) * np.where(y0 != y1, y0 / (y0 - y1), 0.5)
        for _ in range(6):  # Newton on the Lagrange cubic through (x, y)
            value, slope = _lagrange(x, y, r)
            r = np.clip(r - np.where(slope != 0, value / slope, 0.0), radii[j], radii[j + 1])
    roots = np.where(found, r, 0.0)
    return np.where(above[:, -1], high, roots)


def _lagrange(x: np.ndarray, y: np.ndarray, at: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Value and derivative at ``at`` of the cubic through the four points (x, y) of each row."""
    value = np.zeros_like(at)
    slope = np.zeros_like(at)
    for k in range(4):
        others = [m for m in range(4) if m != k]
        denominator = np.prod([x[:, k] - x[:, m] for m in others], axis=0)
        factors = [at - x[:, m] for m in others]
        basis = factors[0] * factors[1] * factors[2]
        d_basis = factors[1] * factors[2] + factors[0] * factors[2] + factors[0] * factors[1]
        value += y[:, k] * basis / denominator
        slope += y[:, k] * d_basis / denominator
    return value, slope


def _tangent(direction: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Two unit vectors perpendicular to ``direction`` and to each other."""
    helper = np.array([1.0, 0.0, 0.0]) if abs(direction[0]) < 0.9 else np.array([0.0, 1.0, 0.0])
    first = np.cross(direction, helper)
    first /= np.linalg.norm(first)
    return first, np.cross(direction, first)


def _climb(state: State, level: float, start: np.ndarray, low: float, high: float) -> float:
    """Largest outer root about ``start``: 9 x 9 directions on a tangent patch, shrunk by 4."""
    best = start
    reach = float(_outer_roots(state, level, start[None, :], low, high)[0])
    offsets = np.linspace(-4.0, 4.0, 9)
    u, v = (a.ravel() for a in np.meshgrid(offsets, offsets, indexing="ij"))
    spacing, steps = 0.02, 0
    while spacing > 1e-8 and steps < 200:  # off by d in direction loses ~d^2 of the radius
        first, second = _tangent(best)
        dirs = best + spacing * (u[:, None] * first + v[:, None] * second)
        dirs /= np.linalg.norm(dirs, axis=1, keepdims=True)
        roots = _outer_roots(state, level, dirs, max(low, 0.999 * reach), high)
        k, steps = int(np.argmax(roots)), steps + 1
        if roots[k] > reach:
            best, reach = dirs[k], float(roots[k])
        if max(abs(u[k]), abs(v[k])) < 4.0 or roots[k] <= reach * (1 - 1e-15):
            spacing /= 4.0  # the best lies inside the patch: zoom in; else move on
    # the best direction's root once more on a narrow bracket (cubic error ~1e-20)
    polished = _outer_roots(state, level, best[None, :], 0.9999 * reach, 1.0001 * reach)[0]
    return float(polished) if polished > 0 else reach


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
    outer = _outer_roots(state, level, dirs, low, high, count=65)
    if outer.max() == 0.0:
        return rough
    # climb from the four best directions: two lobes of nearly equal reach are both tried
    starts = np.argsort(outer)[::-1][:4]
    return max(_climb(state, level, dirs[k], low, high) for k in starts)
