"""Exact samples of |psi|^2: independent positions, each with the sign or phase of psi there.

Every kind of state is a weighted sum of one-centre orbitals (:attr:`State.centres`), and each
orbital a sum of real basis functions phi_k = R_nl(r) S_lm(direction) with coefficients b_k.
Over all centres and terms, with a_k = |weight| |b_k| and W = sum a_k, the Cauchy-Schwarz
inequality bounds the density by a mixture of the terms' own densities:

    |psi|^2 = |sum_k c_k phi_k|^2 <= (sum_k a_k |phi_k|)^2 <= W sum_k a_k |phi_k|^2 = W^2 h,

with h = sum_k (a_k / W) |phi_k|^2 a normalised density. So a point drawn from h (pick a term
with probability a_k / W, draw from |phi_k|^2) and kept with probability |psi|^2 / (W^2 h) is
an exact sample of |psi|^2 (rejection sampling; von Neumann 1951). A single real term is kept
always. Each term is drawn exactly too: the radius by inverting the radial cumulative
distribution r^2 R_nl^2 (tabulated finely, closed form or numerical), the direction by
rejection from uniform directions against the bound |S_lm|^2 <= (2l + 1) / (4 pi) (Unsold's
theorem). Work is done in chunks, so memory stays bounded for any number of points.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from orbviz.errors import ParameterError
from orbviz.states.angular import solid_harmonic_real
from orbviz.states.state import State

__all__ = ["MAX_POINTS", "Points", "sample"]

MAX_POINTS = 10_000_000  # 10^7 points: 160 MB of positions and phases, a few seconds
_CHUNK = 250_000  # candidates drawn at a time
_TABLE = 1 << 15  # points of a radial cumulative table


@dataclass(frozen=True)
class Points:
    """Sampled positions of the electron.

    Attributes
    ----------
    positions : (N, 3) ndarray of float32
        Positions in bohr (the state's frame: the nucleus, or a bond's midpoint, at the origin).
    phase : (N,) ndarray of float32
        The sign of psi at each point (+1 or -1) for a real state, else the phase angle of psi
        in radians (-pi to pi).
    real : bool
        Whether ``phase`` holds signs.
    label : str
        The state's label.
    acceptance : float
        Share of candidate points kept (1 for a single real term).
    notes : list of str
        Remarks for the user.
    """

    positions: np.ndarray
    phase: np.ndarray
    real: bool
    label: str
    acceptance: float = 1.0
    notes: list[str] = field(default_factory=list)

    def __len__(self) -> int:
        return len(self.positions)

    def __repr__(self) -> str:
        kind = "signs" if self.real else "phases"
        return f"Points({self.label}: {len(self):,} positions in bohr, with {kind})"


@dataclass(frozen=True)
class _Term:
    """One basis function of one centre: R_nl(r) S_lm(direction) about (0, 0, z)."""

    z: float
    weight: float  # a_k = |centre weight| |b_k|
    orbital: object
    n: int
    l: int
    m: int


def _terms(state: State) -> list[_Term]:
    out = []
    for centre in state.centres:
        for (n, l, m), b in centre.orbital.basis:
            a = abs(centre.weight) * abs(b)
            if a > 0:
                out.append(_Term(centre.z, a, centre.orbital, n, l, m))
    return out


class _Radial:
    """Inverse of the radial cumulative distribution of r^2 R_nl^2, tabulated finely."""

    def __init__(self, term: _Term) -> None:
        orbital = term.orbital
        r_max = orbital.radial_extent(term.n, term.l, tail=1e-15)  # type: ignore[attr-defined]
        # r = r_max u^2 puts points where the distribution of most states lives (near 0 and at
        # its peaks); the cumulative is integrated by the trapezoid rule in u
        u = np.linspace(0.0, 1.0, _TABLE)
        r = r_max * u * u
        radial = orbital.radial(term.n, term.l, r)  # type: ignore[attr-defined]
        p = r * r * radial * radial * 2.0 * r_max * u
        cumulative = np.concatenate([[0.0], np.cumsum(0.5 * (p[1:] + p[:-1]) * np.diff(u))])
        self.r, self.cumulative = r, cumulative / cumulative[-1]

    def draw(self, rng: np.random.Generator, count: int) -> np.ndarray:
        return np.interp(rng.random(count), self.cumulative, self.r)


def _directions(rng: np.random.Generator, l: int, m: int, count: int) -> np.ndarray:
    """Return unit vectors distributed as S_lm^2 (rejection against (2l + 1) / (4 pi))."""
    out, have = np.empty((count, 3)), 0
    bound = (2 * l + 1) / (4 * math.pi)
    while have < count:
        want = count - have
        draw = max(64, int(want * (1.1 * (2 * l + 1) if l else 1)))
        v = rng.standard_normal((draw, 3))
        v /= np.linalg.norm(v, axis=1, keepdims=True)
        if l:
            s = solid_harmonic_real(l, m, v[:, 0], v[:, 1], v[:, 2])
            v = v[rng.random(draw) * bound < s * s]
        take = v[:want]
        out[have : have + len(take)] = take
        have += len(take)
    return out


def _term_density(term: _Term, x: np.ndarray, y: np.ndarray, z: np.ndarray) -> np.ndarray:
    """|phi_k|^2 at points (the term's own centre)."""
    zc = z - term.z
    r = np.sqrt(x * x + y * y + zc * zc)
    safe = np.where(r > 0, r, 1.0)
    s = solid_harmonic_real(term.l, term.m, x / safe, y / safe, zc / safe)
    radial = term.orbital.radial(term.n, term.l, r)  # type: ignore[attr-defined]
    return (radial * s) ** 2


def sample(state: State, count: int, *, seed: int | None = None) -> Points:
    """Draw ``count`` independent positions distributed exactly as |psi|^2.

    Parameters
    ----------
    state : State
        Any kind of state.
    count : int
        Number of points, 1 to 10^7.
    seed : int, optional
        Seed of numpy's PCG64 generator; the same seed gives the same points.

    Returns
    -------
    Points
        Positions (float32, bohr) with the sign or phase of psi at each.
    """
    if not (isinstance(count, (int, np.integer)) and 1 <= count <= MAX_POINTS):
        raise ParameterError(
            f"points: expected a whole number from 1 to {MAX_POINTS}, got {count!r}"
        )
    rng = np.random.default_rng(seed)
    terms = _terms(state)
    total = sum(t.weight for t in terms)
    chooser = np.array([t.weight for t in terms]) / total
    radials = {(id(t.orbital), t.n, t.l): _Radial(t) for t in terms}
    single = len(terms) == 1 and state.is_real
    positions = np.empty((count, 3), dtype=np.float32)
    phase = np.empty(count, dtype=np.float32)
    have, drawn, accepted = 0, 0, 0
    while have < count:
        want = min(_CHUNK, count - have)
        size = want if single else min(_CHUNK, int(want * min(total * total, 50.0) * 1.1) + 64)
        picks = rng.choice(len(terms), size=size, p=chooser)
        points = np.empty((size, 3))
        for k, term in enumerate(terms):
            mine = np.flatnonzero(picks == k)
            if not len(mine):
                continue
            radius = radials[(id(term.orbital), term.n, term.l)].draw(rng, len(mine))
            points[mine] = _directions(rng, term.l, term.m, len(mine)) * radius[:, None]
            points[mine, 2] += term.z
        x, y, z = points[:, 0], points[:, 1], points[:, 2]
        psi = state.psi(x, y, z, dtype=np.float64)
        drawn += size
        if not single:
            density = np.abs(psi) ** 2
            envelope = sum(t.weight * _term_density(t, x, y, z) for t in terms) * total
            keep = rng.random(size) * envelope < density
            points, psi = points[keep], psi[keep]
        accepted += len(points)
        take = min(len(points), count - have)
        positions[have : have + take] = points[:take]
        phase[have : have + take] = np.sign(psi[:take]) if state.is_real else np.angle(psi[:take])
        have += take
    if state.is_real:
        phase[phase == 0] = 1.0  # exactly on a node (probability zero): counted as +
    return Points(positions, phase, state.is_real, state.label, acceptance=accepted / drawn)
