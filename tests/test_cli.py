"""The command line, in process: output keys, physics in the JSON, and every bad-input class."""

from __future__ import annotations

import json
import math

import pytest
from scipy.constants import physical_constants

from orbviz.cli import main


def _run(capsys, *argv):
    status = main(list(argv))
    out, err = capsys.readouterr()
    return status, out, err


KEYS = {
    "n",
    "l",
    "m",
    "Z",
    "form",
    "energy_hartree",
    "energy_ev",
    "degeneracy",
    "radial_nodes",
    "angular_nodes",
    "radial_node_radii_bohr",
    "mean_radius_bohr",
    "most_probable_radius_bohr",
    "fraction",
    "isovalue",
    "enclosed_fraction",
}


def test_info_json_eigenstate(capsys):
    status, out, _ = _run(capsys, "info", "3s", "--Z", "2", "--json")
    assert status == 0
    info = json.loads(out)
    assert KEYS <= set(info)
    assert (info["n"], info["l"], info["m"], info["form"]) == (3, 0, 0, "real")
    hartree_ev = physical_constants["Hartree energy in eV"][0]  # CODATA via scipy.constants
    assert info["energy_ev"] == pytest.approx(-4 / 18 * hartree_ev, rel=1e-12)
    assert info["degeneracy"] == 9
    assert info["radial_nodes"] == 2 and info["angular_nodes"] == 0
    # 3s node radii (9 -+ 3 sqrt3)/(2Z) and <r> = [3n^2 - l(l+1)]/2Z
    # (Bethe & Salpeter 1957; docs/references.md)
    assert info["radial_node_radii_bohr"] == pytest.approx(
        [(9 - 3 * math.sqrt(3)) / 4, (9 + 3 * math.sqrt(3)) / 4], rel=1e-12
    )
    assert info["mean_radius_bohr"] == pytest.approx(27 / 4, rel=1e-12)
    assert info["enclosed_fraction"] == pytest.approx(0.9, abs=1e-4)


def test_info_json_complex_and_superposition(capsys):
    _, out, _ = _run(capsys, "info", "4,2,-1", "--json")
    info = json.loads(out)
    assert (info["m"], info["form"]) == (-1, "complex")
    _, out, _ = _run(capsys, "info", "0.6*2s+0.8*3pz", "--json")
    info = json.loads(out)
    assert info["n"] is None and info["l"] is None and info["m"] is None
    assert info["degeneracy"] is None
    # expectation value of the energy: 0.36 E_2 + 0.64 E_3 with E_n = -1/2n^2 hartree
    assert info["energy_hartree"] == pytest.approx(-0.36 / 8 - 0.64 / 18, rel=1e-12)
    # <r> = 0.36 * 6 + 0.64 * 12.5 (closed forms; no cross term between l = 0 and l = 1)
    assert info["mean_radius_bohr"] == pytest.approx(0.36 * 6 + 0.64 * 12.5, rel=1e-10)
    assert 0 < info["isovalue"] and info["enclosed_fraction"] == pytest.approx(0.9, abs=1e-4)


def test_mean_radius_cross_term_by_integration(capsys):
    # <r> of (1s + 2s)/sqrt2 includes the 1s-2s radial cross term; integrate independently
    from scipy import integrate

    from tests.conftest import reference_radial

    _, out, _ = _run(capsys, "info", "1s+2s", "--json")
    info = json.loads(out)
    expected, _ = integrate.quad(
        lambda r: 0.5 * (reference_radial(1, 0, r) + reference_radial(2, 0, r)) ** 2 * r**3, 0, 200
    )
    assert info["mean_radius_bohr"] == pytest.approx(expected, rel=1e-9)


def test_reduced_mass_hydrogen(capsys):
    # hydrogen ground state with the proton's reduced mass: -R_inf hc / (1 + m_e/m_p) (CODATA)
    _, out, _ = _run(capsys, "info", "1s", "--reduced-mass", "--json")
    info = json.loads(out)
    rydberg = physical_constants["Rydberg constant times hc in eV"][0]
    ratio = physical_constants["proton-electron mass ratio"][0]
    assert info["reduced_mass"] is True
    assert info["energy_ev"] == pytest.approx(-rydberg / (1 + 1 / ratio), rel=1e-12)
    # NIST hydrogen ionisation energy 13.598434 eV (from memory); the rest is QED/fine structure
    assert -info["energy_ev"] == pytest.approx(13.598434, rel=2e-5)


def test_text_output(capsys):
    status, out, _ = _run(capsys, "info", "3dz2")
    assert status == 0 and "3dz2" in out and "bohr^-3" in out and "reduced mass off" in out


def test_help_shows_grammar(capsys):
    status, out, _ = _run(capsys, "info", "--help")
    assert status == 0 and "4,2,-1" in out and "superposition" in out


