"""The public API as the README shows it: spec text to numbers, meshes, figures and models."""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest

import orbviz


def test_mesh_export_as_the_readme_writes_it(tmp_path):
    import trimesh  # an independent reader

    written = orbviz.mesh("3dz2", grid=48).export(str(tmp_path / "x.glb"))
    assert written == [tmp_path / "x.glb"]
    scene = trimesh.load(tmp_path / "x.glb", process=False)
    assert set(scene.geometry) == {"positive", "negative"}


def test_model_export_in_millimetres(tmp_path):
    import lib3mf  # the 3MF Consortium's reference reader

    model = orbviz.model("2pz", size_mm=60, grid=48)
    assert model.export(tmp_path / "m.3mf") == [tmp_path / "m.3mf"]
    reader = lib3mf.get_wrapper().CreateModel()
    reader.QueryReader("3mf").ReadFromFile(str(tmp_path / "m.3mf"))
    assert reader.GetUnit() == lib3mf.ModelUnit.MilliMeter
    points = []
    objects = reader.GetMeshObjects()
    while objects.MoveNext():
        points += [v.Coordinates for v in objects.GetCurrentMeshObject().GetVertices()]
    extent = np.ptp(np.asarray(points), axis=0)
    assert extent.max() == pytest.approx(60.0, abs=1e-3)  # the longest side, as asked
    # a model's bodies are in mm and are written in mm by the general writer too
    from orbviz.export import write_bodies

    assert write_bodies(model.bodies(), tmp_path / "s.stl", units="mm") == [tmp_path / "s.stl"]


def test_to_trimesh_and_to_pyvista_hold_every_body():
    mesh = orbviz.mesh("2pz", grid=40)
    scene = mesh.to_trimesh()
    assert type(scene).__name__ == "Scene" and set(scene.geometry) == {"positive", "negative"}
    for body in mesh.bodies:
        material = scene.geometry[body.name].visual.material
        assert material.metallicFactor == 0.0  # matte, not glTF's default metal
        np.testing.assert_array_equal(material.baseColorFactor, body.colors[0])
    blocks = mesh.to_pyvista()
    assert type(blocks).__name__ == "MultiBlock" and len(blocks) == 2
    assert {"Normals", "RGBA", "phase"} <= set(blocks[0].point_data.keys())


def test_summarise_against_closed_forms():
    # E = -Z^2 / 2n^2 and <r> = [3n^2 - l(l+1)] / 2Z (Bethe & Salpeter 1957)
    info = orbviz.summarise("3dz2", Z=2)
    assert info["energy_hartree"] == pytest.approx(-4 / 18, rel=1e-12)
    assert info["mean_radius_bohr"] == pytest.approx((27 - 6) / 4, rel=1e-12)


def test_a_state_passes_straight_through():
    state = orbviz.state("bond(1s,1s,R=2,+)")
    # two 1s orbitals 2 bohr apart overlap by e^-R (1 + R + R^2/3) (Szabo & Ostlund, from memory)
    assert orbviz.summarise(state)["overlap"] == pytest.approx(math.exp(-2) * (1 + 2 + 4 / 3))
    with pytest.raises(orbviz.OptionError, match="Z: applies to spec text"):
        orbviz.summarise(state, Z=2)


def test_bad_keywords_are_named():
    with pytest.raises(orbviz.OptionError, match="gird: unknown option"):
        orbviz.mesh("2pz", gird=64)
    with pytest.raises(orbviz.OptionError, match="size_mm: expected a number from 5 to 500 mm"):
        orbviz.model("2pz", size_mm=-5)
    with pytest.raises(ValueError, match="fraction"):  # every domain error is a ValueError too
        orbviz.mesh("2pz", fraction=1.5)


def test_readable_reprs():
    mesh = orbviz.mesh("2pz", grid=32)
    texts = [repr(mesh), repr(mesh.state), repr(mesh.bodies[0]), repr(mesh.grid.field)]
    assert all(len(t) < 200 and "array(" not in t for t in texts), texts


def test_figure_is_a_context_manager(tmp_path):
    with orbviz.figure("2pz", grid=32, size=(200, 150)) as fig:
        path = fig.save(Path(tmp_path) / "f.png")
        assert fig.image().shape == (150, 200, 4)
    assert path.exists() and fig.stage is None  # closed on leaving the block
    with pytest.raises(orbviz.ParameterError, match="closed"):
        fig.image()
