"""Quadrature of any state on rays: a spherical product grid of radii, polar and azimuth.

Used for states with more than one centre or off the nucleus (bonds): a superposition about the
nucleus uses the fans of :mod:`orbviz.levels.ray_cells`. Mirror planes halve the range sampled,
and an axis of rotational symmetry reduces the azimuths to one.

A quadrature may be restricted to a *window* of log density and a radius: only samples whose
log-density interval reaches into the window are binned, those wholly above it are summed into
one lump, and the rays stop where the density has fallen well below the window. The enclosed
probability P(c) is then exact (to the quadrature) for every level c in the window.
"""

from __future__ import annotations

import math

import numpy as np

from orbviz._defaults import DEFAULTS
from orbviz.levels.fields import field_parity
from orbviz.levels.logmass import MAX_HALF, SPAN, LogMass, midpoints, spread
from orbviz.levels.shell import unit_vectors
from orbviz.states.state import State
from orbviz.states.symmetry import symmetry_frame

__all__ = ["RayLevels", "RayQuadrature", "azimuth_range"]

# Radial nodes at refine 1 over the whole extent (base + per unit of n, on the square-root map)
# and the fewest polar lobes the rings resolve: with these, windowed quadratures at refine 1 and
# 2 extrapolate to within 4e-6 of brute-force sums for the mixtures in the tests, and within
# 2e-5 for single d and f shells forced onto rays (measured, 2026-12-03).
_RADIAL = (400, 130)
_MIN_LOBES = 2
_WINDOW = 1.0  # half-width of the window of log density about the scout's level


def _bound(state: State, r: np.ndarray) -> float:
    """Return an upper bound of |psi| on the rays.

    |psi| <= sum over centres |w| sum over terms |b| max|R_nl| max|S_lm|, with
    max|S_lm| <= sqrt((2l + 1) / 2pi).
    """
    total = 0.0
    for centre in state.centres:
        orbital = centre.orbital
        peak = {(n, l): np.abs(orbital.radial(n, l, r)).max() for n, l in orbital.shells}
        total += abs(centre.weight) * sum(
            peak[(n, l)] * abs(c) * math.sqrt((2 * l + 1) / (2 * math.pi))
            for (n, l, _), c in orbital.basis
        )
    return float(total)


def azimuth_range(mirror: tuple[bool, ...]) -> tuple[float, float]:
    """Range of azimuths the x = 0 and y = 0 mirror planes of |psi|^2 leave to sample."""
    return {
        (True, True): (0.0, 0.5 * math.pi),
        (False, True): (0.0, math.pi),  # y -> -y: azimuth -> -azimuth
        (True, False): (-0.5 * math.pi, 0.5 * math.pi),  # x -> -x: azimuth -> pi - az
        (False, False): (0.0, 2 * math.pi),
    }[(mirror[0], mirror[1])]


def _azimuths(mirror: tuple[bool, ...], count: float) -> tuple[np.ndarray, float, float]:
    """Azimuth midpoints over the range the x and y mirrors leave, their step and the share."""
    a_low, a_high = azimuth_range(mirror)
    share = (a_high - a_low) / (2 * math.pi)
    a, da = midpoints(max(1, round(count * share)), a_low, a_high)
    return a, da, share


def _padded(logs: np.ndarray, halo: tuple[bool, bool], ends: tuple[str, str]) -> np.ndarray:
    """Pad the (rings, azimuths, radii) logs by one on every side for central differences.

    The ring axis comes with its real neighbours where ``halo`` says so; elsewhere each end
    is padded by its kind: "mirror" (a plane of symmetry, or r = 0 on the square-root map: the
    value beyond is the value itself), "wrap" (a full circle of azimuths), "flat" (one azimuth:
    no spread across it) or "open" (a pole or the outer radius: the linear extrapolation, so the
    difference there is the one-sided one). ``ends`` gives the kinds of the ring axis's open
    ends and of the azimuth axis.
    """
    side = ((0, 0), (1, 1), (0, 0))
    if ends[1] == "mirror":
        out = np.pad(logs, side, mode="symmetric")
    elif ends[1] == "wrap":
        out = np.pad(logs, side, mode="wrap")
    else:
        out = np.pad(logs, side, mode="edge")
    out = np.concatenate([out[:, :, :1], out, 2 * out[:, :, -1:] - out[:, :, -2:-1]], axis=2)
    if not halo[0]:
        beyond = out[:1] if ends[0] == "mirror" else 2 * out[:1] - out[1:2]
        out = np.concatenate([beyond, out])
    if not halo[1]:  # the pole t = 1
        out = np.concatenate([out, 2 * out[-1:] - out[-2:-1]])
    return out


