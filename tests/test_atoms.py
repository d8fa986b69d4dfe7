"""Configurations and Slater's-rules effective charges; screened orbitals through the CLI."""

from __future__ import annotations

import json

import pytest

import orbviz
from orbviz.cli import main
from orbviz.errors import SpecError
from orbviz.states.atoms import SYMBOLS, configuration, configuration_text, element, slater_charge
from orbviz.states.orbital import Orbital

# Slater's rules, Phys. Rev. 36, 57 (1930); these worked values appear in standard inorganic
# chemistry textbooks (e.g. Housecroft & Sharpe, Inorganic Chemistry) -- from memory
SLATER = [
    ("He", 1, 0, 1.70),
    ("C", 2, 1, 3.25),
    ("N", 2, 1, 3.90),
    ("O", 2, 1, 4.55),
    ("F", 2, 1, 5.20),
    ("Na", 3, 0, 2.20),
    ("Cl", 3, 1, 6.10),
    ("K", 4, 0, 2.20),
    ("Fe", 3, 2, 6.25),
    ("Fe", 4, 0, 3.75),
    ("Cu", 4, 0, 3.70),
    ("Zn", 4, 0, 4.35),
    ("Zn", 3, 2, 8.85),
]


@pytest.mark.parametrize(("symbol", "n", "l", "expected"), SLATER)
def test_slater_charges(symbol, n, l, expected):
    assert slater_charge(element(symbol), n, l) == pytest.approx(expected, abs=1e-9)


def test_every_configuration_holds_z_electrons_within_capacity():
    for Z in range(1, len(SYMBOLS) + 1):
        config = configuration(Z)
        assert sum(config.values()) == Z
        assert all(0 < k <= 2 * (2 * l + 1) for (_, l), k in config.items())


# ground-state configurations with exceptions to aufbau (NIST Atomic Spectra Database, from
# memory), and two regular ones
@pytest.mark.parametrize(
    ("symbol", "text"),
    [
        ("Cr", "1s2 2s2 2p6 3s2 3p6 3d5 4s1"),
        ("Cu", "1s2 2s2 2p6 3s2 3p6 3d10 4s1"),
        ("Pd", "1s2 2s2 2p6 3s2 3p6 3d10 4s2 4p6 4d10"),
        ("Ag", "1s2 2s2 2p6 3s2 3p6 3d10 4s2 4p6 4d10 5s1"),
        ("Fe", "1s2 2s2 2p6 3s2 3p6 3d6 4s2"),
        ("Xe", "1s2 2s2 2p6 3s2 3p6 3d10 4s2 4p6 4d10 5s2 5p6"),
    ],
)
def test_configurations(symbol, text):
    assert configuration_text(element(symbol)) == text


def test_screened_orbital_is_hydrogen_like_with_z_eff():
    # <r> = [3n^2 - l(l+1)] / (2 Z_eff) with Slater's Z_eff = 2.20 for Na 3s
    orbital = Orbital.from_spec("Na:3s")
    assert orbital.Z == pytest.approx(2.20) and orbital.element == "Na"
    assert orbital.label == "Na:3s"


@pytest.mark.parametrize(
    ("spec", "fragment"),
    [
        ("Na:3dz2", "no 3d electron"),
        ("Xx:1s", "unknown element"),
        ("Fe:3dz2+4s", "different Slater charges"),
    ],
)
def test_screened_errors(spec, fragment):
    with pytest.raises(SpecError, match=fragment):
        Orbital.from_spec(spec)


def test_cli_info_and_mesh_for_a_screened_orbital(capsys, tmp_path):
    assert main(["info", "C:2p", "--json"]) == 0  # the element form names the set, like 2p
    infos = json.loads(capsys.readouterr().out)
    assert [i["label"] for i in infos] == ["C:2px", "C:2py", "C:2pz"]
    for info in infos:
        # Slater's rules for carbon 2p: Z_eff = 6 - (3 x 0.35 + 2 x 0.85) = 3.25 (Slater 1930);
        # <r> = [3n^2 - l(l+1)]/(2 Z_eff) (Bethe & Salpeter 1957)
        assert info["element"] == "C" and info["Z"] == pytest.approx(3.25)
        assert info["mean_radius_bohr"] == pytest.approx((12 - 2) / (2 * 3.25), rel=1e-12)
    assert main(["mesh", "Fe:3dxy", "--grid", "48", "-o", str(tmp_path / "fe.stl")]) == 0
    status = main(["info", "Na:3s", "--Z", "2"])
    assert status == 2 and "leave out Z" in capsys.readouterr().err


def test_scene_atom_key_prefixes_every_spec():
    from orbviz.errors import SceneError
    from orbviz.scenes.load import parse_scene

    items = parse_scene('[[shells]]\nn = 2\natom = "C"\n', "a.toml").items
    assert [i.spec for i in items] == ["C:2s", "C:2px", "C:2py", "C:2pz"]
    with pytest.raises(SceneError, match="no 3d electron"):
        parse_scene('[[orbital]]\nspec = "3dz2"\natom = "Na"\n', "a.toml")


@pytest.mark.parametrize(
    ("spec", "z_eff", "n_star"),
    [
        # Slater's rules (J. C. Slater, Phys. Rev. 36, 57 (1930)), worked by hand here:
        # Zn 4s: 30 - (0.35*1 + 0.85*18 + 1.00*10) = 4.35, n* = 3.7
        ("Zn:4s", 4.35, 3.7),
        # Ag 5s1: 47 - (0.85*18 + 1.00*28) = 3.70, n* = 4.0
        ("Ag:5s", 3.70, 4.0),
        # Xe 5s2 5p6: 54 - (0.35*7 + 0.85*18 + 1.00*28) = 8.25, n* = 4.0
        ("Xe:5pz", 8.25, 4.0),
        # Kr 4s2 4p6: 36 - (0.35*7 + 0.85*18 + 1.00*10) = 8.25, n* = 3.7
        ("Kr:4pz", 8.25, 3.7),
        # Na 3s1: 11 - (0.85*8 + 1.00*2) = 2.20, n* = 3
        ("Na:3s", 2.20, 3.0),
    ],
)
def test_screened_energies_follow_slaters_rule_with_his_n_star(spec, z_eff, n_star):
    facts = orbviz.summarise(spec)
    assert facts["Z"] == pytest.approx(z_eff, abs=1e-12)
    assert facts["energy_hartree"] == pytest.approx(-(z_eff**2) / (2 * n_star**2), rel=1e-12)
    assert facts["degeneracy"] == 4  # an ns + np Slater group shares Z_eff and n*
