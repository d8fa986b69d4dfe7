"""Print kits, phase marks and stand labels, checked geometrically (manifold3d and trimesh).

The kit's claims are checked on the parts themselves, not on the names the builder gives them:
closed solids with a flat face on the bed, disjoint where assembled, adding up to the one-piece
model, pins sitting in sockets with the stated gap, and a lobe turned the wrong way clashing.
"""

from __future__ import annotations

import json
import math

import numpy as np
import pytest

from orbviz import api
from orbviz.cli import main
from orbviz.models.build import build_model
from orbviz.models.kit import build_kit
from orbviz.models.options import ModelOptions
from orbviz.models.solids import arrays

SPECS = ["2pz", "3dz2", "3dxy", "4s", "2sp3[1]"]
CLEARANCE = 0.2  # mm, the default: common FDM practice, no source


def _kit(spec, **options):
    opts = ModelOptions(size_mm=60.0, grid=72, kit=True, **options)
    model = build_model(api.state(spec), opts)
    return model, build_kit(model, opts, spec)


@pytest.fixture(scope="module", params=SPECS)
def kit(request):
    return request.param, *_kit(request.param)


def _trimesh(solid):
    import trimesh  # an independent check of closedness and winding

    v, f = arrays(solid)
    # the triangles as manifold3d made them (process=False: vertices are not merged by
    # position; a spoke's seam can meet a pin's edge at one position, which the slicer test
    # shows a slicer accepts)
    return trimesh.Trimesh(v, f, process=False)


def _box(centre, axes, low, high):
    """A box built in the test from a joint's recorded centre and axes."""
    import manifold3d

    cube = manifold3d.Manifold.cube(tuple(high - low)).translate(tuple(low))
    return cube.transform(np.column_stack([axes, centre]).tolist())


def test_every_part_is_a_closed_solid_with_a_flat_face_on_the_bed(kit):
    spec, _, built = kit
    for part in built.parts:
        mesh = _trimesh(part.printed())
        assert mesh.is_watertight and mesh.is_winding_consistent and mesh.volume > 0, part.code
        assert mesh.bounds[0][2] == pytest.approx(0.0, abs=1e-6)  # lying on the bed
        # the face on the bed: at least 20 mm^2 (a stated minimum, common practice, no source)
        assert part.flat_area() >= 20.0, (part.code, part.flat_area())
        # the print pose is a rigid motion: the part keeps its volume
        assert mesh.volume == pytest.approx(part.solid.volume(), rel=1e-6)
        if part.partner is not None:  # a half on its cut face needs (almost) no supports:
            # under 10% of its area faces down more steeply than 45 degrees off the bed
            # (the rod's groove bridges; common FDM practice for overhangs, no source)
            low = mesh.vertices[mesh.faces][:, :, 2].max(axis=1) < 1e-3
            steep = (mesh.face_normals[:, 2] < -np.cos(np.radians(45))) & ~low
            assert mesh.area_faces[steep].sum() < 0.10 * mesh.area, part.code


def test_parts_are_disjoint_and_add_up_to_the_one_piece_model(kit):
    spec, model, built = kit
    one = build_model(api.state(spec), ModelOptions(size_mm=60.0, grid=72, stand=True))
    solids = [p.solid for p in built.parts]
    for i, a in enumerate(solids):
        for b in solids[i + 1 :]:
            assert (a ^ b).volume() < 0.05  # mm^3: touching faces only
    total = sum(s.volume() for s in solids)
    assert total == pytest.approx(one.solid.volume(), rel=0.02)
    assert len(built.parts) >= 3 and built.parts[0].color == "support"


