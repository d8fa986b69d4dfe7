"""Every format read back by an independent reader; the Khronos validator; safe writes."""

from __future__ import annotations

import json
import os
from pathlib import Path

import numpy as np
import pytest
from scipy.constants import physical_constants

from orbviz.cli import main
from orbviz.export import write_bodies
from orbviz.states.orbital import Orbital
from orbviz.surface.mesh import build_mesh
from orbviz.surface.options import MeshOptions
from tests.conftest import khronos_validate, read_3mf


@pytest.fixture(scope="module")
def real_mesh():
    return build_mesh(Orbital.from_spec("3dz2"), MeshOptions(grid=64))


@pytest.fixture(scope="module")
def complex_mesh():
    return build_mesh(Orbital.from_spec("3,2,1"), MeshOptions(grid=64))


def _triangles(bodies, scale=1.0):
    return np.vstack([b.vertices[b.faces] * scale for b in bodies])


def _same_triangles(a: np.ndarray, b: np.ndarray, tol: float) -> None:
    key = lambda t: np.lexsort(np.round(t.reshape(len(t), -1) / tol).T)  # noqa: E731
    np.testing.assert_allclose(a[key(a)], b[key(b)], atol=tol)


def test_stl_round_trip_numpy_stl(real_mesh, tmp_path):
    from stl import mesh as stl_mesh  # numpy-stl, an independent STL reader

    path = tmp_path / "a.stl"
    write_bodies(real_mesh.bodies, path)
    back = stl_mesh.Mesh.from_file(str(path))
    _same_triangles(back.vectors.astype(float), _triangles(real_mesh.bodies), 1e-4)
    # binary STL: 80-byte header, count, 50 bytes a triangle
    assert path.stat().st_size == 84 + 50 * len(back.vectors)


def test_units_scale_by_codata_bohr_radius(real_mesh, tmp_path):
    from stl import mesh as stl_mesh

    path = tmp_path / "a.stl"
    write_bodies(real_mesh.bodies, path, units="angstrom")
    a0 = physical_constants["Bohr radius"][0] / 1e-10  # CODATA, in angstrom
    back = stl_mesh.Mesh.from_file(str(path))
    _same_triangles(back.vectors.astype(float), _triangles(real_mesh.bodies, a0), 1e-4)


def test_obj_round_trip_and_own_material_file(real_mesh, tmp_path):
    import meshio
    import trimesh

    write_bodies(real_mesh.bodies, tmp_path / "a.obj")
    write_bodies(real_mesh.bodies, tmp_path / "b.obj")
    assert (tmp_path / "a.mtl").exists() and (tmp_path / "b.mtl").exists()
    text = (tmp_path / "a.obj").read_text()
    assert "mtllib a.mtl" in text and "o positive" in text and "o negative" in text
    back = meshio.read(tmp_path / "a.obj")  # meshio: geometry
    assert len(back.points) == sum(len(b.vertices) for b in real_mesh.bodies)
    scene = trimesh.load(tmp_path / "a.obj", process=False)  # trimesh: objects and materials
    assert set(scene.geometry) == {"positive", "negative"}
    for body in real_mesh.bodies:
        assert len(scene.geometry[body.name].faces) == len(body.faces)
        material = scene.geometry[body.name].visual.material
        np.testing.assert_allclose(np.asarray(material.main_color)[:3], body.colors[0][:3], atol=1)


def test_obj_complex_has_vertex_colours(complex_mesh, tmp_path):
    written = write_bodies(complex_mesh.bodies, tmp_path / "c.obj")
    assert written == [tmp_path / "c.obj"]
    first = next(
        line for line in (tmp_path / "c.obj").read_text().splitlines() if line.startswith("v ")
    )
    assert len(first.split()) == 7  # v x y z r g b


