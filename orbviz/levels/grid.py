"""Sampling the contoured field on a cubic grid centred on the nucleus.

The box is sized from the radial cumulative probability, so that it holds at least
``DEFAULTS.box_coverage`` of the probability and the surface stays clear of its faces. Samples
are float32, stored with x fastest (Fortran order, what VTK reads without a copy). They are
written in place by one fused numexpr kernel, so peak memory is one field plus numexpr's small
per-thread blocks.

Two savings keep the work to what the surface needs, without changing a single contoured cell:

* a surface reaches only ``Isovalue.axis_reach`` (or ``max_radius``) along each axis, so only
  the centred box (the *window*) that holds it, plus a few clear cells, is sampled; every sample
  outside lies below the level, and the window's own faces are checked to be below it before it
  is trusted;
* a field that is even or odd under a mirror plane (every eigenstate on every axis) is evaluated
  on one side of it and copied, with its sign, to the other: an eigenstate costs an eighth.
"""

from __future__ import annotations

import math
import os
from dataclasses import dataclass

import numpy as np

from orbviz._defaults import DEFAULTS, LIMITS
from orbviz.errors import ParameterError
from orbviz.levels.fields import Field
from orbviz.levels.isovalue import Isovalue
from orbviz.states.state import State

__all__ = [
    "Grid",
    "box_half_width",
    "check_grid_points",
    "estimate_bytes",
    "sample",
    "window_start",
]

_MARGIN_CELLS = 3  # free cells between the farthest surface point and the box face
_WINDOW_CELLS = 2  # free cells between the farthest surface point and the window face


@dataclass(frozen=True)
class Grid:
    """Samples of a field on the cube [-half_width, half_width]^3.

    The grid has N samples per axis, but only a centred box of them, the window, is held:
    samples ``start[a]`` to ``N - 1 - start[a]`` on axis a. Every sample outside it lies below
    the contoured level, so contouring the window gives the surface of the whole grid.

    Attributes
    ----------
    values : (Mx, My, Mz) ndarray of float32, Fortran order
        ``values[i, j, k]`` is the field at (x_s, y_t, z_u) with s = start[0] + i and so on,
        x_s = -half_width + s * spacing.
    half_width : float
        Half the box side, bohr.
    field : Field
        What was sampled.
    start : (3,) tuple of int, default: (0, 0, 0)
        Index of the window's first sample on each axis (zeros: the window is the whole box).
    """

    values: np.ndarray
    half_width: float
    field: Field
    start: tuple[int, int, int] = (0, 0, 0)

    @property
    def points(self) -> int:
        """Samples per axis of the whole box."""
        return self.values.shape[0] + 2 * self.start[0]

    @property
    def spacing(self) -> float:
        """Distance between samples, bohr."""
        return 2.0 * self.half_width / (self.points - 1)

    @property
    def origin(self) -> float:
        """Coordinate of the first sample of the box on every axis, bohr."""
        return -self.half_width

    @property
    def window_origin(self) -> tuple[float, float, float]:
        """Coordinates of the first held sample, ``values[0, 0, 0]``, bohr."""
        x, y, z = (-self.half_width + s * self.spacing for s in self.start)
        return x, y, z

    def probability_sums(self, level: float) -> tuple[float, float]:
        """Riemann sums of |psi|^2 dV over the grid: (above the level, in the whole box).

        Samples outside the window are evaluated here again, one z slab at a time.
        """
        import numexpr

        names = {"f": self.values, "lvl": np.float64(level)}
        cell = self.spacing**3
        # the 1.0 factors make numexpr accumulate in float64: float32 sums lose 3e-3 at 128^3
        above = numexpr.evaluate("sum(where(f * f >= lvl, 1.0 * f * f, 0.0))", local_dict=names)
        total = float(numexpr.evaluate("sum(1.0 * f * f)", local_dict=names))
        if any(self.start):
            total += self._outside_sum()
        return float(above) * cell, total * cell

    def _outside_sum(self) -> float:
        """Sum of f^2 over the samples outside the window, slab by slab (float64 sums)."""
        n = self.points
        (x0, y0, z0), (x1, y1, z1) = self.start, (n - s for s in self.start)
        axis = np.linspace(-self.half_width, self.half_width, n)
        slab = np.empty((n, n, 1), dtype=np.float32, order="F")
        total = 0.0
        for k in range(n):
            self.field(axis[:, None, None], axis[None, :, None], axis[k : k + 1], out=slab)
            square = np.square(slab[:, :, 0], dtype=np.float64)
            total += float(square.sum())
            if z0 <= k < z1:  # the window's part of this slab is counted already
                total -= float(square[x0:x1, y0:y1].sum())
        return total


def check_grid_points(points: object) -> int:
    """Validate a grid size: a whole number of samples per axis in the supported range."""
    low, high = LIMITS.grid_min, LIMITS.grid_max
    if isinstance(points, bool) or not isinstance(points, (int, np.integer)):
        raise ParameterError(f"grid: expected a whole number from {low} to {high}, got {points!r}")
    if not low <= int(points) <= high:
        raise ParameterError(f"grid: expected a whole number from {low} to {high}, got {points}")
    return int(points)


def box_half_width(state: State, iso: Isovalue, points: int) -> float:
    """Half the side (bohr) of a cube holding ``box_coverage`` of the probability and the surface.

    The cube contains the sphere of radius half_width, so the radial quantile suffices for the
    coverage; the surface, which reaches ``iso.max_radius``, keeps three cells clear of the faces.
    """
    coverage = state.radial_quantile(DEFAULTS.box_coverage)
    cells = points - 1
    clear = iso.max_radius * cells / (cells - 2 * _MARGIN_CELLS)
    return max(coverage, clear)


