"""Two-centre combinations: overlap against the closed form, norm, nodes, meshes and models."""

from __future__ import annotations

import json
import math

import numpy as np
import pytest

from orbviz import state
from orbviz.cli import main
from orbviz.states.orbital import Orbital


def parse_bond(spec):
    return state(spec)


@pytest.mark.parametrize("R", [0.5, 1.0, 2.0, 4.0, 7.0])
def test_1s_overlap_closed_form(R):
    # S(R) = e^{-R} (1 + R + R^2/3) for two hydrogen 1s orbitals R bohr apart (a standard
    # textbook result, e.g. Szabo & Ostlund, Modern Quantum Chemistry -- from memory)
    bond = parse_bond(f"bond(1s,1s,R={R},+)")
    assert bond.S == pytest.approx(math.exp(-R) * (1 + R + R * R / 3), abs=1e-10)


@pytest.mark.slow
@pytest.mark.parametrize(
    ("spec", "cos_azimuth"),
    [
        ("bond(1s,1s,R=2.0,+)", False),
        ("bond(1s,1s,R=2.0,-)", False),
        ("bond(2pz,2pz,R=4,+)", False),
        ("bond(2px,2px,R=4,-)", True),
    ],
)
def test_normalised_by_an_independent_integral(spec, cos_azimuth):
    # integral of |psi|^2 dV = 1, by scipy.integrate.dblquad in cylindrical coordinates (rho, z)
    # (independent of the spheroidal quadrature orbviz normalises with). A sigma combination does
    # not depend on the azimuth: dV = 2 pi rho; a pi one (px) goes as cos(azimuth): pi rho.
    from scipy.integrate import dblquad

    bond = parse_bond(spec)
    half = bond.R / 2

    def density(rho, z):
        value = bond.psi(np.array([rho]), np.zeros(1), np.array([z]), dtype=np.float64)[0]
        return value * value * rho * (math.pi if cos_azimuth else 2 * math.pi)

    total = 0.0
    for z_low, z_high in [(-60, -half), (-half, 0.0), (0.0, half), (half, 60)]:  # nuclei at ends
        part, _ = dblquad(density, z_low, z_high, 0.0, 60.0, epsabs=1e-12, epsrel=1e-10)
        total += part
    assert total == pytest.approx(1.0, abs=1e-7)


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
        ("bond(1s,1s,R=0,+)", "R must be from 0.01 to 40 bohr"),
        ("bond(1s,1s,R=1e104,-)", "R must be from 0.01 to 40 bohr"),
        ("bond(1s,1s,R=2)", "bond(1s,1s,R=2.0,+)"),
        ("bond(2,1,1,1s,R=2,+)", "bond("),
    ]:
        assert main(["info", text]) == 2
        assert fragment in capsys.readouterr().err
    with pytest.raises(Exception, match="real orbital labels"):
        state("bond(2px+2py,1s,R=2,+)")
    with pytest.raises(Exception, match="two-centre combination, not a one-centre Orbital"):
        Orbital.from_spec("bond(1s,1s,R=2,+)")