@pytest.mark.parametrize("suffix", [".glb", ".gltf"])
def test_gltf_round_trip(real_mesh, tmp_path, suffix):
    import trimesh

    path = tmp_path / f"a{suffix}"
    written = write_bodies(real_mesh.bodies, path)
    if suffix == ".gltf":
        assert written == [path, tmp_path / "a.bin"]
        assert json.loads(path.read_text())["buffers"][0]["uri"] == "a.bin"
    scene = trimesh.load(path, process=False)
    assert set(scene.geometry) == {"positive", "negative"}
    for body in real_mesh.bodies:
        geometry = scene.geometry[body.name]
        # glTF colours are linear light (glTF 2.0, section 3.9.2): encoded back to sRGB they
        # are the figure's colour
        shown = _srgb(geometry.visual.material.baseColorFactor)
        np.testing.assert_allclose(shown[:3], body.colors[0][:3], atol=1.5)
        # vertex data keep the physics frame (z is the quantisation axis)
        np.testing.assert_allclose(
            np.sort(geometry.vertices[:, 2]), np.sort(body.vertices[:, 2]), atol=1e-5
        )
    # one root rotation turns z up in +Y-up viewers: the world y of the mesh is physics z
    world = scene.to_mesh()
    original = np.vstack([b.vertices for b in real_mesh.bodies])
    assert world.bounds[1][1] == pytest.approx(original[:, 2].max(), abs=1e-4)


def _validate(path: Path) -> dict:
    return khronos_validate(path)  # the Khronos reference validator


@pytest.mark.parametrize("suffix", [".glb", ".gltf"])
@pytest.mark.parametrize("which", ["real_mesh", "complex_mesh"])
def test_khronos_validator(request, tmp_path, suffix, which):
    result = request.getfixturevalue(which)
    path = tmp_path / f"m{suffix}"
    write_bodies(result.bodies, path)
    report = _validate(path)  # the Khronos reference validator
    assert report["issues"]["numErrors"] == 0, report["issues"]["messages"][:5]


def test_ply_round_trip_meshio(real_mesh, tmp_path):
    import meshio

    path = tmp_path / "a.ply"
    write_bodies(real_mesh.bodies, path)
    assert path.read_bytes().startswith(b"ply\nformat binary_little_endian")
    back = meshio.read(path)  # an independent PLY reader
    assert len(back.points) == sum(len(b.vertices) for b in real_mesh.bodies)
    np.testing.assert_allclose(
        back.point_data["phase"], np.concatenate([b.phase for b in real_mesh.bodies])
    )
    # the header says uchar; meshio 5 hands uchar back as int8, so view the bytes as uint8
    colours = np.stack(
        [back.point_data[c].view(np.uint8) for c in ("red", "green", "blue")], axis=1
    )
    np.testing.assert_array_equal(colours, np.vstack([b.colors[:, :3] for b in real_mesh.bodies]))
    assert set(np.unique(back.point_data["body"])) == {0, 1}


def test_3mf_round_trip_lib3mf(real_mesh, tmp_path):
    import lib3mf  # the 3MF Consortium's reference library

    path = tmp_path / "a.3mf"
    write_bodies(real_mesh.bodies, path)
    unit, items, objects, parts = read_3mf(path)
    assert unit == lib3mf.ModelUnit.MilliMeter and items == 1 and objects == 1
    found = {name: (rgb, mesh) for name, rgb, mesh in parts}
    assert set(found) == {b.name for b in real_mesh.bodies}
    for body in real_mesh.bodies:
        rgb, mesh = found[body.name]
        assert len(mesh.faces) == len(body.faces)
        assert rgb == tuple(int(c) for c in body.colors[0][:3])
        assert mesh.is_watertight and mesh.is_winding_consistent


