"""Sampling the contoured field on a cubic grid centred on the nucleus.

The box is sized from the radial cumulative probability, so that it holds at least
``DEFAULTS.box_coverage`` of the probability and the surface stays clear of its faces. Samples
are float32, stored with x fastest (Fortran order, what VTK reads without a copy). They are
written in place by one fused numexpr kernel, so peak memory is one field plus numexpr's small
per-thread blocks.
"""

from __future__ import annotations

import os
from dataclasses import dataclass

import numpy as np

from orbviz._defaults import DEFAULTS
from orbviz.errors import ParameterError
from orbviz.fields import Field
from orbviz.isovalue import Isovalue
from orbviz.orbital import Orbital

__all__ = ["Grid", "box_half_width", "check_grid_points", "estimate_bytes", "sample"]

_MARGIN_CELLS = 3  # free cells between the farthest surface point and the box face


@dataclass(frozen=True)
class Grid:
    """Samples of a field on the cube [-half_width, half_width]^3.

    Attributes
    ----------
    values : (N, N, N) ndarray of float32, Fortran order
        ``values[i, j, k]`` is the field at (x_i, y_j, z_k), x_i = -half_width + i * spacing.
    half_width : float
        Half the box side, bohr.
    field : Field
        What was sampled.
    """

    values: np.ndarray
    half_width: float
    field: Field

    @property
    def points(self) -> int:
        """Samples per axis."""
        return self.values.shape[0]

    @property
    def spacing(self) -> float:
        """Distance between samples, bohr."""
        return 2.0 * self.half_width / (self.points - 1)

    @property
    def origin(self) -> float:
        """Coordinate of the first sample on every axis, bohr."""
        return -self.half_width

    def probability_sums(self, level: float) -> tuple[float, float]:
        """Riemann sums of |psi|^2 dV over the grid: (above the level, in the whole box)."""
        import numexpr

        names = {"f": self.values, "lvl": np.float64(level)}
        cell = self.spacing**3
        # the 1.0 factors make numexpr accumulate in float64: float32 sums lose 3e-3 at 128^3
        above = numexpr.evaluate("sum(where(f * f >= lvl, 1.0 * f * f, 0.0))", local_dict=names)
        total = numexpr.evaluate("sum(1.0 * f * f)", local_dict=names)
        return float(above) * cell, float(total) * cell


def check_grid_points(points: object) -> int:
    """Validate a grid size: an integer from 16 to 2048 samples per axis."""
    if isinstance(points, bool) or not isinstance(points, (int, np.integer)):
        raise ParameterError(f"grid size must be an integer, got {points!r}")
    if not 16 <= int(points) <= 2048:
        raise ParameterError(
            f"grid size must be between 16 and 2048 samples per axis, got {points}"
        )
    return int(points)


def radial_quantile(orbital: Orbital, q: float) -> float:
    """Radius (bohr) inside which the fraction ``q`` of the probability lies."""
    r_max = max(orbital.radial_extent(n, l) for n, l in orbital.shells)
    u = np.linspace(0.0, 1.0, 20001)
    r = r_max * u * u
    p = orbital.radial_distribution(r) * 2.0 * r_max * u
    cumulative = np.concatenate([[0.0], np.cumsum(0.5 * (p[1:] + p[:-1]) * np.diff(u))])
    return float(np.interp(q * cumulative[-1], cumulative, r))


def box_half_width(orbital: Orbital, iso: Isovalue, points: int) -> float:
    """Half the side (bohr) of a cube holding ``box_coverage`` of the probability and the surface.

    The cube contains the sphere of radius half_width, so the radial quantile suffices for the
    coverage; the surface, which reaches ``iso.max_radius``, keeps three cells clear of the faces.
    """
    if getattr(orbital, "general", False):  # two centres: each orbital's coverage, off centre
        coverage = orbital.R / 2 + max(
            radial_quantile(o, DEFAULTS.box_coverage) for o in (orbital.a, orbital.b)
        )
    else:
        coverage = radial_quantile(orbital, DEFAULTS.box_coverage)
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


def estimate_bytes(points: int) -> int:
    """Peak memory estimate of sampling and contouring an N^3 grid.

    One float32 field, and contour output of at most ~8 N^2 vertices and 16 N^2 triangles per
    side (vertex 12 B, normal 12 B, colour 4 B, scalars 4 B; triangle 12 B plus VTK's cell
    arrays 16 B), with both phases and a copy during post-processing.
    """
    field = 4 * points**3
    surface = 2 * 2 * (8 * points**2 * 32 + 16 * points**2 * 28)
    return field + surface


def sample(field: Field, half_width: float, points: int) -> Grid:
    """Sample ``field`` on an N^3 grid spanning [-half_width, half_width] on each axis.

    Raises
    ------
    ParameterError
        If the estimated memory exceeds 80% of what the system has available.
    """
    points = check_grid_points(points)
    need, have = estimate_bytes(points), available_bytes()
    if need > 0.8 * have:
        raise ParameterError(
            f"a {points}^3 grid needs about {need / 2**30:.1f} GiB but only "
            f"{have / 2**30:.1f} GiB is available; use a smaller --grid"
        )
    axis = np.linspace(-half_width, half_width, points)
    values = np.empty((points, points, points), dtype=np.float32, order="F")
    field(axis[:, None, None], axis[None, :, None], axis[None, None, :], out=values)
    return Grid(values, float(half_width), field)
