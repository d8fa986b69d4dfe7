"""Brute-force enclosed probability of a one-centre superposition, from scipy alone.

psi(r, direction) = sum_k c_k R_k(r) Y_k(direction) with scipy's harmonics (complex, or real by
the chemistry sign convention) and the textbook radial functions of tests/conftest.py. The
probability inside {|psi|^2 >= c} is summed ray by ray: Gauss-Legendre nodes in cos(polar) times
equal steps in azimuth (Abramowitz & Stegun 25.4.29 and the trapezoidal rule, exact for a
periodic trigonometric polynomial), and along each ray a fine square-root grid on which the
crossings of the level are placed by linear interpolation and |psi|^2 r^2 integrated by the
trapezoidal rule over the parts inside.
"""

from __future__ import annotations

import math

import numpy as np
from scipy.special import sph_harm_y

from tests.conftest import reference_radial, reference_real_harmonic


def _angular(terms, polar, azimuth):
    out = []
    for c, _, l, m, form in terms:
        if form == "real":
            out.append(c * reference_real_harmonic(l, m, polar, azimuth))
        else:
            out.append(c * sph_harm_y(l, m, polar, azimuth))
    return np.stack(out, axis=-1).astype(complex)


def enclosed(terms, level, r_max, *, nr=3000, nt=400, na=800, Z=1.0) -> float:
    """Probability inside {|psi|^2 >= level}; terms are (coef, n, l, m, form), normalised here."""
    norm = math.sqrt(sum(abs(t[0]) ** 2 for t in terms))
    terms = [(t[0] / norm, *t[1:]) for t in terms]
    u = np.linspace(0.0, 1.0, nr)
    r = r_max * u * u
    radial = np.stack([reference_radial(n, l, r, Z) for _, n, l, _, _ in terms])
    t, wt = np.polynomial.legendre.leggauss(nt)
    azimuth = np.arange(na) * (2 * math.pi / na)
    total = 0.0
    for ring, weight in zip(np.arccos(t), wt, strict=True):
        ang = _angular(terms, np.full(na, ring), azimuth)  # (na, K)
        psi = ang @ radial  # (na, nr)
        d = np.abs(psi) ** 2
        g = d * r * r  # integrand along the ray
        inside = d >= level
        # a cell [r_i, r_i+1] holds its inside part: both ends in, or the part up to the crossing
        a, b = inside[:, :-1], inside[:, 1:]
        dr = np.diff(r)
        full = a & b
        part = a ^ b
        with np.errstate(divide="ignore", invalid="ignore"):
            s = np.clip((level - d[:, :-1]) / (d[:, 1:] - d[:, :-1]), 0.0, 1.0)
        gx = g[:, :-1] + s * (g[:, 1:] - g[:, :-1])  # integrand at the crossing
        share = np.where(a, s, 1.0 - s)  # the inside part of the cell
        end = np.where(a, g[:, :-1], g[:, 1:])
        cells = np.where(full, 0.5 * (g[:, :-1] + g[:, 1:]) * dr, 0.0)
        cells += np.where(part, 0.5 * (end + gx) * share * dr, 0.0)
        total += weight * cells.sum() * (2 * math.pi / na)
    return float(total)
