"""How far the surface reaches: the largest distance from the nucleus where |psi|^2 = c.

The quadratures know it only to their radial spacing (about 1e-5 relative). Here it is polished:
the outermost crossing of the level along each of a thousand directions is placed on a radial
scan and solved on the local cubic, and the best directions are then climbed on shrinking
patches of directions (the root radius is smooth at its maximum), all vectorised. A one-shell
state climbs its angular factor instead, and solves one root along the best direction.
"""

from __future__ import annotations

import math
from collections.abc import Callable

import numpy as np

from orbviz.states.state import State

__all__ = ["polished_max_radius"]


def _density(state: State, points: np.ndarray) -> np.ndarray:
    psi = state.psi(points[..., 0], points[..., 1], points[..., 2], dtype=np.float64)
    return psi * psi if state.is_real else np.abs(psi) ** 2


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


def _climb(score: Callable[[np.ndarray], np.ndarray], start: np.ndarray) -> np.ndarray:
    """Return the direction of largest ``score`` near ``start``.

    The score is taken on 9 x 9 directions of a patch tangent to the best direction so far;
    the patch shrinks fourfold when the best lies inside it and moves on when it lies on the
    edge. A smooth maximum is found to ~1e-8 rad, which costs ~1e-16 of a smooth score.
    """
    best = start
    value = float(score(start[None, :])[0])
    offsets = np.linspace(-4.0, 4.0, 9)
    u, v = (a.ravel() for a in np.meshgrid(offsets, offsets, indexing="ij"))
    spacing, steps = 0.02, 0
    while spacing > 1e-8 and steps < 200:
        first, second = _tangent(best)
        dirs = best + spacing * (u[:, None] * first + v[:, None] * second)
        dirs /= np.linalg.norm(dirs, axis=1, keepdims=True)
        values = score(dirs)
        k, steps = int(np.argmax(values)), steps + 1
        if values[k] > value:
            best, value = dirs[k], float(values[k])
        else:
            spacing /= 4.0  # nothing better on the patch: zoom in
            continue
        if max(abs(u[k]), abs(v[k])) < 4.0:
            spacing /= 4.0  # the best lies inside the patch: zoom in; else move on
    return best


def _sphere(count: int = 24) -> np.ndarray:
    """Directions on a polar x azimuth grid, count x 2 count (equal steps in cos(polar))."""
    polar = np.arccos(1 - 2 * (np.arange(count) + 0.5) / count)
    azimuth = np.linspace(0.0, 2 * math.pi, 2 * count, endpoint=False)
    p, a = np.meshgrid(polar, azimuth, indexing="ij")
    return np.stack([np.sin(p) * np.cos(a), np.sin(p) * np.sin(a), np.cos(p)], -1).reshape(-1, 3)


def _polish(state: State, level: float, direction: np.ndarray, low: float, high: float) -> float:
    """Outer root along ``direction``: a scan of [low, high], then a narrow bracket about it."""
    rough = float(_outer_roots(state, level, direction[None, :], low, high, count=257)[0])
    if not 0.0 < rough < high:
        return rough
    return float(_outer_roots(state, level, direction[None, :], 0.9999 * rough, 1.0001 * rough)[0])


def _one_shell(state: State, level: float, rough: float) -> float:
    """Return the reach of a one-shell state at the origin, |psi|^2 = R(r)^2 A(direction).

    The farthest point lies along the direction of largest A (found on a dense set of
    directions and climbed, no root inside), then the outermost root of R^2 A_max = c.
    """
    orbital = state.centres[0].orbital
    shell = orbital.shells[0]

    def angular(dirs: np.ndarray) -> np.ndarray:
        return np.abs(orbital.shell_angular(*dirs.T)[shell]) ** 2

    dirs = _sphere(96)
    best = _climb(angular, dirs[int(np.argmax(angular(dirs)))])
    found = _polish(state, level, best, 0.9 * rough, 1.1 * rough)
    return found if 0.0 < found < 1.1 * rough else rough


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
    dirs = _sphere()
    outer = _outer_roots(state, level, dirs, low, high, count=65)
    if outer.max() == 0.0:
        return rough

    def root(candidates: np.ndarray) -> np.ndarray:
        return _outer_roots(state, level, candidates, low, high)

    # climb from the four best directions: two lobes of nearly equal reach are both tried
    tops = [_climb(root, dirs[k]) for k in np.argsort(outer)[::-1][:4]]
    return max(_polish(state, level, top, low, high) for top in tops)