def test_pins_sit_in_sockets_within_the_clearance_and_a_turned_lobe_clashes(kit):
    spec, model, built = kit
    pins = [j for j in built.joints if j.kind == "pin"]
    held = {j.parts[1] for j in pins}
    halves = {p.code for p in built.parts[1:] if p.code.endswith("a")}
    assert held == halves, "every lobe sits on a pin"
    support = built.part(f"{spec} S").solid
    for joint in pins:
        axes = np.column_stack([np.cross(joint.axis, joint.along), joint.along, joint.axis])
        across, along, reach = joint.size
        half = np.array([across / 2, along / 2, reach / 2])
        # rebuilt from the record alone: the pin is part of the support, centred on the record
        centre = joint.centre + axes[:, 2] * 0  # the record's centre lies on the rod
        lobe = [built.part(joint.parts[1]), built.part(joint.parts[1][:-1] + "b")]
        halves = lobe[0].solid + lobe[1].solid
        span = half * [1, 1, 0] + [0, 0, reach]
        pin = support ^ _box(centre, axes, -span, span)
        assert pin.volume() > across * along * reach
        assert (pin ^ halves).volume() < 0.05  # the pin fits its sockets...
        # the socket's walls stand between 0.8 and 1.3 clearances from the pin, on both sides
        # of the cut, beyond the rod's own channel
        inner = model.rod_mm / 2 + CLEARANCE + 0.2
        for sign in (1.0, -1.0):
            for factor, expect_hit in ((0.8, False), (1.3, True)):
                wall = factor * CLEARANCE
                low = np.array([-half[0] - wall, -half[1] - wall, inner])
                high = np.array([half[0] + wall, half[1] + wall, reach - 0.3])
                span = (low, high) if sign > 0 else (high * [1, 1, -1], low * [1, 1, -1])
                lo = np.minimum(span[0], span[1]) if sign < 0 else span[0]
                hi = np.maximum(span[0], span[1]) if sign < 0 else span[1]
                met = (_box(centre, axes, lo, hi) ^ halves).volume()
                assert (met > 0.01) == expect_hit, (joint.parts, sign, factor, met)
        # the lobe turned about the rod by 20 degrees, or one half turned a quarter about the
        # pin, meets the pin: it goes on one way only
        turn = _rotation(joint.along, math.radians(20))
        moved = halves.translate(tuple(-centre)).transform(turn).translate(tuple(centre))
        assert (moved ^ support).volume() > 1.0
        quarter = _rotation(joint.axis, math.radians(90))
        one = lobe[0].solid.translate(tuple(-centre)).transform(quarter).translate(tuple(centre))
        assert (one ^ support).volume() > 1.0


def _rotation(axis, angle):
    """A rotation about ``axis`` (Rodrigues' formula) as a manifold3d 3 x 4 matrix."""
    k = np.asarray(axis, float) / np.linalg.norm(axis)
    cross = np.array([[0, -k[2], k[1]], [k[2], 0, -k[0]], [-k[1], k[0], 0]])
    r = np.eye(3) + math.sin(angle) * cross + (1 - math.cos(angle)) * cross @ cross
    return np.column_stack([r, np.zeros(3)]).tolist()


def _psi_sign(spec, point):
    """Sign of the real orbital at a point, from its closed angular-radial form."""
    x, y, z = point
    r = math.sqrt(x * x + y * y + z * z)
    if spec == "2pz":  # psi_2pz ~ z exp(-r/2) (Griffiths, Introduction to QM, Table 4.7)
        return np.sign(z)
    if spec == "3dz2":  # psi_3dz2 ~ (3z^2 - r^2) exp(-r/3) (same table, real combination)
        return np.sign(3 * z * z - r * r)
    if spec == "3dxy":  # psi_3dxy ~ xy exp(-r/3)
        return np.sign(x * y)
    raise ValueError(spec)


@pytest.mark.parametrize("spec", ["2pz", "3dz2", "3dxy"])
@pytest.mark.parametrize("style", ["embossed", "engraved"])
def test_marks_sit_on_lobes_of_their_phase(spec, style):
    opts = ModelOptions(size_mm=60.0, grid=72, marks=style, stand=True)
    model = build_model(api.state(spec), opts)
    lobes = {"2pz": 2, "3dz2": 3, "3dxy": 4}[spec]
    assert len(model.marks) == lobes
    for mark in model.marks:
        foot = (mark.foot - 0.5 * mark.normal) / model.mm_per_bohr  # just inside the lobe
        assert mark.sign == _psi_sign(spec, foot)
        assert mark.relief >= 1.0 and mark.stroke >= opts.min_feature_mm
    facts = model.facts()
    assert facts.watertight and facts.solids == 1
    plain = build_model(api.state(spec), ModelOptions(size_mm=60.0, grid=72, stand=True))
    for mark in model.marks:  # the relief, measured: a ray down the normal onto the glyph's foot
        start = mark.foot + 30 * mark.normal
        end = mark.foot - 5 * mark.normal
        hit = model.solid.ray_cast(tuple(start), tuple(end))[0].position
        bare = plain.solid.ray_cast(tuple(start), tuple(end))[0].position
        height = float((np.asarray(hit) - np.asarray(bare)) @ mark.normal)
        # embossed: stands >= 1 mm out; engraved: cut >= 1 mm in (the minimum)
        assert (height if style == "embossed" else -height) >= 1.0 - 1e-3, (mark, height)
    change = facts.volume - plain.facts().volume
    assert change > 0 if style == "embossed" else change < 0