def test_default_phase_colours_in_the_file_are_tols_high_contrast_pair(real_mesh, tmp_path):
    # the written materials carry the published pair of Paul Tol's high-contrast scheme
    # (SRON/EPS/TN/09-002, 2021): #004488 and #DDAA33, read back by trimesh from the GLB
    import trimesh

    write_bodies(real_mesh.bodies, tmp_path / "c.glb")
    scene = trimesh.load(tmp_path / "c.glb", process=False)
    colour = {
        n: tuple(np.round(_srgb(g.visual.material.baseColorFactor)[:3]).astype(int))
        for n, g in scene.geometry.items()
    }
    # stored as linear light (glTF 2.0, 3.9.2), within one step of 255 after the round trip
    assert np.abs(np.subtract(colour["positive"], (0x00, 0x44, 0x88))).max() <= 1
    assert np.abs(np.subtract(colour["negative"], (0xDD, 0xAA, 0x33))).max() <= 1


def _srgb(linear_bytes) -> np.ndarray:
    """Linear-light bytes -> sRGB bytes by the IEC 61966-2-1 transfer function (alpha kept)."""
    c = np.asarray(linear_bytes, dtype=float) / 255.0
    rgb = np.where(c[:3] <= 0.0031308, 12.92 * c[:3], 1.055 * c[:3] ** (1 / 2.4) - 0.055)
    return np.concatenate([255.0 * rgb, 255.0 * c[3:]])


def test_complex_vertex_colours_are_stored_as_linear_light(complex_mesh, tmp_path):
    import trimesh

    write_bodies(complex_mesh.bodies, tmp_path / "z.glb")
    scene = trimesh.load(tmp_path / "z.glb", process=False)
    (geometry,) = scene.geometry.values()
    stored = np.asarray(geometry.visual.vertex_attributes["color"], dtype=float)
    expected = complex_mesh.bodies[0].colors[:, :3].astype(float)
    shown = np.array([_srgb(c)[:3] for c in stored[:500]])
    # 8-bit linear values are coarse in the darks (one linear step is 13 sRGB steps at black,
    # ~5 near the wheel's darkest channels, ~20): bounded there, and exact on average
    error = np.abs(shown - expected[:500])
    assert error.max() <= 8 and error.mean() <= 1.0


def _read_back(path: Path) -> tuple[np.ndarray, str | None]:
    """Vertices of a written file by an independent reader, and the unit it declares, if any."""
    suffix = path.suffix
    if suffix == ".stl":
        from stl import mesh as stl_mesh  # numpy-stl

        return stl_mesh.Mesh.from_file(str(path)).vectors.reshape(-1, 3).astype(float), None
    if suffix in (".ply", ".obj"):
        import meshio

        header = path.read_text(errors="replace").splitlines()[0] if suffix == ".obj" else ""
        return np.asarray(meshio.read(path).points, dtype=float), header or None
    if suffix in (".glb", ".gltf"):
        import trimesh

        scene = trimesh.load(path, process=False)
        vertices = np.vstack([g.vertices for g in scene.geometry.values()])
        return vertices, _gltf_unit(path)
    import lib3mf  # 3MF: the consortium's reference library

    model = lib3mf.get_wrapper().CreateModel()
    model.QueryReader("3mf").ReadFromFile(str(path))
    points = []
    objects = model.GetMeshObjects()
    while objects.MoveNext():
        points += [v.Coordinates for v in objects.GetCurrentMeshObject().GetVertices()]
    unit = model.GetMetaDataGroup().GetMetaDataByKey("orbviz", "length_unit").GetValue()
    return np.asarray(points, dtype=float), unit


def _gltf_unit(path: Path) -> str:
    data = path.read_bytes()
    if path.suffix == ".glb":  # 12-byte header, then the JSON chunk: length, type, data
        length = int.from_bytes(data[12:16], "little")
        tree = json.loads(data[20 : 20 + length])
    else:
        tree = json.loads(data)
    roots = tree["scenes"][tree.get("scene", 0)]["nodes"]
    return tree["nodes"][roots[0]]["extras"]["length_unit"]


