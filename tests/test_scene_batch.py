"""Scene files and batch runs: validation, manifest, reruns, failures, contact sheet, demo."""

from __future__ import annotations

import concurrent.futures as cf
import dataclasses
import json
import subprocess
from pathlib import Path

import pytest

from orbviz.cli import main
from orbviz.errors import SceneError
from orbviz.scenes.items import Item
from orbviz.scenes.load import load_scene
from orbviz.scenes.load import parse_scene as _parse
from orbviz.scenes.runner import run_scene
from tests.conftest import chromium_path


def parse_scene(text, source):
    return _parse(text, source).items


GALLERY = Path(__file__).resolve().parents[1] / "gallery_scenes"


def _small(items: list[Item]) -> list[Item]:
    """The same items at a small grid and image size, so the tests run quickly."""
    out = []
    for item in items:
        figure = dataclasses.replace(item.figure, grid=32, size=(160, 120), scale=1.0)
        model = dataclasses.replace(item.model, grid=32, size_mm=60.0)
        out.append(dataclasses.replace(item, figure=figure, model=model))
    return out


SCENE = """
title = "test set"
[defaults]
grid = 32
outputs = ["png", "stl"]
render = { size = "160x120" }

[[orbital]]
spec = "2pz"

[[shells]]
n = 1

[[orbital]]
spec = "3dxy"
name = "dxy-figure"
outputs = ["png", "ply"]
"""


def test_parse_defaults_overrides_and_expansion():
    items = parse_scene(SCENE, "test.toml")
    assert [i.name for i in items] == ["2pz", "1s", "dxy-figure"]  # file order kept
    assert items[0].outputs == ("png", "stl")
    assert items[2].outputs == ("png", "ply")
    assert all(i.figure.grid == 32 and i.model.grid == 32 for i in items)


def test_shells_expand_to_every_real_orbital():
    # n^2 real orbitals per shell (l = 0..n-1, 2l+1 each): 1 + 4 + 9 + 16 + 25 = 55
    items = parse_scene("[[shells]]\nn = [1, 2, 3, 4, 5]\n", "s.toml")
    assert len(items) == 55
    assert len({i.name for i in items}) == 55
    assert "5,4,-4" in {i.spec for i in items}  # no label beyond f: n,l,m as a real combination
    assert all(i.physics.real is False for i in items)


@pytest.mark.parametrize(
    ("text", "fragment"),
    [
        (
            "[[orbital]]\nspec = '2pz'\nfracton = 0.5\n",
            "t.toml: orbital 1 ('2pz'): fracton: unknown key",
        ),
        ("[[orbital]]\nspec = '2pq'\n", "t.toml: orbital 1 ('2pq'): spec: expected an orbital"),
        ("[[orbital]]\nspec = '2pz'\nfraction = 1.5\n", "fraction: expected a number"),
        ("[[orbital]]\nspec = '2pz'\ngrid = 'fine'\n", "grid: expected a whole number"),
        ("[[orbital]]\nspec = '2pz'\noutputs = ['webm']\n", "outputs: expected a non-empty list"),
        (
            "[[orbital]]\nspec = '2pz'\noutputs = ['gif']\n",
            "outputs: an animation (gif, mp4) needs",
        ),
        ("[[orbital]]\nspec = '2pz'\nrender = { colour = 'red' }\n", "render.colour: unknown key"),
        ("[[orbital]]\nspec = '2pz'\nname = '../escape'\n", "name: '../escape' must be"),
        ("[[orbital]]\nspec = '2pz'\nname = '/etc/x'\n", "name: '/etc/x' must be"),
        ("[[orbital]]\nspec = '2pz'\n[[orbital]]\nspec = '2pz'\n", "both write '2pz.png'"),
        ("[[shells]]\nn = 0\n", "t.toml: shells 1: n: expected whole numbers"),
        (
            "[defaults]\nZ = -1\n[[orbital]]\nspec = '1s'\n",
            "t.toml: [defaults]: Z: expected a number",
        ),
        ("[[orbital]]\nname = 'x'\n", "spec: missing"),
        ("[scene]\nx = 1\n", "unknown table 'scene'"),
        ("[[orbital]\nspec = '1s'\n", "not valid TOML"),
        ("title = 'empty'\n", "no items"),
    ],
)
def test_errors_name_file_item_and_key(text, fragment):
    with pytest.raises(SceneError) as info:
        parse_scene(text, "t.toml")
    assert fragment in str(info.value)