def test_stand_label_adds_letters_on_the_stand_front():
    opts = dict(size_mm=60.0, grid=64, stand=True)
    plain = build_model(api.state("3dz2"), ModelOptions(label="none", **opts))
    labelled = build_model(api.state("3dz2"), ModelOptions(**opts))
    assert labelled.label == "3dz2 · 90%" and plain.label == ""
    letters = labelled.solid - plain.solid
    assert letters.volume() > 5.0  # mm^3 of raised text
    lo, hi = np.asarray(letters.bounding_box()[:3]), np.asarray(letters.bounding_box()[3:])
    base = np.asarray(plain.parts["support"].bounding_box())
    assert lo[2] >= base[2] - 1e-6 and hi[2] < base[2] + 0.15 * 60  # within the plinth
    assert hi[1] < 0  # on the front (towards -y)


def test_kit_cli_writes_parts_plates_sheet_and_manifest(tmp_path, capsys):
    out = tmp_path / "kit"
    assert main(["model", "2pz", "--kit", "--grid", "64", "--marks", "-o", str(out)]) == 0
    manifest = json.loads((out / "kit.json").read_text())
    assert {p["colour"] for p in manifest["parts"]} == {"support", "positive", "negative"}
    for part in manifest["parts"]:
        assert (out / part["file"]).stat().st_size > 1000 and (out / part["plate"]).exists()
    assert (out / "assembly.png").read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    assert (out / "assembly.pdf").read_bytes()[:5] == b"%PDF-"
    zipped = tmp_path / "kit.zip"
    assert main(["model", "2pz", "--kit", "--grid", "64", "-o", str(zipped)]) == 0
    import zipfile

    names = zipfile.ZipFile(zipped).namelist()
    assert "kit/kit.json" in names and "kit/assembly.pdf" in names


def test_magnet_sockets_go_into_both_halves():
    model, built = _kit("2pz", magnets=(6.0, 3.0))
    magnets = [j for j in built.joints if j.kind == "magnet"]
    assert magnets
    import manifold3d

    for joint in magnets:
        for code, sign in ((joint.parts[0], 1.0), (joint.parts[1], -1.0)):
            part = built.part(code).solid
            # a 6 mm x 3 mm disc at the recorded place, inside the half: meets no material
            disc = manifold3d.Manifold.cylinder(2.9, 2.95, 2.95, circular_segments=48)
            disc = disc.translate((0, 0, 0.05))
            frame = np.column_stack(
                [np.cross(joint.axis, joint.along), joint.along, sign * joint.axis]
            )
            placed = disc.transform(np.column_stack([frame, joint.centre]).tolist())
            assert (placed ^ part).volume() < 0.01


@pytest.mark.parametrize(
    "args, message",
    [
        (["--magnets", "6x3mm"], "--magnets: it shapes a kit's parts: add --kit"),
        (["--clearance", "0.3"], "--clearance: it shapes a kit's parts"),
        (["--kit", "--cut", "half"], "leave out --cut"),
        (["--label", "x"], "a label goes on the stand"),
        (["--kit", "--magnets", "40x3"], "--magnets"),
        (["--kit", "--bed", "10x10mm"], "--bed"),
        (["--stand", "--label", "\u200b"], "printable characters"),  # zero-width space
        (["--stand", "--label", "a\u0085b"], "printable characters"),  # next-line control
        (["--stand", "--label", "a\u7535"], "DejaVu Sans Bold"),  # a CJK character: no glyph
    ],
)
def test_kit_options_are_refused_with_one_line(args, message, tmp_path, capsys):
    status = main(["model", "2pz", *args, "-o", str(tmp_path / "k")])
    err = capsys.readouterr().err
    assert status == 2 and message in err and len(err.strip().splitlines()) == 1
    assert not any(tmp_path.iterdir())


def test_kit_to_a_file_name_is_refused(tmp_path, capsys):
    assert main(["model", "2pz", "--kit", "-o", str(tmp_path / "k.stl")]) == 2
    assert "a kit is written to a folder or a .zip" in capsys.readouterr().err


def test_codes_are_cut_into_the_hidden_face_only(kit):
    # the same kit without codes, less the kit with them, is the letters: some volume per
    # coded half, all of it within the 0.4 mm next to the face on the bed in the print pose
    spec, model, built = kit
    opts = ModelOptions(size_mm=60.0, grid=72, kit=True)
    plain = build_kit(model, opts, spec, codes=False)
    coded = [p for p in built.parts[1:] if p.code_mm > 0]
    assert len(coded) >= len(built.parts[1:]) // 2  # most halves carry their code
    for part in coded:
        letters = plain.part(part.code).printed() - part.printed()
        assert letters.volume() > 0.4 * 0.5 * part.code_mm  # mm^3: a few letters 0.4 mm deep
        above = letters.trim_by_plane((0.0, 0.0, 1.0), 0.41)  # what lies above z = 0.41 mm
        assert above.volume() < 1e-3, (part.code, above.volume())


