"""Named hybrids: orthonormal (by quadrature of scipy-built functions) and at textbook angles."""

from __future__ import annotations

import math

import numpy as np
import pytest

from orbviz.states.hybrids import HYBRIDS, hybrid_terms
from orbviz.states.orbital import Orbital
from orbviz.states.spec import parse_spec
from tests.conftest import reference_psi


def _terms(spec: str):
    return [(a.coefficient, a.n, a.l, a.m, a.form) for a in parse_spec(spec)]


def _sphere_quadrature(order=24, radial=120):
    t, wt = np.polynomial.legendre.leggauss(order)
    phi = np.arange(2 * order) * math.pi / order
    x, wr = np.polynomial.laguerre.laggauss(radial)  # r = x / 0.6: e^{-0.6 r} weight absorbed
    r = x / 0.6
    wr = wr * np.exp(x) / 0.6
    R, T, P = np.meshgrid(r, t, phi, indexing="ij")
    W = wr[:, None, None] * wt[None, :, None] * (math.pi / order) * R**2
    s = np.sqrt(1 - T**2)
    return R * s * np.cos(P), R * s * np.sin(P), R * T, W


@pytest.mark.parametrize(
    ("name", "n"), [("sp", 2), ("sp2", 2), ("sp3", 2), ("sp3d", 3), ("sp3d2", 3)]
)
def test_hybrids_are_orthonormal(name, n):
    x, y, z, w = _sphere_quadrature()
    psis = [
        reference_psi(_terms(f"{n}{name}[{k}]"), x, y, z).real
        for k in range(1, len(HYBRIDS[name]) + 1)
    ]
    gram = np.array([[np.sum(a * b * w) for b in psis] for a in psis])
    np.testing.assert_allclose(gram, np.eye(len(psis)), atol=1e-8)


def _radius(spec: str) -> float:
    n = int(spec[0])
    return 1.5 * n * n  # out where the outermost lobes and the isosurface lie


def _direction(spec: str) -> np.ndarray:
    """Direction of the largest |psi|^2 on a sphere of radius 1.5 n^2 (scipy-built psi)."""
    t = np.linspace(-1, 1, 721)
    phi = np.linspace(0, 2 * math.pi, 1441)
    T, P = np.meshgrid(t, phi, indexing="ij")
    s = np.sqrt(1 - T**2)
    d = np.stack([s * np.cos(P), s * np.sin(P), T], axis=-1)
    dens = np.abs(reference_psi(_terms(spec), *(_radius(spec) * d).transpose(2, 0, 1))) ** 2
    return d[np.unravel_index(np.argmax(dens), dens.shape)]


@pytest.mark.parametrize(
    ("name", "n", "angles"),
    [
        ("sp", 2, [180.0]),
        ("sp2", 2, [120.0]),
        ("sp3", 2, [math.degrees(math.acos(-1 / 3))]),  # tetrahedral 109.47 degrees
        ("sp3d2", 3, [90.0, 180.0]),
        ("sp3d", 3, [90.0, 120.0, 180.0]),
    ],
)
def test_hybrid_directions(name, n, angles):
    # textbook geometry: linear, trigonal, tetrahedral, trigonal bipyramid, octahedral
    dirs = [_direction(f"{n}{name}[{k}]") for k in range(1, len(HYBRIDS[name]) + 1)]
    found = [
        math.degrees(math.acos(np.clip(a @ b, -1, 1)))
        for i, a in enumerate(dirs)
        for b in dirs[i + 1 :]
    ]
    # every pair at one of the textbook angles (the direction grid resolves ~0.25 degree), and
    # every textbook angle present
    assert all(min(abs(f - a) for a in angles) < 0.5 for f in found)
    assert all(any(abs(f - a) < 0.5 for f in found) for a in angles)


def test_sp3_axes_tetrahedral_to_a_tenth_of_a_degree():
    a, b = _direction("2sp3[1]"), _direction("2sp3[2]")
    assert math.degrees(math.acos(a @ b)) == pytest.approx(109.4712, abs=0.2)


def test_grammar_errors_and_normalisation():
    from orbviz.errors import SpecError

    with pytest.raises(SpecError, match=r"\[1\] to \[4\]"):
        Orbital.from_spec("2sp3[5]")
    with pytest.raises(SpecError, match="n >= 3"):
        Orbital.from_spec("2sp3d2[1]")
    orbital = Orbital.from_spec("3sp3d2[4]")
    assert sum(abs(c) ** 2 for _, c in orbital.basis) == pytest.approx(1.0, abs=1e-14)
    assert not orbital.notes  # already normalised: no note
    assert len(hybrid_terms(4, "sp3", 1)) == 4


@pytest.mark.parametrize(
    ("spec", "axis"),
    [
        ("2sp3[1]", (1, 1, 1)),
        ("3sp3[4]", (-1, -1, 1)),
        ("2sp2[1]", (1, 0, 0)),
        ("2sp[2]", (0, 0, -1)),
        ("3sp3d2[5]", (0, 1, 0)),
        ("4sp3d[4]", (0, 0, 1)),
    ],
)
def test_large_positive_lobe_points_along_the_named_direction(spec, axis):
    axis = np.array(axis, dtype=float) / np.linalg.norm(axis)
    d = _direction(spec)
    assert math.degrees(math.acos(np.clip(d @ axis, -1, 1))) < 1.0
    # and psi is positive there (scipy-built psi along the axis, out at the outer lobe)
    assert reference_psi(_terms(spec), *(_radius(spec) * axis)[:, None]).real[0] > 0


def test_whole_set_in_one_figure(tmp_path, capsys):
    from PIL import Image

    from orbviz.cli import main
    from orbviz.surface.colors import SET_PALETTE

    out = tmp_path / "set.png"
    assert (
        main(
            [
                "render",
                "2sp3",
                "--grid",
                "40",
                "--size",
                "320x240",
                "--fraction",
                "0.5",
                "--view",
                "20,10",
                "--overlay",
                "-o",
                str(out),
            ]
        )
        == 0
    )
    assert "4 orbitals in one panel" in capsys.readouterr().out
    with Image.open(out) as image:
        img = np.asarray(image.convert("RGB")).astype(float)
    # each of the four members shows in its own palette colour (hue match, any shading)
    unit = img / np.maximum(np.linalg.norm(img, axis=2, keepdims=True), 1)
    for rgb in SET_PALETTE[:4]:
        target = np.array(rgb, dtype=float) / np.linalg.norm(rgb)
        assert np.mean((unit @ target > 0.99) & (img.sum(axis=2) > 60)) > 0.005


def test_whole_set_as_one_model_with_disjoint_colour_parts(tmp_path, capsys):
    from orbviz.models.build import build_model
    from orbviz.models.options import ModelOptions
    from orbviz.models.solids import arrays as _arrays
    from orbviz.states.orbital import Orbital
    from orbviz.surface.checks import mesh_facts

    orbitals = [Orbital.from_spec(f"2sp3[{k}]") for k in range(1, 5)]
    model = build_model(orbitals, ModelOptions(size_mm=50.0, grid=64), fraction=0.5)
    facts = model.facts()
    assert facts.watertight and facts.solids == 1
    assert sorted(model.parts) == ["lobe-1", "lobe-2", "lobe-3", "lobe-4", "support"]
    volumes = [mesh_facts(*_arrays(p)).volume for p in model.parts.values()]
    assert sum(volumes) == pytest.approx(facts.volume, rel=1e-6)  # disjoint: volumes add up
