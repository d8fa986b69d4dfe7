"""What 2D figures share: planes through the nucleus, the best of them, the grid of panels."""

from __future__ import annotations

from typing import Any

import numpy as np

from orbviz.figures.options import PlotOptions
from orbviz.states.state import State

__all__ = ["PLANES", "best_plane", "choose_plane", "panel_axes", "plane_psi"]

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


def panel_axes(
    count: int, options: PlotOptions, *, panel: tuple[float, float], extra: tuple[float, float]
) -> tuple[Any, Any]:
    """Return a figure of ``count`` panels, at most three a row, and its axes (unused ones off).

    ``panel`` is one panel's natural size in inches and ``extra`` what the figure adds (a
    colour bar, a title); the options' printed size overrides both.
    """
    from matplotlib.figure import Figure

    cols = min(count, 3)
    rows = -(-count // cols)
    fig = Figure(
        figsize=options.inches((panel[0] * cols + extra[0], panel[1] * rows + extra[1])),
        dpi=options.dpi,
        layout="constrained",
    )
    axes = fig.subplots(rows, cols, squeeze=False).ravel()
    for ax in axes[count:]:
        ax.set_axis_off()
    return fig, axes
