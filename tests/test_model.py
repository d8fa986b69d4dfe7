"""Printable models: one watertight body at the asked size, colour parts, cutaways, checks."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.optimize import brentq

from orbviz.cli import main
from orbviz.errors import OptionError
from orbviz.models.build import build_model as _build
from orbviz.models.options import ModelOptions
from orbviz.models.solids import arrays
from orbviz.states.orbital import Orbital
from tests.conftest import read_3mf


def build_model(state, *, fraction=0.9, **options):
    """The model with these options (size -> size_mm and so on, as on the command line)."""
    names = {"size": "size_mm", "rod": "rod_mm", "min_feature": "min_feature_mm"}
    return _build(
        state, ModelOptions(**{names.get(k, k): v for k, v in options.items()}), fraction=fraction
    )


def _size(model) -> float:
    box = np.array(model.solid.bounding_box())
    return float((box[3:] - box[:3]).max())


@pytest.mark.parametrize("spec", ["2pz", "3dz2", "4s", "4fxyz", "4fz3", "3dxy", "4,2,1"])
def test_one_watertight_body_at_the_asked_size(spec):
    model = build_model(Orbital.from_spec(spec), size=50.0, grid=96)
    facts = model.facts()
    assert facts.watertight and facts.solids == 1
    assert _size(model) == pytest.approx(50.0, abs=1e-3)
    # the colour parts are closed and together make up the solid (disjoint: volumes add up)
    from orbviz.surface.checks import mesh_facts

    volumes = [mesh_facts(*arrays(p)).volume for p in model.parts.values()]
    assert all(mesh_facts(*arrays(p)).closed for p in model.parts.values())
    assert sum(volumes) == pytest.approx(facts.volume, rel=1e-6)


def test_1s_model_is_the_r90_sphere():
    # closed form 1s 90% radius (rho ~ 2.661); the rod and bead lie inside the sphere
    rho = brentq(lambda p: 1 - math.exp(-2 * p) * (1 + 2 * p + 2 * p * p) - 0.9, 0.1, 10)
    size = 40.0
    model = build_model(Orbital.from_spec("1s"), size=size)
    facts = model.facts()
    assert facts.solids == 1 and facts.cavities == 0 and facts.pieces == 1
    assert model.mm_per_bohr == pytest.approx(size / (2 * rho), rel=0.01)
    assert facts.volume == pytest.approx(math.pi / 6 * size**3, rel=0.01)


@pytest.mark.parametrize("cut", ["half", "quarter"])
def test_cutaways_stay_watertight_and_open_the_shells(cut):
    whole = build_model(Orbital.from_spec("4s"), size=50.0, grid=96)
    assert whole.facts().cavities >= 1  # nested shells enclose voids...
    model = build_model(Orbital.from_spec("4s"), size=50.0, grid=96, cut=cut)
    facts = model.facts()
    assert facts.watertight and facts.solids == 1 and facts.cavities == 0  # ...a cut opens them
    assert _size(model) == pytest.approx(50.0, abs=1e-3)
    v, _ = arrays(model.solid)
    removed = (v[:, 0] > 1e-4) if cut == "half" else (v[:, 0] > 1e-4) & (v[:, 1] > 1e-4)
    assert not removed.any()  # nothing left at x > 0 (half) or at x > 0, y > 0 (quarter)
    if cut == "half":
        assert not any("flat base" in c.message for c in model.checks)


def test_stand_gives_a_flat_base():
    model = build_model(Orbital.from_spec("2pz"), size=50.0, grid=96, stand=True)
    assert model.facts().watertight and model.facts().solids == 1
    assert not any("flat base" in c.message for c in model.checks)
    v, f = arrays(model.solid)
    bottom = v[:, 2].min()
    cross = np.cross(v[f[:, 1]] - v[f[:, 0]], v[f[:, 2]] - v[f[:, 0]])
    down = (cross[:, 2] < 0) & np.all(np.abs(v[f][:, :, 2] - bottom) < 1e-4, axis=1)
    assert 0.5 * np.linalg.norm(cross[down], axis=1).sum() > 100  # mm^2 of flat base


def test_min_feature_catches_a_thin_rod():
    with pytest.raises(
        OptionError, match=r"0.8 mm rod is under the 1.2 mm thinnest feature: use size_mm >= 30"
    ):
        build_model(Orbital.from_spec("2pz"), size=20.0)
    with pytest.raises(OptionError, match=r"1 mm rod is under the 1.5 mm"):
        build_model(Orbital.from_spec("2pz"), size=60.0, rod=1.0, min_feature=1.5)
    with pytest.raises(OptionError, match=r"a 100 mm rod would hide a 60 mm model"):
        build_model(Orbital.from_spec("2pz"), size=60.0, rod=100.0)


def test_thin_lobes_are_reported():
    # a 24 mm 4fxyz has lobes about 5 mm across: against a 6 mm minimum feature most of each
    # phase is too thin, and the opening check must say so (at 40 mm, 8 mm lobes, only ~1% is)
    model = build_model(Orbital.from_spec("4fxyz"), size=24.0, rod=6.0, min_feature=6.0, grid=64)
    assert any(c.level == "warning" and "thinner than 6 mm" in c.message for c in model.checks)


def test_3mf_is_one_object_with_coloured_parts_read_back_with_lib3mf(tmp_path, capsys):
    import lib3mf

    out = tmp_path / "pz.3mf"
    assert main(["model", "2pz", "--size", "50", "--grid", "64", "-o", str(out)]) == 0
    unit, items, objects, parts = read_3mf(out)
    assert unit == lib3mf.ModelUnit.MilliMeter
    assert items == 1 and objects == 1  # one object: a slicer keeps the parts in place
    found = {name: rgb for name, rgb, _ in parts}
    assert set(found) == {"support", "positive", "negative"}
    # Paul Tol's high-contrast pair (SRON/EPS/TN/09-002, 2021): #004488 and #DDAA33
    assert found["positive"] == (0x00, 0x44, 0x88) and found["negative"] == (0xDD, 0xAA, 0x33)
    assert all(mesh.is_watertight and mesh.is_winding_consistent for _, _, mesh in parts)
    assert all(mesh.volume > 0 for _, _, mesh in parts)  # outward normals


def test_split_writes_one_stl_per_part(tmp_path, capsys):
    from stl import mesh as stl_mesh  # numpy-stl, an independent reader

    out = tmp_path / "m.stl"
    assert main(["model", "3dz2", "--size", "40", "--grid", "64", "--split", "-o", str(out)]) == 0
    names = sorted(p.name for p in tmp_path.iterdir())
    assert names == ["m-negative.stl", "m-positive.stl", "m-support.stl"]
    for name in names:
        back = stl_mesh.Mesh.from_file(str(tmp_path / name))
        assert back.is_closed()


def test_model_cli_refuses_and_writes_nothing(tmp_path, capsys):
    out = tmp_path / "t.stl"
    status = main(["model", "2pz", "--size", "20", "-o", str(out)])
    err = capsys.readouterr().err
    assert status == 2 and "--rod: a 0.8 mm rod is under the 1.2 mm" in err and err.count("\n") == 1
    assert "use --size >= 30 or --rod 1.2" in err
    assert not out.exists()
    status = main(["model", "2pz", "--size", "40", "--split", "-o", str(tmp_path / "x.3mf")])
    assert status == 2 and "split parts are written as .stl" in capsys.readouterr().err
    status = main(["model", "2pz", "--size", "60", "--rod", "100", "-o", str(out)])
    assert status == 2 and "a 100 mm rod would hide a 60 mm model" in capsys.readouterr().err
    assert not out.exists()


@pytest.mark.parametrize(
    ("spec", "cut"), [("3dz2", "quarter"), ("3dz2", "half"), ("4fxyz", "half"), ("3dxy", "quarter")]
)
def test_cut_off_axis_pieces_stay_joined(spec, cut):
    # spokes are placed after the cut, so no half-ring or half-lobe is left floating
    model = build_model(Orbital.from_spec(spec), size=50.0, grid=64, cut=cut)
    facts = model.facts()
    assert facts.watertight and facts.solids == 1
