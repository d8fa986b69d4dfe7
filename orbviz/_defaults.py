"""One frozen set of defaults and tolerances, shared by the API, the CLI and scene files."""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["DEFAULTS", "Defaults"]


@dataclass(frozen=True)
class Defaults:
    """Defaults and numerical tolerances.

    Attributes
    ----------
    fraction : float
        Probability enclosed by the isosurface (0.9 is common teaching practice, no source).
    grid : int
        Samples per axis of the mesh grid; meets the vertex-level accuracy targets of
        ../docs/meshes.md.
    box_coverage : float
        Probability the sampling box must hold at least.
    radial_tail : float
        Radial probability left outside the radial quadrature range.
    radial_points : int
        Radial nodes (plus 400 per unit of n) of the isovalue quadrature, on a square-root map.
    polar_points : int
        Midpoint nodes in cos(polar), per unit of l + 1, for a one-shell state.
    azimuth_points : int
        Midpoint nodes in azimuth for a separable (real) orbital.
    ray_points : int
        Polar rays per unit of l + 1 for a superposition of several shells (twice as many in
        azimuth).
    ray_block : int
        Samples evaluated at once on rays (bounds the working memory, about 100 bytes each).
    log_step : float
        Spacing of the table of log density on which the enclosed probability is tabulated.
    isovalue_tolerance : float
        Target error of the quadrature in enclosed probability.
    coefficient_tolerance : float
        Coefficients below this (relative to the largest) are dropped from a superposition.
    """

    fraction: float = 0.9
    grid: int = 128
    box_coverage: float = 0.999
    radial_tail: float = 1e-13
    radial_points: int = 6000
    polar_points: int = 1024
    azimuth_points: int = 2048
    log_step: float = 1e-3
    ray_points: int = 24
    ray_block: int = 2_000_000
    isovalue_tolerance: float = 1e-4
    coefficient_tolerance: float = 1e-12


DEFAULTS = Defaults()
