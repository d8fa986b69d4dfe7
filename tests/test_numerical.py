"""The numerical radial solver against closed forms, a published table and a variational bound."""

from __future__ import annotations

import json
import math

import numpy as np
import pytest
from scipy.optimize import minimize_scalar

from orbviz.states.numerical import NoBoundState, solve_radial
from orbviz.states.potentials import Coulomb, Harmonic, Tabulated, UserPotential, Yukawa
from tests.conftest import reference_radial

HYDROGEN = [(n, l) for n in range(1, 6) for l in range(n)]


@pytest.mark.parametrize(("n", "l"), HYDROGEN)
@pytest.mark.parametrize("Z", [1.0, 2.0])
def test_hydrogen_energies_radii_and_functions(n, l, Z):
    s = solve_radial(Coulomb(Z), n, l)
    # E_n = -Z^2 / (2 n^2) hartree (Bethe & Salpeter 1957; docs/references.md)
    assert s.energy == pytest.approx(-(Z**2) / (2 * n * n), rel=1e-6)
    # <r> = [3n^2 - l(l+1)] / (2Z) (Bethe & Salpeter)
    assert s.expectation(1) == pytest.approx((3 * n * n - l * (l + 1)) / (2 * Z), abs=1e-5)
    # R_nl from scipy's eval_genlaguerre (tests/conftest.py), beyond the nucleus' size
    keep = s.r >= 1e-4
    exact = reference_radial(n, l, s.r[keep], Z)
    assert np.abs(s.R[keep] - exact).max() <= 1e-5 * np.abs(exact).max()
    assert s.nodes == n - l - 1


@pytest.mark.parametrize(("nr", "l"), [(0, 0), (1, 0), (0, 1), (2, 1), (0, 3), (3, 2)])
@pytest.mark.parametrize("omega", [1.0, 0.25])
def test_harmonic_well_spectrum(nr, l, omega):
    # isotropic oscillator: E = (2 n_r + l + 3/2) omega (standard textbook result)
    s = solve_radial(Harmonic(omega), nr + l + 1, l)
    assert s.energy == pytest.approx((2 * nr + l + 1.5) * omega, rel=1e-6)
    assert s.nodes == nr


def _variational_1s(delta: float) -> float:
    # trial e^{-a r}: E(a) = a^2/2 - 4 a^3 / (2a + delta)^2 for V = -e^{-delta r}/r (closed form)
    result = minimize_scalar(
        lambda a: a * a / 2 - 4 * a**3 / (2 * a + delta) ** 2,
        bounds=(1e-3, 2.0),
        method="bounded",
        options={"xatol": 1e-12},
    )
    return result.fun


# Yukawa (Debye) ground states, V = -exp(-delta r)/r: Rogers, Graboske & Harwood,
# Phys. Rev. A 1, 1577 (1970) -- from memory; checked below against a variational bound too
YUKAWA_1S = {0.1: -0.407058, 0.2: -0.326809, 0.5: -0.148117}


@pytest.mark.parametrize("delta", sorted(YUKAWA_1S))
def test_yukawa_ground_state(delta):
    s = solve_radial(Yukawa(1.0, 1.0 / delta), 1, 0)
    assert s.energy == pytest.approx(YUKAWA_1S[delta], abs=2e-6)
    bound = _variational_1s(delta)
    assert s.energy <= bound  # the exact level lies below any variational estimate
    assert s.energy == pytest.approx(bound, rel=0.05)


@pytest.mark.parametrize(("n", "l"), [(2, 0), (3, 0), (3, 1), (4, 2)])
def test_node_counts_in_non_coulomb_potentials(n, l):
    # n - l - 1 radial nodes, counted on the computed functions
    # (Bethe & Salpeter 1957; docs/references.md)
    for potential in (
        Yukawa(2.0, 20.0),
        Harmonic(0.5),
        # Woods-Saxon-like well, -3/(1 + e^t) written as tanh so it cannot overflow
        UserPotential(
            lambda r: -1.5 * (1.0 - np.tanh((r - 6.0) / 1.0)), name="Woods-Saxon-like well"
        ),
    ):
        s = solve_radial(potential, n, l)
        u = s.R * s.r
        big = np.abs(u) > 1e-8 * np.abs(u).max()
        signs = np.sign(u[big])
        assert int(np.count_nonzero(signs[1:] != signs[:-1])) == n - l - 1