@pytest.mark.parametrize("suffix", [".stl", ".obj", ".glb", ".gltf", ".ply", ".3mf"])
@pytest.mark.parametrize("units", ["bohr", "angstrom", "pm"])
def test_every_format_round_trips_coordinates_and_units(real_mesh, tmp_path, suffix, units):
    # every vertex comes back at its place times the unit's length in bohr (CODATA Bohr radius,
    # scipy.constants), read by an independent reader, and the file says which unit it uses
    a0 = physical_constants["Bohr radius"][0]
    scale = {"bohr": 1.0, "angstrom": a0 / 1e-10, "pm": a0 / 1e-12}[units]
    path = tmp_path / f"m{suffix}"
    write_bodies(real_mesh.bodies, path, units=units)
    got, declared = _read_back(path)
    want = np.vstack([b.vertices for b in real_mesh.bodies]) * scale
    from scipy.spatial import cKDTree

    tol = 1e-5 * scale  # float32 files keep ~7 digits of coordinates ~20 bohr across
    assert cKDTree(want).query(got)[0].max() < tol  # every point read is one written...
    assert cKDTree(got).query(want)[0].max() < tol  # ...and every point written is read
    if suffix in (".glb", ".gltf", ".3mf"):
        assert declared == units
    if suffix == ".obj":
        assert declared is not None and units in declared


# ---------------------------------------------------------------- safe writes, via the CLI


def test_failed_write_leaves_nothing_and_keeps_old_file(tmp_path, monkeypatch, capsys):
    target = tmp_path / "a.stl"
    target.write_bytes(b"keep me")
    import trimesh.exchange.stl

    def broken(*args, **kwargs):
        raise OSError("disk full (simulated)")

    monkeypatch.setattr(trimesh.exchange.stl, "export_stl", broken)
    status = main(["mesh", "2pz", "--grid", "32", "-o", str(target)])
    assert status != 0
    assert target.read_bytes() == b"keep me"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["a.stl"]
    assert "Traceback" not in capsys.readouterr().err


@pytest.mark.parametrize(
    ("name", "fragment"),
    [("x.abc", "unknown suffix"), ("missing/x.stl", "does not exist"), ("x", "unknown suffix")],
)
def test_bad_output_refused_before_any_computation(tmp_path, monkeypatch, capsys, name, fragment):
    import orbviz.surface.mesh

    def must_not_run(*args, **kwargs):
        raise AssertionError("computation started")

    monkeypatch.setattr(orbviz.surface.mesh, "build_mesh", must_not_run)
    status = main(["mesh", "2pz", "-o", str(tmp_path / name)])
    err = capsys.readouterr().err
    assert status == 2 and fragment in err and err.count("\n") == 1


def test_unwritable_folder(tmp_path, capsys, monkeypatch):
    # CI runs as root, who may write anywhere: simulate the permission check answering no
    import orbviz.export

    folder = tmp_path / "ro"
    folder.mkdir()
    real_access = os.access
    monkeypatch.setattr(
        orbviz.export.os,
        "access",
        lambda p, mode: False if Path(p) == folder else real_access(p, mode),
    )
    status = main(["mesh", "2pz", "-o", str(folder / "x.stl")])
    assert status == 2 and "not writable" in capsys.readouterr().err


def test_mesh_command_and_report(tmp_path, capsys):
    out = tmp_path / "m.glb"
    status = main(
        ["mesh", "2pz", "--grid", "48", "-o", str(out), "--report", str(tmp_path / "m.json")]
    )
    assert status == 0 and out.exists()
    report = json.loads((tmp_path / "m.json").read_text())
    for key in [
        "isovalue",
        "grid_enclosed_fraction",
        "in_box_probability",
        "vertices",
        "faces",
        "watertight",
        "bodies",
    ]:
        assert key in report
    assert {b["name"] for b in report["bodies"]} == {"positive", "negative"}
    assert all(
        b["watertight"] and b["volume_bohr3"] > 0 and b["area_bohr2"] > 0 for b in report["bodies"]
    )
    # 2pz lobes are mirror images: equal volume (symmetry of |Y_10|^2 under z -> -z)
    a, b = report["bodies"]
    assert a["volume_bohr3"] == pytest.approx(b["volume_bohr3"], rel=1e-6)