BAD = [
    (["info", "2pq"], "expected an orbital"),
    (["info", "(1+*2s"], "expected an orbital"),
    (["info", "0,0,0"], "n >= 1"),
    (["info", "2,2,0"], "0 <= l < n"),
    (["info", "2,1,3"], "|m| <= l"),
    (["info", "2.5,1,0"], "integer"),
    (["info", "3,1.5,0"], "integer"),
    (["info", "2pz", "--fraction", "1"], "--fraction: expected a number from 0.01 to 0.999"),
    (["info", "2pz", "--fraction", "0"], "--fraction: expected a number from 0.01 to 0.999"),
    (["info", "2pz", "--fraction", "-0.3"], "--fraction: expected a number from 0.01"),
    (["info", "2pz", "--fraction", "nan"], "--fraction: expected a number"),
    (["info", "2pz", "--Z", "inf"], "--Z: expected a number from 0.001 to 1000"),
    (["info", "2pz", "--Z", "1e150"], "--Z: expected a number from 0.001 to 1000"),
    (["info", "2pz", "--Z", "1e-300"], "--Z: expected a number from 0.001 to 1000"),
    (["info", "2pz", "--Z", "0"], "Z"),
    (["info", "2pz", "--Z", "-2"], "Z"),
    (["info", "2pz", "--Z", "two"], "number"),
    (["info", "inf*2pz"], "finite"),
    (["info", "2pz - 2pz"], "zero"),
    (["info", "2pz", "--Z", "2", "--reduced-mass"], "nuclear-mass"),
    (["info", "2pz", "--nuclear-mass", "-1"], "nuclear-mass"),
    (["info", "2pz", "--nuclear-mass", "1e-300"], "--nuclear-mass: expected a number from 0.00054"),
    (["info", "Na:3s", "--reduced-mass"], "proton's mass, which is hydrogen's, not Na's"),
    (["info", "bond(1s,1s,R=2,+)", "--real"], "bond(...) takes real labels already"),
    (["info"], "spec"),
    (["frobnicate"], "invalid choice"),
]


@pytest.mark.parametrize(("argv", "fragment"), BAD)
def test_bad_input_one_line_exit_2(capsys, argv, fragment):
    status, out, err = _run(capsys, *argv)
    assert status == 2
    assert err.count("\n") == 1 and err.startswith("orbviz: error: ")
    assert fragment in err
    assert "Traceback" not in err + out


@pytest.mark.parametrize(
    ("spec", "l", "m", "form"),
    [
        ("2,1,1", 1, 1, "complex"),
        ("3,2,1", 2, 1, "complex"),
        ("4,3,0", 3, 0, "complex"),
        ("5,4,-2", 4, -2, "complex"),
        ("3dxy", 2, -2, "real"),
        ("4fz3", 3, 0, "real"),
    ],
)
def test_info_angular_nodes(capsys, spec, l, m, form):
    # a complex eigenstate's |psi|^2 vanishes where P_l^|m|(cos polar) does: count the sign
    # changes of scipy.special.lpmv on (-1, 1); a real form has l nodal surfaces (textbook)
    import numpy as np
    from scipy.special import lpmv

    status, out, _ = _run(capsys, "info", spec, "--json")
    assert status == 0
    info = json.loads(out)
    t = (np.arange(20000) + 0.5) / 10000 - 1  # midpoints: no t lands on a root
    cones = int(np.count_nonzero(np.diff(np.sign(lpmv(abs(m), l, t))) != 0))
    assert info["angular_nodes"] == (cones if form == "complex" else l)
    if form == "complex":
        assert cones == l - abs(m)


def test_mesh_notes_a_grid_too_coarse_for_thin_shells(capsys, tmp_path):
    # 12s at the default grid: see tests/test_mesh.py for the vertex levels behind the note
    status, out, err = _run(capsys, "mesh", "12s", "-o", str(tmp_path / "a.stl"))
    assert status == 0 and out.startswith("wrote ")
    assert err.startswith("orbviz: note: the thinnest shell is") and "use a grid of" in err
    status, _, err = _run(capsys, "mesh", "3s", "-o", str(tmp_path / "b.stl"))
    assert status == 0 and err == ""


def test_every_option_of_every_command_has_help_with_its_default():
    # the help text is generated from the options model; every flag must say what it does, and
    # every option that takes a value must show its default (the brief's requirement)
    import argparse

    from orbviz.cli.parser import build_parser

    parser = build_parser()
    (sub,) = [a for a in parser._actions if isinstance(a, argparse._SubParsersAction)]
    assert set(sub.choices) == {
        "info",
        "mesh",
        "render",
        "plot",
        "model",
        "animate",
        "sample",
        "batch",
        "demo",
    }
    for name, command in sub.choices.items():
        for action in command._actions:
            if isinstance(action, argparse._HelpAction) or not action.option_strings:
                continue
            assert action.help, (name, action.option_strings)
            takes_value = action.nargs != 0
            if takes_value and not action.required:
                assert "default" in action.help or action.dest in ("report",), (
                    name,
                    action.option_strings,
                )


def test_top_level_help_lists_hybrids_and_bonds(capsys):
    status, out, _ = _run(capsys, "--help")
    assert status == 0 and "2sp3[1]" in out and "bond(1s,1s,R=2.0,+)" in out
    status, out, _ = _run(capsys, "animate", "--help")
    assert all(kind in out for kind in (".gif", ".mp4", ".glb", "folder"))
