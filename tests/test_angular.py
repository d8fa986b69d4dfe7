"""Spherical harmonics and real orbitals against scipy.special and Cartesian closed forms."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.special import sph_harm_y

from orbviz.states.angular import LABELS, complex_harmonic, real_harmonic, solid_harmonic_real
from tests.conftest import reference_real_harmonic


@pytest.mark.parametrize("l", [0, 1, 2, 3, 6, 11, 20, 30])
def test_complex_against_scipy(l, rng):
    # scipy.special.sph_harm_y(l, m, polar, azimuth), Condon-Shortley phase (DLMF 14.30)
    polar = rng.uniform(0, math.pi, 400)
    azimuth = rng.uniform(0, 2 * math.pi, 400)
    for m in range(-l, l + 1):
        np.testing.assert_allclose(
            complex_harmonic(l, m, polar, azimuth), sph_harm_y(l, m, polar, azimuth), atol=1e-12
        )


@pytest.mark.parametrize("l", [1, 2, 3, 5, 9])
def test_real_against_scipy_combination(l, rng):
    polar = rng.uniform(0, math.pi, 300)
    azimuth = rng.uniform(0, 2 * math.pi, 300)
    for m in range(-l, l + 1):
        np.testing.assert_allclose(
            real_harmonic(l, m, polar, azimuth),
            reference_real_harmonic(l, m, polar, azimuth),
            atol=1e-12,
        )


# Cartesian shapes of the real orbitals with the chemistry signs (tables of real spherical
# harmonics, e.g. Blanco, Florez & Bermejo 1997 -- from memory; docs/references.md lists the signs)
CARTESIAN = {
    "s": lambda x, y, z: np.ones_like(x),
    "px": lambda x, y, z: x,
    "py": lambda x, y, z: y,
    "pz": lambda x, y, z: z,
    "dz2": lambda x, y, z: 3 * z * z - (x * x + y * y + z * z),
    "dxz": lambda x, y, z: x * z,
    "dyz": lambda x, y, z: y * z,
    "dx2-y2": lambda x, y, z: x * x - y * y,
    "dxy": lambda x, y, z: x * y,
    "fz3": lambda x, y, z: z * (5 * z * z - 3 * (x * x + y * y + z * z)),
    "fxz2": lambda x, y, z: x * (5 * z * z - (x * x + y * y + z * z)),
    "fyz2": lambda x, y, z: y * (5 * z * z - (x * x + y * y + z * z)),
    "fz(x2-y2)": lambda x, y, z: z * (x * x - y * y),
    "fxyz": lambda x, y, z: x * y * z,
    "fx(x2-3y2)": lambda x, y, z: x * (x * x - 3 * y * y),
    "fy(3x2-y2)": lambda x, y, z: y * (3 * x * x - y * y),
}


def test_every_label_has_a_cartesian_check():
    assert set(CARTESIAN) == set(LABELS)


@pytest.mark.parametrize("label", sorted(CARTESIAN))
def test_real_signs(label, rng):
    # r^l S_lm must be a positive multiple of the Cartesian polynomial
    l, m = LABELS[label]
    x, y, z = rng.normal(size=(3, 500))
    ours = solid_harmonic_real(l, m, x, y, z)
    poly = CARTESIAN[label](x, y, z)
    big = np.abs(poly) > 1e-3 * np.abs(poly).max()
    ratio = ours[big] / poly[big]
    assert ratio.min() > 0
    np.testing.assert_allclose(ratio, ratio.mean(), rtol=1e-10)


def test_float32_stays_float32():
    x = np.linspace(-1, 1, 7, dtype=np.float32)
    assert solid_harmonic_real(3, -2, x, x, x).dtype == np.float32


def _sphere_quadrature(order: int):
    # Gauss-Legendre in cos(polar) x trapezoid in azimuth: exact for degree <= 2 order - 1
    t, w = np.polynomial.legendre.leggauss(order)
    azimuth = np.arange(2 * order) * math.pi / order
    polar = np.arccos(t)
    P, A = np.meshgrid(polar, azimuth, indexing="ij")
    W = np.outer(w, np.full(azimuth.size, math.pi / order))
    return P.ravel(), A.ravel(), W.ravel()


def test_orthonormality_on_quadrature():
    polar, azimuth, weight = _sphere_quadrature(16)
    states = [(l, m) for l in range(7) for m in range(-l, l + 1)]
    real = np.array([real_harmonic(l, m, polar, azimuth) for l, m in states])
    gram = (real * weight) @ real.T
    np.testing.assert_allclose(gram, np.eye(len(states)), atol=1e-12)
    cplx = np.array([complex_harmonic(l, m, polar, azimuth) for l, m in states])
    gram = (cplx.conj() * weight) @ cplx.T
    np.testing.assert_allclose(gram, np.eye(len(states)), atol=1e-12)


def _sign_changes(values: np.ndarray) -> int:
    s = np.sign(values[np.abs(values) > 1e-9 * np.abs(values).max()])
    return int(np.count_nonzero(s[1:] != s[:-1]))


@pytest.mark.parametrize(("l", "m"), [(l, m) for l in range(6) for m in range(-l, l + 1)])
def test_angular_node_count_from_sign_changes(l, m):
    # l nodal surfaces (Bethe & Salpeter 1957; docs/references.md): l - |m| cones or planes
    # crossed along a meridian, and
    # |m| planes through the z axis, each crossed twice around a circle of latitude
    offset = 0.0 if m >= 0 else math.pi / (2 * abs(m))
    polar = np.linspace(1e-4, math.pi - 1e-4, 20_001)
    meridian = real_harmonic(l, m, polar, np.full_like(polar, offset + 1e-3))
    azimuth = np.linspace(0, 2 * math.pi, 20_001)[:-1] + 1e-3
    circle = real_harmonic(l, m, np.full_like(azimuth, 1.0), azimuth)  # polar angle 1 rad
    wraps = _sign_changes(np.append(circle, circle[0]))
    assert _sign_changes(meridian) + wraps // 2 == l
