"""Two-centre combinations: overlap against the closed form, norm, nodes, meshes and models."""

from __future__ import annotations

import json
import math

import numpy as np
import pytest

from orbviz.cli import main
from orbviz.states.bond import parse_bond
from orbviz.states.orbital import Orbital


@pytest.mark.parametrize("R", [0.5, 1.0, 2.0, 4.0, 7.0])
def test_1s_overlap_closed_form(R):
    # S(R) = e^{-R} (1 + R + R^2/3) for two hydrogen 1s orbitals R bohr apart (a standard
    # textbook result, e.g. Szabo & Ostlund, Modern Quantum Chemistry -- from memory)
    bond = parse_bond(f"bond(1s,1s,R={R},+)")
    assert bond.S == pytest.approx(math.exp(-R) * (1 + R + R * R / 3), abs=1e-10)


@pytest.mark.parametrize(
    "spec",
    ["bond(1s,1s,R=2.0,+)", "bond(1s,1s,R=2.0,-)", "bond(2pz,2pz,R=4,+)", "bond(2px,2px,R=4,-)"],
)
def test_normalised(spec):
    # integral of |psi|^2 = 1, by the same spheroidal quadrature used as <psi|psi>
    bond = parse_bond(spec)
    half = bond.R / 2
    points = 64
    x, wx = np.polynomial.laguerre.laggauss(points)
    mu, wmu = 1.0 + x / (2 * half), wx * np.exp(x) / (2 * half)
    nu, wnu = np.polynomial.legendre.leggauss(points)
    az = np.arange(2 * points) * math.pi / points
    M, N, A = np.meshgrid(mu, nu, az, indexing="ij")
    rho = half * np.sqrt((M**2 - 1) * (1 - N**2))
    w = wmu[:, None, None] * wnu[None, :, None] * (math.pi / points) * half**3 * (M**2 - N**2)
    dens = bond.psi(rho * np.cos(A), rho * np.sin(A), half * M * N, dtype=np.float64) ** 2
    assert np.sum(dens * w) == pytest.approx(1.0, abs=1e-9)


def _axis_sign_changes(bond) -> int:
    z = np.linspace(-bond.R / 2 + 1e-3, bond.R / 2 - 1e-3, 2001)
    values = bond.psi(np.zeros_like(z), np.zeros_like(z), z, dtype=np.float64)
    return int(np.count_nonzero(np.sign(values[1:]) != np.sign(values[:-1])))


def test_bonding_has_no_node_between_the_nuclei_antibonding_one_plane():
    bonding, anti = parse_bond("bond(1s,1s,R=2.0,+)"), parse_bond("bond(1s,1s,R=2.0,-)")
    assert _axis_sign_changes(bonding) == 0
    assert _axis_sign_changes(anti) == 1
    rng = np.random.default_rng(3)
    x, y = rng.normal(scale=3, size=(2, 500))
    assert np.abs(anti.psi(x, y, np.zeros_like(x), dtype=np.float64)).max() < 1e-15  # z = 0
    assert np.all(bonding.psi(x, y, np.zeros_like(x), dtype=np.float64) > 0)


def test_info_mesh_and_model(tmp_path, capsys):
    assert main(["info", "bond(1s,1s,R=2.0,+)", "--json"]) == 0
    info = json.loads(capsys.readouterr().out)
    assert info["energy_hartree"] is None and "not a molecular calculation" in info["notes"][0]
    assert info["enclosed_fraction"] == pytest.approx(0.9, abs=1e-4)
    assert (
        main(
            [
                "mesh",
                "bond(1s,1s,R=2.0,-)",
                "--grid",
                "64",
                "-o",
                str(tmp_path / "a.stl"),
                "--report",
                str(tmp_path / "a.json"),
            ]
        )
        == 0
    )
    report = json.loads((tmp_path / "a.json").read_text())
    assert report["watertight"] and {b["name"] for b in report["bodies"]} == {
        "positive",
        "negative",
    }
    assert (
        main(
            [
                "model",
                "bond(1s,1s,R=2.0,+)",
                "--size",
                "40",
                "--grid",
                "64",
                "-o",
                str(tmp_path / "m.stl"),
            ]
        )
        == 0
    )


def test_bad_bonds(capsys):
    for text, fragment in [
        ("bond(1s,1s,R=0,+)", "R must be > 0"),
        ("bond(1s,1s,R=2)", "bond(1s,1s,R=2.0,+)"),
        ("bond(2,1,1,1s,R=2,+)", "bond("),
    ]:
        assert main(["info", text]) == 2
        assert fragment in capsys.readouterr().err
    with pytest.raises(Exception, match="real orbital labels"):
        Orbital.from_spec("bond(2px+2py,1s,R=2,+)")
