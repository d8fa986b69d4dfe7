"""Every body is closed at every grid: sweeps of grid sizes, odd and even, checked by trimesh.

Flying edges stores its vertices as float32, so where a sample lies within rounding of the level,
several vertices land on one point and make zero-area faces. Which grids do that is a matter of
the last bits of the samples (3dz2 did at 512 but not at 511 or 513), so these tests sweep every
grid in each range rather than pick a few.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
import trimesh

import orbviz
from orbviz.surface.contour import contour

SMALL = [range(16, 41), range(126, 131), range(254, 259)]
# Each state also gets one range of large grids, chosen where zero-area faces were seen when
# this test was written (3dz2 at 512 and 636-638; 4fz3 at 255, 512 and 639; 2pz at 514; the
# mixture at 510; 3,2,1 at 636; 3dxy and the bond at 639); 1s, which showed none, takes the
# cheaper one. Which grids do it moves with the last bits of the sampling.
SWEEPS = {
    "1s": [*SMALL, range(510, 515)],
    "2pz": [*SMALL, range(510, 515)],
    "3dz2": [*SMALL, range(510, 515), range(636, 641)],
    "3dxy": [*SMALL, range(636, 641)],
    "4fz3": [*SMALL, range(510, 515)],
    "3,2,1": [*SMALL, range(636, 641)],
    "0.6*2s+0.8*2pz": [*SMALL, range(510, 515)],
    "bond(1s,1s,R=2,-)": [*SMALL, range(636, 641)],
}
CASES = [(spec, grids) for spec, ranges in SWEEPS.items() for grids in ranges]


def _defects(vertices: np.ndarray, faces: np.ndarray) -> list[str]:
    """What trimesh finds wrong with a closed, outward surface (trimesh: an independent library)."""
    mesh = trimesh.Trimesh(vertices=vertices, faces=faces, process=False)
    defects = []
    # trimesh: every edge shared by exactly two faces
    if not mesh.is_watertight:
        defects.append("open")
    # trimesh: each shared edge traversed in opposite directions by its two faces
    if not mesh.is_winding_consistent:
        defects.append("inconsistent winding")
    # trimesh: signed volume from the divergence theorem, positive when wound outward
    if not mesh.volume > 0:
        defects.append(f"volume {mesh.volume:.4g}")
    # trimesh: triangle areas from its own cross products; none may be exactly zero
    flat = int(np.count_nonzero(mesh.area_faces == 0))
    if flat:
        defects.append(f"{flat} zero-area faces")
    return defects


@pytest.mark.slow
@pytest.mark.parametrize(
    ("spec", "grids"), CASES, ids=[f"{s}-{g.start}..{g.stop - 1}" for s, g in CASES]
)
def test_every_body_is_closed_at_every_grid(spec: str, grids: range) -> None:
    failures = []
    for points in grids:
        for body in orbviz.mesh(spec, grid=points).bodies:
            defects = _defects(body.vertices, body.faces)
            if defects:
                failures.append(f"grid {points}, {body.name}: {', '.join(defects)}")
    assert not failures, "\n".join(failures)


@pytest.mark.slow
@pytest.mark.parametrize("spec", ["3dz2", "2pz", "3,2,1"])
def test_level_equal_to_samples_still_gives_closed_bodies(spec: str) -> None:
    # A level taken from the samples themselves (the sample nearest the isovalue, squared; the
    # trap DESIGN.md names) puts vertices exactly on grid points: VTK's flying edges places a
    # vertex at t = (level - s0) / (s1 - s0) along an edge, which is 0 at such a sample.
    mesh = orbviz.mesh(spec, grid=64)
    grid, level = mesh.grid, mesh.isovalue.level
    values = grid.values[grid.values > 0].astype(np.float64)
    sample = values[np.argmin(np.abs(values - math.sqrt(level)))]
    # precondition, IEEE 754 (common practice, no source): a float32 squared is exact in float64
    # and sqrt is correctly rounded, so the contour value sqrt(level) is that sample exactly
    assert math.sqrt(sample**2) == sample
    for body in contour(grid, sample**2):
        assert _defects(body.vertices, body.faces) == [], body.name
