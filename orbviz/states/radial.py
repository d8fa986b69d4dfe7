"""Normalised hydrogen-like radial functions R_nl(r; Z), energies, expectation values and nodes.

Everything is in atomic units: r in bohr, energies in hartree. ``Z`` here is the charge that sets
the length scale; a reduced-mass correction enters as ``Z * mass_ratio`` (see
:class:`orbviz.states.orbital.Orbital`).
"""

from __future__ import annotations

import functools
import math

import numpy as np
import numpy.typing as npt

from orbviz._defaults import LIMITS
from orbviz.errors import ParameterError, QuantumNumberError

__all__ = [
    "check_quantum_numbers",
    "energy_hartree",
    "expectation_r",
    "laguerre",
    "log_norm",
    "most_probable_radius",
    "radial_extent",
    "radial_function",
    "radial_function_reduced",
    "radial_node_radii",
]


def check_quantum_numbers(n: object, l: object, m: object = 0) -> tuple[int, int, int]:
    """Validate ``(n, l, m)`` and return them as ints.

    Raises
    ------
    QuantumNumberError
        Unless ``n >= 1``, ``0 <= l < n`` and ``|m| <= l``, all integers.
    """
    values = {"n": n, "l": l, "m": m}
    out = {}
    for name, value in values.items():
        if isinstance(value, bool) or not isinstance(value, (int, np.integer, float)):
            raise QuantumNumberError(f"quantum number {name} must be an integer, got {value!r}")
        if isinstance(value, float) and not (math.isfinite(value) and value.is_integer()):
            raise QuantumNumberError(f"quantum number {name} must be an integer, got {value!r}")
        out[name] = int(value)
    n, l, m = out["n"], out["l"], out["m"]
    if n < 1:
        raise QuantumNumberError(f"need n >= 1, got n={n}")
    if n > LIMITS.n_max:
        raise QuantumNumberError(
            f"need n <= {LIMITS.n_max} (the supported range, see docs/limits.md), got n={n}"
        )
    if not 0 <= l < n:
        raise QuantumNumberError(f"need 0 <= l < n, got n={n}, l={l}")
    if abs(m) > l:
        raise QuantumNumberError(f"need |m| <= l, got l={l}, m={m}")
    return n, l, m


def check_charge(Z: float) -> float:
    """Return ``Z`` as a float, refusing non-finite or non-positive values."""
    try:
        Z = float(Z)
    except (TypeError, ValueError):
        raise ParameterError(f"nuclear charge Z must be a number, got {Z!r}") from None
    if not math.isfinite(Z) or Z <= 0:
        raise ParameterError(f"nuclear charge Z must be finite and > 0, got Z={Z}")
    return Z


def laguerre(k: int, alpha: float, x: npt.ArrayLike) -> np.ndarray:
    """Generalised Laguerre polynomial L_k^alpha(x) by the three-term recurrence.

    Parameters
    ----------
    k : int
        Degree (an integer; a float degree is what makes library routines inaccurate at high n).
    alpha : float
        Order.
    x : array_like
        Points.

    Returns
    -------
    ndarray
        Values, same shape as ``x``, in x's float precision (at least float32).

    Notes
    -----
    (j+1) L_{j+1} = (2j + 1 + alpha - x) L_j - (j + alpha) L_{j-1}, which is forward stable for
    evaluating the polynomial (Abramowitz & Stegun 22.7.12).
    """
    x = np.asarray(x)
    if x.dtype.kind != "f":
        x = x.astype(np.float64)
    prev = np.ones_like(x)
    if k == 0:
        return prev
    cur = 1.0 + alpha - x
    for j in range(1, k):
        prev, cur = cur, ((2 * j + 1 + alpha - x) * cur - (j + alpha) * prev) / (j + 1)
    return cur


def log_norm(n: int, l: int, Z: float) -> float:
    """Log of the normalisation constant of R_nl, in log space so high n cannot overflow."""
    return 0.5 * (
        3.0 * math.log(2.0 * Z / n)
        + math.lgamma(n - l)
        - math.log(2.0 * n)
        - math.lgamma(n + l + 1)
    )