class RayQuadrature:
    """Any state sampled on rays (product quadrature in r, polar angle and azimuth).

    Parameters
    ----------
    state : State
        Any kind of state.
    refine : float
        Resolution relative to the base one (samples grow as its cube).
    window : (float, float), optional
        Range of log density in which the table must be right (all of it if omitted).
    r_max : float, optional
        Radius the rays reach (the state's extent if omitted); beyond it the density must lie
        below the window.

    Notes
    -----
    A density that does not depend on azimuth needs one azimuth, so it gets 16 times the
    polar rays for the same work.
    """

    method = "rays"

    def __init__(
        self,
        state: State,
        refine: float,
        window: tuple[float, float] | None = None,
        r_max: float | None = None,
    ) -> None:
        self.state, self.window, self.lump = state, window, 0.0
        rays_per_l = DEFAULTS.ray_points
        centres = state.centres
        shells = [s for c in centres for s in c.orbital.shells]
        off_centre = len(centres) > 1 or centres[0].z != 0.0
        l_top = max(l for _, l in shells) + (2 if off_centre else 0)
        extent = state.extent()
        r_max = extent if r_max is None else min(r_max, extent)
        # the same radial spacing near r_max as on the whole extent (square-root map)
        count = (_RADIAL[0] + _RADIAL[1] * max(n for n, _ in shells)) * math.sqrt(r_max / extent)
        u, du = midpoints(max(16, round(count * refine)), 0.0, 1.0)
        self.radii = r = r_max * u * u
        frame = symmetry_frame(centres, is_real=state.is_real)  # None: no axis of symmetry
        mirror = (False,) * 3 if frame is not None else tuple(p != 0 for p in field_parity(state))
        # a mirror plane halves the range sampled, at the same density of rays, mass doubled;
        # rings equally spaced in polar angle (cells stay square near the poles, where a
        # nodal axis would make equal steps in cos(polar) coarse), from the z = 0 mirror or the
        # south pole up to the north pole
        polar_top = 0.5 * math.pi if mirror[2] else math.pi
        lobes = max(l_top + 1, _MIN_LOBES)
        polar = rays_per_l * lobes * refine * (16 if frame is not None else 1)
        theta, d_theta = midpoints(max(2, round(polar * polar_top / math.pi)), 0.0, polar_top)
        t = np.cos(theta[::-1])
        self._ring_weight = np.sin(theta[::-1]) * d_theta
        weight = 2.0 if mirror[2] else 1.0
        if frame is not None:
            a, da = np.zeros(1), 2 * math.pi
        else:
            a, da, share = _azimuths(mirror, 2 * rays_per_l * lobes * refine)
            weight /= share
        self._frame, self._azimuths = frame, a.size
        # the low end of the rings is the plane z = 0 under a z mirror, else the pole t = -1;
        # a mirrored range of azimuths ends on mirror planes at both ends
        azimuth_ends = "flat" if a.size == 1 else "mirror" if mirror[0] or mirror[1] else "wrap"
        self._ends = ("mirror" if mirror[2] else "open", azimuth_ends)
        self.step = step = DEFAULTS.log_step / refine
        if window is None:
            self.table = LogMass(2.0 * math.log(_bound(state, r)) + 1.0, step, span=SPAN + 20.0)
        else:  # every interval reaching into the window ends below its top + 2 * MAX_HALF + 1
            top = window[1] + 2 * MAX_HALF + 1.0
            self.table = LogMass(top, step, span=top - window[0] + 1.0)
        self.ring_max = np.empty((t.size, r.size))
        cell = r * r * 2.0 * r_max * u * du * da * weight
        block = max(1, DEFAULTS.ray_block // (a.size * r.size))
        for first in range(0, t.size, block):  # blocks of polar rings, with a one-ring halo
            self._accumulate(t, a, first, block, cell)

    def _density(self, x: np.ndarray, y: np.ndarray, z: np.ndarray) -> np.ndarray:
        """|psi|^2 on the rays through the unit vectors (x, y, z), shape (rays, radii), float32."""
        r = self.radii
        psi = self.state.psi(np.outer(x, r), np.outer(y, r), np.outer(z, r), dtype=np.float64)
        dens = psi * psi if self.state.is_real else np.abs(psi) ** 2
        return dens.astype(np.float32)

    def _accumulate(
        self, t: np.ndarray, a: np.ndarray, first: int, block: int, cell: np.ndarray
    ) -> None:
        """Add the rings first .. first + block - 1 to the table (neighbours for the spreads).

        Each sample's log-density interval comes from central differences on all three axes
        and the rule of :func:`orbviz.levels.logmass.spread`, in float32 over the block.
        """
        import numexpr

        lo, hi = max(first - 1, 0), min(first + block + 1, t.size)
        x, y, z = unit_vectors(np.repeat(t[lo:hi], a.size), np.tile(a, hi - lo))
        if self._frame is not None:
            x, y, z = self._frame @ np.stack([x, y, z])
        dens = self._density(x, y, z).reshape(hi - lo, a.size, self.radii.size)
        f32 = np.float32
        tiny = f32(np.finfo(np.float32).tiny)
        logs = numexpr.evaluate(
            "log(where(d > tiny, d, tiny))", local_dict={"d": dens, "tiny": tiny}
        )
        p = _padded(logs, (lo < first, hi > first + block), self._ends)
        own = min(block, t.size - first)
        dens = dens[first - lo : first - lo + own]
        self.ring_max[first : first + own] = dens.max(axis=1)
        # own rings start at 1 in the padded array, after a real or an extrapolated halo
        mid = p[1 : own + 1, 1:-1, 1:-1]
        h = np.square(p[2 : own + 2, 1:-1, 1:-1] - p[0:own, 1:-1, 1:-1])
        for ahead, behind in (
            (p[1 : own + 1, 2:, 1:-1], p[1 : own + 1, :-2, 1:-1]),
            (p[1 : own + 1, 1:-1, 2:], p[1 : own + 1, 1:-1, :-2]),
        ):
            h += np.square(ahead - behind)
        np.sqrt(h, out=h)
        h *= f32(0.25)  # half of the central difference, as a half-width
        low, high = spread(mid, h, self.step)
        flat = dens.reshape(-1)
        if self.window is None:
            keep = np.flatnonzero(flat > 0)
        else:
            above = np.flatnonzero(low >= self.window[1])
            self.lump += float(np.dot(flat[above], self._cell(above, first, cell)))
            keep = np.flatnonzero((high > self.window[0] - 1.0) & (low < self.window[1]))
        mass = flat[keep] * self._cell(keep, first, cell)
        self.table.add(
            low.reshape(-1)[keep].astype(np.float64),
            high.reshape(-1)[keep].astype(np.float64),
            mass,
        )

    def _cell(self, index: np.ndarray, first: int, cell: np.ndarray) -> np.ndarray:
        """Volume of the cells at flat ``index`` into a block of rings starting at ``first``."""
        per_ring = self._azimuths * cell.size
        return cell[index % cell.size] * self._ring_weight[first + index // per_ring]

    def above(self, log_levels: np.ndarray) -> np.ndarray:
        """Probability with log density >= each level (within the window, if it has one)."""
        return self.table.above(log_levels) + self.lump

    def max_radius(self, level: float) -> float:
        """Largest radius at which any ray reaches the level."""
        hit = (self.ring_max >= level).any(axis=0)
        return float(self.radii[hit].max()) if hit.any() else 0.0


class RayLevels:
    """Windowed ray quadratures about one level, extrapolated to zero spacing (Richardson).

    A scout quadrature at half the base resolution places a window of log density about the
    level and the radius the rays must reach; quadratures at refine 1, 1.5 and 2 are then built
    on demand. Their error falls as the square of the spacing, so the level is solved on the
    Richardson extrapolation (4 P_2 - P_1) / 3 and checked by (16 P_2 - 9 P_1.5) / 7, a second
    extrapolation that shares P_2 but not P_1 (both within 4e-6 of brute-force sums for the
    mixtures in the tests; up to 2e-5 for single d and f shells forced onto rays).

    Parameters
    ----------
    state : State
        Any kind of state.
    fraction : float, optional
        Probability the level should enclose (places the window).
    log_level : float, optional
        Or the log of a known level.
    """

    def __init__(
        self,
        state: State,
        fraction: float | None = None,
        log_level: float | None = None,
        scout: RayQuadrature | None = None,
    ) -> None:
        self.state = state
        self.scout = scout or RayQuadrature(state, 0.5)
        if log_level is None:
            assert fraction is not None
            log_level = self.scout.table.level_above(fraction)
        self.window = (log_level - _WINDOW, log_level + _WINDOW)
        # beyond this radius every scout ray lies e^6 below the window
        self.r_max = 1.1 * self.scout.max_radius(math.exp(self.window[0] - 6.0))
        self._tables: dict[float, RayQuadrature] = {}

    def quadrature(self, refine: float) -> RayQuadrature:
        """Return the windowed quadrature at ``refine`` (built once)."""
        if refine not in self._tables:
            self._tables[refine] = RayQuadrature(self.state, refine, self.window, self.r_max)
        return self._tables[refine]

    def extrapolated(self, refines: tuple[float, ...], log_levels: np.ndarray) -> np.ndarray:
        """P at zero spacing: the polynomial in h^2 through the refinements' P, at h = 0."""
        squares = [1.0 / (k * k) for k in refines]
        total = np.zeros(np.shape(log_levels))
        for i, (k, x) in enumerate(zip(refines, squares, strict=True)):
            weight = math.prod(y / (y - x) for j, y in enumerate(squares) if j != i)
            total += weight * self.quadrature(k).above(log_levels)
        return total

    def solve(self, fraction: float) -> float | None:
        """Log level whose extrapolated P is ``fraction``; None if the window misses it."""
        logs = np.linspace(*self.window, 4001)
        p = self.extrapolated((1.0, 2.0), logs)
        inside = np.flatnonzero(p >= fraction)
        if inside.size == 0 or inside[-1] == logs.size - 1 or p[0] < fraction:
            return None
        i = int(inside[-1])  # P falls through the fraction between logs[i] and logs[i + 1]
        return float(np.interp(fraction, [p[i + 1], p[i]], [logs[i + 1], logs[i]]))

    def moved(self, fraction: float) -> RayLevels:
        """Return the quadratures about a better guess, when :meth:`solve` found no level.

        The finer windowed table, with the mass above the window added back, places the level;
        it is kept at least a window's width beyond the side the extrapolation points to.
        """
        fine = self.quadrature(2.0)
        ends = self.extrapolated((1.0, 2.0), np.array(self.window))
        guess = fine.table.level_above(min(max(fraction - fine.lump, 0.0), 1.0))
        if ends[0] < fraction:  # even the window's bottom encloses too little: go lower
            guess = min(guess, self.window[0] - _WINDOW)
        else:  # its top encloses too much: go higher
            guess = max(guess, self.window[1] + _WINDOW)
        return RayLevels(self.state, log_level=guess, scout=self.scout)

    def rough_reach(self, level: float) -> float:
        """Largest radius at which a ray of the finest quadrature reaches the level (bohr)."""
        return self.quadrature(2.0).max_radius(level)

    def achieved(self, log_level: float) -> float:
        """Probability the level encloses, by the checking extrapolation."""
        return float(self.extrapolated((1.5, 2.0), np.array([log_level]))[0])
