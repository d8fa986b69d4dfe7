"""Levels of superpositions against brute-force sums and scans built from scipy alone.

The brute force (tests/tools/brute.py) sums |psi|^2 ray by ray with scipy's harmonics and the
textbook radial functions, placing each crossing of the level on the ray; nothing of orbviz
enters it. Its own error at the resolutions used here is under 2e-6 (measured by doubling them).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.optimize import brentq, minimize

from orbviz.levels.isovalue import check_isovalue, enclosing_isovalue
from orbviz.states.orbital import Orbital
from tests.conftest import reference_psi
from tests.tools.brute import enclosed

# (spec, Z, fraction, terms as (coef, n, l, m, form))
CASES = [
    (
        "1s + 2s + 2,1,1",
        1.0,
        0.9,
        [(1, 1, 0, 0, "complex"), (1, 2, 0, 0, "complex"), (1, 2, 1, 1, "complex")],
    ),
    (
        "0.8*2,1,1 + 0.6j*3,2,-1",
        1.3,
        0.75,
        [(0.8, 2, 1, 1, "complex"), (0.6j, 3, 2, -1, "complex")],
    ),
    (
        "3s + 3pz + 4dx2-y2",
        1.0,
        0.5,
        [(1, 3, 0, 0, "real"), (1, 3, 1, 0, "real"), (1, 4, 2, 2, "real")],
    ),
]


@pytest.mark.parametrize(
    ("spec", "Z", "fraction", "terms"),
    [
        pytest.param(*CASES[0], id="1s+2s+2p1"),
        pytest.param(*CASES[1], id="complex-Z1.3", marks=pytest.mark.slow),
        pytest.param(*CASES[2], id="real-3s3p4d", marks=pytest.mark.slow),
    ],
)
def test_mixture_encloses_its_fraction_to_1e_5(spec, Z, fraction, terms):
    iso = enclosing_isovalue(Orbital.from_spec(spec, Z=Z), fraction=fraction)
    truth = enclosed(terms, iso.level, 2.5 * iso.max_radius, Z=Z)
    assert truth == pytest.approx(fraction, abs=1e-5)
    # the self-check is an honest estimate of what the level achieves
    assert iso.enclosed_fraction == pytest.approx(truth, abs=1e-5)


def test_check_added_later_matches_the_brute_force():
    spec, Z, fraction, terms = CASES[0]
    orbital = Orbital.from_spec(spec, Z=Z)
    quick = enclosing_isovalue(orbital, fraction=fraction, check=False)
    assert math.isnan(quick.enclosed_fraction)
    full = check_isovalue(orbital, quick)
    truth = enclosed(terms, quick.level, 2.5 * quick.max_radius, Z=Z, nr=1500, nt=150, na=300)
    assert full.enclosed_fraction == pytest.approx(truth, abs=1e-5)


def test_max_radius_of_a_mixture_to_1e_8():
    # psi from scipy (tests/conftest.py reference_psi); per direction the outer root of
    # |psi|^2 = c by brentq, maximised over the two angles by Nelder-Mead from a dense scan
    iso = enclosing_isovalue(Orbital.from_spec("0.8*2pz + 0.6*3dxy"))
    terms = [(0.8, 2, 1, 0, "real"), (0.6, 3, 2, -2, "real")]
    guess = iso.max_radius

    def excess(r, d):
        return float(np.abs(reference_psi(terms, *(r * d)[:, None])[0]) ** 2 - iso.level)

    def outer_root(angles):
        p, a = angles
        d = np.array([math.sin(p) * math.cos(a), math.sin(p) * math.sin(a), math.cos(p)])
        radii = np.linspace(0.8 * guess, 1.2 * guess, 401)
        dens = np.abs(reference_psi(terms, *np.outer(d, radii))) ** 2
        above = np.flatnonzero(dens >= iso.level)
        if above.size == 0:
            return 0.0
        i = int(above[-1])
        return brentq(excess, radii[i], radii[i + 1], args=(d,), xtol=1e-14, rtol=1e-15)

    grid = [
        (p, a)
        for p in np.linspace(0.05, math.pi - 0.05, 40)
        for a in np.linspace(0, 2 * math.pi, 80, endpoint=False)
    ]
    start = max(grid, key=outer_root)
    best = minimize(
        lambda x: -outer_root(x),
        np.array(start),
        method="Nelder-Mead",
        options={"xatol": 1e-9, "fatol": 1e-14, "maxiter": 2000},
    )
    assert iso.max_radius == pytest.approx(-best.fun, rel=1e-8)


def test_mixture_at_a_high_fraction():
    # f = 0.999 puts the level far in the tail, where the coarse first pass is least sure of
    # it: the level is still found, and encloses f within 1e-5 by the scipy brute force
    terms = [(1.0, 2, 1, 0, "real"), (0.5, 3, 2, 1, "real")]  # 2pz + 0.5 3dxz
    iso = enclosing_isovalue(Orbital.from_spec("2pz + 0.5*3dxz"), fraction=0.999)
    truth = enclosed(terms, iso.level, 2.0 * iso.max_radius, nr=3000, nt=200, na=400)
    assert truth == pytest.approx(0.999, abs=1e-5)
    assert iso.enclosed_fraction == pytest.approx(truth, abs=1e-5)
