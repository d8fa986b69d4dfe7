"""Quadrature of any state on rays: a spherical product grid of radii, polar and azimuth.

Used for superpositions of several shells and for states with more than one centre. Mirror
planes halve the range sampled, and an axis of rotational symmetry reduces the azimuths to one.
"""

from __future__ import annotations

import math

import numpy as np

from orbviz._defaults import DEFAULTS
from orbviz.levels.fields import field_parity
from orbviz.levels.logmass import SPAN, LogMass, midpoints
from orbviz.levels.shell import unit_vectors
from orbviz.states.state import State
from orbviz.states.symmetry import symmetry_frame

__all__ = ["RayQuadrature"]


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


def _azimuths(mirror: tuple[bool, ...], count: int) -> tuple[np.ndarray, float, float]:
    """Azimuth midpoints over the range the x and y mirrors leave, their step and the share."""
    a_low, a_high = {
        (True, True): (0.0, 0.5 * math.pi),
        (False, True): (0.0, math.pi),  # y -> -y: azimuth -> -azimuth
        (True, False): (-0.5 * math.pi, 0.5 * math.pi),  # x -> -x: azimuth -> pi - az
        (False, False): (0.0, 2 * math.pi),
    }[(mirror[0], mirror[1])]
    share = (a_high - a_low) / (2 * math.pi)
    a, da = midpoints(int(count * share), a_low, a_high)
    return a, da, share


class RayQuadrature:
    """Any state sampled on rays (product quadrature in r, cos polar and azimuth).

    A density that does not depend on azimuth needs one azimuth, so it gets 16 times the
    polar rays for the same work.
    """

    method = "rays"

    def __init__(self, state: State, refine: int) -> None:
        self.state = state
        centres = state.centres
        shells = [s for c in centres for s in c.orbital.shells]
        off_centre = len(centres) > 1 or centres[0].z != 0.0
        l_top = max(l for _, l in shells) + (2 if off_centre else 0)
        r_max = state.extent()
        u, du = midpoints((300 + 100 * max(n for n, _ in shells)) * refine, 0.0, 1.0)
        self.radii = r = r_max * u * u
        # one centre at the origin: psi is a sum of outer products of shell angular and radial
        self._radial = (
            None if off_centre else {s: centres[0].orbital.radial(*s, r) for s in set(shells)}
        )
        frame = symmetry_frame(centres, is_real=state.is_real)  # None: no axis of symmetry
        mirror = (False,) * 3 if frame is not None else tuple(p != 0 for p in field_parity(state))
        # a mirror plane halves the range sampled, at the same density of rays, mass doubled
        t_low = 0.0 if mirror[2] else -1.0
        polar = DEFAULTS.ray_points * (l_top + 1) * refine * (16 if frame is not None else 1)
        t, dt = midpoints(int(polar * (1.0 - t_low) / 2), t_low, 1.0)
        weight = 2.0 if mirror[2] else 1.0
        if frame is not None:
            a, da = np.zeros(1), 2 * math.pi
        else:
            a, da, share = _azimuths(mirror, 2 * DEFAULTS.ray_points * (l_top + 1) * refine)
            weight /= share
        self._frame, self._periodic = frame, frame is None and not (mirror[0] or mirror[1])
        step = DEFAULTS.log_step / refine
        self.table = LogMass(2.0 * math.log(_bound(state, r)) + 1.0, step, span=SPAN + 20.0)
        self.ring_max = np.empty((t.size, r.size))
        cell = r * r * 2.0 * r_max * u * du * dt * da * weight
        block = max(1, DEFAULTS.ray_block // (a.size * r.size))
        for first in range(0, t.size, block):  # blocks of polar rings, with a one-ring halo
            self._accumulate(t, a, first, block, cell, step)

    def _density(self, x: np.ndarray, y: np.ndarray, z: np.ndarray) -> np.ndarray:
        """|psi|^2 on the rays through the unit vectors (x, y, z), shape (rays, radii)."""
        r = self.radii
        if self._radial is None:
            psi = self.state.psi(np.outer(x, r), np.outer(y, r), np.outer(z, r), dtype=np.float64)
        else:
            angular = self.state.centres[0].orbital.shell_angular(x, y, z)
            psi = np.zeros((x.size, r.size), dtype=np.result_type(*angular.values()))
            for key, ang in angular.items():
                psi += np.outer(ang, self._radial[key])
        return psi * psi if self.state.is_real else np.abs(psi) ** 2

    def _accumulate(
        self, t: np.ndarray, a: np.ndarray, first: int, block: int, cell: np.ndarray, step: float
    ) -> None:
        """Add the rings first .. first + block - 1 to the table (neighbours for the spreads)."""
        lo, hi = max(first - 1, 0), min(first + block + 1, t.size)
        x, y, z = unit_vectors(np.repeat(t[lo:hi], a.size), np.tile(a, hi - lo))
        if self._frame is not None:
            x, y, z = self._frame @ np.stack([x, y, z])
        dens = self._density(x, y, z).reshape(hi - lo, a.size, self.radii.size)
        logs = np.log(np.maximum(dens, np.finfo(np.float64).tiny))
        sq = np.gradient(logs, axis=2) ** 2 + np.gradient(logs, axis=0) ** 2
        if a.size > 1 and self._periodic:
            sq += (0.5 * (np.roll(logs, -1, axis=1) - np.roll(logs, 1, axis=1))) ** 2
        elif a.size > 1:  # a mirrored range: one-sided differences at its ends
            sq += np.gradient(logs, axis=1) ** 2
        own = slice(first - lo, first - lo + min(block, t.size - first))
        dens, logs, sq = dens[own], logs[own], sq[own]
        half = np.clip(0.5 * np.sqrt(sq), 0.5 * step, 8.0)
        centre = logs + np.minimum(half, 1.0) ** 2 / 3.0
        keep = dens > 0
        self.table.add((centre - half)[keep], (centre + half)[keep], (dens * cell)[keep])
        self.ring_max[first : first + dens.shape[0]] = dens.max(axis=1)

    def max_radius(self, level: float) -> float:
        """Largest radius at which any ray reaches the level."""
        hit = (self.ring_max >= level).any(axis=0)
        return float(self.radii[hit].max()) if hit.any() else 0.0
