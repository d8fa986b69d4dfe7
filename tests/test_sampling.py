"""Sampling: the window and mirror copies give the field scipy gives, everywhere it matters."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.optimize import brentq

from orbviz import state
from orbviz.levels.fields import field_of
from orbviz.levels.grid import box_half_width, sample
from orbviz.levels.isovalue import Isovalue, enclosing_isovalue
from orbviz.states.orbital import Orbital
from orbviz.surface.mesh import build_mesh
from orbviz.surface.options import MeshOptions
from tests.conftest import reference_psi, reference_radial

N = 64
SPECS = [
    "3dz2",
    "4fxyz",
    "2px",
    "3dxz",
    "4,2,1",
    "2sp3[1]",
    "0.6*2s+0.8*2pz",
    "(1+1j)*2,1,1 - 3dxy",
]


def reference_field(orbital: Orbital, kind: str, x, y, z) -> np.ndarray:
    """The contoured field from scipy's functions (tests/conftest.py reference_psi).

    signed: psi; envelope: psi e^{-i m azimuth}, real for an eigenstate psi = g e^{i m azimuth};
    modulus: |psi|. The basis is orbital.basis, in real orbitals, so any state can be built.
    """
    terms = [(c, n, l, m, "real") for (n, l, m), c in orbital.basis]
    psi = reference_psi(terms, x, y, z)
    if kind == "signed":
        return psi.real
    if kind == "envelope":
        m = orbital.eigenstate.m
        return (psi * np.exp(-1j * m * np.arctan2(y, x))).real
    return np.abs(psi)


def window(grid):
    return tuple(slice(s, grid.points - s) for s in grid.start)


def full_axes(grid):
    return np.meshgrid(
        *[np.linspace(-grid.half_width, grid.half_width, grid.points)] * 3, indexing="ij"
    )


@pytest.fixture(scope="module")
def sampled():
    out = {}
    for spec in SPECS:
        orbital = state(spec)
        iso = enclosing_isovalue(orbital)
        field = field_of(orbital)
        grid = sample(field, box_half_width(orbital, iso, N), N, surface=iso)
        x, y, z = full_axes(grid)
        out[spec] = (orbital, iso, grid, reference_field(orbital, field.kind, x, y, z))
    return out


@pytest.mark.parametrize("spec", SPECS)
def test_window_holds_the_reference_field(sampled, spec):
    orbital, iso, grid, ref = sampled[spec]
    held = ref[window(grid)]
    # float32 samples of the scipy-built field (tests/conftest.py): 1e-5 of its largest value
    assert np.abs(grid.values - held).max() <= 1e-5 * np.abs(held).max()


@pytest.mark.parametrize("spec", SPECS)
def test_every_sample_outside_the_window_is_below_the_level(sampled, spec):
    orbital, iso, grid, ref = sampled[spec]
    outside = np.ones(ref.shape, dtype=bool)
    outside[window(grid)] = False
    # the scipy-built field outside the window never reaches sqrt(level): nothing is lost there
    assert np.abs(ref[outside]).max(initial=0.0) < math.sqrt(iso.level)


def test_window_fits_the_reach_of_3dz2(sampled):
    # on the z axis the 3dz2 surface ends where R_32(r)^2 Y_20(0)^2 = c (scipy's functions, root
    # by brentq); the window holds that and ends within a few cells of it. The ring in the xy
    # plane reaches less far, so the window is narrower along x and y.
    orbital, iso, grid, _ = sampled["3dz2"]
    y20 = math.sqrt(5 / (4 * math.pi))
    r_z = brentq(lambda r: (reference_radial(3, 2, r) * y20) ** 2 - iso.level, 10.0, 40.0)
    half_z = grid.half_width - grid.start[2] * grid.spacing
    assert r_z < half_z < r_z + 4 * grid.spacing + 0.005 * r_z
    assert grid.start[0] == grid.start[1] > grid.start[2] > 0


@pytest.mark.parametrize("spec", SPECS)
def test_probability_sums_count_the_whole_box(sampled, spec):
    orbital, iso, grid, ref = sampled[spec]
    above, total = grid.probability_sums(iso.level)
    cell = grid.spacing**3
    dens = (
        np.abs(
            reference_psi(
                [(c, n, l, m, "real") for (n, l, m), c in orbital.basis], *full_axes(grid)
            )
        )
        ** 2
    )
    # Riemann sums of the scipy-built |psi|^2 over all N^3 samples, float32 rounding allowed
    assert total == pytest.approx(dens.sum() * cell, rel=1e-5)
    assert above == pytest.approx(dens[dens >= iso.level].sum() * cell, rel=1e-4)


@pytest.mark.parametrize("spec", SPECS)
def test_claimed_mirror_parity_holds_for_the_reference(sampled, spec):
    orbital, iso, grid, ref = sampled[spec]
    parity = field_of(orbital).parity
    for axis, p in enumerate(parity):
        if p:  # mirrored scipy field equals +-itself (the sample grid is symmetric about 0)
            mirrored = np.flip(ref, axis=axis)
            assert np.abs(mirrored - p * ref).max() <= 1e-9 * np.abs(ref).max()


@pytest.mark.parametrize(
    ("spec", "expected"),
    [
        # parity of the real solid harmonic's monomials (textbook: dz2 ~ 3z^2 - r^2, fxyz ~ xyz,
        # px ~ x, dxz ~ xz); a complex eigenstate's envelope is even in x and y and has z parity
        # (-1)^(l - |m|); the sp3 hybrid mixes s and p and has none
        ("3dz2", (1, 1, 1)),
        ("4fxyz", (-1, -1, -1)),
        ("2px", (-1, 1, 1)),
        ("3dxz", (-1, 1, -1)),
        ("4,2,1", (1, 1, -1)),
        ("2sp3[1]", (0, 0, 0)),
        ("0.6*2s+0.8*2pz", (1, 1, 0)),
    ],
)
def test_parity_of_textbook_shapes(spec, expected):
    assert field_of(state(spec)).parity == expected


def test_a_window_that_would_cut_the_surface_falls_back_to_the_whole_box():
    orbital = Orbital.from_spec("3dz2")
    iso = enclosing_isovalue(orbital)
    short = Isovalue(
        iso.level, iso.fraction, iso.enclosed_fraction, 0.5 * iso.max_radius, iso.method
    )
    field = field_of(orbital)
    grid = sample(field, box_half_width(orbital, iso, N), N, surface=short)
    assert grid.start == (0, 0, 0) and grid.values.shape == (N, N, N)
    ref = reference_field(orbital, field.kind, *full_axes(grid))
    # the whole box, from scipy's functions as above
    assert np.abs(grid.values - ref).max() <= 1e-5 * np.abs(ref).max()


@pytest.mark.slow
@pytest.mark.parametrize(
    "spec",
    [
        "3dz2",
        "4fxyz",
        "4,2,1",
        "2sp3[1]",
        "bond(1s,1s,R=2.0,+)",
        "0.3*3dxy + 0.8*3dz2 - 0.5*3dxz",  # one shell, no mirror symmetry on x
        "Fe:3dxy",  # a screened charge
        "harmonic:2pz",  # a numerically solved radial function (see below)
    ],
)
def test_window_contours_to_the_whole_box_surface(spec, monkeypatch):
    # the same triangles as contouring all N^3 samples (window_start forced to 0); VTK's points
    # are float32, so positions agree to float32 rounding of the box size. (A check of the
    # shortcut against the plain path: the plain path is checked against scipy in test_mesh.)
    import orbviz.levels.grid

    if spec.startswith("harmonic:"):
        from orbviz.states.potentials import Harmonic

        orbital = Orbital.from_spec(spec.split(":", 1)[1], potential=Harmonic(0.5))
    else:
        orbital = state(spec)
    windowed = build_mesh(orbital, MeshOptions(grid=80))
    assert any(windowed.grid.start)
    monkeypatch.setattr(orbviz.levels.grid, "window_start", lambda *args: 0)
    whole = build_mesh(orbital, MeshOptions(grid=80))
    assert whole.grid.start == (0, 0, 0)
    for a, b in zip(windowed.bodies, whole.bodies, strict=True):
        assert a.name == b.name and a.faces.shape == b.faces.shape
        assert (
            np.abs(np.sort(a.vertices, axis=0) - np.sort(b.vertices, axis=0)).max()
            < 1e-6 * whole.grid.half_width
        )
    assert windowed.report()["grid_enclosed_fraction"] == pytest.approx(
        whole.report()["grid_enclosed_fraction"], rel=1e-9
    )
    assert windowed.report()["in_box_probability"] == pytest.approx(
        whole.report()["in_box_probability"], rel=1e-6
    )


@pytest.mark.slow
@settings(max_examples=12, deadline=None)
@given(
    st.lists(
        st.floats(-1.0, 1.0, allow_nan=False).filter(lambda c: abs(c) > 0.05),
        min_size=5,
        max_size=5,
    ),
    st.sampled_from([(3, 2), (4, 2), (4, 3)]),
)
def test_random_one_shell_mixtures_sample_as_scipy_says(coefs, shell):
    # real mixtures of one (n, l) shell: the windowed, mirrored samples against the scipy-built
    # psi (tests/conftest.py) on the whole grid, and nothing outside the window at the level
    n, l = shell
    terms = [(c, n, l, m, "real") for c, m in zip(coefs, range(-2, 3), strict=True)]
    from orbviz.states.angular import LABELS

    label = {lm: name for name, lm in LABELS.items()}
    spec = " + ".join(f"({c!r})*{n}{label[(l, m)]}" for c, _, _, m, _ in terms)
    orbital = state(spec)
    iso = enclosing_isovalue(orbital, check=False)
    grid = sample(field_of(orbital), box_half_width(orbital, iso, 40), 40, surface=iso)
    ref = reference_field(orbital, "signed", *full_axes(grid))
    assert np.abs(grid.values - ref[window(grid)]).max() <= 1e-5 * np.abs(ref).max()
    outside = np.ones(ref.shape, dtype=bool)
    outside[window(grid)] = False
    assert np.abs(ref[outside]).max(initial=0.0) < math.sqrt(iso.level)


@pytest.mark.parametrize(
    ("spec", "sign", "n", "l", "m", "expected"),
    [
        ("bond(1s,1s,R=2.0,+)", 1, 1, 0, 0, (1, 1, 1)),
        ("bond(1s,1s,R=2.0,-)", -1, 1, 0, 0, (1, 1, -1)),
        ("bond(2pz,2pz,R=3.0,-)", -1, 2, 1, 0, (1, 1, 1)),
        ("bond(2px,2px,R=2.5,+)", 1, 2, 1, 1, (-1, 1, 1)),
    ],
)
def test_bond_parity_against_the_scipy_combination(spec, sign, n, l, m, expected):
    # psi ~ phi(z + R/2) + sign phi(z - R/2) from scipy's functions (tests/conftest.py): the
    # field's claimed parity holds for it under each mirror, and is the textbook one (a same-
    # orbital pair has z parity p * sign)
    field = field_of(state(spec))
    assert field.parity == expected
    half = state(spec).R / 2
    rng = np.random.default_rng(5)
    x, y, z = rng.uniform(-6, 6, (3, 200))

    def psi(x, y, z):
        terms = [(1, n, l, m, "real")]
        return (
            reference_psi(terms, x, y, z + half) + sign * reference_psi(terms, x, y, z - half)
        ).real

    base = psi(x, y, z)
    for axis, p in enumerate(expected):
        flipped = [x, y, z]
        flipped[axis] = -flipped[axis]
        assert np.allclose(psi(*flipped), p * base, atol=1e-12)
