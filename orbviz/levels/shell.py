"""Quadrature of one (n, l) shell: the log-density distribution is radial (*) angular.

Every eigenstate, and any state of one shell, factorises as |psi|^2 = R^2(r) A(direction), so the
distribution of log |psi|^2 is the convolution (FFT) of a radial and an angular one. A real
orbital factorises further, A = F(cos polar) G(azimuth), so each factor is a fine 1D quadrature.
"""

from __future__ import annotations

import math

import numpy as np

from orbviz._defaults import DEFAULTS
from orbviz.levels.logmass import LogMass, midpoints
from orbviz.states.orbital import Orbital

__all__ = ["ShellQuadrature", "unit_vectors"]

_REACH_POLAR, _REACH_AZIMUTH = 129, 256  # directions for the per-axis reach (axes included)


def _radial_count(rate: float, r_max: float, step: float) -> int:
    """Radial nodes so that neighbouring samples differ by under two log steps in density.

    In the tail R^2 falls as exp(-rate r); on the square-root map dr <= 2 r_max / count.
    """
    return DEFAULTS.radial_points + int(rate * r_max / step)


def _radial_samples(orbital: Orbital, n: int, l: int, refine: int) -> tuple[np.ndarray, ...]:
    """Radii on a square-root map (dense near the nucleus), R^2, and radial masses R^2 r^2 dr."""
    r_max = orbital.radial_extent(n, l, tail=DEFAULTS.radial_tail)
    rate = _decay_rate(orbital, n, l, r_max)
    u, du = midpoints(_radial_count(rate, r_max, DEFAULTS.log_step / refine), 0.0, 1.0)
    r = r_max * u * u
    dens = orbital.radial(n, l, r) ** 2
    return r, dens, dens * r * r * (2.0 * r_max * u * du)


def _decay_rate(orbital: Orbital, n: int, l: int, r_max: float) -> float:
    """Largest fall-off rate of log R^2 in the tail, per bohr (2Z/n for hydrogen-like states)."""
    if orbital.potential is None:
        return 2.0 * orbital.length_charge / n
    r = np.linspace(0.2 * r_max, r_max, 2001)
    d = orbital.radial(n, l, r) ** 2
    keep = d > 1e-250
    if keep.sum() < 3:
        return 2.0 / n
    return float(np.abs(np.gradient(np.log(d[keep]), r[keep])).max())


def unit_vectors(t: np.ndarray, azimuth: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Return the unit vectors at cos(polar) = t and the azimuths."""
    s = np.sqrt(np.maximum(1.0 - t * t, 0.0))
    return s * np.cos(azimuth), s * np.sin(azimuth), t


class ShellQuadrature:
    """One (n, l) shell: log-density distribution = radial (*) angular."""

    def __init__(self, orbital: Orbital, refine: int) -> None:
        ((n, l),) = orbital.shells
        step = DEFAULTS.log_step / refine
        r, dens, mass = _radial_samples(orbital, n, l, refine)
        radial = LogMass.of_samples(dens, mass, step)
        angular, self.max_angular, self.method = self._angular(orbital, n, l, refine, step)
        self.table = radial.convolve(angular)
        self.radii, self.radial_density = r, dens
        self.orbital = orbital

    @staticmethod
    def _angular(orbital: Orbital, n: int, l: int, refine: int, step: float):
        def density(t, azimuth):
            part = orbital.shell_angular(*unit_vectors(t, azimuth))[(n, l)]
            return np.abs(part) ** 2

        probe_t, _ = midpoints(24, -1.0, 1.0)
        probe_a, _ = midpoints(24, 0.0, 2 * math.pi)
        probe = density(probe_t[:, None], probe_a[None, :])
        t, dt = midpoints(DEFAULTS.polar_points * (l + 1) * refine, -1.0, 1.0)
        if np.ptp(probe, axis=1).max() <= 1e-12 * probe.max():  # axially symmetric
            f = density(t, np.zeros_like(t))
            return LogMass.of_samples(f, f * dt * 2 * math.pi, step), f.max(), "factorised"
        if len(orbital.basis) == 1:  # real orbital: A = F(t) cos^2 or sin^2 (|m| azimuth)
            (_, _, m), _ = orbital.basis[0]
            peak = 0.0 if m > 0 else math.pi / (2 * abs(m))
            f = density(t, np.full_like(t, peak))
            a, da = midpoints(DEFAULTS.azimuth_points * refine, 0.0, 2 * math.pi)
            g = np.cos(a) ** 2
            polar = LogMass.of_samples(f, f * dt, step)
            return polar.convolve(LogMass.of_samples(g, g * da, step)), f.max(), "separable"
        t2, dt2 = midpoints(DEFAULTS.polar_points * (l + 1) * refine // 4, -1.0, 1.0)
        a, da = midpoints(DEFAULTS.polar_points * (l + 1) * refine // 2, 0.0, 2 * math.pi)
        f = density(t2[:, None], a[None, :]).ravel()
        return LogMass.of_samples(f, f * dt2 * da, step), f.max(), "factorised"

    def max_radius(self, level: float) -> float:
        """Largest radius at which the density reaches ``level`` in its strongest direction."""
        inside = self.radial_density * self.max_angular >= level
        return float(self.radii[inside].max()) if inside.any() else 0.0

    def thinnest_shell(self, level: float) -> float | None:
        """Shortest run of radii where R^2 max(A) >= level (None if there is none)."""
        inside = np.concatenate([[False], self.radial_density * self.max_angular >= level, [False]])
        change = np.flatnonzero(np.diff(inside.astype(np.int8)))
        if change.size == 0:
            return None
        first, last = change[::2], change[1::2] - 1  # index runs [first, last] inside
        return float(np.min(self.radii[last] - self.radii[first]))

    def axis_reach(self, level: float) -> tuple[float, float, float]:
        """Largest |x|, |y|, |z| of {|psi|^2 >= level}: per direction, the farthest radius.

        The directions are uniform in polar angle and azimuth, both axes and the diagonals
        among them, so lobes along the axes or between them are met exactly; elsewhere the
        reach is short by at most ~(pi/64)^2/8 of the radius, which the sampling window's
        clear cells cover.
        """
        polar = np.linspace(0.0, math.pi, _REACH_POLAR)
        azimuth = np.linspace(0.0, 2 * math.pi, _REACH_AZIMUTH, endpoint=False)
        ux = np.outer(np.sin(polar), np.cos(azimuth)).ravel()
        uy = np.outer(np.sin(polar), np.sin(azimuth)).ravel()
        uz = np.repeat(np.cos(polar), azimuth.size)
        ((n, l),) = self.orbital.shells
        angular = np.abs(self.orbital.shell_angular(ux, uy, uz)[(n, l)]) ** 2
        # farthest radius whose density reaches t: the last index where the suffix max >= t
        suffix = np.maximum.accumulate(self.radial_density[::-1])[::-1]
        with np.errstate(divide="ignore", over="ignore"):  # a tiny angular factor: need = inf
            need = np.where(angular > 0, level / angular, np.inf)
        count = np.searchsorted(-suffix, -need, side="right")
        far = np.where(count > 0, self.radii[np.maximum(count - 1, 0)], 0.0)
        reach_x, reach_y, reach_z = (float(np.max(far * np.abs(u))) for u in (ux, uy, uz))
        return reach_x, reach_y, reach_z
