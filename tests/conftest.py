"""Shared test helpers: independent reference implementations built from scipy only."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.special import eval_genlaguerre, gammaln, sph_harm_y


def reference_radial(n: int, l: int, r: np.ndarray, Z: float = 1.0) -> np.ndarray:
    """R_nl from scipy.special.eval_genlaguerre (integer degree) and the textbook normalisation."""
    rho = 2.0 * Z * np.asarray(r, dtype=float) / n
    log_norm = 0.5 * (
        3 * math.log(2 * Z / n) + gammaln(n - l) - math.log(2 * n) - gammaln(n + l + 1)
    )
    return np.exp(log_norm - rho / 2) * rho**l * eval_genlaguerre(n - l - 1, 2 * l + 1, rho)


def reference_real_harmonic(l: int, m: int, polar, azimuth) -> np.ndarray:
    """Real harmonics from scipy's complex ones with the chemistry sign convention.

    Source: tables of real spherical harmonics (Blanco, Florez & Bermejo 1997, from memory;
    docs/references.md) (m > 0: sqrt2 (-1)^m Re Y_l^m; m < 0: sqrt2 (-1)^m Im Y_l^|m|).
    """
    if m == 0:
        return np.real(sph_harm_y(l, 0, polar, azimuth))
    y = sph_harm_y(l, abs(m), polar, azimuth)
    part = np.real(y) if m > 0 else np.imag(y)
    return math.sqrt(2) * (-1) ** abs(m) * part


@pytest.fixture
def rng() -> np.random.Generator:
    return np.random.default_rng(20261202)


def reference_psi(terms, x, y, z, Z: float = 1.0) -> np.ndarray:
    """psi of a superposition from scipy only: terms are (coef, n, l, m, form) with orthonormal
    (non-overlapping) states, normalised here by sqrt(sum |coef|^2)."""
    r = np.sqrt(x * x + y * y + z * z)
    polar = np.arccos(np.clip(z / np.where(r > 0, r, 1.0), -1, 1))
    azimuth = np.arctan2(y, x)
    total = np.zeros(np.shape(r), dtype=complex)
    norm = math.sqrt(sum(abs(c) ** 2 for c, *_ in terms))
    for c, n, l, m, form in terms:
        angular = (
            reference_real_harmonic(l, m, polar, azimuth)
            if form == "real"
            else sph_harm_y(l, m, polar, azimuth)
        )
        total += c / norm * reference_radial(n, l, r, Z) * angular
    return total


def gltf_validator_dir():
    """Folder with node_modules/gltf-validator, or None (.ci/run installs it for CI)."""
    import os
    from pathlib import Path

    for candidate in [
        os.environ.get("ORBVIZ_GLTF_VALIDATOR"),
        Path(__file__).resolve().parents[1] / ".ci" / "node",
    ]:
        if candidate and (Path(candidate) / "node_modules" / "gltf-validator").is_dir():
            return Path(candidate) / "node_modules"
    return None


def sample_density(n: int, l: int, m: int, count: int, rng: np.random.Generator):
    """Points distributed as |psi|^2 of a real orbital, drawn with scipy-based functions only."""
    r = np.linspace(0, 12.0 * n * n, 400_001)
    pdf = (r * reference_radial(n, l, r)) ** 2
    cdf = np.concatenate([[0.0], np.cumsum(0.5 * (pdf[1:] + pdf[:-1]) * np.diff(r))])
    radii = np.interp(rng.uniform(0, cdf[-1], count), cdf, r)
    polar, azimuth = np.empty(0), np.empty(0)
    bound = (2 * l + 1) / (2 * math.pi)  # max |S_lm|^2 <= (2l+1)/2pi
    while polar.size < count:  # rejection sampling of directions from |S_lm|^2
        t = rng.uniform(-1, 1, count)
        a = rng.uniform(0, 2 * math.pi, count)
        y2 = reference_real_harmonic(l, m, np.arccos(t), a) ** 2
        keep = rng.uniform(0, bound, count) < y2
        polar, azimuth = np.append(polar, np.arccos(t[keep])), np.append(azimuth, a[keep])
    polar, azimuth = polar[:count], azimuth[:count]
    dens = reference_radial(n, l, radii) ** 2 * reference_real_harmonic(l, m, polar, azimuth) ** 2
    return dens


def fine_axisymmetric(psi_of, level: float, r_max: float) -> float:
    """Brute-force midpoint sum of |psi|^2 over {|psi|^2 >= level}, for psi(r, cos polar)."""
    nr, nt = 20_000, 4_000
    r = (np.arange(nr) + 0.5) * (r_max / nr)
    total = 0.0
    for t in np.array_split((np.arange(nt) + 0.5) * (2.0 / nt) - 1.0, 20):
        d = psi_of(r[None, :], t[:, None]) ** 2
        mass = d * (r * r)[None, :] * (r_max / nr) * (2.0 / nt) * 2 * math.pi
        total += mass[d >= level].sum()
    return total


def as_trimesh(body):
    """A body as a plain trimesh.Trimesh (trimesh as an independent checker of closedness)."""
    import trimesh

    return trimesh.Trimesh(vertices=body.vertices, faces=body.faces, process=False)


def chromium_path() -> str:
    """Debian's chromium, or skip (fail in CI, where .ci/run installs it)."""
    import os
    import shutil

    import pytest

    exe = shutil.which("chromium") or shutil.which("chromium-browser")
    if exe is None:
        if os.environ.get("CI"):
            pytest.fail("chromium is not installed: .ci/run must install it")
        pytest.skip("chromium not installed (apt-get install chromium)")
    return exe