def available_bytes() -> int:
    """Memory the system reports as available (MemAvailable), or physical memory if unknown."""
    try:
        with open("/proc/meminfo") as meminfo:
            for line in meminfo:
                if line.startswith("MemAvailable:"):
                    return int(line.split()[1]) * 1024
    except OSError:
        pass
    return os.sysconf("SC_PAGE_SIZE") * os.sysconf("SC_PHYS_PAGES")


def estimate_bytes(points: int, held: tuple[int, int, int] | None = None) -> int:
    """Peak memory estimate of sampling and contouring an N^3 grid.

    One float32 field (of the ``held`` window's shape, if given, else the whole box), and
    contour output of at most ~8 N^2 vertices and 16 N^2 triangles per side (vertex 12 B,
    normal 12 B, colour 4 B, scalars 4 B; triangle 12 B plus VTK's cell arrays 16 B), with both
    phases and a copy during post-processing.
    """
    field = 4 * math.prod(held or (points, points, points))
    surface = 2 * 2 * (8 * points**2 * 32 + 16 * points**2 * 28)
    return field + surface


def _check_memory(points: int, held: tuple[int, int, int] | None = None) -> None:
    need, have = estimate_bytes(points, held), available_bytes()
    if need > 0.8 * have:
        raise ParameterError(
            f"a {points}^3 grid needs about {need / 2**30:.1f} GiB but only "
            f"{have / 2**30:.1f} GiB is available; use a smaller --grid"
        )


def window_start(points: int, half_width: float, reach: float) -> int:
    """First index on an axis of the centred window that holds every point within ``reach``.

    The window keeps two clear samples, and half a percent of ``reach``, beyond it, and at
    least four samples.
    """
    spacing = 2.0 * half_width / (points - 1)
    start = math.floor((half_width - 1.005 * reach) / spacing) - _WINDOW_CELLS
    return max(0, min(start, (points - 4) // 2))


def _fill(field: Field, axes: list[np.ndarray], out: np.ndarray) -> None:
    """Evaluate ``field`` at the product of ``axes`` into ``out``, mirroring where it may.

    On an axis where the field is even or odd and the (symmetric) samples allow, only the upper
    half, which holds the middle sample of an odd count, is evaluated; the lower half is the
    upper one reversed, times the parity.
    """
    upper = [slice(None)] * 3
    for axis, parity in enumerate(field.parity):
        coords = axes[axis]
        if parity and np.allclose(coords, -coords[::-1], rtol=0, atol=1e-12 * abs(coords).max()):
            upper[axis] = slice(len(coords) // 2, None)
    x, y, z = (a[s] for a, s in zip(axes, upper, strict=True))
    field(x[:, None, None], y[None, :, None], z[None, None, :], out=out[tuple(upper)])
    for axis, cut in enumerate(upper):
        if cut.start is None:
            continue
        m = out.shape[axis]
        low = [slice(None)] * axis + [slice(0, m // 2)] + upper[axis + 1 :]  # only what is filled
        high = [slice(None)] * axis + [slice(m - m // 2, None)] + upper[axis + 1 :]
        mirrored = np.flip(out[tuple(high)], axis=axis)
        if field.parity[axis] < 0:
            np.negative(mirrored, out=out[tuple(low)])
        else:
            out[tuple(low)] = mirrored


def sample(
    field: Field, half_width: float, points: int, *, surface: Isovalue | None = None
) -> Grid:
    """Sample ``field`` on an N^3 grid spanning [-half_width, half_width] on each axis.

    Parameters
    ----------
    field : Field
        What to sample.
    half_width : float
        Half the box side, bohr.
    points : int
        Samples per axis.
    surface : Isovalue, optional
        The level to be contoured. If given, only the window holding the surface it bounds is
        sampled (see the module docstring); if any sample on the window's faces reaches the
        level after all, the whole box is sampled instead.

    Raises
    ------
    ParameterError
        If the estimated memory exceeds 80% of what the system has available.
    """
    points = check_grid_points(points)
    axis = np.linspace(-half_width, half_width, points)
    start = (0, 0, 0)
    if surface is not None:
        reach = surface.axis_reach or (surface.max_radius,) * 3
        sx, sy, sz = (window_start(points, half_width, r) for r in reach)
        start = (sx, sy, sz)
    if any(start):
        held = [axis[s : points - s] for s in start]
        shape = (held[0].size, held[1].size, held[2].size)
        _check_memory(points, shape)
        values = np.empty(shape, dtype=np.float32, order="F")
        _fill(field, held, values)
        assert surface is not None  # a window is only taken for a surface
        if _faces_clear(values, math.sqrt(surface.level)):
            return Grid(values, float(half_width), field, start)
        del values
    _check_memory(points)
    values = np.empty((points, points, points), dtype=np.float32, order="F")
    _fill(field, [axis, axis, axis], values)
    return Grid(values, float(half_width), field)


def _faces_clear(values: np.ndarray, threshold: float) -> bool:
    """Tell whether every sample on the box's six faces lies strictly below ``threshold``."""
    faces = (values[[0, -1]], values[:, [0, -1]], values[:, :, [0, -1]])
    return all(float(np.abs(face).max()) < threshold for face in faces)