def test_user_callable_and_table_reproduce_coulomb(tmp_path):
    callable_potential = UserPotential(lambda r: -1.0 / r, name="-1/r")
    assert solve_radial(callable_potential, 2, 1).energy == pytest.approx(-0.125, rel=1e-8)
    r = np.geomspace(1e-10, 2000.0, 20000)
    path = tmp_path / "coulomb.txt"
    np.savetxt(path, np.column_stack([r, -1.0 / r]), header="r/bohr V/hartree")
    table = Tabulated.from_file(path)
    # the table ends at V(2000) = -5e-4, which is taken as the threshold
    assert solve_radial(table, 2, 1).energy == pytest.approx(-0.125, rel=1e-4)


def test_no_bound_state_is_an_error():
    # a Yukawa well of screening length 0.5 bohr (delta = 2) binds no 1s state
    # (critical delta ~ 1.19, from memory; the variational bound is positive there too)
    assert _variational_1s(2.0) > 0
    with pytest.raises(NoBoundState, match="no bound state with n=1, l=0"):
        solve_radial(Yukawa(1.0, 0.5), 1, 0)


def test_bad_input():
    from orbviz.errors import ParameterError, QuantumNumberError

    with pytest.raises(QuantumNumberError):
        solve_radial(Coulomb(1.0), 2, 2)
    with pytest.raises(ParameterError):
        Yukawa(1.0, -1.0)
    with pytest.raises(ParameterError):
        Tabulated([1, 2, 3], [1, 2, 3])


def test_interpolated_function_is_normalised():
    s = solve_radial(Yukawa(1.0, 10.0), 2, 1)
    r = np.geomspace(1e-6, s.r[-1], 200001)
    value = np.trapezoid((s.radial(r) * r) ** 2, r)
    assert value == pytest.approx(1.0, rel=1e-6)
    assert math.isclose(s.expectation(0), 1.0, rel_tol=1e-7)


@pytest.mark.parametrize(
    ("text", "fragment"),
    [
        ("# r (bohr), V (hartree)\n0.1 -10\n0.2 -5\nabc def\n", "line 4: expected two numbers"),
        ("# r, V\n0.1, -10\n0.2, -5, 3\n", "line 3: expected two numbers r, V, got '0.2, -5, 3'"),
        ("0.1 -10\n0.2\n", "line 2: expected two numbers"),
    ],
)
def test_a_malformed_table_line_is_named_by_its_number(tmp_path, text, fragment):
    from orbviz.errors import ParameterError

    path = tmp_path / "t.txt"
    path.write_text(text)
    with pytest.raises(ParameterError, match=fragment.replace("(", r"\(")):
        Tabulated.from_file(path)


def test_a_comma_in_a_comment_does_not_make_a_table_comma_separated(tmp_path):
    # issue 18: "# r (bohr), V (hartree)" above whitespace-separated columns made the file
    # unreadable. The Coulomb table still gives hydrogen's 2p energy, -1/8 hartree (closed form)
    r = np.geomspace(1e-10, 2000.0, 20000)
    path = tmp_path / "coulomb.txt"
    np.savetxt(path, np.column_stack([r, -1.0 / r]), header="r (bohr), V (hartree)")
    assert solve_radial(Tabulated.from_file(path), 2, 1).energy == pytest.approx(-0.125, rel=1e-4)


# ---------------------------------------------------------------- the solver's stated accuracy
# Hydrogen: E = -1/2n^2 (Bohr; Griffiths, Introduction to QM, eq. 4.70), <r> = (3n^2 - l(l+1))/2
# (Bethe & Salpeter, Quantum Mechanics of One- and Two-Electron Atoms, eq. 3.24), radial nodes
# at n x / 2 for the roots x of the generalised Laguerre polynomial L_{n-l-1}^{2l+1}
# (scipy.special.roots_genlaguerre, an independent implementation).
HYDROGEN_UP_TO_12 = [(n, l) for n in range(1, 13) for l in (0, 1, 2) if l < n]


