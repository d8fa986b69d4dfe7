"""Exact polynomial forms of the solid harmonics and radial factors, as numexpr text.

Solid harmonics r^l S_lm are expanded in monomials of x, y, z by the same normalised recurrence
as :func:`orbviz.states.angular.polar_polynomial`; Laguerre polynomials are written in Horner
form. Measured against the recurrence on the unit sphere, the monomial forms keep 1e-11
relative up to l = 32; numexpr compiles expressions of up to ~150 monomials, so larger ones are
evaluated directly instead (:mod:`orbviz.levels.fields`).
"""

from __future__ import annotations

import math
from collections import defaultdict

from orbviz.states.angular import polar_start
from orbviz.states.radial import log_norm

__all__ = ["Poly", "add", "poly_text", "polar_poly", "radial_text", "real_solid_poly"]

Poly = dict[tuple[int, int, int], float]


def _mul(a: Poly, b: Poly) -> Poly:
    out: Poly = defaultdict(float)
    for ka, va in a.items():
        for kb, vb in b.items():
            out[(ka[0] + kb[0], ka[1] + kb[1], ka[2] + kb[2])] += va * vb
    return dict(out)


def add(a: Poly, b: Poly, scale: float = 1.0) -> Poly:
    """Return a + scale * b."""
    out: Poly = defaultdict(float, a)
    for k, v in b.items():
        out[k] += scale * v
    return dict(out)


def polar_poly(l: int, m: int) -> Poly:
    """S_l^m(z, r^2) as a polynomial in x, y, z (0 <= m <= l)."""
    prev: Poly = {(0, 0, 0): polar_start(m)}
    if l == m:
        return prev
    z: Poly = {(0, 0, 1): 1.0}
    r2: Poly = {(2, 0, 0): 1.0, (0, 2, 0): 1.0, (0, 0, 2): 1.0}
    cur = {k: v * math.sqrt(2 * m + 3) for k, v in _mul(z, prev).items()}
    for ll in range(m + 2, l + 1):
        a = math.sqrt((4 * ll * ll - 1) / (ll * ll - m * m))
        b = math.sqrt(((ll - 1) ** 2 - m * m) / (4 * (ll - 1) ** 2 - 1))
        nxt = add(_mul(z, cur), _mul(r2, prev), -b)
        prev, cur = cur, {k: a * v for k, v in nxt.items()}
    return cur


def _xy_power(m: int) -> tuple[Poly, Poly]:
    re: Poly = {(0, 0, 0): 1.0}
    im: Poly = {}
    x: Poly = {(1, 0, 0): 1.0}
    y: Poly = {(0, 1, 0): 1.0}
    for _ in range(m):
        re, im = add(_mul(re, x), _mul(im, y), -1.0), add(_mul(im, x), _mul(re, y))
    return re, im


def real_solid_poly(l: int, m: int) -> Poly:
    """r^l S_lm (chemistry signs) as a polynomial; matches ``solid_harmonic_real``."""
    theta = polar_poly(l, abs(m))
    if m == 0:
        return theta
    re, im = _xy_power(abs(m))
    factor = math.sqrt(2.0) * (-1) ** abs(m)
    return {k: factor * v for k, v in _mul(theta, re if m > 0 else im).items()}


def poly_text(poly: Poly) -> str:
    """Numexpr text of a polynomial in x, y, z."""
    terms = []
    for (a, b, c), v in sorted(poly.items()):
        if abs(v) < 1e-300:
            continue
        factors = [repr(float(v))]
        factors += [
            f"{name}**{p}" if p > 1 else name for name, p in (("x", a), ("y", b), ("z", c)) if p
        ]
        terms.append("*".join(factors))
    return "(" + " + ".join(terms) + ")" if terms else "0.0"


def radial_text(n: int, l: int, Z: float) -> str:
    """R_nl / r^l as text: N (2Z/n)^l exp(-Zr/n) L_{n-l-1}^{2l+1}(2Zr/n), Horner form."""
    k, alpha = n - l - 1, 2 * l + 1
    scale = math.exp(log_norm(n, l, Z) + l * math.log(2.0 * Z / n))
    q = 2.0 * Z / n
    # L_k^alpha(rho) = sum_i (-1)^i C(k + alpha, k - i) rho^i / i!
    coeffs = [
        (-1) ** i * math.comb(k + alpha, k - i) / math.factorial(i) * q**i for i in range(k + 1)
    ]
    horner = repr(coeffs[-1])
    for c in reversed(coeffs[:-1]):
        horner = f"({horner}*R + {c!r})"
    text = f"{scale!r}*exp({-0.5 * q!r}*R)*{horner}"
    return text.replace("R", "sqrt(x**2 + y**2 + z**2)")
