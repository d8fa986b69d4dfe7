"""Benchmark: exact samples of |psi|^2, against a plain numpy inverse-CDF sampler.

Targets (issue 16): 10^6 samples of 3dz2 in at most 1 s in process, of a three-term
superposition in at most 3 s; peak memory for 10^7 points at most 1 GB. Reported as ratios to
a plain sampler written here, in the same run (median of 5, alternating): 3dz2's radius by
inverting its radial CDF on a table with np.interp, its direction by rejection against
|Y_20|^2 <= 5 / (4 pi), which is what an exact sampler of one eigenstate must do at least.
Each memory figure is a fresh process's peak resident size (ru_maxrss).
Run: python benchmarks/bench_sample.py
"""

from __future__ import annotations

import statistics
import subprocess
import sys
import time

from _common import save

PLAIN = """
import math, time, numpy as np
rng = np.random.default_rng(1)
t = time.perf_counter()
n = 1_000_000
r = np.linspace(0, 80, 1 << 15)
p = r**6 * np.exp(-2 * r / 3)                       # r^2 R_32^2 up to a constant
cdf = np.concatenate([[0], np.cumsum(0.5 * (p[1:] + p[:-1]) * np.diff(r))])
radius = np.interp(rng.random(n), cdf / cdf[-1], r)
out, have = np.empty((n, 3)), 0
while have < n:
    v = rng.standard_normal((6 * (n - have), 3))
    v /= np.linalg.norm(v, axis=1, keepdims=True)
    y = (3 * v[:, 2] ** 2 - 1) / 2                   # Y_20 up to sqrt(5 / 4 pi)
    v = v[rng.random(len(v)) < y * y][: n - have]
    out[have : have + len(v)] = v
    have += len(v)
out *= radius[:, None]
print(time.perf_counter() - t)
"""

ORBVIZ = """
import sys, time, orbviz
from orbviz.levels.sampling import sample
state = orbviz.state(sys.argv[1])
sample(state, 1000, seed=0)                          # tables and imports warm
t = time.perf_counter()
points = sample(state, int(sys.argv[2]), seed=1)
print(time.perf_counter() - t, points.acceptance)
"""

MEMORY = """
import resource, sys, orbviz
from orbviz.levels.sampling import sample
points = sample(orbviz.state(sys.argv[1]), int(sys.argv[2]), seed=1)
print(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024)
"""


def _run(code: str, *args: str) -> list[float]:
    out = subprocess.run(
        [sys.executable, "-c", code, *args], check=True, capture_output=True, text=True
    ).stdout
    return [float(v) for v in out.split()]


def main(repeats: int = 5) -> None:
    runs: dict[str, list[float]] = {"plain_3dz2": [], "orbviz_3dz2": [], "orbviz_mixture": []}
    acceptance = 0.0
    for _ in range(repeats):
        runs["plain_3dz2"].append(_run(PLAIN)[0])
        runs["orbviz_3dz2"].append(_run(ORBVIZ, "3dz2", "1000000")[0])
        seconds, acceptance = _run(ORBVIZ, "0.5*2s + 0.5*2pz + 0.7*3dz2", "1000000")
        runs["orbviz_mixture"].append(seconds)
    medians = {key: statistics.median(values) for key, values in runs.items()}
    start = time.perf_counter()
    peak_1e7 = _run(MEMORY, "3dz2", "10000000")[0]
    seconds_1e7 = time.perf_counter() - start
    baseline = _run(MEMORY, "3dz2", "1000")[0]
    result = {
        "plain_numpy_3dz2_1e6_s": medians["plain_3dz2"],
        "orbviz_3dz2_1e6_s": medians["orbviz_3dz2"],
        "orbviz_over_plain": medians["orbviz_3dz2"] / medians["plain_3dz2"],
        "orbviz_three_term_1e6_s": medians["orbviz_mixture"],
        "three_term_acceptance": acceptance,
        "peak_mb_1e7_points": peak_1e7,
        "peak_mb_1e3_points": baseline,
        "process_1e7_points_s": seconds_1e7,
        "targets": {"3dz2_s": 1.0, "three_term_s": 3.0, "peak_mb_1e7": 1024},
        "all_runs_s": runs,
    }
    save("sample", result)


if __name__ == "__main__":
    main()
