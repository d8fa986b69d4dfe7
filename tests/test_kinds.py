"""Every command meets every kind of state: it works, or it refuses in one line (exit 2).

Kinds: an eigenstate, a complex eigenstate, a superposition, a hybrid, a screened atom, a
numerically solved radial part, and a two-centre combination. What "works" means is checked
elsewhere against outside references; here the frame is tested: no kind reaches a command that
cannot serve it, and none ends in an internal error.
"""

from __future__ import annotations

import json

import pytest

from orbviz.cli import main

KINDS = {
    "eigenstate": ["3dz2"],
    "complex": ["3,2,1"],
    "superposition": ["0.6*2s+0.8*3pz"],
    "hybrid": ["2sp3[1]"],
    "screened": ["Na:3s"],
    "numerical": ["2pz", "--potential", "yukawa:10"],
    "bond": ["bond(1s,1s,R=2,+)"],
}

# commands whose refusals are expected, by kind: a fragment of the one-line message
REFUSED = {
    ("plot-radial", "bond"): "a bond has no single radial distribution",
    ("animate", "bond"): "a bond has no energies",
    ("animate", "eigenstate"): "does not move",
    ("animate", "complex"): "does not move",
    ("animate", "hybrid"): "does not move",
    ("animate", "screened"): "does not move",
    ("animate", "numerical"): "does not move",
}

SMALL = ["--grid", "32"]


def _argv(command: str, kind: str, out) -> list[str]:
    spec, *physics = KINDS[kind]
    if command == "info":
        return ["info", spec, *physics, "--json"]
    if command.startswith("plot"):
        kind = command.split("-")[1]
        few = ["--points", "2000"] if kind == "dots" else []
        return ["plot", spec, *physics, "--kind", kind, *few, "-o", str(out / "p.png")]
    if command == "render":
        return ["render", spec, *physics, *SMALL, "--size", "160x120", "-o", str(out / "r.png")]
    if command == "sample":
        return ["sample", spec, *physics, "--points", "2000", "-o", str(out / "s.ply")]
    if command in ("cloud", "volume"):
        look = ["--style", command, "--points", "2000", "--size", "160x120"]
        return ["render", spec, *physics, *SMALL, *look, "-o", str(out / "c.png")]
    if command == "page":
        return ["render", spec, *physics, *SMALL, "--levels", "0.5", "-o", str(out / "p.html")]
    if command == "mesh":
        return ["mesh", spec, *physics, *SMALL, "-o", str(out / "m.glb")]
    if command == "model":
        return ["model", spec, *physics, "--grid", "48", "--size", "40", "-o", str(out / "m.stl")]
    frames = ["--frames", "2", *SMALL, "--size", "80x60"]
    return ["animate", spec, *physics, *frames, "-o", str(out / "a.gif")]


COMMANDS = [
    "info",
    "plot-slice",
    "plot-radial",
    "plot-dots",
    "render",
    "cloud",
    "volume",
    "page",
    "sample",
    "mesh",
    "model",
    "animate",
]


@pytest.mark.slow
@pytest.mark.parametrize("kind", list(KINDS))
@pytest.mark.parametrize("command", COMMANDS)
def test_command_works_or_refuses_in_one_line(command, kind, tmp_path, capsys):
    status = main(_argv(command, kind, tmp_path))
    out, err = capsys.readouterr()
    assert "internal error" not in err and "Traceback" not in err
    fragment = REFUSED.get((command, kind))
    if fragment is None:
        assert status == 0, err
        if command == "info":
            assert json.loads(out)["enclosed_fraction"] == pytest.approx(0.9, abs=1e-3)
        else:
            assert any(tmp_path.iterdir())
    else:
        assert status == 2 and err.count("\n") == 1 and fragment in err
        assert not any(tmp_path.iterdir())  # nothing written


def test_a_moving_superposition_animates(tmp_path, capsys):
    argv = ["animate", "1s+2pz", "--frames", "2", *SMALL, "--size", "80x60"]
    assert main([*argv, "-o", str(tmp_path / "a.gif")]) == 0


@pytest.mark.slow
def test_batch_items_of_every_kind(tmp_path, capsys):
    # a scene with one item of each kind, each making a figure, a mesh and a model
    lines = ["[defaults]", "grid = 48", 'outputs = ["png", "glb", "model.stl"]']
    lines += ['render = { size = "160x120" }', "model = { size = 40 }"]
    for kind, (spec, *physics) in KINDS.items():
        lines += ["[[orbital]]", f"spec = {json.dumps(spec)}", f'name = "{kind}"']
        if physics:
            lines.append(f"potential = {json.dumps(physics[1])}")
    scene = tmp_path / "kinds.toml"
    scene.write_text("\n".join(lines) + "\n")
    status = main(["batch", str(scene), "-o", str(tmp_path / "out"), "--no-progress"])
    manifest = json.loads((tmp_path / "out" / "manifest.json").read_text())
    assert status == 0, [e.get("error") for e in manifest["items"]]
    assert {e["name"]: e["status"] for e in manifest["items"]} == dict.fromkeys(KINDS, "done")
