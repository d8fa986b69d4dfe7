"""A real slicer as the client of printable models: Debian's prusa-slicer, from its command line.

Every model and kit part must slice with no error or warning about the model, and a colour 3MF
must come back from the slicer with its parts where they were relative to each other.
"""

from __future__ import annotations

import numpy as np
import pytest

from orbviz.cli import main
from tests.conftest import read_3mf, slice_model

pytestmark = pytest.mark.slow

MODELS = ["2pz", "3dz2", "3dxy", "4s", "2sp3[1]"]


def _placed_vertices(path):
    """Every object's vertices in a 3MF, moved by its build item (3MF core spec, 3.4 and 4.1).

    Read with the standard library: lib3mf refuses the slicer's package for an extra part.
    """
    import xml.etree.ElementTree as ET
    import zipfile

    ns = {"m": "http://schemas.microsoft.com/3dmanufacturing/core/2015/02"}
    root = ET.fromstring(zipfile.ZipFile(path).read("3D/3dmodel.model"))
    meshes = {}
    for obj in root.iterfind(".//m:resources/m:object", ns):
        points = [[float(v.get(a)) for a in "xyz"] for v in obj.iterfind(".//m:vertex", ns)]
        meshes[obj.get("id")] = np.array(points)
    placed = []
    for item in root.iterfind(".//m:build/m:item", ns):
        m = np.array([float(x) for x in item.get("transform", "1 0 0 0 1 0 0 0 1 0 0 0").split()])
        # the transform is a 4x3 matrix in rows: a point row-vector times it, then + row 4
        placed.append(meshes[item.get("objectid")] @ m[:9].reshape(3, 3) + m[9:])
    return np.vstack(placed)


@pytest.mark.parametrize("spec", MODELS)
def test_slicer_accepts_the_one_piece_model(spec, tmp_path, capsys):
    out = tmp_path / "m.stl"
    cut = ["--cut", "half"] if spec == "4s" else ["--stand"]
    assert main(["model", spec, "--size", "50", "--grid", "80", *cut, "-o", str(out)]) == 0
    assert slice_model(out, out=tmp_path / "m.gcode") == []
    assert (tmp_path / "m.gcode").stat().st_size > 10_000


def test_colour_3mf_keeps_its_parts_in_place_through_the_slicer(tmp_path, capsys):
    out = tmp_path / "c.3mf"
    assert main(["model", "3dz2", "--size", "50", "--grid", "80", "-o", str(out)]) == 0
    assert slice_model(out, out=tmp_path / "c.gcode") == []
    back = tmp_path / "back.3mf"
    assert slice_model(out, out=back, export="--export-3mf") == []
    _, items, objects, before = read_3mf(out)
    assert objects == 1 and items == 1
    # the slicer may move the whole object (onto its bed), never one part against another
    merged_before = np.vstack([mesh.vertices for _, _, mesh in before])
    merged_after = _placed_vertices(back)
    shift = merged_after.min(axis=0) - merged_before.min(axis=0)
    for _, _, mesh in before:
        moved = mesh.vertices + shift
        # every vertex of the part is still a vertex of the slicer's object (to 1e-3 mm)
        from scipy.spatial import cKDTree

        distance, _ = cKDTree(merged_after).query(moved)
        assert distance.max() < 1e-3


@pytest.mark.parametrize("spec", MODELS)
def test_slicer_accepts_every_kit_plate(spec, tmp_path, capsys):
    out = tmp_path / "kit"
    assert (
        main(["model", spec, "--size", "60", "--grid", "72", "--kit", "--marks", "-o", str(out)])
        == 0
    )
    plates = sorted(out.glob("plate-*.stl"))
    assert len(plates) >= 3
    for plate in plates:
        assert slice_model(plate, out=tmp_path / (plate.stem + ".gcode")) == [], plate.name
