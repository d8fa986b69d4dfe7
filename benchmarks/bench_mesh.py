"""Benchmark: spec to written GLB for 3dz2 at 256^3, orbviz against a straightforward pipeline.

The straightforward pipeline is written here, as issue 3 describes it:
    meshgrid -> spherical angles -> scipy.special radial and angular parts -> sort-and-cumsum
    isovalue -> skimage marching cubes (both phases) -> trimesh GLB export.
Each pipeline runs in its own process, so that its peak memory (ru_maxrss) is its own; times are
taken in-process after the imports. Also measured: `orbviz mesh` as a whole process, and how
orbviz scales from 96^3 to 512^3. Targets: >= 15x faster in-process, <= 2.5 s whole process,
<= half the peak memory of the straightforward pipeline.

Each side runs 5 times, alternating; the report gives medians and extremes (this machine's timings
vary by a factor of 2-3 from run to run for the memory-heavy straightforward pipeline).

Run: python benchmarks/bench_mesh.py [--quick]
"""

from __future__ import annotations

import json
import resource
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

from _common import save

SPEC, N = "3dz2", 256

BASELINE = r"""
import math, sys, time, json, resource
import numpy as np, trimesh
from scipy.special import eval_genlaguerre, factorial, sph_harm_y
from skimage.measure import marching_cubes
n, l, m, N, out, L = 3, 2, 0, int(sys.argv[1]), sys.argv[2], float(sys.argv[3])
t0 = time.perf_counter()                       # L: the box half-width orbviz chooses (bohr)
axis = np.linspace(-L, L, N)
x, y, z = np.meshgrid(axis, axis, axis, indexing="ij")
r = np.sqrt(x * x + y * y + z * z)
polar = np.arccos(np.divide(z, r, out=np.zeros_like(r), where=r > 0))
azimuth = np.arctan2(y, x)
rho = 2 * r / n
norm = math.sqrt((2 / n) ** 3 * factorial(n - l - 1) / (2 * n * factorial(n + l)))
radial = norm * np.exp(-rho / 2) * rho**l * eval_genlaguerre(n - l - 1, 2 * l + 1, rho)
psi = radial * np.real(sph_harm_y(l, m, polar, azimuth))
dens = psi * psi
h = axis[1] - axis[0]
order = np.sort(dens.ravel())[::-1]            # sort-and-cumsum isovalue
level = order[np.searchsorted(np.cumsum(order) * h**3, 0.9)]
meshes = []
for sign in (1, -1):
    v, f, normals, _ = marching_cubes(sign * psi, math.sqrt(level), spacing=(h, h, h))
    meshes.append(trimesh.Trimesh(v - L, f, vertex_normals=normals))
scene = trimesh.Scene(meshes)
scene.export(out)
elapsed = time.perf_counter() - t0
peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
print(json.dumps({"seconds": elapsed, "peak_rss_mb": peak,
                  "faces": sum(len(m.faces) for m in meshes)}))
"""

ORBVIZ = r"""
import sys, time, json, resource
from orbviz.states.orbital import Orbital
from orbviz.surface.mesh import build_mesh
from orbviz.surface.options import MeshOptions
from orbviz.export import write_bodies
import orbviz.surface.contour, orbviz.export.gltf, trimesh, vtkmodules.vtkFiltersCore  # noqa: E501
spec, N, out = sys.argv[1], int(sys.argv[2]), sys.argv[3]
t0 = time.perf_counter()
result = build_mesh(Orbital.from_spec(spec), MeshOptions(grid=N))
write_bodies(result.bodies, out)
elapsed = time.perf_counter() - t0
peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
print(json.dumps({"seconds": elapsed, "peak_rss_mb": peak,
                  "faces": sum(len(b.faces) for b in result.bodies)}))
"""


def child(code: str, *args: str) -> dict:
    out = subprocess.run(
        [sys.executable, "-c", code, *args], check=True, capture_output=True, text=True
    )
    return json.loads(out.stdout.strip().splitlines()[-1])


def whole_process(args: list[str]) -> float:
    start = time.perf_counter()
    subprocess.run([sys.executable, "-m", "orbviz", *args], check=True, capture_output=True)
    return time.perf_counter() - start


def summary(runs: list[dict]) -> dict:
    times = sorted(r["seconds"] for r in runs)
    return {
        "median_s": statistics.median(times),
        "min_s": times[0],
        "max_s": times[-1],
        "peak_rss_mb": max(r["peak_rss_mb"] for r in runs),
        "faces": runs[0]["faces"],
    }


def main() -> None:
    quick = "--quick" in sys.argv
    repeats = 1 if quick else 5
    with tempfile.TemporaryDirectory() as tmp:
        glb = str(Path(tmp) / "m.glb")
        from orbviz.levels.grid import box_half_width
        from orbviz.levels.isovalue import enclosing_isovalue
        from orbviz.states.orbital import Orbital

        orbital = Orbital.from_spec(SPEC)
        width = box_half_width(orbital, enclosing_isovalue(orbital), N)  # same box for both
        # alternate the two so that the machine's load falls on both alike
        base_runs, our_runs = [], []
        for _ in range(repeats):
            base_runs.append(child(BASELINE, str(N), glb, repr(width)))
            our_runs.append(child(ORBVIZ, SPEC, str(N), glb))
        base, ours = summary(base_runs), summary(our_runs)
        whole = statistics.median(
            whole_process(["mesh", SPEC, "--grid", str(N), "-o", glb]) for _ in range(repeats)
        )
        scaling = {}
        for n in [96, 128, 256] if quick else [96, 128, 192, 256, 384, 512]:
            run = child(ORBVIZ, SPEC, str(n), glb)
            scaling[n] = {**run, "ns_per_sample": run["seconds"] / n**3 * 1e9}
    result = {
        "case": f"{SPEC} at {N}^3 to GLB",
        "straightforward": base,
        "orbviz": ours,
        "speedup_in_process_median": base["median_s"] / ours["median_s"],
        "speedup_in_process_best_vs_best": base["min_s"] / ours["min_s"],
        "memory_ratio_orbviz_over_straightforward": ours["peak_rss_mb"] / base["peak_rss_mb"],
        "whole_process_s": whole,
        "whole_process_over_target_2.5s": whole / 2.5,
        "scaling": scaling,
        "children_peak_rss_mb": resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss / 1024,
    }
    save("mesh", result)


if __name__ == "__main__":
    main()