@pytest.mark.parametrize(
    ("argv", "fragment"),
    [
        (["--grid", "8"], "--grid: expected a whole number from 16 to 1024, got '8'"),
        (["--grid", "0"], "--grid: expected a whole number from 16 to 1024"),
        (["--faces", "10"], "--faces: expected a whole number from 100"),
        (["--units", "furlong"], "--units: expected bohr, angstrom, nm or pm, got 'furlong'"),
        (["--units", "mm"], "--units: expected bohr, angstrom, nm or pm, got 'mm'"),
        (["--colors", "red,blue"], "--colors: expected two hex colours"),
        (["--fraction", "1.2"], "--fraction: expected a number from 0.01 to 0.999"),
    ],
)
def test_mesh_bad_options(tmp_path, capsys, argv, fragment):
    status = main(["mesh", "2pz", "-o", str(tmp_path / "x.stl"), *argv])
    err = capsys.readouterr().err
    assert status == 2 and fragment in err and err.count("\n") == 1
    assert not any(tmp_path.iterdir())


@pytest.mark.parametrize(
    ("argv", "name"),
    [
        (["mesh", "2pz", "--grid", "32"], "a.obj"),
        (["render", "2pz", "--grid", "32", "--size", "80x60"], "a.png"),
        (["plot", "2pz"], "a.pdf"),
        (["model", "2pz", "--grid", "32"], "a.stl"),
    ],
)
def test_no_clobber_keeps_an_existing_file(tmp_path, capsys, argv, name):
    # the documented overwrite rule (docs/meshes.md): by default the whole set is replaced; with
    # --no-clobber an existing target is refused before any work, byte for byte unchanged
    target = tmp_path / name
    target.write_bytes(b"keep me")
    status = main([*argv, "-o", str(target), "--no-clobber"])
    err = capsys.readouterr().err
    assert status == 2 and "no-clobber keeps existing files" in err and err.count("\n") == 1
    assert target.read_bytes() == b"keep me" and sorted(tmp_path.iterdir()) == [target]
    assert main([*argv, "-o", str(target)]) == 0 and target.read_bytes() != b"keep me"


@pytest.mark.parametrize("suffix", [".glb", ".gltf"])
def test_a_display_size_sets_the_longest_side_in_metres(real_mesh, tmp_path, suffix):
    import trimesh

    path = tmp_path / f"shown{suffix}"
    real_mesh.export(path, display_size="20cm")
    loaded = trimesh.load(path)  # trimesh's glTF reader, applying the z-up root node
    points = np.vstack([b.vertices for b in real_mesh.bodies])
    # brute force: the bounding box of the bodies in bohr, scaled to 0.2 m on its longest side
    sides = points.max(axis=0) - points.min(axis=0)
    expected = sorted(sides * 0.2 / sides.max())
    assert sorted(loaded.extents) == pytest.approx(expected, rel=1e-5)
    assert _gltf_unit(path) == "m"
    report = _validate(path)  # the Khronos reference validator
    assert report["issues"]["numErrors"] == 0


@pytest.mark.parametrize(
    "argv, fragment",
    [
        (["--display-size", "0.2m", "-o", "o.stl"], "--display-size: applies to .glb and .gltf"),
        (["--display-size", "500m", "-o", "o.glb"], "from 1 mm to 100 m, like 0.2m"),
        (["--display-size", "2 furlongs", "-o", "o.glb"], "got '2 furlongs'"),
        (["--display-size", "0.5mm", "-o", "o.glb"], "from 1 mm to 100 m"),
        (["--display-size", "1m", "--units", "angstrom", "-o", "o.glb"], "or --units, not both"),
    ],
)
def test_bad_display_sizes_are_refused_before_any_work(tmp_path, capsys, argv, fragment):
    from orbviz.cli import main

    argv = [a if not a.startswith("o.") else str(tmp_path / a) for a in argv]
    status = main(["mesh", "2pz", *argv])
    err = capsys.readouterr().err
    assert status == 2 and err.count("\n") == 1 and fragment in err, err
    assert not any(tmp_path.iterdir())