def radial_function(n: int, l: int, r: npt.ArrayLike, *, Z: float = 1.0) -> np.ndarray:
    """Normalised hydrogen-like radial function R_nl(r).

    Parameters
    ----------
    n, l : int
        Principal and angular quantum numbers, ``0 <= l < n``.
    r : array_like
        Radii in bohr, ``r >= 0``.
    Z : float, default: 1.0
        Nuclear charge (length-scale charge when a reduced mass is used).

    Returns
    -------
    ndarray
        R_nl(r) in bohr^(-3/2), float64.

    Notes
    -----
    R_nl = N (2Zr/n)^l exp(-Zr/n) L_{n-l-1}^{2l+1}(2Zr/n), with
    N^2 = (2Z/n)^3 (n-l-1)! / (2n (n+l)!), so that the integral of R^2 r^2 dr is 1.
    The sign is positive at the origin side (the Laguerre polynomial is positive at 0).

    References
    ----------
    H. A. Bethe and E. E. Salpeter, *Quantum Mechanics of One- and Two-Electron Atoms* (1957).
    """
    n, l, _ = check_quantum_numbers(n, l)
    Z = check_charge(Z)
    r = np.asarray(r, dtype=np.float64)
    rho = 2.0 * Z * r / n
    with np.errstate(divide="ignore"):
        log_pow = l * np.log(rho) if l > 0 else np.zeros_like(rho)
    envelope = np.exp(log_norm(n, l, Z) + log_pow - 0.5 * rho)
    return envelope * laguerre(n - l - 1, 2 * l + 1, rho)


def radial_function_reduced(
    n: int, l: int, r: npt.ArrayLike, *, Z: float = 1.0, dtype: npt.DTypeLike = np.float64
) -> np.ndarray:
    """R_nl(r) / r^l, the radial factor that multiplies a solid harmonic r^l Y_lm.

    Parameters
    ----------
    n, l : int
        Quantum numbers.
    r : array_like
        Radii in bohr.
    Z : float, default: 1.0
        Nuclear charge.
    dtype : dtype, default: float64
        Precision of the result (float32 for grids).

    Returns
    -------
    ndarray
        Values of R_nl(r) / r^l; finite at the origin.
    """
    r = np.asarray(r, dtype=dtype)
    scale = math.exp(log_norm(n, l, Z) + l * math.log(2.0 * Z / n))
    rho = r * np.asarray(2.0 * Z / n, dtype=dtype)
    out = laguerre(n - l - 1, 2 * l + 1, rho)
    out *= np.exp(-0.5 * rho) * np.asarray(scale, dtype=dtype)
    return out


def energy_hartree(n: int, *, Z: float = 1.0, mass_ratio: float = 1.0) -> float:
    """Bound-state energy E_n = -Z^2 mu / (2 n^2) in hartree (mu = reduced mass / electron mass)."""
    return -(Z**2) * mass_ratio / (2.0 * n**2)


def expectation_r(n: int, l: int, power: int, *, Z: float = 1.0) -> float:
    """Closed-form <r^power> for power in {-2, -1, 1, 2}, in bohr^power.

    References
    ----------
    Bethe & Salpeter (1957): <r> = [3n^2 - l(l+1)]/(2Z), <r^2> = n^2[5n^2 + 1 - 3l(l+1)]/(2Z^2),
    <1/r> = Z/n^2, <1/r^2> = Z^2/(n^3 (l + 1/2)).
    """
    ll = l * (l + 1)
    forms = {
        1: (3 * n**2 - ll) / (2.0 * Z),
        2: n**2 * (5 * n**2 + 1 - 3 * ll) / (2.0 * Z**2),
        -1: Z / n**2,
        -2: Z**2 / (n**3 * (l + 0.5)),
    }
    if power not in forms:
        raise ParameterError(f"closed-form <r^k> is available for k in -2, -1, 1, 2, got k={power}")
    return forms[power]


