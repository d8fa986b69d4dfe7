"""Benchmark: numerical radial solutions, per state, for hydrogen up to n = 12.

Targets: issue 7, < 50 ms a state for n <= 5; issue 18, <= 0.2 s a state for every s, p and d
state up to n = 12, at energies <= 1e-9 relative, <r> <= 1e-6 bohr. Hydrogen states, whose
exact energies are known, are solved in-process after a warm-up (scipy's imports). The time of
one shift-invert eigensolve on the coarse grid is measured in the same run, for comparison.
Run: python benchmarks/bench_radial.py
"""

from __future__ import annotations

import math
import statistics
import time

import numpy as np
from _common import save

from orbviz.states.numerical import _state, solve_radial
from orbviz.states.potentials import Coulomb, Yukawa


def numerov_pass(energy: float, r: np.ndarray, l: int = 0) -> float:
    """One outward Numerov integration of u'' = 2 (V + l(l+1)/2r^2 - E) u for V = -1/r.

    The recurrence is sequential, so it runs as a Python loop: this times the inner step of a
    shooting method, for comparison with the matrix method used by orbviz.
    """
    h = r[1] - r[0]
    k = 2.0 * (energy + 1.0 / r - l * (l + 1) / (2 * r * r))
    f = 1.0 + h * h * k / 12.0
    u0, u1 = 0.0, h
    for i in range(1, r.size - 1):
        u0, u1 = u1, ((12.0 - 10.0 * f[i]) * u1 - f[i - 1] * u0) / f[i + 1]
    return u1


def main() -> None:
    solve_radial(Coulomb(1.0), 2, 1)  # warm-up: imports
    rows = {}
    for n, l in [(1, 0), (2, 1), (3, 0), (5, 2)]:
        times, errors = [], []
        for _ in range(7):
            start = time.perf_counter()
            s = solve_radial(Coulomb(1.0), n, l)
            times.append(time.perf_counter() - start)
            errors.append(abs(s.energy / (-0.5 / n**2) - 1))
        rows[f"{n},{l}"] = {
            "median_ms": 1e3 * statistics.median(times),
            "relative_energy_error": max(errors),
        }
    upto12 = {}
    for n in range(1, 13):
        for l in (0, 1, 2):
            if l >= n:
                continue
            times, worst_e, worst_r = [], 0.0, 0.0
            for _ in range(3):
                start = time.perf_counter()
                s = solve_radial(Coulomb(1.0), n, l)
                times.append(time.perf_counter() - start)
                worst_e = max(worst_e, abs(s.energy / (-0.5 / n**2) - 1))
                worst_r = max(worst_r, abs(s.expectation(1) - (3 * n * n - l * (l + 1)) / 2))
            upto12[f"{n},{l}"] = (statistics.median(times), worst_e, worst_r)
    slowest = max(t for t, _, _ in upto12.values())
    print(
        f"n <= 12, s p d: slowest {1e3 * slowest:.0f} ms a state (target 200 ms), worst "
        f"E {max(e for _, e, _ in upto12.values()):.1e} relative, <r> "
        f"{max(r for _, _, r in upto12.values()):.1e} bohr"
    )
    x = np.linspace(math.log(1e-10), math.log(160.0), 4000)
    eig = []
    for _ in range(15):
        start = time.perf_counter()
        _state(Coulomb(1.0), 1, 0, x, -0.13)
        eig.append(time.perf_counter() - start)
    yukawa = []
    for _ in range(15):
        start = time.perf_counter()
        solve_radial(Yukawa(1.0, 10.0), 1, 0)
        yukawa.append(time.perf_counter() - start)
    grid = np.linspace(1e-6, 40.0, 6000)  # as many points as the fine grid
    passes = []
    for _ in range(15):
        start = time.perf_counter()
        numerov_pass(-0.5, grid)
        passes.append(time.perf_counter() - start)
    numerov_ms = 1e3 * statistics.median(passes)
    bisection_steps = math.ceil(math.log2(1.0 / 1e-10))  # an interval of 1 hartree to 1e-10
    worst = max(r["median_ms"] for r in rows.values())
    save(
        "radial",
        {
            "hydrogen": rows,
            "worst_median_ms": worst,
            "worst_over_target_50ms": worst / 50.0,
            "up_to_n12_slowest_ms": 1e3 * slowest,
            "up_to_n12_slowest_over_target_200ms": slowest / 0.2,
            "up_to_n12_worst_relative_energy_error": max(e for _, e, _ in upto12.values()),
            "up_to_n12_worst_mean_radius_error_bohr": max(r for _, _, r in upto12.values()),
            "one_eigensolve_4000_points_ms": 1e3 * statistics.median(eig),
            "yukawa_1s_median_ms": 1e3 * statistics.median(yukawa),
            "numerov_one_pass_6000_points_ms": numerov_ms,
            "numerov_shooting_estimate_ms": numerov_ms * bisection_steps,
            "matrix_method_over_numerov_shooting": worst / (numerov_ms * bisection_steps),
        },
    )


if __name__ == "__main__":
    main()
