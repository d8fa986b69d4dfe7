"""One frozen set of defaults, tolerances and limits, shared by the API, the CLI and scene files.

Every input has a supported range here, decided from what the numerics keep accurate and what
memory allows; docs/limits.md gives the measurements behind each. Values outside are refused at
the boundary with one line naming the value and the range.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = [
    "BOHR_IN_ANGSTROM",
    "DEFAULTS",
    "DISPLAY_UNITS",
    "LENGTH_UNITS",
    "LIMITS",
    "Defaults",
    "Limits",
]

LENGTH_UNITS = ("bohr", "angstrom", "nm", "pm", "mm")  # mm: printable models
DISPLAY_UNITS = ("angstrom", "bohr")  # lengths shown to a reader: info, plot axes, scale bars
BOHR_IN_ANGSTROM = 0.529177210544  # CODATA 2022; checked against scipy.constants in the tests


@dataclass(frozen=True)
class Defaults:
    """Defaults and numerical tolerances.

    Attributes
    ----------
    fraction : float
        Probability enclosed by the isosurface (0.9 is common teaching practice, no source).
    display_units : str
        Unit of the lengths shown to a reader (``info`` radii, plot axes, scale bars).
    grid : int
        Samples per axis of the mesh grid; meets the vertex-level accuracy targets of
        ../docs/meshes.md.
    animation_grid : int
        Samples per axis of each animation frame.
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
    image_size : (int, int)
        Figure size in pixels.
    min_feature_mm : float
        Thinnest printable feature (common FDM practice for a 0.4 mm nozzle, no source).
    rod_share : float
        Default rod diameter of a model as a share of its size (1.2 mm at 30 mm).
    """

    fraction: float = 0.9
    display_units: str = "angstrom"
    grid: int = 128
    animation_grid: int = 96
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
    image_size: tuple[int, int] = (1600, 1200)
    min_feature_mm: float = 1.2
    rod_share: float = 0.04


@dataclass(frozen=True)
class Limits:
    """The supported range of every input (see docs/limits.md for the measurements).

    Attributes
    ----------
    n_max : int
        Largest principal quantum number: R_nl agrees with mpmath to 1e-12 relative and the
        enclosed probability with its finer check to 1e-4 up to here; ``info`` stays under 1 s
        and 300 MB.
    terms_max : int
        Most distinct (n, l, m) states in one superposition (a whole n = 10 shell has 100).
    spec_chars : int
        Longest spec text.
    Z_min, Z_max : float
        Nuclear charge range. psi scales as Z^(3/2) and lengths as 1/Z; inside this range every
        sampled value, level and length stays within float32 and the box sizes stay finite.
    nuclear_mass_min_u, nuclear_mass_max_u : float
        Nucleus mass range in daltons: from the electron's (positronium-like, mu = m_e / 2) to
        far beyond uranium (mu within 1e-9 of m_e).
    fraction_min, fraction_max : float
        Enclosed probability range; outside it the level lies in the density's extreme tails,
        where the box would grow without bound (above) or the surface shrinks to a point.
    bond_distance_min, bond_distance_max : float
        Internuclear distance of a two-centre combination, bohr. Beyond the maximum the two
        lobes are too far apart for one grid to resolve both.
    grid_min, grid_max : int
        Samples per axis; a 1024^3 float32 field is 4 GiB, and memory is checked before any
        sampling.
    image_side_min, image_side_max : int
        Pixels per side of a figure.
    image_megapixels : float
        Largest image after ``scale``.
    frames_max : int
        Most frames of an animation.
    model_size_min_mm, model_size_max_mm : float
        Longest side of a printed model (a common FDM bed is 220 mm, common practice).
    rod_share_max : float
        Largest rod diameter as a share of the model size (a thicker rod hides the orbital).
    faces_min, faces_max : int
        Face budget of a decimated mesh.
    smooth_max : int
        Most smoothing iterations.
    jobs_max : int
        Most batch workers (also capped by cores and memory).
    extent_max : float
        Largest fixed figure extent, bohr.
    """

    n_max: int = 100
    terms_max: int = 100
    spec_chars: int = 4000
    Z_min: float = 1e-3
    Z_max: float = 1e3
    nuclear_mass_min_u: float = 5.4e-4
    nuclear_mass_max_u: float = 1e6
    fraction_min: float = 0.01
    fraction_max: float = 0.999
    bond_distance_min: float = 0.01
    bond_distance_max: float = 40.0
    grid_min: int = 16
    grid_max: int = 1024
    image_side_min: int = 16
    image_side_max: int = 8192
    image_megapixels: float = 64.0
    frames_max: int = 600
    model_size_min_mm: float = 5.0
    model_size_max_mm: float = 500.0
    rod_share_max: float = 0.25
    faces_min: int = 100
    faces_max: int = 10_000_000
    smooth_max: int = 1000
    jobs_max: int = 64
    extent_max: float = 1e5


DEFAULTS = Defaults()
LIMITS = Limits()