def radial_node_radii(n: int, l: int, *, Z: float = 1.0) -> np.ndarray:
    """Radii (bohr) of the n - l - 1 radial nodes: the roots of L_{n-l-1}^{2l+1}(2Zr/n).

    Notes
    -----
    The roots of L_k^alpha are the eigenvalues of its symmetric Jacobi matrix (diagonal
    2j + alpha + 1, off-diagonal -sqrt(j (j + alpha)), j = 1..k; Golub & Welsch 1969).
    """
    k = n - l - 1
    if k == 0:
        return np.empty(0)
    alpha = 2 * l + 1
    j = np.arange(1, k + 1, dtype=np.float64)
    jacobi = np.diag(2 * j - 1 + alpha) + np.diag(-np.sqrt(j[:-1] * (j[:-1] + alpha)), 1)
    roots = np.linalg.eigvalsh(jacobi, UPLO="U")
    return np.sort(roots) * n / (2.0 * Z)


def _gamma_radius(n: int, tail: float) -> float:
    """Radius (Z = 1) beyond which the asymptotic Gamma(2n + 1) tail bound is below ``tail``.

    For large r the radial density r^2 R^2 behaves as rho^(2n) exp(-rho), rho = 2r/n, whose tail
    is Q(a, x) <= x^(a-1) e^(-x) / Gamma(a) * x / (x - a + 1) for x > a - 1 (a = 2n + 1). It
    holds only beyond the outer turning point, so it is a starting bracket, not the answer.
    """
    a = 2 * n + 1
    target = math.log(tail * 1e-3)

    def log_bound(x: float) -> float:
        return (a - 1) * math.log(x) - x - math.lgamma(a) + math.log(x / (x - a + 1))

    lo, hi = float(a), float(a) + 10.0
    while log_bound(hi) > target:
        lo, hi = hi, 2.0 * hi
    for _ in range(60):
        mid = 0.5 * (lo + hi)
        lo, hi = (mid, hi) if log_bound(mid) > target else (lo, mid)
    return 1.25 * hi * n / 2.0


@functools.lru_cache(maxsize=4096)
def _unit_extent(n: int, l: int, tail: float) -> float:
    """:func:`radial_extent` at Z = 1, from the tail of the radial density itself."""
    turning = n * n + n * math.sqrt(n * n - l * (l + 1))  # outer classical turning point
    hi = max(_gamma_radius(n, tail), 1.5 * turning)
    while True:
        r = np.linspace(0.0, hi, 40001)
        p = (r * radial_function(n, l, r)) ** 2
        # beyond hi the density falls at least as fast as exp(-2r/n): its tail is below p n
        if p[-1] * n < 1e-3 * tail:
            break
        hi *= 1.5
    step = r[1] - r[0]
    outside = np.concatenate([np.cumsum((0.5 * (p[1:] + p[:-1]) * step)[::-1])[::-1], [0.0]])
    inside = np.flatnonzero(outside >= tail)
    edge = r[inside[-1] + 1] if inside.size else r[1]
    return float(1.02 * edge)


def radial_extent(n: int, l: int, *, Z: float = 1.0, tail: float = 1e-13) -> float:
    """Return a radius (bohr) beyond which less than ``tail`` of the radial probability lies.

    Notes
    -----
    Found from the radial density r^2 R^2 itself: integrated inward from a radius beyond both
    the outer classical turning point n^2 (1 + sqrt(1 - l(l+1)/n^2)) / Z and the asymptotic
    Gamma tail bound, with 2% margin. Lengths scale as 1/Z, so it is computed once at Z = 1.
    An asymptotic bound alone is too short for large n - l: for 140s it missed 11% of the
    probability.
    """
    return _unit_extent(int(n), int(l), float(tail)) / Z


def most_probable_radius(n: int, l: int, *, Z: float = 1.0) -> float:
    """Radius (bohr) of the global maximum of the radial distribution r^2 R_nl^2.

    Found on a fine grid, then refined by successive zooms to about 1e-10 relative.
    """
    lo, hi = 0.0, radial_extent(n, l, Z=Z)
    for _ in range(6):
        r = np.linspace(lo, hi, 4001)
        p = r**2 * radial_function(n, l, r, Z=Z) ** 2
        i = int(np.argmax(p))
        step = r[1] - r[0]
        lo, hi = max(r[i] - step, 0.0), r[i] + step
    return 0.5 * (lo + hi)