def read_3mf(path):
    """Read a 3MF with lib3mf: unit, build items, mesh objects, [(material, rgb, trimesh)].

    The parts are told apart by each triangle's material, as a slicer would see them.
    """
    import lib3mf  # the 3MF Consortium's reference library, as an independent reader
    import trimesh  # an independent closedness check of each part's triangles

    model = lib3mf.get_wrapper().CreateModel()
    model.QueryReader("3mf").ReadFromFile(str(path))
    items = model.GetBuildItems()
    count = 0
    while items.MoveNext():
        count += 1
    objects = model.GetMeshObjects()
    parts = []
    while objects.MoveNext():
        obj = objects.GetCurrentMeshObject()
        vertices = np.array([v.Coordinates[:] for v in obj.GetVertices()])
        faces = np.array([t.Indices[:] for t in obj.GetTriangleIndices()])
        props = obj.GetAllTriangleProperties()
        keys = np.array([(p.ResourceID, p.PropertyIDs[0]) for p in props])
        for key in sorted({tuple(k) for k in keys.tolist()}):
            group = model.GetBaseMaterialGroupByID(key[0])
            colour = group.GetDisplayColor(key[1])
            chosen = faces[np.all(keys == key, axis=1)]
            mesh = trimesh.Trimesh(vertices, chosen, process=True)
            parts.append((group.GetName(key[1]), (colour.Red, colour.Green, colour.Blue), mesh))
    return model.GetUnit(), count, model.GetMeshObjects().Count(), parts


def slicer_path() -> str:
    """Debian's prusa-slicer, or skip (fail in CI, where .ci/run installs it)."""
    import os
    import shutil

    import pytest

    exe = shutil.which("prusa-slicer")
    if exe is None:
        if os.environ.get("CI"):
            pytest.fail("prusa-slicer is not installed: .ci/run must install it")
        pytest.skip("prusa-slicer not installed (apt-get install prusa-slicer)")
    return exe


def slice_model(*paths, out, export: str = "--export-gcode") -> list[str]:
    """Run prusa-slicer from its command line on model files; return its complaints.

    A complaint is any line of its output, other than its own trace and progress lines, that
    says "warning", "error" or "not printable"; a non-zero exit is one too.
    """
    import subprocess

    run = subprocess.run(
        [slicer_path(), export, "-o", str(out), *map(str, paths)],
        capture_output=True,
        text=True,
        timeout=600,
        env={"HOME": str(out.parent), "PATH": "/usr/bin:/bin", "LC_ALL": "C.UTF-8"},
    )
    lines = (run.stdout + run.stderr).splitlines()
    words = ("warning", "error", "not printable", "empty layer")
    bad = [
        line for line in lines if any(w in line.lower() for w in words) and "[trace]" not in line
    ]
    if run.returncode != 0:
        bad.append(f"exit status {run.returncode}")
    return bad


def khronos_validate(path) -> dict:
    """Run the Khronos glTF validator (npm gltf-validator) on a file; return its report."""
    import json
    import os
    import shutil
    import subprocess
    from pathlib import Path

    import pytest

    modules = gltf_validator_dir()
    if modules is None:
        if os.environ.get("CI"):
            pytest.fail("gltf-validator is not installed: .ci/run must install it")
        pytest.skip("gltf-validator not installed (run .ci/run, or npm install it to .ci/node)")
    node = shutil.which("node")
    script = Path(__file__).parent / "tools" / "gltf_validate.cjs"
    out = subprocess.run(
        [node, str(script), str(path)],
        capture_output=True,
        text=True,
        env={**os.environ, "NODE_PATH": str(modules)},
        check=True,
    )
    return json.loads(out.stdout)
