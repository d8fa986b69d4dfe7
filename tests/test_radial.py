"""Radial functions, energies and radial expectation values against external references."""

from __future__ import annotations

import math

import numpy as np
import pytest
import sympy
from scipy import integrate
from scipy.constants import physical_constants
from sympy.physics.hydrogen import R_nl as sympy_R_nl

from orbviz.states.radial import (
    energy_hartree,
    expectation_r,
    most_probable_radius,
    radial_function,
    radial_node_radii,
)
from tests.conftest import reference_psi, reference_radial

# Textbook closed forms with a0 = 1 (e.g. Griffiths, Introduction to Quantum Mechanics, table of
# hydrogen radial wavefunctions -- from memory; each is also checked against sympy below).
CLOSED_FORMS = {
    (1, 0): lambda r, Z: 2 * Z**1.5 * np.exp(-Z * r),
    (2, 0): lambda r, Z: Z**1.5 / math.sqrt(2) * (1 - Z * r / 2) * np.exp(-Z * r / 2),
    (2, 1): lambda r, Z: Z**1.5 / math.sqrt(24) * Z * r * np.exp(-Z * r / 2),
    (3, 0): lambda r, Z: (
        2
        * Z**1.5
        / math.sqrt(27)
        * (1 - 2 * Z * r / 3 + 2 * (Z * r) ** 2 / 27)
        * np.exp(-Z * r / 3)
    ),
    (3, 1): lambda r, Z: (
        8 * Z**1.5 / (27 * math.sqrt(6)) * (1 - Z * r / 6) * Z * r * np.exp(-Z * r / 3)
    ),
    (3, 2): lambda r, Z: 4 * Z**1.5 / (81 * math.sqrt(30)) * (Z * r) ** 2 * np.exp(-Z * r / 3),
}


@pytest.mark.parametrize(("n", "l"), sorted(CLOSED_FORMS))
@pytest.mark.parametrize("Z", [1.0, 2.0, 3.7])
def test_closed_forms(n, l, Z):
    r = np.linspace(0.0, 40.0 / Z, 501)
    expected = CLOSED_FORMS[(n, l)](r, Z)
    np.testing.assert_allclose(radial_function(n, l, r, Z=Z), expected, rtol=1e-12, atol=1e-300)


@pytest.mark.parametrize(("n", "l"), sorted(CLOSED_FORMS))
def test_closed_forms_agree_with_sympy(n, l):
    # sympy.physics.hydrogen.R_nl(n, l, r, Z), exact arithmetic: guards the table above
    for r in [0.5, 2.0, 7.0]:
        exact = float(sympy_R_nl(n, l, sympy.Rational(str(r)), 2).evalf(30))
        assert CLOSED_FORMS[(n, l)](r, 2.0) == pytest.approx(exact, rel=1e-13)


@pytest.mark.parametrize(
    ("n", "l"), [(4, 0), (5, 3), (8, 2), (12, 11), (20, 0), (20, 7), (30, 0), (30, 5), (30, 29)]
)
def test_against_sympy_high_n(n, l):
    # sympy's exact R_nl evaluated with mpmath at 40 digits (sympy.physics.hydrogen.R_nl; mpmath
    # above n~12)
    Z = sympy.Rational(3, 2)
    radii = [0.25, 1.5, 6.0, 23.0, 80.0, 300.0]
    ours = radial_function(n, l, np.array(radii), Z=1.5)
    for r, value in zip(radii, ours, strict=True):
        exact = float(sympy_R_nl(n, l, sympy.Rational(str(r)), Z).evalf(40))
        if abs(exact) < 1e-280:
            continue
        assert value == pytest.approx(exact, rel=1e-10)


@pytest.mark.parametrize(
    ("n", "l"), [(1, 0), (5, 2), (10, 9), (20, 0), (20, 13), (30, 0), (30, 12)]
)
@pytest.mark.parametrize("Z", [1.0, 2.5])
def test_normalisation(n, l, Z):
    # integral of R^2 r^2 dr = 1 (Bethe & Salpeter 1957; docs/references.md), by adaptive quadrature
    # split at the node radii
    edges = np.concatenate([[0.0], radial_node_radii(n, l, Z=Z), [4.0 * n * n / Z, np.inf]])
    total = 0.0
    for a, b in zip(edges[:-1], edges[1:], strict=True):
        value, _ = integrate.quad(
            lambda r: (radial_function(n, l, r, Z=Z) * r) ** 2,
            a,
            b,
            epsabs=0,
            epsrel=1e-13,
            limit=400,
        )
        total += value
    assert total == pytest.approx(1.0, rel=1e-10)


def test_against_scipy_genlaguerre():
    # independent evaluation through scipy.special.eval_genlaguerre (integer degree)
    r = np.linspace(0.0, 120.0, 2001)
    for n, l in [(6, 1), (9, 4), (15, 3)]:
        np.testing.assert_allclose(
            radial_function(n, l, r, Z=1.2), reference_radial(n, l, r, Z=1.2), rtol=1e-9, atol=1e-14
        )


@pytest.mark.parametrize("n", [1, 2, 3, 7, 30])
@pytest.mark.parametrize("Z", [1.0, 2.0])
def test_energy_against_codata(n, Z):
    # E_n = -Z^2/(2n^2) hartree; the hartree is twice the Rydberg energy (CODATA, scipy.constants)
    rydberg_ev = physical_constants["Rydberg constant times hc in eV"][0]
    hartree_ev = physical_constants["Hartree energy in eV"][0]
    assert energy_hartree(n, Z=Z) * hartree_ev == pytest.approx(
        -(Z**2) * rydberg_ev / n**2, rel=1e-11
    )