def test_scene_makes_a_kit_zip_with_its_exploded_view_as_thumbnail(tmp_path, capsys):
    import zipfile

    from PIL import Image

    scene = tmp_path / "kits.toml"
    scene.write_text(
        '[[orbital]]\nspec = "2pz"\nname = "pz"\noutputs = ["kit.zip", "model.stl"]\n'
        'grid = 64\nmodel = { marks = "engraved", label = "Lab B: 2pz", clearance = 0.25,'
        " stand = true }\n"
    )
    out = tmp_path / "out"
    assert main(["batch", str(scene), "-o", str(out), "--no-progress"]) == 0
    names = zipfile.ZipFile(out / "pz-kit.zip").namelist()
    assert "pz-kit/kit.json" in names and "pz-kit/assembly.png" in names
    manifest = json.loads(zipfile.ZipFile(out / "pz-kit.zip").read("pz-kit/kit.json"))
    assert manifest["clearance_mm"] == 0.25
    assert (out / "pz-model.stl").stat().st_size > 10_000
    with Image.open(out / "thumbs" / "pz.png") as thumb:
        assert thumb.size == (320, 240)
        # the exploded view: the kit's phase colours are in the picture (Tol's pair, 2021)
        pixels = np.asarray(thumb.convert("RGB")).reshape(-1, 3).astype(int)
    blue = np.abs(pixels - [0x00, 0x44, 0x88]).sum(axis=1) < 90
    assert blue.mean() > 0.01


def test_a_complex_state_makes_a_kit_and_a_set_is_refused(tmp_path, capsys):
    # the complex 4,2,1 density is rings about z that the rod misses: each gets spokes and pins
    model, built = _kit("4,2,1")
    assert {p.color for p in built.parts} == {"support", "surface"}
    held = {j.parts[1] for j in built.joints if j.kind == "pin"}
    assert held == {p.code for p in built.parts[1:] if p.code.endswith("a")}
    for part in built.parts:
        assert _trimesh(part.printed()).is_watertight
    status = main(["model", "2sp3", "--kit", "--grid", "48", "-o", str(tmp_path / "k")])
    err = capsys.readouterr().err
    assert status == 2 and "a kit is made from one orbital" in err and err.count("\n") == 1


def test_a_kit_never_replaces_a_folder_of_other_files(tmp_path, capsys, monkeypatch):
    folder = tmp_path / "mine"
    (folder / "sub").mkdir(parents=True)
    (folder / "notes.txt").write_text("keep me")
    status = main(["model", "2pz", "--kit", "--grid", "48", "-o", str(folder)])
    err = capsys.readouterr().err
    assert status == 2 and "which this run does not write" in err
    assert (folder / "notes.txt").read_text() == "keep me" and (folder / "sub").is_dir()
    monkeypatch.chdir(tmp_path)
    assert main(["model", "2pz", "--kit", "--grid", "48", "-o", ""]) == 2  # the working folder
    assert "name a folder of its own" in capsys.readouterr().err
    kit = tmp_path / "kit"  # an old kit is replaced by a new one
    assert main(["model", "2pz", "--kit", "--grid", "48", "-o", str(kit)]) == 0
    assert main(["model", "2pz", "--kit", "--grid", "48", "--size", "50", "-o", str(kit)]) == 0


def test_plates_turn_parts_to_fit_a_long_bed(tmp_path, capsys):
    # the stand (about 60 x 47 mm at 100 mm) fits a 50 x 1000 mm bed only turned a quarter
    out = tmp_path / "k.zip"
    args = ["model", "2pz", "--kit", "--grid", "48", "--size", "100", "--bed", "50x1000mm"]
    assert main([*args, "-o", str(out)]) == 0
    import io
    import zipfile

    from stl import mesh as stl_mesh  # numpy-stl, an independent reader

    archive = zipfile.ZipFile(out)
    plates = [n for n in archive.namelist() if "/plate-" in n]
    assert plates
    for name in plates:
        back = stl_mesh.Mesh.from_file(name, fh=io.BytesIO(archive.read(name)))
        span = back.vectors.reshape(-1, 3).max(axis=0) - back.vectors.reshape(-1, 3).min(axis=0)
        assert span[0] <= 50.0 + 1e-6 and span[1] <= 1000.0 + 1e-6, (name, span)
