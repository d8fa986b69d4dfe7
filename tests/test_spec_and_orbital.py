"""The spec grammar and the Orbital built from it."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.special import sph_harm_y

from orbviz.errors import OrbvizError, QuantumNumberError, SpecError
from orbviz.states.orbital import Orbital
from orbviz.states.spec import parse_spec
from tests.conftest import reference_radial, reference_real_harmonic


@pytest.mark.parametrize(
    ("text", "expected"),
    [
        ("1s", [(1, 0, 0, "real", 1)]),
        ("3DX2-Y2", [(3, 2, 2, "real", 1)]),
        ("4fy(3x2-y2)", [(4, 3, -3, "real", 1)]),
        ("4,2,-1", [(4, 2, -1, "complex", 1)]),
        ("0.5*2s+0.866*2pz", [(2, 0, 0, "real", 0.5), (2, 1, 0, "real", 0.866)]),
        ("(1+1j)*2,1,1 - 3dxy", [(2, 1, 1, "complex", 1 + 1j), (3, 2, -2, "real", -1)]),
        ("2j*2px", [(2, 1, 1, "real", 2j)]),
        (" - 1e-1 * 3dz2 ", [(3, 2, 0, "real", -0.1)]),
    ],
)
def test_parse(text, expected):
    got = [(a.n, a.l, a.m, a.form, a.coefficient) for a in parse_spec(text)]
    assert got == [(n, l, m, f, complex(c)) for n, l, m, f, c in expected]


@pytest.mark.parametrize(
    "text",
    [
        "",
        "2p",
        "2pq",
        "3dz",
        "2pz 2s",
        "2pz++2s",
        "*2pz",
        "2pz*",
        "nan*2s",
        "inf*1s",
        "(1+)*2s",
        "2.5,1,0",
        "2,1.5,0",
        "2,1,0.5",
        "abc",
        "1s + ",
        "2pz3",
    ],
)
def test_malformed(text):
    with pytest.raises(SpecError):
        Orbital.from_spec(text)


@pytest.mark.parametrize("text", ["0,0,0", "2,2,0", "2,1,2", "2,-1,0", "3,1,-2"])
def test_bad_quantum_numbers(text):
    with pytest.raises(QuantumNumberError):
        Orbital.from_spec(text)


def test_cancelling_superposition():
    with pytest.raises(SpecError, match="zero"):
        Orbital.from_spec("2pz - 2pz")


TOKENS = [
    "1s",
    "2pz",
    "3dx2-y2",
    "4,2,-1",
    "2,1,1",
    "+",
    "-",
    "*",
    "0.5",
    "(1+1j)",
    "2j",
    " ",
    ",",
    "(",
    ")",
    "e",
    "9",
    "fxyz",
    "nan",
    "inf",
    "j",
]


@settings(max_examples=400, deadline=None)
@given(st.lists(st.sampled_from(TOKENS), max_size=8).map("".join) | st.text(max_size=24))
def test_parser_fuzz(text):
    # anything either parses into an orbital or raises our own error class, never anything else
    try:
        Orbital.from_spec(text)
    except OrbvizError:
        pass


def test_normalisation_note_and_norm():
    # orthonormal basis: the norm of 0.5*2s + 0.5*2pz is sqrt(0.5)
    orbital = Orbital.from_spec("0.5*2s + 0.5*2pz")
    assert orbital.given_norm == pytest.approx(math.sqrt(0.5), rel=1e-14)
    assert any("normalised" in note for note in orbital.notes)
    assert sum(abs(c) ** 2 for _, c in orbital.basis) == pytest.approx(1.0, rel=1e-14)
    assert not Orbital.from_spec("0.6*2s + 0.8*2pz").notes


def _points(rng, count=200, scale=6.0):
    return rng.normal(scale=scale, size=(3, count))


def _spherical(x, y, z):
    r = np.sqrt(x * x + y * y + z * z)
    return r, np.arccos(z / r), np.arctan2(y, x)


@pytest.mark.parametrize(("n", "l", "m"), [(1, 0, 0), (2, 1, 1), (3, 2, -2), (4, 3, 3), (5, 2, -1)])
def test_complex_eigenstate_psi(n, l, m, rng):
    # psi = R_nl(r) Y_l^m(polar, azimuth) with scipy's Y (note scipy's (polar, azimuth) order)
    x, y, z = _points(rng)
    r, polar, azimuth = _spherical(x, y, z)
    expected = reference_radial(n, l, r, Z=1.7) * sph_harm_y(l, m, polar, azimuth)
    psi = Orbital.from_spec(f"{n},{l},{m}", Z=1.7).psi(x, y, z, dtype=np.float64)
    np.testing.assert_allclose(psi, expected, atol=1e-13)


def test_real_superposition_psi(rng):
    x, y, z = _points(rng)
    r, polar, azimuth = _spherical(x, y, z)
    expected = 0.6 * reference_radial(2, 0, r) * reference_real_harmonic(
        0, 0, polar, azimuth
    ) - 0.8 * reference_radial(3, 2, r) * reference_real_harmonic(2, 2, polar, azimuth)
    orbital = Orbital.from_spec("0.6*2s - 0.8*3dx2-y2")
    assert orbital.is_real
    np.testing.assert_allclose(orbital.psi(x, y, z, dtype=np.float64), expected, atol=1e-13)


def test_real_flag_turns_nlm_into_real_combinations(rng):
    x, y, z = _points(rng)
    a = Orbital.from_spec("3,2,-2", real=True).psi(x, y, z, dtype=np.float64)
    b = Orbital.from_spec("3dxy").psi(x, y, z, dtype=np.float64)
    np.testing.assert_allclose(a, b, atol=1e-15)


def test_global_phase_is_removed_for_real_states(rng):
    orbital = Orbital.from_spec("1j*2px")
    assert orbital.is_real and any("phase" in note for note in orbital.notes)


def test_density_normalised_by_monte_carlo_volume(rng):
    # integral of |psi|^2 over a box holding ~all probability, by plain Monte Carlo
    count, half = 400_000, 30.0
    x, y, z = rng.uniform(-half, half, size=(3, count))
    dens = Orbital.from_spec("(1+1j)*2,1,1 - 3dxy").density(x, y, z)
    estimate = dens.mean() * (2 * half) ** 3
    sigma = dens.std() * (2 * half) ** 3 / math.sqrt(count)
    assert estimate == pytest.approx(1.0, abs=4 * sigma)


def test_pair_of_lz_eigenstates_is_a_real_p(rng):
    # (Y_1^1 - Y_1^-1)/sqrt2 = -S_11 (px) by the Condon-Shortley phase; scipy gives both sides
    x, y, z = _points(rng)
    r, polar, azimuth = _spherical(x, y, z)
    pair = (sph_harm_y(1, 1, polar, azimuth) - sph_harm_y(1, -1, polar, azimuth)) / math.sqrt(2)
    orbital = Orbital.from_spec("2,1,1 - 2,1,-1")
    assert orbital.is_real
    expected = reference_radial(2, 1, r) * pair
    np.testing.assert_allclose(expected.imag, 0.0, atol=1e-14)
    np.testing.assert_allclose(orbital.psi(x, y, z, dtype=np.float64), expected.real, atol=1e-13)
    np.testing.assert_allclose(
        expected.real,
        -reference_radial(2, 1, r) * reference_real_harmonic(1, 1, polar, azimuth),
        atol=1e-13,
    )