@pytest.mark.parametrize(("n", "l"), HYDROGEN_UP_TO_12)
def test_hydrogen_to_n_12_within_the_stated_accuracy(n, l):
    from scipy.special import roots_genlaguerre

    from orbviz.states.numerical import solve_radial
    from orbviz.states.potentials import parse_potential

    s = solve_radial(parse_potential("coulomb"), n, l)
    exact = -0.5 / n**2
    assert abs(s.energy - exact) <= 1e-9 * abs(exact)  # energies to 1e-9 relative
    assert abs(s.expectation(1) - (3 * n * n - l * (l + 1)) / 2) <= 1e-6  # <r> to 1e-6 bohr
    if n - l - 1:
        x, _ = roots_genlaguerre(n - l - 1, 2 * l + 1)
        assert np.abs(s.node_radii() - n * x / 2).max() <= 1e-6  # nodes to 1e-6 bohr
    assert 0 < s.error < 1e-7 * abs(exact)  # the error estimate is given, and an upper one


@pytest.mark.parametrize("big_n", range(11))
def test_harmonic_well_levels_to_N_10(big_n):
    # E = (2 n_r + l + 3/2) omega, the 3D isotropic oscillator (Sakurai & Napolitano, Modern
    # Quantum Mechanics; from memory); here n = n_r + l + 1
    from orbviz.states.numerical import solve_radial
    from orbviz.states.potentials import Harmonic

    omega = 0.37
    for l in range(big_n % 2, big_n + 1, 2):
        n_r = (big_n - l) // 2
        s = solve_radial(Harmonic(omega), n_r + l + 1, l)
        assert s.energy == pytest.approx((big_n + 1.5) * omega, rel=1e-9)


def test_hulthen_potential_given_as_a_table(tmp_path):
    # V = -delta e^{-delta r} / (1 - e^{-delta r}) (Z = 1): the s levels are known in closed
    # form, E_n = -(1 - n^2 delta / 2)^2 / (2 n^2) (L. Hulthen, Ark. Mat. Astron. Fys. 28A (1942);
    # e.g. Fluegge, Practical Quantum Mechanics, problem 68). Read from a file through the same
    # route as --potential table:FILE, with a comment line whose commas are not separators.
    from orbviz.states.numerical import solve_radial
    from orbviz.states.potentials import parse_potential

    delta = 0.05
    r = np.geomspace(1e-6, 400.0, 4000)
    v = -delta * np.exp(-delta * r) / -np.expm1(-delta * r)
    table = tmp_path / "hulthen.dat"
    rows = "".join(f"{a:.17g} {b:.17g}\n" for a, b in zip(r, v, strict=True))
    table.write_text("# r (bohr), V (hartree)\n" + rows)
    potential = parse_potential(f"table:{table}")
    for n in (1, 2, 3, 4):
        exact = -((1 - n * n * delta / 2) ** 2) / (2 * n * n)
        # the table's cubic interpolation limits it (docs/spec.md): 1e-9 relative here
        assert solve_radial(potential, n, 0).energy == pytest.approx(exact, rel=1e-9)


@pytest.mark.parametrize(
    ("spec", "potential", "size"),
    [
        ("10,4,2", "coulomb", 100),  # n^2 (Griffiths eq. 4.89)
        ("2pz", "coulomb", 4),
        ("3s", "harmonic:0.37", 15),  # N = 4: (N + 1)(N + 2)/2 (Sakurai; from memory)
        ("6,2,1", "harmonic:0.5", 45),  # N = 8
    ],
)
def test_level_sizes_under_a_potential(capsys, spec, potential, size):
    from orbviz.cli import main

    assert main(["info", spec, "--potential", potential, "--json"]) == 0
    info = json.loads(capsys.readouterr().out)
    assert info["degeneracy"] == size
    assert 0 < info["energy_error_hartree"] < 1e-8 * abs(info["energy_hartree"])
