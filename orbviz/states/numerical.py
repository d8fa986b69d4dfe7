"""Bound states of the radial equation for any central potential, solved numerically.

-u''/2 + [V(r) + l(l+1)/(2 r^2)] u = E u,  u = r R(r).

Method: on x = ln r, with u = e^{x/2} phi, the equation becomes
phi'' = [(l + 1/2)^2 + 2 r^2 (V - E)] phi, whose solutions are smooth in x. The log grid is
dense where the wavefunction varies fast (near the nucleus) and sparse far out. Numerov's
three-point formula, (phi_{i+1} - 2 phi_i + phi_{i-1}) / h^2 = (g_{i+1} phi_{i+1} + 10 g_i phi_i
+ g_{i-1} phi_{i-1}) / 12, is O(h^4) and, with g linear in E, a sparse generalised
eigenproblem (the "matrix Numerov" form) whose levels near a guess come from shift-invert
Arnoldi. Each state is solved on three nested grids (h, h/2 and 2h): the first two are
Richardson-extrapolated (O(h^6)), and the difference from the extrapolation of the coarser
pair is the error estimate reported with the energy.

The innermost radius depends on l: phi falls like r^(l + 1/2) towards the nucleus, so the wall
at r_min perturbs the level by about r_min^(2l + 1) (1e-12 bohr for s states, 1e-8 for p, 1e-5
beyond). Measured against hydrogen (tests/test_numerical.py, benchmarks/bench_radial.py):
energies to 2e-10 relative or better and <r> to 1e-7 bohr for every state up to n = 12, in
0.05-0.2 s a state.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from orbviz.errors import NoBoundState, ParameterError
from orbviz.states.potentials import Potential
from orbviz.states.radial import check_quantum_numbers

__all__ = ["RadialSolution", "solve_radial"]


@dataclass(frozen=True)
class RadialSolution:
    """One bound state.

    Attributes
    ----------
    n, l : int
        Labels: l the angular momentum, n - l - 1 the number of radial nodes.
    energy : float
        Eigenvalue in hartree (Richardson-extrapolated from two grids).
    r : (N,) ndarray
        Radii in bohr (log-spaced).
    R : (N,) ndarray
        Normalised radial function (integral of R^2 r^2 dr = 1), positive near the origin.
    nodes : int
        Sign changes of R counted on the grid.
    error : float
        Estimated error of the energy, hartree: the difference between the extrapolation from
        the two finer grids and that from the two coarser ones (an upper estimate).
    """

    n: int
    l: int
    energy: float
    r: np.ndarray
    R: np.ndarray
    nodes: int
    error: float = 0.0

    def expectation(self, power: float) -> float:
        """<r^power> by the trapezoid rule in ln r (uniform there, so close to spectral)."""
        h = math.log(self.r[1] / self.r[0])
        return float(h * np.sum(self.R**2 * self.r ** (3 + power)))

    def node_radii(self) -> np.ndarray:
        """Radii (bohr) where R changes sign.

        Each node is a root of a degree-7 spline of the extrapolated R in ln r (interpolation
        error O(h^8), below the function's own), polished by Brent's method.
        """
        return _roots(self.r, self.R)

    def radial(self, r: np.ndarray) -> np.ndarray:
        """R at any radii (cubic interpolation in ln r; zero beyond the grid)."""
        from scipy.interpolate import CubicSpline

        spline = CubicSpline(np.log(self.r), self.R)
        r = np.asarray(r, dtype=np.float64)
        out = np.zeros_like(r)
        inside = (r >= self.r[0]) & (r <= self.r[-1])
        out[inside] = spline(np.log(r[inside]))
        small = r < self.r[0]  # R ~ r^l near the origin
        out[small] = self.R[0] * (r[small] / self.r[0]) ** self.l
        return out


def _roots(r: np.ndarray, R: np.ndarray) -> np.ndarray:
    """Return the sign changes of R as roots of a degree-7 spline of 16 points around each."""
    from scipy.interpolate import make_interp_spline
    from scipy.optimize import brentq

    x = np.log(r)
    big = np.flatnonzero(np.abs(R) > 1e-10 * np.abs(R).max())
    v = R[big]
    roots = []
    for j in np.flatnonzero(np.sign(v[1:]) != np.sign(v[:-1])):
        i = int(big[j])
        lo, hi = max(i - 7, 0), min(i + 9, x.size)
        spline = make_interp_spline(x[lo:hi], R[lo:hi], k=min(7, hi - lo - 1))
        roots.append(brentq(spline, x[i], x[int(big[j + 1])], xtol=1e-14))
    return np.exp(np.asarray(roots, dtype=np.float64))


def _pencil(potential: Potential, l: int, x: np.ndarray) -> tuple[Any, Any, np.ndarray, float]:
    """Sparse L and M of L phi = E M phi on the uniform x = ln r grid (matrix Numerov)."""
    from scipy import sparse

    sub_l, main_l, sup_l, sub_m, main_m, sup_m = _bands(potential, l, x)
    L = sparse.diags([sub_l, main_l, sup_l], [-1, 0, 1], format="csc")
    M = sparse.diags([sub_m, main_m, sup_m], [-1, 0, 1], format="csc")
    return L, M, np.exp(x), float(x[1] - x[0])


def _nodes(values: np.ndarray) -> int:
    significant = np.abs(values) > 1e-10 * np.abs(values).max()
    signs = np.sign(values[significant])
    return int(np.count_nonzero(signs[1:] != signs[:-1]))


def _state(
    potential: Potential, l: int, k: int, x: np.ndarray, shift: float
) -> tuple[float, np.ndarray, np.ndarray]:
    """Find the eigenpair with k radial nodes by shift-invert Arnoldi near ``shift``.

    Returns the level, the radii and u = r R, normalised and positive near the nucleus.
    """
    from scipy.sparse.linalg import ArpackNoConvergence, eigs

    L, M, r, h = _pencil(potential, l, x)
    count = min(4, x.size - 3)
    try:
        values, vectors = eigs(L, k=count, M=M, sigma=shift, which="LM", tol=1e-14)
    except ArpackNoConvergence:  # a level far outside what the grid resolves (73s in a table)
        raise NoBoundState(
            f"the solver finds no level with {k} radial nodes near {shift:.4g} hartree "
            "(its eigenvalue search did not converge)"
        ) from None
    pairs = sorted(zip(values.real, vectors.T.real, strict=True), key=lambda p: p[0])
    for value, phi in pairs:
        u = phi * np.sqrt(r)  # u = e^{x/2} phi
        if _nodes(u) == k:
            norm = math.sqrt(h * float(np.sum(r * u * u)))  # int u^2 dr = int u^2 r dx
            lead = u[np.argmax(np.abs(u) > 1e-6 * np.abs(u).max())]
            return float(value), r, u / norm * (1.0 if lead > 0 else -1.0)
    raise NoBoundState(f"the solver finds no level with {k} radial nodes near {shift:.4g} hartree")


def _bands(potential: Potential, l: int, x: np.ndarray) -> tuple[np.ndarray, ...]:
    """Return the three diagonals of L and of M (sub, main, super) of the Numerov pencil."""
    h = float(x[1] - x[0])
    r = np.exp(x)
    q = (l + 0.5) ** 2 + 2.0 * r * r * potential(r)
    main_l = 0.5 * (2.0 / h**2 + 10.0 * q / 12.0)
    sub_l = 0.5 * (-1.0 / h**2 + q[:-1] / 12.0)  # row i + 1, column i
    sup_l = 0.5 * (-1.0 / h**2 + q[1:] / 12.0)  # row i, column i + 1
    w = r * r
    return sub_l, main_l, sup_l, w[:-1] / 12.0, 10.0 * w / 12.0, w[1:] / 12.0


def _refine(
    potential: Potential, l: int, x: np.ndarray, energy: float, guess: np.ndarray
) -> tuple[float, np.ndarray]:
    """Polish a level on a finer grid by Rayleigh-quotient inverse iteration (banded solves).

    ``guess`` is the coarser grid's phi interpolated onto ``x``; each step solves
    (L - E M) y = M phi, O(N), and the quotient converges quadratically.
    """
    from scipy.linalg import solve_banded

    sub_l, main_l, sup_l, sub_m, main_m, sup_m = _bands(potential, l, x)

    def times(sub: np.ndarray, main: np.ndarray, sup: np.ndarray, v: np.ndarray) -> np.ndarray:
        out = main * v
        out[1:] += sub * v[:-1]
        out[:-1] += sup * v[1:]
        return out

    phi = guess / np.linalg.norm(guess)
    for _ in range(12):
        bands = np.zeros((3, x.size))
        bands[0, 1:] = sup_l - energy * sup_m
        bands[1] = main_l - energy * main_m
        bands[2, :-1] = sub_l - energy * sub_m
        y = solve_banded((1, 1), bands, times(sub_m, main_m, sup_m, phi))
        phi = y / np.linalg.norm(y)
        lphi, mphi = times(sub_l, main_l, sup_l, phi), times(sub_m, main_m, sup_m, phi)
        new = float(phi @ lphi / (phi @ mphi))
        if abs(new - energy) <= 1e-15 * max(abs(new), 1e-300):
            energy = new
            break
        energy = new
    return energy, phi


def _estimate(potential: Potential, l: int, k: int, r_max: float) -> float:
    """Estimate the level roughly (a shift for _state): coarse grid, symmetric form, r >= 1e-3."""
    from scipy.linalg import eigh_tridiagonal

    x = np.linspace(math.log(1e-3), math.log(r_max), 600)
    h = x[1] - x[0]
    r = np.exp(x)
    main = (1.0 / h**2 + 0.5 * (l + 0.5) ** 2 + r * r * potential(r)) / (r * r)
    off = -0.5 / h**2 / (r[:-1] * r[1:])
    values = eigh_tridiagonal(main, off, eigvals_only=True, select="i", select_range=(0, k))
    return float(values[k])


def _inner(l: int) -> float:
    """Return the innermost radius for angular momentum l (its wall moves E by ~r^(2l+1))."""
    return (1e-12, 1e-8)[l] if l < 2 else 1e-5


def _nested(
    potential: Potential, n: int, l: int, span: tuple[float, float], points: int, shift: float
) -> tuple[list[float], list[np.ndarray]]:
    """Solve one level on the three nested grids; return its energies and R on each."""
    inner, outer = span
    k = n - l - 1
    energies, functions = [], []
    previous = None
    for m in ((points + 1) // 2, points, 2 * points - 1):  # nested grids
        x = np.linspace(math.log(inner), math.log(outer), m)
        r = np.exp(x)
        if previous is None:  # the coarse grid: Arnoldi, which picks the level by its nodes
            try:
                value, r, u = _state(potential, l, k, x, shift)
            except NoBoundState as error:
                raise NoBoundState(
                    f"no bound state with n={n}, l={l} found in {potential.describe()}: "
                    f"{error} (the state may be unbound, or too small or too large for the "
                    "solver's grid)"
                ) from None
        else:  # finer grids: start from the coarser one, polish by inverse iteration
            px, pphi = previous
            value, phi = _refine(potential, l, x, energies[-1], np.interp(x, px, pphi))
            u = phi * np.sqrt(r)
            h = float(x[1] - x[0])
            u = u / math.sqrt(h * float(np.sum(r * u * u)))
            lead = u[np.argmax(np.abs(u) > 1e-6 * np.abs(u).max())]
            u = u if lead > 0 else -u
            if _nodes(u) != k:  # drifted to a neighbouring level: Arnoldi on this grid too
                value, r, u = _state(potential, l, k, x, shift)
        previous = (x, u / np.sqrt(r))
        energies.append(value)
        functions.append(u / r)
    return energies, functions


def solve_radial(
    potential: Potential,
    n: int,
    l: int,
    *,
    points: int = 2001,
    r_min: float | None = None,
    r_max: float | None = None,
) -> RadialSolution:
    """Solve for the bound state with n - l - 1 radial nodes and angular momentum l.

    Parameters
    ----------
    potential : Potential
        V(r) in hartree.
    n, l : int
        ``0 <= l < n``; the state is the (n - l)-th lowest of that l.
    points : int, default: 2001
        Grid points of the middle grid (made odd); the fine one has 2 points - 1 and the coarse
        one (points + 1) / 2. Energy and function are Richardson-extrapolated from the middle
        and fine grids; the coarse grid gives the error estimate.
    r_min : float, optional
        Smallest radius, bohr (default 1e-12 for s, 1e-8 for p, 1e-5 beyond).
    r_max : float, optional
        Largest radius, bohr; by default 40 n^2 bohr, doubled until the state has decayed to
        1e-9 of its peak at the outer end.

    Raises
    ------
    NoBoundState
        If that state lies at or above the potential's value at infinity.
    """
    n, l, _ = check_quantum_numbers(n, l)
    if points < 200:
        raise ParameterError(f"need at least 200 grid points, got {points}")
    points |= 1  # odd, so that the coarse grid is every other middle point
    k = n - l - 1
    inner = _inner(l) if r_min is None else float(r_min)
    outer = 40.0 * n * n if r_max is None else float(r_max)
    for _ in range(8):
        guess = _estimate(potential, l, k, outer)
        shift = guess - 0.05 * max(abs(guess), 1e-3)  # just below: the nearest level is ours
        energies, functions = _nested(potential, n, l, (inner, outer), points, shift)
        r = np.exp(np.linspace(math.log(inner), math.log(outer), points))
        R = (16.0 * functions[2][::2] - functions[1]) / 15.0  # Richardson: O(h^6)
        if (
            r_max is not None
            or abs(R[-1] * r[-1]) < 1e-9 * np.abs(R * r).max()
            or math.isinf(potential.limit)
        ):
            break
        outer *= 2.0
    energy = (16.0 * energies[2] - energies[1]) / 15.0
    coarser = (16.0 * energies[1] - energies[0]) / 15.0
    if energy >= potential.limit:
        raise NoBoundState(
            f"no bound state with n={n}, l={l} in {potential.describe()}: its level "
            f"{energy:.6g} hartree is not below the threshold {potential.limit:g}"
        )
    nodes = _nodes(R)
    estimate = max(abs(energy - coarser), 1e-11 * abs(energy))  # the wall, rounding: ~1e-11
    return RadialSolution(n, l, float(energy), r, R, nodes, estimate)


LEVEL_MARGIN = 10.0  # levels within this many times their summed error estimates are one


def same_level(a: float, a_error: float, b: float, b_error: float) -> bool:
    """Tell whether two energies are one level.

    They are if they differ by at most LEVEL_MARGIN times their summed error estimates, or by
    1e-12 relative (rounding).
    """
    return abs(a - b) <= LEVEL_MARGIN * (a_error + b_error) + 1e-12 * abs(a)


L_WINDOW = 40  # angular momenta scanned for a level's other members: 0 to l + 40


def level_members(potential: Potential, state: RadialSolution) -> list[tuple[int, int]]:
    """Return every (n, l) whose level coincides with ``state``'s within the error estimates.

    For each angular momentum l' from 0 upwards the level nearest the state's energy is solved
    (its node count taken from a coarse estimate of the whole spectrum);
    it coincides if the two differ by at most LEVEL_MARGIN times their summed error estimates
    (or 1e-12 relative). The scan stops where
    the lowest level of l' lies above the state's energy (the centrifugal barrier only raises
    levels with l'), or at l + L_WINDOW.
    """
    from scipy.linalg import eigh_tridiagonal

    members = []
    outer = float(state.r[-1])
    for l in range(0, state.l + L_WINDOW + 1):
        x = np.linspace(math.log(1e-3), math.log(outer), 800)
        h = x[1] - x[0]
        r = np.exp(x)
        main = (1.0 / h**2 + 0.5 * (l + 0.5) ** 2 + r * r * potential(r)) / (r * r)
        off = -0.5 / h**2 / (r[:-1] * r[1:])
        rough = eigh_tridiagonal(main, off, eigvals_only=True, select="i", select_range=(0, 60))
        if rough[0] > state.energy + 0.05 * abs(state.energy) + 1e-9:
            break
        k = int(np.argmin(np.abs(rough - state.energy)))
        if l == state.l and k == state.n - state.l - 1:
            members.append((state.n, state.l))
            continue
        try:
            other = solve_radial(potential, l + k + 1, l)
        except NoBoundState:
            continue
        if same_level(state.energy, state.error, other.energy, other.error):
            members.append((other.n, other.l))
    return sorted(set(members))
