"""The planes through the nucleus that 2D figures show, and the one that shows a state best."""

from __future__ import annotations

import numpy as np

from orbviz.states.state import State

__all__ = ["PLANES", "best_plane", "choose_plane", "plane_psi"]

PLANES = {"xz": (0, 2), "xy": (0, 1), "yz": (1, 2)}


def plane_psi(state: State, plane: str, axis: np.ndarray) -> np.ndarray:
    """Return psi on the plane's square grid of ``axis`` x ``axis`` (bohr)."""
    u, v = np.meshgrid(axis, axis, indexing="ij")
    coords = [np.zeros_like(u)] * 3
    i, j = PLANES[plane]
    coords[i], coords[j] = u, v
    return np.asarray(state.psi(*coords, dtype=np.float64))


def choose_plane(state: State, axis: np.ndarray) -> str:
    """Return the plane through the nucleus holding the most probability (xz on a near tie).

    A plane that is a nodal plane of the state (xz for 3dxy) would show nothing.
    """
    weights = {p: float(np.sum(np.abs(plane_psi(state, p, axis)) ** 2)) for p in PLANES}
    best = max(weights.values())
    return next(p for p in ("xz", "xy", "yz") if weights[p] >= 0.98 * best)


def best_plane(state: State, half: float) -> str:
    """Return the plane through the nucleus holding the most probability within ``half``."""
    return choose_plane(state, np.linspace(-half, half, 101))
