"""Levels of a one-centre superposition: exact along each ray, linear across its cell of directions.

About one centre psi is a sum over shells R_nl(r) S_l(direction), so on a fan of rays it is a
matrix product: the shells' angular parts on the directions times their radial functions.

* **Along a ray** the density F = |psi|^2 is sampled on a square-root map of radius, and each
  radial cell is integrated on the cubic through its four nearest samples (fourth order); the part
  of a cell above the level ends where that cubic crosses it.
* **Across a ray's cell of directions** (midpoints of equal steps in polar angle and azimuth) F is
  taken to vary linearly, with half-ranges a and b from central differences to the neighbouring
  rays. The cell's mass above c is then E[F 1(F >= c)] for F = F0 + U1 + U2, with U1 and U2
  uniform on [-a, a] and [-b, b]: a closed form (:func:`cell_mass`). This model is second order
  in the angular step, smoothly so even where a ray grazes the surface, so two fans of rays are
  extrapolated to zero step (Richardson), where a sharp cut on each ray would leave errors that
  shrink only as the step to the power 1.5.

Against brute-force sums from scipy (tests/test_mixture_levels.py) the extrapolated enclosed
probability is within 1e-5; the 50-term superposition of bench_mixture.py agrees with a fan four
times as fine to 1e-7 (measured, 2026-12-04).
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from orbviz._defaults import DEFAULTS
from orbviz.errors import ParameterError
from orbviz.levels.cell_model import mass_above
from orbviz.levels.fields import field_parity
from orbviz.levels.rays import azimuth_range
from orbviz.levels.shell import unit_vectors
from orbviz.states.state import State
from orbviz.states.symmetry import symmetry_frame

__all__ = ["RayCellLevels", "RayCellQuadrature"]

# Base fan: polar rings per unit of l + 1 (at least _MIN_RINGS), azimuths twice as many, and the
# radial nodes (base + per unit of n) on the square-root map. Rays about an axis of symmetry need
# one azimuth, and get _AXIAL times the rings. Measured, 2026-12-04: extrapolated from the base
# fan and one twice as fine, within 2e-6 of a fan four times as fine for the test mixtures.
_PER_LOBE, _MIN_RINGS, _AXIAL = 6, 48, 4
_RADIAL = (120, 24)
# the finest fan's samples at most: 11 times the 50-term mixture of bench_mixture.py (9.1e6),
# about 30 s and 0.5 GB of kept cells (measured, 2026-12-04)
_MAX_SAMPLES = 100_000_000
_WINDOW = 0.4  # half-width in log density of the first window about the scout's level
_NARROW = 0.05  # half-width of the window of the finer fans, about the base fan's level


@dataclass(frozen=True)
class _Fan:
    """Ray directions: rings of equal polar steps, each with equal azimuth steps.

    Mirror planes of |psi|^2 shrink the range (z = 0: the northern rings only; x = 0 and y = 0:
    part of the azimuths), at the same steps, with the solid angles multiplied to match.
    """

    polar: np.ndarray
    azimuth: np.ndarray
    solid: np.ndarray  # solid angle each ray of a ring stands for (mirror images included)
    equator_mirror: bool  # the last ring's neighbour across z = 0 is its own image
    azimuth_ends: str  # "wrap" (a full circle), "mirror" (mirror planes) or "one"


def _fan(rings: int, axial: bool, mirror: tuple[bool, bool, bool]) -> _Fan:
    """Return the fan of ``rings`` polar steps over the sphere, cut down by its mirror planes."""
    d_polar = math.pi / rings
    polar = (np.arange(rings // 2 if mirror[2] else rings) + 0.5) * d_polar
    copies = 2.0 if mirror[2] else 1.0
    azimuth: np.ndarray
    if axial:
        azimuth, d_azimuth, ends = np.zeros(1), 2 * math.pi, "one"
    else:
        low, high = azimuth_range(mirror)
        d_azimuth = math.pi / rings
        count = round((high - low) / d_azimuth)
        azimuth = low + (np.arange(count) + 0.5) * d_azimuth
        copies *= 2 * math.pi / (high - low)
        ends = "mirror" if mirror[0] or mirror[1] else "wrap"
    solid = np.sin(polar) * d_polar * d_azimuth * copies
    return _Fan(polar, azimuth, solid, mirror[2], ends)


class _Rays:
    """psi of a one-centre state on rays of a fan, at radii u^2 r_max (u from -h to 1 + 2h)."""

    def __init__(self, state: State, radii: int, r_max: float) -> None:
        centre = state.centres[0]
        self.orbital, self.weight = centre.orbital, abs(centre.weight) ** 2
        self.shells = sorted(set(self.orbital.shells))
        self.frame = symmetry_frame(state.centres, is_real=state.is_real)
        parity = (0, 0, 0) if self.frame is not None else field_parity(state)
        self.mirror = (parity[0] != 0, parity[1] != 0, parity[2] != 0)
        self.h = 1.0 / radii
        self.u = np.arange(-1, radii + 2) * self.h  # one ghost inside r = 0, two beyond r_max
        self.r_max = r_max
        r = r_max * self.u * self.u
        self.radial = np.stack([self.orbital.radial(n, l, r) for n, l in self.shells])
        self.radial = self.radial.astype(np.float32)
        self.jacobian = 2.0 * r_max**3 * self.u**5  # r^2 dr/du, odd in u like the ghost's

    def density(self, polar: np.ndarray, azimuth: np.ndarray) -> np.ndarray:
        """|psi|^2 on the rays (every polar by every azimuth), shape (polar, azimuth, radii)."""
        t = np.repeat(np.cos(polar), azimuth.size)
        x, y, z = unit_vectors(t, np.tile(azimuth, polar.size))
        if self.frame is not None:
            x, y, z = self.frame @ np.stack([x, y, z])
        angular = self.orbital.shell_angular(x, y, z)
        parts = np.stack([np.broadcast_to(angular[s], x.shape) for s in self.shells], axis=1)
        if np.iscomplexobj(parts):
            real = parts.real.astype(np.float32) @ self.radial
            imag = parts.imag.astype(np.float32) @ self.radial
            dens = real * real + imag * imag
        else:
            psi = parts.astype(np.float32) @ self.radial
            dens = psi * psi
        dens *= np.float32(self.weight)
        return dens.reshape(polar.size, azimuth.size, self.u.size)


class RayCellQuadrature:
    """P(c) of a one-centre state for levels c in a window, on one fan of rays.

    Parameters
    ----------
    rays : _Rays
        The state on its radial grid.
    rings : int
        Polar rings of the fan (azimuths: twice as many, or one about an axis of symmetry).
    window : (float, float)
        Range of density levels c in which :meth:`above` is exact to the quadrature. Cells wholly
        above it are summed into one lump; only those reaching into it are kept.
    """

    def __init__(self, rays: _Rays, rings: int, window: tuple[float, float]) -> None:
        self.rings, self.window, self.lump = rings, window, 0.0
        fan = self.fan = _fan(rings, rays.frame is not None, rays.mirror)
        self.column_max = np.zeros(rays.u.size, dtype=np.float32)
        kept: list[dict[str, np.ndarray]] = []
        block = max(1, DEFAULTS.ray_block // (4 * fan.azimuth.size * rays.u.size))
        for first in range(0, fan.polar.size, block):
            kept.append(self._block(rays, first, block))
        cells = {k: np.concatenate([part[k] for part in kept], axis=-1) for k in kept[0]}
        order = np.argsort(cells["low"], kind="stable")  # cells below a level: a prefix
        # mass of the cells whole at a level: those from searchsorted(low, level) on
        self.tail = np.concatenate([np.cumsum(cells["mass"][order][::-1])[::-1], [0.0]])
        del cells["mass"]
        self.cells = {k: v[..., order] for k, v in cells.items()}  # about 56 bytes a cell

    def _block(self, rays: _Rays, first: int, block: int) -> dict[str, np.ndarray]:
        """Sample rings first .. first + block - 1 (and a ring either side); keep their cells."""
        fan = self.fan
        rings = fan.polar.size
        lo, hi = max(first - 1, 0), min(first + block + 1, rings)
        dens = rays.density(fan.polar[lo:hi], fan.azimuth)
        own = np.arange(first, min(first + block, rings))
        f = dens[own - lo]
        np.maximum(self.column_max, f.max(axis=(0, 1)), out=self.column_max)
        # half-ranges across a cell: a quarter of the central difference; one-sided at a pole,
        # and across z = 0 the neighbour is the ring's own mirror image
        above, below = np.minimum(own + 1, rings - 1), np.maximum(own - 1, 0)
        span = above - below
        if fan.equator_mirror:
            span[own == rings - 1] = 2
        a = np.abs(dens[above - lo] - dens[below - lo])
        a /= (2 * span).astype(np.float32)[:, None, None]
        if fan.azimuth_ends == "wrap":
            b = np.abs(np.roll(f, -1, axis=1) - np.roll(f, 1, axis=1))
        elif fan.azimuth_ends == "mirror":
            padded = np.pad(f, ((0, 0), (1, 1), (0, 0)), mode="symmetric")
            b = np.abs(padded[:, 2:] - padded[:, :-2])
        else:
            b = np.zeros_like(f)
        b *= np.float32(0.25)
        weight = np.repeat(fan.solid[own], fan.azimuth.size)
        ring = np.repeat(own.astype(np.int32), fan.azimuth.size)
        f, a, b = (x.reshape(-1, rays.u.size) for x in (f, a, b))
        # a radial cell j spans samples j + 1 and j + 2 (sample 0 is the ghost inside r = 0)
        g = f * rays.jacobian.astype(np.float32)  # float32: ~1e-7 of each cell's mass
        mass = g[:, 1:-2] + g[:, 2:-1]
        mass *= np.float32(13.0)
        mass -= g[:, :-3]
        mass -= g[:, 3:]
        mass *= np.float32(rays.h / 24.0)
        # the range of F over a cell: its ends, the angular half-ranges, and a quarter of the
        # larger second difference (a cubic between the samples strays beyond them by ~1/8)
        bend = np.abs(f[:, :-2] - 2 * f[:, 1:-1] + f[:, 2:])
        bend = np.maximum(bend[:, :-1], bend[:, 1:]) * np.float32(0.25)
        reach = a + b
        low = np.minimum(f[:, 1:-2] - reach[:, 1:-2], f[:, 2:-1] - reach[:, 2:-1]) - bend
        high = np.maximum(f[:, 1:-2] + reach[:, 1:-2], f[:, 2:-1] + reach[:, 2:-1]) + bend
        c_low, c_high = self.window
        whole = low >= c_high
        per_ray = np.where(whole, mass, np.float32(0.0)).sum(axis=1, dtype=np.float64)
        self.lump += float(np.dot(per_ray, weight))
        ray, cell = np.nonzero(~whole & (high >= c_low))
        return {
            "f": np.stack([f[ray, cell + k] for k in range(4)]),
            "a": np.stack([a[ray, cell + 1], a[ray, cell + 2]]),
            "b": np.stack([b[ray, cell + 1], b[ray, cell + 2]]),
            "cell": cell.astype(np.int32),
            "ring": ring[ray],
            "mass": mass[ray, cell].astype(np.float64) * weight[ray],
            "low": low[ray, cell],
            "high": high[ray, cell],
        }

    def above(self, level: float, rays: _Rays) -> float:
        """Probability in {|psi|^2 >= level} for a level inside the window."""
        cells = self.cells
        cut = int(np.searchsorted(cells["low"], level, side="right"))
        total = self.lump + float(self.tail[cut])
        part = np.flatnonzero(cells["high"][:cut] >= level)
        if part.size == 0:
            return total
        f, a, b = (cells[k][:, part] for k in ("f", "a", "b"))
        inside = mass_above(f, a, b, rays.u[cells["cell"][part] + 1], rays.h, level)
        weight = self.fan.solid[cells["ring"][part]]
        return total + 2.0 * rays.r_max**3 * rays.h * float(np.dot(inside, weight))

    def reach(self, level: float, rays: _Rays) -> float:
        """Largest radius at which a ray reaches the level, to a fraction of the radial step.

        Between the last sample where some ray reaches it and the next, log of the largest
        density over the rays is interpolated linearly in radius.
        """
        hit = np.flatnonzero(self.column_max >= level)
        if hit.size == 0:
            return 0.0
        last = int(hit[-1])
        r = rays.r_max * rays.u**2
        if last + 1 >= r.size:
            return float(r[-1])
        inner, outer = (math.log(max(float(self.column_max[k]), 1e-300)) for k in (last, last + 1))
        share = (inner - math.log(level)) / (inner - outer) if inner > outer else 0.0
        return float(r[last] + share * (r[last + 1] - r[last]))


def _check_size(state: State, rings: int, axial: bool, radii: int) -> None:
    """Refuse a state whose finest fan would exceed the sample budget (time and memory)."""
    samples = rings * (1 if axial else 2 * rings) * (radii + 3)
    if samples > _MAX_SAMPLES:
        raise ParameterError(
            f"superposition: {state.label} needs {samples:.2g} samples on its finest fan of rays "
            f"(shells up to l = {rings // 2 // _PER_LOBE - 1}); the most is {_MAX_SAMPLES:.0g}, "
            "so use fewer high-l shells"
        )


def _scout(rays: _Rays, fan: _Fan, samples: np.ndarray, fraction: float) -> tuple[float, float]:
    """Rough log level enclosing ``fraction`` and dP/d(log level) there, from a coarse fan.

    The weighted quantile of the ``samples`` of |psi|^2 on the fan (mass |psi|^2 r^2 dr dOmega
    each), and the slope of their cumulative mass across +-0.1 about it.
    """
    dens = samples[:, :, 1:-2].astype(np.float64)
    mass = dens * rays.jacobian[1:-2] * rays.h * fan.solid[:, None, None]
    order = np.argsort(dens, axis=None)[::-1]
    logs = np.log(np.maximum(dens.reshape(-1)[order], 1e-300))
    cumulative = np.cumsum(mass.reshape(-1)[order]) / mass.sum()
    k = min(int(np.searchsorted(cumulative, fraction)), order.size - 1)
    ends = np.interp([logs[k] + 0.1, logs[k] - 0.1], logs[::-1], cumulative[::-1])
    return float(logs[k]), float(min((ends[0] - ends[1]) / 0.2, -1e-6))


class RayCellLevels:
    """The level of a one-centre state: fans of rays extrapolated to zero angular step.

    A coarse scout places the level; the base fan solves it in a window of +-0.4 in log density,
    and the fan twice as fine, in a narrow window about that, extrapolates: the level is solved on
    (4 P_2 - P_1) / 3 and checked by (16 P_2 - 9 P_1.5) / 7, which shares P_2 but not P_1.

    Parameters
    ----------
    state : State
        A state about one centre at the origin.
    fraction : float, optional
        Probability the level should enclose (places the windows).
    log_level : float, optional
        Or the log of a known level.
    """

    def __init__(
        self, state: State, fraction: float | None = None, log_level: float | None = None
    ) -> None:
        shells = state.centres[0].orbital.shells
        lobes = max(l for _, l in shells) + 1
        extent = state.extent()
        radii = _RADIAL[0] + _RADIAL[1] * max(n for n, _ in shells)
        scout = _Rays(state, radii // 2, extent)
        self.base = max(_PER_LOBE * lobes, _MIN_RINGS) * (_AXIAL if scout.frame is not None else 1)
        self.base += -self.base % 4  # so that half and 1.5 times it are whole
        _check_size(state, 2 * self.base, scout.frame is not None, radii)
        self.slope: float | None = None
        coarse = _fan(self.base // 2, scout.frame is not None, scout.mirror)
        samples = scout.density(coarse.polar, coarse.azimuth)
        if log_level is None:
            assert fraction is not None
            log_level, self.slope = _scout(scout, coarse, samples, fraction)
        # the rays end a quarter beyond where every coarse ray lies e^4 below the lowest window
        column = samples.max(axis=(0, 1))
        hit = np.flatnonzero(column >= math.exp(log_level - _WINDOW - 4.0))
        r_max = extent
        if hit.size:
            last = scout.u[min(int(hit[-1]) + 2, radii // 2)]
            r_max = min(1.25 * scout.r_max * last * last, extent)
        self.rays = _Rays(state, radii, r_max)
        self.state, self.log_level = state, log_level
        self._fans: dict[int, RayCellQuadrature] = {}

    def fan(self, rings: int, low: float, high: float) -> RayCellQuadrature:
        """Return the quadrature on ``rings`` whose window holds the log levels [low, high]."""
        fan = self._fans.get(rings)
        if fan is None or not (math.log(fan.window[0]) <= low and high <= math.log(fan.window[1])):
            fan = RayCellQuadrature(self.rays, rings, (math.exp(low), math.exp(high)))
            self._fans[rings] = fan
        return fan

    def extrapolated(self, fine: int, coarse: int, log_level: float) -> float:
        """P at zero angular step from the fans of ``fine`` and ``coarse`` rings (h^2 error)."""
        x, y = (self.base / coarse) ** 2, (self.base / fine) ** 2
        p_fine = self._fans[fine].above(math.exp(log_level), self.rays)
        p_coarse = self._fans[coarse].above(math.exp(log_level), self.rays)
        return float((x * p_fine - y * p_coarse) / (x - y))

    def solve(self, fraction: float) -> float | None:
        """Log level whose extrapolated P is ``fraction``; None if the first window misses it.

        The fans of half the base rings and the base ones, in the first window, give a rough
        extrapolated level; the fine fan's window is centred there, as wide as twice that level's
        distance from the base fan's own (widened if it still misses), and the level is polished
        from the rough one by secant steps.
        """
        half, base, fine = self.base // 2, self.base, 2 * self.base
        window = (self.log_level - _WINDOW, self.log_level + _WINDOW)
        self.fan(half, *window)
        plain = self.fan(base, *window)
        start = None if self.slope is None else (self.log_level, self.slope)
        found = _root(
            lambda x: self.extrapolated(base, half, x) - fraction, window, start, enough=1e-4
        )
        if found is None:
            return None
        rough, slope = found
        shift = (plain.above(math.exp(rough), self.rays) - fraction) / slope
        width = max(_NARROW, 2.0 * abs(shift))
        for _ in range(3):
            window = (rough - width, rough + width)
            self.fan(fine, *window)
            self.fan(base, *window)
            polished = _root(
                lambda x: self.extrapolated(fine, base, x) - fraction, window, (rough, slope)
            )
            if polished is not None:
                return polished[0]
            width *= 3.0
        return None

    def moved(self, fraction: float) -> RayCellLevels:
        """Return the levels about a better guess, when :meth:`solve` found none.

        The guess moves a window's width beyond the end of the first window the level lies past.
        """
        low, high = self.log_level - _WINDOW, self.log_level + _WINDOW
        lower = self.extrapolated(self.base, self.base // 2, low) < fraction
        return RayCellLevels(self.state, log_level=low - _WINDOW if lower else high + _WINDOW)

    def achieved(self, log_level: float) -> float:
        """Probability the level encloses, by the checking extrapolation (1.5 and 2 times)."""
        middle, fine = 3 * self.base // 2, 2 * self.base
        window = (log_level - 0.5 * _NARROW, log_level + 0.5 * _NARROW)
        self.fan(middle, *window)
        self.fan(fine, *window)
        return float(self.extrapolated(fine, middle, log_level))

    def rough_reach(self, level: float) -> float:
        """Largest radius at which a ray of the finest fan built reaches the level (bohr)."""
        if not self._fans:
            self.fan(self.base, math.log(level), math.log(level))
        fan = self._fans[max(self._fans)]
        return fan.reach(level, self.rays)


def _root(
    excess: Callable[[float], float],
    window: tuple[float, float],
    start: tuple[float, float] | None = None,
    enough: float = 1e-10,
) -> tuple[float, float] | None:
    """Root of a decreasing ``excess`` inside a window of log levels, and the slope there.

    From ``start`` (a guess and the slope there) by secant steps while they stay inside the
    window and close in; otherwise, or without a start, by Illinois false position on the
    window. It ends once |excess| < ``enough`` (a probability) or the step is below 1e-10.
    None if the window does not bracket the root.
    """
    tol = 1e-10
    if start is not None:
        x0, slope = start
        f0 = excess(x0)
        if abs(f0) < enough:
            return x0, slope
        for _ in range(8):
            x1 = x0 - f0 / slope
            if not window[0] < x1 < window[1]:
                break
            f1 = excess(x1)
            if abs(x1 - x0) < tol or abs(f1) < enough:
                return x1, slope
            if f1 == f0 or (f1 - f0) / (x1 - x0) >= 0 or abs(f1) >= abs(f0):
                break
            x0, f0, slope = x1, f1, (f1 - f0) / (x1 - x0)
    a, b = window
    fa, fb = excess(a), excess(b)
    if fa < 0 or fb > 0:
        return None
    side = 0
    for _ in range(100):
        x = b - fb * (b - a) / (fb - fa) if fb != fa else 0.5 * (a + b)
        fx = excess(x)
        if abs(b - a) < tol or abs(fx) < enough:
            break
        if fx > 0:
            a, fa = x, fx
            fb, side = (0.5 * fb if side == 1 else fb), 1
        else:
            b, fb = x, fx
            fa, side = (0.5 * fa if side == -1 else fa), -1
    slope = (fb - fa) / (b - a) if b != a else -1.0
    return x, slope if slope < 0 else -1.0