def test_batch_cli_bad_scene_is_one_line(tmp_path, capsys):
    scene = tmp_path / "bad.toml"
    scene.write_text("[[orbital]]\nspec = '2pz'\nfracton = 0.5\n")
    status = main(["batch", str(scene), "-o", str(tmp_path / "out")])
    err = capsys.readouterr().err
    assert status == 2 and err.count("\n") == 1 and "bad.toml: orbital 1" in err
    assert not (tmp_path / "out").exists()


@pytest.mark.slow
def test_run_manifest_rerun_and_force(tmp_path):
    items = parse_scene(SCENE, "test.toml")
    first = run_scene(items, tmp_path, jobs=2, progress=False)
    entries = {e["name"]: e for e in first["items"]}
    assert [e["status"] for e in first["items"]] == ["done"] * 3
    assert set(entries["2pz"]["files"]) == {"2pz.stl", "2pz.png"}
    for entry in first["items"]:
        assert all((tmp_path / f).exists() for f in entry["files"])
        assert entry["isovalue"] > 0 and entry["faces"] > 0 and entry["watertight"]
    on_disk = json.loads((tmp_path / "manifest.json").read_text())
    assert on_disk["items"] == first["items"]
    # an unchanged rerun skips everything; a changed item reruns alone; --force redoes all
    again = run_scene(items, tmp_path, jobs=2, progress=False)
    assert [e["status"] for e in again["items"]] == ["skipped"] * 3
    physics = dataclasses.replace(items[0].physics, fraction=0.8)
    changed = [dataclasses.replace(items[0], physics=physics)]
    third = run_scene(changed + items[1:], tmp_path, jobs=2, progress=False)
    assert [e["status"] for e in third["items"]] == ["done", "skipped", "skipped"]
    (tmp_path / "1s.png").unlink()  # a missing file makes its item run again
    fourth = run_scene(changed + items[1:], tmp_path, jobs=2, progress=False)
    assert [e["status"] for e in fourth["items"]] == ["skipped", "done", "skipped"]
    forced = run_scene(items, tmp_path, jobs=2, progress=False, force=True)
    assert [e["status"] for e in forced["items"]] == ["done"] * 3


@pytest.mark.slow
def test_one_failure_does_not_stop_the_others(tmp_path, capsys):
    scene = tmp_path / "s.toml"
    # the second item fixes a figure extent too small to hold its surface, found only when the
    # surface is solved (at run time): it fails alone
    scene.write_text(
        "[defaults]\ngrid = 32\noutputs = ['stl']\n"
        "[[orbital]]\nspec = '2pz'\n"
        "[[orbital]]\nspec = '3dz2'\nrender = { extent = 2.0 }\n"
        "[[orbital]]\nspec = '1s'\n"
    )
    status = main(["batch", str(scene), "-o", str(tmp_path / "out"), "--no-progress"])
    assert status == 1
    manifest = json.loads((tmp_path / "out" / "manifest.json").read_text())
    states = {e["name"]: e["status"] for e in manifest["items"]}
    assert states == {"2pz": "done", "3dz2": "failed", "1s": "done"}
    failed = next(e for e in manifest["items"] if e["status"] == "failed")
    assert "does not hold the surface" in failed["error"]
    assert "failed: 3dz2" in capsys.readouterr().err


@pytest.mark.slow
def test_custom_executor_is_used(tmp_path):
    # any concurrent.futures.Executor works (a Dask Client.get_executor() fits the same slot)
    class Counting(cf.ProcessPoolExecutor):
        submitted = 0

        def submit(self, fn, /, *args, **kwargs):
            Counting.submitted += 1
            return super().submit(fn, *args, **kwargs)

    import multiprocessing

    items = parse_scene(SCENE, "test.toml")[:2]
    # spawned workers: a forked pool, made after VTK and numexpr have started threads, can hang
    with Counting(max_workers=2, mp_context=multiprocessing.get_context("spawn")) as pool:
        manifest = run_scene(items, tmp_path, executor=pool, progress=False)
    assert Counting.submitted == 2 and all(e["status"] == "done" for e in manifest["items"])


CHROMIUM_FLAGS = [
    "--headless",
    "--no-sandbox",
    "--disable-gpu",
    "--disable-quic",
    "--no-first-run",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
]


