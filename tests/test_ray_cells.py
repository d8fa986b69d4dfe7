"""The fans of rays that place the level of a one-centre superposition (orbviz/levels/ray_cells).

The cell model's closed form is checked against a brute-force midpoint sum over the cell written
here; whole levels against the scipy brute force of tests/tools/brute.py (its own error under
2e-6, measured by doubling its resolutions), which nothing of orbviz enters.
"""

from __future__ import annotations

import math
import subprocess
import sys

import numpy as np
import pytest

from orbviz.errors import ParameterError
from orbviz.levels.cell_model import cell_mass
from orbviz.levels.isovalue import enclosed_probability, enclosing_isovalue
from orbviz.states.orbital import Orbital
from tests.tools.brute import enclosed


def _brute_cell(f: float, a: float, b: float, level: float, count: int = 2000) -> float:
    # the mean of F 1(F >= level) over the square, F = f + u + v, u in [-a, a], v in [-b, b],
    # by the midpoint rule on count x count points (the definition of the mean; error ~1/count^2
    # away from the cut, ~1/count^1.5 across it)
    u = -a + (np.arange(count) + 0.5) * (2 * a / count)
    v = -b + (np.arange(count) + 0.5) * (2 * b / count)
    field = f + u[:, None] + v[None, :]
    return float(np.where(field >= level, field, 0.0).mean())


@pytest.mark.parametrize(
    ("f", "a", "b", "level"),
    [
        (1.0, 0.3, 0.2, 1.1),  # the cut crosses two sides
        (1.0, 0.3, 0.2, 0.95),  # ... inside the middle band
        (1.0, 0.3, 0.2, 0.55),  # ... near a corner
        (2.0, 0.5, 0.01, 2.2),  # one half-range far smaller than the other
        (1.0, 0.3, 0.2, 0.4),  # the whole cell above: the mean, f
        (1.0, 0.3, 0.2, 1.6),  # the whole cell below: 0
    ],
)
def test_cell_mass_is_the_mean_over_the_cell(f, a, b, level):
    got = cell_mass(np.array([f]), np.array([a]), np.array([b]), level)[0]
    assert got == pytest.approx(_brute_cell(f, a, b, level), abs=2e-5 * f)


def test_cell_mass_without_spread_is_the_sharp_cut():
    # half-ranges of zero: F is f on the whole cell, so the mean is f above the level, else 0
    f = np.array([0.5, 1.5])
    got = cell_mass(f, np.zeros(2), np.zeros(2), 1.0)
    assert got == pytest.approx([0.0, 1.5], abs=1e-9)


@pytest.mark.slow
def test_twelve_shell_mixture_against_the_brute_force():
    # the 12-term superposition of benchmarks/bench_mixture.py (1s, 2s, 2p, 3s, ... 5p; m cycling
    # through -l .. l; equal complex weights): the level and its self-check within 1e-5 of the
    # scipy brute force
    shells = [(n, l) for n in range(1, 6) for l in range(n)][:12]
    terms = [(1.0, n, l, i % (2 * l + 1) - l, "complex") for i, (n, l) in enumerate(shells)]
    spec = " + ".join(f"{n},{l},{m}" for _, n, l, m, _ in terms)
    iso = enclosing_isovalue(Orbital.from_spec(spec), fraction=0.9)
    truth = enclosed(terms, iso.level, 1.5 * iso.max_radius, nr=2500, nt=300, na=600)
    assert truth == pytest.approx(0.9, abs=1e-5)
    assert iso.enclosed_fraction == pytest.approx(truth, abs=1e-5)


def test_superposition_too_fine_for_the_fans_is_refused_in_one_line():
    # l = 39 needs (12 x 40)^2 x 2 rays of ~1100 radii on the finest fan: 5e8 samples, beyond
    # the budget of 1e8 (the message names the state, the count and the rule)
    with pytest.raises(ParameterError) as caught:
        enclosing_isovalue(Orbital.from_spec("1s + 40,39,39"))
    message = str(caught.value)
    assert "\n" not in message and "the most is 1e+08" in message and "40,39,39" in message


def test_refusal_reaches_the_command_line_as_exit_2():
    run = subprocess.run(
        [sys.executable, "-m", "orbviz", "info", "1s + 40,39,39"],
        capture_output=True,
        text=True,
        timeout=120,
    )
    assert run.returncode == 2, run.stderr
    assert len(run.stderr.strip().splitlines()) == 1 and "Traceback" not in run.stderr


def test_axial_mixture_uses_one_azimuth_and_matches_the_brute_force():
    # 1s + 2pz + 3dz2 is symmetric about z (every m = 0): one azimuth per ring; against the
    # brute force within 1e-5 (at nr 2000, nt 300 the brute force is itself 1.1e-5 off; at 4000
    # and 600 it agrees with 8000 and 1200 to 2e-7)
    terms = [(1.0, 1, 0, 0, "real"), (1.0, 2, 1, 0, "real"), (1.0, 3, 2, 0, "real")]
    iso = enclosing_isovalue(Orbital.from_spec("1s + 2pz + 3dz2"), fraction=0.8)
    truth = enclosed(terms, iso.level, 1.5 * iso.max_radius, nr=4000, nt=600, na=4)
    assert truth == pytest.approx(0.8, abs=1e-5)
    assert math.isfinite(iso.enclosed_fraction)
    assert iso.enclosed_fraction == pytest.approx(truth, abs=1e-5)


@pytest.mark.slow
def test_enclosed_probability_of_a_mixture_at_given_levels():
    # the public enclosed_probability routes a superposition about the nucleus through the same
    # fans: at two levels a decade apart, within 1e-5 of the scipy brute force
    terms = [(1, 1, 0, 0, "complex"), (1, 2, 0, 0, "complex"), (1, 2, 1, 1, "complex")]
    levels = np.array([2e-4, 2e-3])
    got = enclosed_probability(Orbital.from_spec("1s + 2s + 2,1,1"), levels)
    for level, p in zip(levels, got, strict=True):
        assert p == pytest.approx(enclosed(terms, level, 30.0), abs=1e-5)
