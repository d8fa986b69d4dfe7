"""Numerically solved orbitals through info, isovalue, mesh and batch, against closed forms.

The isotropic harmonic well has closed-form states: u_{n_r l} ~ r^(l+1) L_{n_r}^{l+1/2}(w r^2)
e^(-w r^2 / 2), E = (2 n_r + l + 3/2) w (a standard textbook result), so every number the
pipeline computes numerically for it can be checked exactly.
"""

from __future__ import annotations

import json
import math

import numpy as np
import pytest
from scipy.special import gamma, gammainc

from orbviz.cli import main
from orbviz.levels.isovalue import enclosing_isovalue
from orbviz.scenes.load import parse_scene
from orbviz.states.orbital import Orbital
from orbviz.states.potentials import Harmonic
from orbviz.surface.mesh import build_mesh
from tests.conftest import as_trimesh

W = 0.5


def test_info_for_a_harmonic_state(capsys):
    assert main(["info", "3dz2", "--potential", f"harmonic:{W}", "--json"]) == 0
    info = json.loads(capsys.readouterr().out)
    l = 2
    assert info["energy_hartree"] == pytest.approx((l + 1.5) * W, rel=1e-7)
    # nodeless: P(r) ~ r^(2l+2) exp(-w r^2), maximum at sqrt((l+1)/w); <r> = G(l+2)/G(l+3/2)/sqrt(w)
    assert info["most_probable_radius_bohr"] == pytest.approx(math.sqrt((l + 1) / W), rel=1e-6)
    assert info["mean_radius_bohr"] == pytest.approx(
        gamma(l + 2) / gamma(l + 1.5) / math.sqrt(W), rel=1e-6
    )
    # the level N = 2 n_r + l = 2 holds 2d and 3s... (N + 1)(N + 2)/2 = 6 states (the isotropic
    # oscillator's degeneracy, Sakurai & Napolitano, Modern Quantum Mechanics; from memory)
    assert info["radial_nodes"] == 0 and info["degeneracy"] == 6
    assert "harmonic" in info["potential"]


def test_node_radius_of_the_harmonic_2s():
    # n_r = 1, l = 0: L_1^{1/2}(w r^2) = 3/2 - w r^2, so the node is at r = sqrt(3 / (2w))
    orbital = Orbital.from_spec("2s", potential=Harmonic(W))
    assert orbital.node_radii(2, 0) == pytest.approx([math.sqrt(1.5 / W)], rel=1e-5)


@pytest.mark.parametrize("fraction", [0.5, 0.9, 0.99])
def test_isovalue_of_the_gaussian_ground_state(fraction):
    # psi = (w/pi)^(3/4) exp(-w r^2/2): {|psi|^2 >= c} is a ball of radius R with
    # c = (w/pi)^(3/2) exp(-w R^2), holding P = gammainc(3/2, w R^2) (chi distribution, 3 dof)
    iso = enclosing_isovalue(Orbital.from_spec("1s", potential=Harmonic(W)), fraction=fraction)
    radius2 = -math.log(iso.level * (math.pi / W) ** 1.5) / W
    assert gammainc(1.5, W * radius2) == pytest.approx(fraction, abs=1e-5)


def test_mesh_vertices_on_the_level_of_a_harmonic_p_state():
    # psi ~ r cos(polar) exp(-w r^2 / 2), normalised: closed form (n_r = 0, l = 1)
    result = build_mesh(Orbital.from_spec("2pz", potential=Harmonic(W)))
    norm = math.sqrt(2 * W**2.5 / math.pi**1.5)  # integral of (z e^{-w r^2/2})^2 dV = pi^1.5/2w^2.5
    vertices = np.vstack([b.vertices for b in result.bodies])
    z, r2 = vertices[:, 2], (vertices**2).sum(axis=1)
    dens = (norm * z * np.exp(-W * r2 / 2)) ** 2 / result.isovalue.level
    low, high = np.percentile(dens, [5, 95])
    assert 0.95 <= low and high <= 1.05
    assert all(as_trimesh(b).is_watertight for b in result.bodies)


@pytest.mark.slow
def test_scene_items_take_a_potential(tmp_path):
    from orbviz.scenes.runner import run_scene

    scene = parse_scene(
        '[defaults]\ngrid = 32\noutputs = ["stl"]\npotential = "yukawa:10"\n'
        '[[orbital]]\nspec = "2pz"\n',
        "p.toml",
    )
    manifest = run_scene(scene.items, tmp_path, jobs=1, progress=False)
    assert manifest["items"][0]["status"] == "done"


@pytest.mark.parametrize(
    ("argv", "fragment"),
    [
        (["info", "1s", "--potential", "yukawa:0.5"], "no bound state"),
        (["info", "1s", "--potential", "yukawa:x"], "--potential: yukawa takes a number from"),
        (["info", "1s", "--potential", "morse:1"], "expected coulomb, yukawa:LENGTH"),
        (
            ["info", "1s", "--potential", "harmonic:1e9"],
            "harmonic takes a number from 0.001 to 1000",
        ),
        (["info", "1s", "--potential", "table:/nonexistent.txt"], "cannot read potential table"),
    ],
)
def test_potential_errors(capsys, argv, fragment):
    assert main(argv) == 2
    err = capsys.readouterr().err
    assert fragment in err and err.count("\n") == 1