POWERS = {  # closed forms: Bethe & Salpeter (1957), as listed in docs/references.md
    1: lambda n, l, Z: (3 * n**2 - l * (l + 1)) / (2 * Z),
    2: lambda n, l, Z: n**2 * (5 * n**2 + 1 - 3 * l * (l + 1)) / (2 * Z**2),
    -1: lambda n, l, Z: Z / n**2,
    -2: lambda n, l, Z: Z**2 / (n**3 * (l + 0.5)),
}


@pytest.mark.parametrize("power", sorted(POWERS))
@pytest.mark.parametrize(
    ("n", "l", "Z"), [(1, 0, 1.0), (2, 1, 1.0), (3, 0, 2.0), (4, 2, 1.0), (6, 5, 3.0)]
)
def test_expectation_values_by_integration(power, n, l, Z):
    value, _ = integrate.quad(
        lambda r: radial_function(n, l, r, Z=Z) ** 2 * r ** (2 + power),
        0,
        np.inf,
        epsabs=0,
        epsrel=1e-12,
        limit=400,
    )
    assert value == pytest.approx(POWERS[power](n, l, Z), rel=1e-9)
    assert expectation_r(n, l, power, Z=Z) == pytest.approx(POWERS[power](n, l, Z), rel=1e-14)


def _sign_changes(values: np.ndarray) -> int:
    s = np.sign(values[np.abs(values) > 1e-12 * np.abs(values).max()])
    return int(np.count_nonzero(s[1:] != s[:-1]))


@pytest.mark.parametrize(("n", "l"), [(1, 0), (2, 0), (3, 0), (3, 1), (4, 2), (6, 1), (10, 3)])
def test_radial_node_count_from_sign_changes(n, l):
    # nodal count n - l - 1 (Bethe & Salpeter 1957; docs/references.md), counted on the computed
    # function itself
    r = np.linspace(1e-6, 6.0 * n * n, 200_001)
    assert _sign_changes(radial_function(n, l, r)) == n - l - 1
    assert len(radial_node_radii(n, l)) == n - l - 1


@pytest.mark.parametrize(
    ("n", "l", "expected"),
    # closed forms (Bethe & Salpeter 1957; roots checked with sympy): 2s at 2/Z;
    # 3s at (9 -+ 3 sqrt3)/2Z; 3p at 6/Z
    [
        (2, 0, [2.0]),
        (3, 0, [(9 - 3 * math.sqrt(3)) / 2, (9 + 3 * math.sqrt(3)) / 2]),
        (3, 1, [6.0]),
    ],
)
@pytest.mark.parametrize("Z", [1.0, 3.0])
def test_node_radii(n, l, expected, Z):
    radii = radial_node_radii(n, l, Z=Z)
    np.testing.assert_allclose(radii, np.array(expected) / Z, rtol=1e-12)
    # and the computed function changes sign there
    for r0 in radii:
        a, b = radial_function(n, l, np.array([r0 * (1 - 1e-6), r0 * (1 + 1e-6)]), Z=Z)
        assert a * b < 0


@pytest.mark.parametrize(("n", "Z"), [(1, 1.0), (2, 1.0), (3, 2.0), (5, 1.0), (8, 1.5)])
def test_most_probable_radius_nodeless(n, Z):
    # nodeless state l = n - 1: most probable radius n^2 / Z (Bethe & Salpeter 1957;
    # docs/references.md)
    assert most_probable_radius(n, n - 1, Z=Z) == pytest.approx(n * n / Z, rel=1e-7)


@pytest.mark.parametrize(
    ("n", "l"), [(1, 0), (3, 2), (10, 0), (40, 0), (70, 3), (100, 0), (100, 99)]
)
def test_extent_leaves_less_than_its_tail_outside(n, l):
    # the probability beyond radial_extent, integrated by scipy.integrate.quad over the scipy
    # reference R_nl (eval_genlaguerre with an integer degree, tests/conftest.py); beyond the
    # outer turning point n^2 (1 + sqrt(1 - l(l+1)/n^2)) the integrand no longer oscillates
    from scipy.integrate import quad

    from orbviz.states.radial import radial_extent

    edge = radial_extent(n, l, tail=1e-10)
    assert edge > n * n + n * math.sqrt(n * n - l * (l + 1))  # beyond the turning point
    outside, _ = quad(lambda r: (r * reference_radial(n, l, np.array([r]))[0]) ** 2, edge, np.inf)
    assert outside < 1e-10


@pytest.mark.parametrize(("n", "l", "m"), [(33, 32, 0), (80, 79, 3), (100, 99, -5)])
def test_psi_at_high_l_and_large_r(n, l, m):
    # psi of a real orbital of high l far out, where r^l alone overflows float64: against the
    # scipy reference (eval_genlaguerre and sph_harm_y, tests/conftest.py)
    from orbviz.states.orbital import Orbital

    rng = np.random.default_rng(7)
    direction = rng.normal(size=(3, 40))
    direction /= np.linalg.norm(direction, axis=0)
    r = rng.uniform(0.5, 1.5, size=40) * n * n  # about the most probable radius
    x, y, z = direction * r
    got = Orbital.from_spec(f"{n},{l},{m}", real=True).psi(x, y, z, dtype=np.float64)
    want = reference_psi([(1.0, n, l, m, "real")], x, y, z).real
    assert np.all(np.isfinite(got))
    assert got == pytest.approx(want, rel=1e-8, abs=1e-12 * np.abs(want).max())


def test_beyond_the_supported_n_is_refused():
    # the range is decided in orbviz._defaults.LIMITS (docs/limits.md): n <= 100
    from orbviz.errors import QuantumNumberError
    from orbviz.states.orbital import Orbital

    with pytest.raises(QuantumNumberError, match="need n <= 100"):
        Orbital.from_spec("101s")