@pytest.mark.slow
def test_contact_sheet_in_a_real_browser(tmp_path):
    exe = chromium_path()
    out = tmp_path / "set"
    manifest = run_scene(parse_scene(SCENE, "test.toml"), out, jobs=2, progress=False)
    page = (out / "index.html").as_uri()
    dom = subprocess.run(
        [
            exe,
            *CHROMIUM_FLAGS,
            f"--user-data-dir={tmp_path / 'u1'}",
            "--virtual-time-budget=8000",
            "--dump-dom",
            page,
        ],
        capture_output=True,
        timeout=120,
        check=True,
    ).stdout.decode("utf-8", errors="replace")  # the page has psi in it: not the locale's codec
    count = len(manifest["items"])
    assert f'data-thumbnails="{count}/{count}"' in dom  # every thumbnail loaded
    for entry in manifest["items"]:
        assert entry["name"] in dom
        for f in entry["files"]:
            assert f'href="{f}"' in dom
    shot = tmp_path / "sheet.png"
    subprocess.run(
        [
            exe,
            *CHROMIUM_FLAGS,
            f"--user-data-dir={tmp_path / 'u2'}",
            "--window-size=1200,900",
            "--virtual-time-budget=8000",
            f"--screenshot={shot}",
            page,
        ],
        capture_output=True,
        timeout=120,
        check=True,
    )
    import numpy as np
    from PIL import Image

    with Image.open(shot) as image:
        img = np.asarray(image.convert("RGB")).astype(int)
    # the grid shows: the blue and vermillion phases appear in the screenshot
    # the phase pair (Tol's high contrast, #004488 and #DDAA33), shaded: hue match, any lightness
    unit = img / np.maximum(np.linalg.norm(img, axis=2, keepdims=True), 1)
    hue = lambda rgb: (unit @ (np.array(rgb) / np.linalg.norm(rgb)) > 0.99) & (img.sum(2) > 40)  # noqa: E731
    blue, orange = hue([0x00, 0x44, 0x88]).mean(), hue([0xDD, 0xAA, 0x33]).mean()
    assert blue > 0.005 and orange > 0.005


@pytest.mark.slow
@pytest.mark.parametrize("scene", sorted(GALLERY.glob("*.toml")), ids=lambda p: p.stem)
def test_gallery_scenes_parse_and_run(scene, tmp_path):
    items = load_scene(scene).items
    assert items
    manifest = run_scene(_small(items), tmp_path, jobs=2, progress=False)
    assert all(e["status"] == "done" for e in manifest["items"]), [
        e.get("error") for e in manifest["items"]
    ]


@pytest.mark.slow
def test_demo_runs(tmp_path, capsys):
    status = main(["demo", "-o", str(tmp_path / "demo"), "--no-progress"])
    assert status == 0
    manifest = json.loads((tmp_path / "demo" / "manifest.json").read_text())
    names = {e["name"] for e in manifest["items"]}
    # the real orbitals of n = 1..3 (1 + 4 + 9), two cutaways, a complex 3d state, a hybrid and
    # a model
    assert len(names) == 19
    assert {"3dz2", "2s-cut", "3s-cut", "3d-m1-complex", "2sp3-1", "2pz-print"} <= names
    assert (tmp_path / "demo" / "2pz-print-model.3mf").exists()
    assert (tmp_path / "demo" / "index.html").exists()


def test_figure_and_model_of_one_item_share_one_mesh(tmp_path, monkeypatch):
    # an item with a figure and a model contours its orbital once (not a check of physics: of
    # the work done); the model is still the one build_model makes on its own (same volume)
    import orbviz.models.build
    import orbviz.surface.mesh
    from orbviz.models.options import ModelOptions
    from orbviz.scenes.runner import run_item
    from orbviz.states.orbital import Orbital

    text = """
[defaults]
grid = 32
outputs = ["png", "model.stl"]
render = { size = "160x120" }
model = { size = 60 }

[[orbital]]
spec = "2pz"
"""
    (item,) = parse_scene(text, "m.toml")
    calls = []
    real = orbviz.surface.mesh.build_mesh

    def counting(*args, **kwargs):
        calls.append(args[0])
        return real(*args, **kwargs)

    monkeypatch.setattr(orbviz.surface.mesh, "build_mesh", counting)
    monkeypatch.setattr(orbviz.models.build, "build_mesh", counting)
    entry = run_item(item, str(tmp_path))
    assert entry["status"] == "done", entry
    assert len(calls) == 1
    alone = orbviz.models.build.build_model(
        Orbital.from_spec("2pz"), ModelOptions(size_mm=60.0, grid=32)
    )
    import trimesh

    written = trimesh.load(tmp_path / "2pz-model.stl")
    assert written.volume == pytest.approx(float(alone.solid.volume()), rel=1e-6)
