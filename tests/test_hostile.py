"""The hostile sweep: bad and extreme input across every command and scene files.

Every case must be refused with exit status 2 and exactly one line on stderr, starting
``orbviz: error:`` and naming the bad value and the rule it breaks; never a traceback or an
"internal error"; and the disk must be as it was: nothing new, and every file already there
(among them files with the very names the run would write) byte for byte unchanged.

The rules are the documented ones, named beside each group: the supported ranges of
``orbviz._defaults.LIMITS`` (docs/limits.md), the spec grammar of docs/spec.md, the output rules
of docs/meshes.md and docs/figures.md (suffixes, companions, all-or-nothing writes) and the
scene format of docs/scenes.md. Fragments of the rules are built from ``LIMITS`` where a limit
exists, so a message that drifts from the documented range fails here.

tests/test_cli.py (BAD), tests/test_scene_keys.py and tests/test_export.py hold more cases of
single classes; this module sweeps every class across commands. The fuzz tests at the end are
marked slow.
"""

from __future__ import annotations

import json
import math
import os
import shutil
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

from orbviz._defaults import LIMITS
from orbviz.cli import main

KEEP = b"\x00orbviz hostile sweep: keep these bytes\xff\n"

GRID = f"from {LIMITS.grid_min} to {LIMITS.grid_max}"  # _defaults.LIMITS.grid_min/grid_max
Z_RANGE = f"from {LIMITS.Z_min:g} to {LIMITS.Z_max:g}"  # _defaults.LIMITS.Z_min/Z_max
FRACTION = f"from {LIMITS.fraction_min:g} to {LIMITS.fraction_max:g}"  # LIMITS.fraction_*
SIDES = f"each side {LIMITS.image_side_min} to {LIMITS.image_side_max}"  # LIMITS.image_side_*
BOND_R = f"from {LIMITS.bond_distance_min:g} to {LIMITS.bond_distance_max:g} bohr"
MODEL_MM = f"from {LIMITS.model_size_min_mm:g} to {LIMITS.model_size_max_mm:g} mm"
N_MAX = f"n <= {LIMITS.n_max}"  # _defaults.LIMITS.n_max


# ----------------------------------------------------------------------------- the checks
def _snapshot(root: Path) -> dict[str, bytes | None]:
    """Every entry under ``root`` (hidden temporaries too): path -> bytes, None for a folder."""
    found: dict[str, bytes | None] = {}
    for folder, dirs, files in os.walk(root):
        for name in dirs:
            found[os.path.relpath(os.path.join(folder, name), root)] = None
        for name in files:
            path = os.path.join(folder, name)
            found[os.path.relpath(path, root)] = Path(path).read_bytes()
    return found


def _refused(capsys, root: Path, argv: list[str], *fragments: str) -> str:
    """Run ``argv`` in process; assert the refusal contract; return the error line."""
    before = _snapshot(root)
    status = main(argv)
    out, err = capsys.readouterr()
    assert status == 2, (status, err)
    assert err.startswith("orbviz: error: ") and err.endswith("\n") and err.count("\n") == 1, err
    assert "Traceback" not in out + err and "internal error" not in err
    for fragment in fragments:
        assert fragment in err, (fragment, err)
    assert _snapshot(root) == before  # nothing new, nothing changed, nothing removed
    return err


@pytest.fixture
def disk(tmp_path, monkeypatch):
    """A working folder with traps: files that must survive and folders where files would go."""
    monkeypatch.chdir(tmp_path)
    for name in ("keep.bin", "x.stl", "x.png", "x.gif", "plain", "r.json"):
        (tmp_path / name).write_bytes(KEEP)
    for name in ("folder.stl", "a.mtl", "b.bin", "parts-negative.stl", "tables/adir"):
        (tmp_path / name).mkdir(parents=True)
    (tmp_path / "frames").mkdir()
    (tmp_path / "frames" / "notes.txt").write_bytes(KEEP)  # a folder of other files
    tables = tmp_path / "tables"
    r = np.geomspace(1e-3, 50.0, 200)
    np.savetxt(tables / "huge.dat", np.c_[r, -1e300 / r])  # |V| r far above the solver's 1e6
    np.savetxt(tables / "one.dat", r)
    np.savetxt(tables / "decreasing.dat", np.c_[r[::-1], -1.0 / r])
    (tables / "binary.dat").write_bytes(b"\x89PNG\r\n\x1a\n\x00\x00\xff\xfe")
    (tables / "words.dat").write_text("radius potential\none two\n")
    (tables / "empty.dat").write_text("# r V, but no rows\n\n")
    return tmp_path


def _bond(r: str, sign: str = "+") -> str:
    return f"bond(1s,1s,R={r},{sign})"


def _terms(count: int) -> str:
    """``count`` distinct states n,l,0 joined by '+' (each one real basis state)."""
    states = [f"{n},{l},0" for n in range(1, 16) for l in range(n)]
    return "+".join(states[:count])


# ------------------------------------------------------------------- the command-line cases
CASES = [
    # --- quantum numbers (docs/spec.md: integers, N >= 1, 0 <= L < N, |M| <= L; LIMITS.n_max)
    (["info", "0,0,0"], "n=0", "n >= 1"),
    (["mesh", "2,2,0", "-o", "o.stl"], "l=2", "0 <= l < n"),
    (["render", "2,1,3", "-o", "o.png"], "m=3", "|m| <= l"),
    (["plot", "101s", "-o", "o.png"], "n=101", N_MAX),
    (["model", "1000000s", "-o", "o.stl"], "n=1000000", N_MAX),
    (["animate", "2.5,1,0 + 1s", "-o", "o.gif"], "n=2.5", "must be an integer"),
    (["info", "3,-1,0"], "l=-1", "0 <= l < n"),
    (["info", "2,1,1e400"], "m=inf", "must be an integer"),
    (["mesh", "bond(101s,1s,R=2,+)", "-o", "o.stl"], "n=101", N_MAX),
    (["info", "99999999999999999999sp3[1]"], "n=99999999999999999999", N_MAX),
    (["info", "2sp3[5]"], "[5]", "[1] to [4]"),  # docs/spec.md: sp3 has 4 hybrids
    (["info", "2sp3d[1]"], "2sp3d[1]", "n >= 3"),  # docs/spec.md: d hybrids need n >= 3
    (["info", "Na:9s"], "9s", "ground configuration"),  # docs/spec.md: element prefix
    # --- malformed spec text (docs/spec.md grammar; LIMITS.spec_chars, LIMITS.terms_max)
    (["info", "(1+1j*2pz"], "'(1+1j*2pz'", "expected an orbital"),
    (["info", "2pz)"], "'2pz)'", "expected '+' or '-'"),
    (["mesh", "((1+1j)*2pz", "-o", "o.stl"], "'((1+1j)*2pz'", "expected an orbital"),
    (["info", ""], "empty orbital spec", "try e.g. 2pz"),
    (["mesh", "   ", "-o", "o.stl"], "empty orbital spec", "try e.g. 2pz"),
    (["info", "1s+" * 1500 + "1s"], "4502 characters", f"at most {LIMITS.spec_chars}"),
    (["render", "x" * 5000, "-o", "o.png"], "5000 characters", f"at most {LIMITS.spec_chars}"),
    (["info", _terms(LIMITS.terms_max + 1)], "101 distinct states", f"at most {LIMITS.terms_max}"),
    (["info", "inf*2pz"], "'inf'", "must be finite"),
    (["info", "nan*1s"], "'nan'", "must be finite"),
    (["info", "(1e400j)*2pz"], "'1e400j'", "must be finite"),
    (["mesh", "2pz - 2pz", "-o", "o.stl"], "'2pz - 2pz'", "is zero"),  # docs/spec.md: cancels
    (["info", "2,1,1 + 2px - 2,1,1 - 2px"], "'2,1,1 + 2px - 2,1,1 - 2px'", "is zero"),
    (["info", "0*2s"], "'0*2s'", "is zero"),
    (["info", "1e-400*2pz"], "'1e-400*2pz'", "is zero"),  # the weight underflows to 0
    (["info", "1.7e308*2s + 1.7e308*2s"], "'1.7e308*2s + 1.7e308*2s'", "overflow"),
    (["info", "2pz 2s"], "position 4", "expected '+' or '-'"),
    (["info", "(1+1j)*(2+2j)*2pz"], "'(2+2j)*2pz'", "expected an orbital"),
    (["info", "()*2pz"], "''", "bad coefficient"),
    (["info", "2s\x00"], "'2s\\x00'", "expected '+' or '-'"),
    (["info", "Qq:3s"], "'Qq'", "H to Xe"),
    (["info", "Fe:3dz2 + 4s"], "3d: 6.25, 4s: 3.75", "one Slater group"),
    (["info", "Fe:3d + 4s"], "'3d' in", "names a set of orbitals"),
    (["info", _bond("2", "*")], _bond("2", "*"), "bond(1s,1s,R=2.0,+)"),
    (["info", _bond("1e-")], "'1e-'", "number of bohr"),
    (["info", _bond("nan")], _bond("nan"), "bond(1s,1s,R=2.0,+)"),
    (["info", "bond(1s + 2s,1s,R=2,+)"], "'1s + 2s'", "real orbital labels"),
    (["info", "bond(4fz(x2-y2),1s,R=2,+)"], "4fz(x2-y2)", "bond(1s,1s,R=2.0,+)"),
    # --- extreme numbers (LIMITS.Z_*, nuclear_mass_*, fraction_*, bond_distance_*)
    (["info", "2pz", "--Z", "0"], "--Z", "got '0'", Z_RANGE),
    (["mesh", "2pz", "--Z", "-2", "-o", "o.stl"], "--Z", "got '-2'", Z_RANGE),
    (["render", "2pz", "--Z", "inf", "-o", "o.png"], "--Z", "got 'inf'", Z_RANGE),
    (["plot", "2pz", "--Z", "1e150", "-o", "o.png"], "--Z", "got '1e150'", Z_RANGE),
    (["model", "2pz", "--Z", "1e-300", "-o", "o.stl"], "--Z", "got '1e-300'", Z_RANGE),
    (["animate", "1s+2pz", "--Z", "nan", "-o", "o.gif"], "--Z", "got 'nan'", Z_RANGE),
    (["info", "2pz", "--nuclear-mass", "1e-300"], "got '1e-300'", "from 0.00054 to 1e+06 u"),
    (["mesh", "2pz", "--nuclear-mass", "-1", "-o", "o.stl"], "got '-1'", "from 0.00054"),
    (["info", "1e400*2pz + 2s"], "'1e400'", "must be finite"),
    (["info", _bond("0")], "R=0", BOND_R),
    (["mesh", _bond("1e104"), "-o", "o.stl"], "R=1e+104", BOND_R),
    (["render", _bond("-1"), "-o", "o.png"], "R=-1", BOND_R),
    (["info", "2pz", "--fraction", "0"], "--fraction", "got '0'", FRACTION),
    (["mesh", "2pz", "--fraction", "1", "-o", "o.stl"], "--fraction", "got '1'", FRACTION),
    (["render", "2pz", "--fraction", "1.5", "-o", "o.png"], "got '1.5'", FRACTION),
    (["plot", "2pz", "--fraction", "nan", "-o", "o.png"], "got 'nan'", FRACTION),
    (["info", "2pz", "--Z", "2", "--reduced-mass"], "Z = 2", "--nuclear-mass"),
    (["info", "Na:3s", "--Z", "2"], "'Na:3s'", "leave out Z"),
    # --- potentials (docs/spec.md, "Other central potentials"; YUKAWA_RANGE, HARMONIC_RANGE)
    (["info", "2pz", "--potential", "yukawa:0"], "'yukawa:0'", "from 0.05 to 10000 bohr"),
    (["mesh", "2pz", "--potential", "yukawa:x", "-o", "o.stl"], "'yukawa:x'", "from 0.05"),
    (["render", "2pz", "--potential", "harmonic:1e9", "-o", "o.png"], "'harmonic:1e9'", "1000"),
    (["info", "2pz", "--potential", "morse:1"], "'morse:1'", "coulomb, yukawa:LENGTH"),
    (["info", "2pz", "--potential", "coulomb:3"], "'coulomb:3'", "coulomb, yukawa:LENGTH"),
    (["info", "1s", "--potential", "table:missing.dat"], "'missing.dat'", "No such file"),
    (["info", "1s", "--potential", "table:tables"], "'tables'", "Is a directory"),
    (["info", "1s", "--potential", "table:tables/binary.dat"], "'binary.dat'", "not UTF-8"),
    (["info", "1s", "--potential", "table:tables/words.dat"], "'words.dat'", "line 1: expected"),
    (["info", "1s", "--potential", "table:tables/one.dat"], "got 1", "exactly two columns"),
    (["info", "1s", "--potential", "table:tables/huge.dat"], "huge.dat", "|V| min(r, 1) <="),
    (["info", "1s", "--potential", "table:tables/decreasing.dat"], "decreasing", "increasing"),
    (["info", "1s", "--potential", "table:tables/empty.dat"], "'empty.dat'", "no rows"),
    (["info", "1s", "--potential", "yukawa:0.05"], "n=1, l=0", "not below the threshold"),
    (["info", "30s", "--potential", "yukawa:0.05"], "n=30, l=0", "no bound state"),
    (["info", "Na:3s", "--potential", "yukawa:5"], "'Na:3s'", "cannot be combined"),
    # --- option values (each options dataclass's rule; LIMITS where one applies)
    (["mesh", "2pz", "--grid", "7", "-o", "o.stl"], "--grid", "got '7'", GRID),
    (["render", "2pz", "--grid", "0", "-o", "o.png"], "--grid", "got '0'", GRID),
    (["model", "2pz", "--grid", "99999", "-o", "o.stl"], "--grid", "got '99999'", GRID),
    (["animate", "1s+2pz", "--grid", "fine", "-o", "o.gif"], "--grid", "got 'fine'", GRID),
    (["mesh", "2pz", "--grid", "64.5", "-o", "o.stl"], "--grid", "got '64.5'", GRID),
    (["render", "2pz", "--size", "10x10", "-o", "o.png"], "--size", "got '10x10'", SIDES),
    (["render", "2pz", "--size", "0x5", "-o", "o.png"], "--size", "got '0x5'", SIDES),
    (["animate", "1s+2pz", "--size", "big", "-o", "o.gif"], "--size", "got 'big'", SIDES),
    (["render", "2pz", "--size", "8192x8192", "-o", "o.png"], "67 megapixels", "at most 64"),
    (["render", "2pz", "--scale", "100", "-o", "o.png"], "got '100'", "from 0.25 to 8"),
    (["render", "2pz", "--view", "sideways", "-o", "o.png"], "'sideways'", "iso, x, y, z"),
    (["render", "2pz", "--view", "10,200", "-o", "o.png"], "'10,200'", "elevation -90 to 90"),
    (["render", "2pz", "--lighting", "neon", "-o", "o.png"], "'neon'", "soft, studio or flat"),
    (["render", "2pz", "--colors", "red,blue", "-o", "o.png"], "'red,blue'", "two hex colours"),
    (["mesh", "2pz", "--colors", "#0072B2", "-o", "o.stl"], "'#0072B2'", "two hex colours"),
    (["render", "2pz", "--title", "a\nb", "-o", "o.png"], "'a\\nb'", "control characters"),
    (["render", "2pz", "--outer", "1.5", "-o", "o.png"], "got '1.5'", FRACTION),
    (["render", "2pz", "--extent", "0", "-o", "o.png"], "got '0'", "above 0 to 100000 bohr"),
    (["mesh", "2pz", "--faces", "10", "-o", "o.stl"], "got '10'", "from 100 to 10000000"),
    (["mesh", "2pz", "--smooth", "-1", "-o", "o.stl"], "got '-1'", "from 0 to 1000"),
    (["mesh", "2pz", "--units", "furlong", "-o", "o.stl"], "'furlong'", "bohr, angstrom, nm"),
    (["animate", "1s+2pz", "--frames", "1", "-o", "o.gif"], "got '1'", "from 2 to 600"),
    (["animate", "1s+2pz", "--frames", "100000", "-o", "o.gif"], "got '100000'", "2 to 600"),
    (["animate", "1s+2pz", "--periods", "0", "-o", "o.gif"], "got '0'", "above 0 to 100"),
    (["animate", "1s+2pz", "--seconds", "0", "-o", "o.gif"], "got '0'", "from 0.1 to 600 s"),
    (
        ["animate", "1s+2pz", "--frames", "600", "--size", "8192x8192", "-o", "o.gif"],
        "600 frames of 8192x8192",
        "at most 4 GB",
    ),
    (["model", "2pz", "--size", "-5", "-o", "o.stl"], "got '-5'", MODEL_MM),
    (["model", "2pz", "--size", "60", "--rod", "100", "-o", "o.stl"], "100 mm rod", "15 mm"),
    (["model", "2pz", "--size", "20", "-o", "o.stl"], "0.8 mm rod", "1.2 mm thinnest feature"),
    (["model", "2pz", "--min-feature", "0", "-o", "o.stl"], "got '0'", "from 0.1 to 10 mm"),
    (["model", "2pz", "--cut", "slice", "-o", "o.stl"], "'slice'", "half, quarter or none"),
    (["model", "2pz", "--split", "-o", "o.3mf"], "'o.3mf'", "split parts are written as .stl"),
    (["plot", "2pz", "--kind", "bars", "-o", "o.png"], "'bars'", "slice, radial or dots"),
    (["plot", "2pz", "--plane", "xw", "-o", "o.png"], "'xw'", "expected xz, xy"),
    (["plot", "2pz", "--extent", "-1", "-o", "o.png"], "got '-1'", "above 0"),
    (["demo", "-o", "d", "--jobs", "0"], "got 0", f"from 1 to {LIMITS.jobs_max}"),
    (["demo", "-o", "d", "--jobs", "65"], "got 65", f"from 1 to {LIMITS.jobs_max}"),
    (["demo", "-o", "d", "--jobs", "x"], "'x'", "invalid int value"),
    # --- outputs (docs/meshes.md: suffix picks the format, companions beside it, all files
    #     checked before any work; docs/figures.md: animation outputs)
    (["mesh", "2pz", "-o", "o.abc"], "'.abc'", "unknown suffix"),
    (["mesh", "2pz", "-o", ""], "''", "unknown suffix"),
    (["mesh", "2pz", "-o", "missing/o.stl"], "'missing'", "does not exist"),
    (["mesh", "2pz", "-o", "folder.stl"], "'folder.stl'", "it is a folder"),
    (["mesh", "2pz", "-o", "a.obj"], "'a.mtl'", "it is a folder"),
    (["mesh", "2pz", "-o", "b.gltf"], "'b.bin'", "it is a folder"),
    (["mesh", "2pz", "-o", "o.stl", "--report", "missing/r.json"], "'missing'", "does not exist"),
    (["mesh", "2pz", "-o", "o.stl", "--report", "r.txt"], "'.txt'", "use .json"),
    (["model", "2pz", "--split", "-o", "parts.stl"], "'parts-negative.stl'", "it is a folder"),
    (["model", "2pz", "-o", "o.obj"], "'.obj'", "use .3mf, .stl"),
    (["model", "2pz", "-o", "o.stl", "--report", "missing/r.json"], "'missing'", "not exist"),
    (["render", "2pz", "-o", "o.jpg"], "'.jpg'", "unknown suffix"),
    (["render", "2pz", "-o", "missing/o.png"], "'missing'", "does not exist"),
    (["plot", "2pz", "-o", "o.jpg"], "'.jpg'", "use .pdf, .png, .svg"),
    (["animate", "1s+2pz", "-o", "plain"], "'plain'", "exists and is not a folder"),
    (["animate", "1s+2pz", "-o", "o.avi"], "'o.avi'", ".gif, .mp4, .glb or a folder"),
    (["animate", "1s+2pz", "-o", "."], "'.'", "replaced as a whole"),
    (["animate", "1s+2pz", "-o", "frames"], "'notes.txt'", "replaced as a whole"),
    (["animate", "1s+2pz", "-o", "missing/frames"], "'missing'", "does not exist"),
    (["demo", "-o", "plain"], "'plain'", "exists and is not a folder"),
    (["demo", "-o", "missing/d"], "'missing'", "does not exist"),
    # --- kinds a command cannot serve (docs/figures.md; DESIGN.md: "says so in one line")
    (["animate", "2s+2pz", "-o", "o.gif"], "'2s+2pz'", "does not move"),  # E_2s = E_2p
    (["animate", "2pz+2px", "-o", "o.gif"], "'2pz+2px'", "does not move"),
    (["animate", "2,1,1+2,1,-1", "-o", "o.gif"], "'2,1,1+2,1,-1'", "does not move"),
    (["animate", "3s+3pz+3dz2", "-o", "o.gif"], "'3s+3pz+3dz2'", "does not move"),
    (["animate", "2pz", "-o", "o.gif"], "'2pz'", "does not move"),
    (["animate", "Na:3s", "-o", "o.gif"], "'Na:3s'", "does not move"),
    (["animate", "2sp3[1]", "-o", "o.gif"], "'2sp3[1]'", "does not move"),
    (["animate", _bond("2"), "-o", "o.gif"], "a bond has no energies", "does not move"),
    (["plot", _bond("2"), "--kind", "radial", "-o", "o.png"], "bond", "--kind radial does not"),
    (["mesh", "2sp3", "-o", "o.stl"], "'2sp3'", "names the set of 4"),
    (["animate", "2sp3", "-o", "o.gif"], "'2sp3'", "names the set of 4"),
    (["info", _bond("2"), "--real"], "bond(...)", "real labels already"),
]


def _case_id(case) -> str:
    argv = case[0]
    text = " ".join(a if len(a) <= 24 else a[:20] + "..." for a in argv)
    return text.replace("\n", "\\n").replace("\x00", "\\0") or "empty"


@pytest.mark.parametrize("case", CASES, ids=[_case_id(c) for c in CASES])
def test_command_line_refuses(capsys, disk, case):
    argv, *fragments = case
    _refused(capsys, disk, argv, *fragments)


# ------------------------------------------------------------------------- scene files
SCENE_CASES = [
    # --- the file itself (docs/scenes.md: TOML, UTF-8, at most 1 MB)
    ("[[orbital]\nspec='1s'\n", "not valid TOML", "line 1"),
    ("x = " + "{a=" * 5000 + "1" + "}" * 5000 + "\n", "nested too deeply", "lab.toml"),
    ("", "no items", "add [[orbital]], [[shells]] or [[sheet]]"),
    ("title = 'only a title'\n", "no items", "add [[orbital]], [[shells]] or [[sheet]]"),
    ("orbital = [1, 2]\n", "orbital 1", "expected a table, got 1"),
    ("x = " + "[" * 5000 + "]" * 5000 + "\n", "nested too deeply", "lab.toml"),
    ("orbital = 'x'\n", "'orbital'", "must be an array of tables"),
    ("[orbital]\nspec = '1s'\n", "'orbital'", "must be an array of tables"),
    ("[shells]\nn = 1\n", "'shells'", "must be an array of tables"),
    ("title = '" + "t" * 201 + "'\n[[orbital]]\nspec='1s'\n", "title", "at most 200 characters"),
    # --- unknown keys at every level (docs/scenes.md, Keys)
    ("colour = 1\n[[orbital]]\nspec='1s'\n", "'colour'", "known: defaults, orbital"),
    ("[defaults]\nfoo = 1\n[[orbital]]\nspec='1s'\n", "[defaults]: foo", "unknown key"),
    ("[defaults]\nrender = {foo=1}\n[[orbital]]\nspec='1s'\n", "render.foo", "unknown key"),
    ("[defaults]\nmodel = {foo=1}\n[[orbital]]\nspec='1s'\n", "model.foo", "unknown key"),
    ("[[orbital]]\nspec='1s'\nrender = {grid=32}\n", "render.grid", "unknown key"),
    ("[[orbital]]\nspec='1s'\nmodel = {split=true}\n", "model.split", "unknown key"),
    ("[[shells]]\nn = 1\nspec = '1s'\n", "shells 1: spec", "unknown key"),
    ("[[shells]]\nn = 1\nrender = {colour='red'}\n", "shells 1: render.colour", "unknown key"),
    ("[[defaults]]\nZ = 1\n[[orbital]]\nspec='1s'\n", "[defaults]", "expected a table"),
    # --- bad values in the render and model tables (the options' own rules)
    ("[[orbital]]\nspec='1s'\nrender = {size=[100,100,3]}\n", "[100, 100, 3]", SIDES),
    ("[[orbital]]\nspec='1s'\nrender = {size=[100.5,100]}\n", "[100.5, 100]", SIDES),
    ("[[orbital]]\nspec='1s'\nrender = {view=[nan,0]}\n", "[nan, 0]", "elevation -90 to 90"),
    ("[[orbital]]\nspec='1s'\nrender = {scale=inf}\n", "got inf", "from 0.25 to 8"),
    ("[[orbital]]\nspec='1s'\nrender = {scale=1979-05-27}\n", "1979-05-27", "from 0.25 to 8"),
    ("[[orbital]]\nspec='1s'\nrender = {title=\"a\\nb\"}\n", "'a\\nb'", "control characters"),
    (
        "[[orbital]]\nspec='1s'\nrender = {size='8192x8192', scale=8}\n",
        "4295 megapixels",
        "at most 64",
    ),
    ("[[orbital]]\nspec='1s'\nmodel = {size='big'}\n", "model.size", "got 'big'", MODEL_MM),
    ("[[orbital]]\nspec='1s'\nmodel = {rod=-1}\n", "model.rod", "got -1", "from 0.1"),
    ("[[orbital]]\nspec='1s'\nmodel = {size=20}\n", "0.8 mm rod", "model.size >= 30"),
    ("[[orbital]]\nspec='1s'\ngrid = 64.5\n", "grid", "got 64.5", GRID),
    ("[[orbital]]\nspec='1s'\ngrid = true\n", "grid", "got True", GRID),
    ("[[orbital]]\nspec='1s'\nZ = nan\n", "Z", "got nan", Z_RANGE),
    ("[[orbital]]\nspec='1s'\nfraction = -inf\n", "fraction", "got -inf", FRACTION),
    ("[[orbital]]\nspec='1s'\noutputs = 'png'\n", "outputs", "got 'png'", "non-empty list"),
    ("[[orbital]]\nspec='1s'\natom = ''\n", "atom", "got ''", "element symbol"),
    # --- specs and shells (docs/spec.md; docs/scenes.md: n 1-12)
    ("[[orbital]]\nname = 'x'\n", "orbital 1: spec", "missing"),
    ("[[orbital]]\nspec = '0,0,0'\n", "('0,0,0'): spec", "n >= 1"),
    ("[[orbital]]\nspec = 'inf*2pz'\n", "'inf'", "must be finite"),
    ("[[orbital]]\nspec = '2sp3'\n", "'2sp3'", "names a set of 4 orbitals: list it in a [[sheet]]"),
    ("[[orbital]]\nspec='" + "1s+" * 1500 + "1s'\n", "4502 characters", "at most 4000"),
    ("[[shells]]\nn = 0\n", "got 0", "whole numbers 1..12"),
    ("[[shells]]\nn = 2.0\n", "got 2.0", "whole numbers 1..12"),
    ("[[shells]]\nn = []\n", "got []", "whole numbers 1..12"),
    ("[[shells]]\n", "shells 1: n", "missing"),
    # --- names: unsafe, duplicate, colliding, case-only (docs/scenes.md, name)
    ("[[orbital]]\nspec='1s'\nname='../x'\n", "'../x'", "starting with a letter or digit"),
    ("[[orbital]]\nspec='1s'\nname='..'\n", "'..'", "starting with a letter or digit"),
    ("[[orbital]]\nspec='1s'\nname='/etc/x'\n", "'/etc/x'", "letters, digits"),
    ("[[orbital]]\nspec='1s'\nname='a/b'\n", "'a/b'", "letters, digits"),
    ("[[orbital]]\nspec='1s'\nname=''\n", "''", "1-100 letters"),
    ("[[orbital]]\nspec='1s'\nname='" + "a" * 101 + "'\n", "'aaaa", "1-100 letters"),
    ("[[orbital]]\nspec='1s'\nname=3\n", "name: 3", "1-100 letters"),
    ("[[orbital]]\nspec='1s'\nname='\u00e4'\n", "'\u00e4'", "letters, digits"),
    ("[[orbital]]\nspec='1s'\nname=\"a\\u0000b\"\n", "'a\\x00b'", "letters, digits"),
    (
        "[[orbital]]\nspec='1s'\nname='a'\n[[orbital]]\nspec='2s'\nname='a'\n",
        "orbital 2 ('2s') and orbital 1 ('1s') both write 'a.png'",
        "different 'name'",
    ),
    (
        "[[orbital]]\nspec='1s'\nname='a'\n[[orbital]]\nspec='2s'\nname='A'\n",
        "both write 'A.png'",
        "different 'name'",
    ),
    ("[[orbital]]\nspec='2pz'\n[[shells]]\nn=2\n", "both write '2pz.png'", "different 'name'"),
    (
        "[[orbital]]\nspec='1s'\nname='a'\noutputs=['gltf']\n"
        "[[orbital]]\nspec='2s'\nname='a'\noutputs=['png']\n",
        "both write 'thumbs/a.png'",
        "different 'name'",
    ),
    ("[[shells]]\nn = [12, 12]\n", "both write '12s.png'", "different 'name'"),
    # --- potential tables (docs/scenes.md: beside the scene; docs/spec.md: the table rules)
    ("[[orbital]]\nspec='1s'\npotential='table:../t.dat'\n", "potential", "scene's folder"),
    ("[[orbital]]\nspec='1s'\npotential='table:/etc/hostname'\n", "potential", "scene's folder"),
    ("[[orbital]]\nspec='1s'\npotential='table:nothere.dat'\n", "'nothere.dat'", "No such file"),
    ("[[orbital]]\nspec='1s'\npotential='table:tables/adir'\n", "'adir'", "Is a directory"),
    ("[[orbital]]\nspec='1s'\npotential='table:tables/binary.dat'\n", "binary.dat", "UTF-8"),
    ("[[orbital]]\nspec='1s'\npotential='table:tables/one.dat'\n", "got 1", "two columns"),
    ("[[orbital]]\nspec='1s'\npotential='table:tables/huge.dat'\n", "huge.dat", "|V| min(r"),
    ("[[orbital]]\nspec='1s'\npotential='table:tables/empty.dat'\n", "empty.dat", "no rows"),
    ("[[orbital]]\nspec='1s'\npotential=3\n", "potential", "got 3"),
    ("[[orbital]]\nspec='3s'\natom='Na'\npotential='yukawa:5'\n", "'Na:3s'", "cannot be"),
]


def _scene_id(case) -> str:
    text = case[0].replace("\n", " ")
    return (text if len(text) <= 40 else text[:37] + "...") or "empty"


@pytest.mark.parametrize("case", SCENE_CASES, ids=[_scene_id(c) for c in SCENE_CASES])
def test_scene_refused(capsys, disk, case):
    text, *fragments = case
    shutil.copytree(disk / "tables", disk / "scenes" / "tables")  # tables beside the scene
    scene = disk / "scenes" / "lab.toml"
    scene.write_text(text, encoding="utf-8")
    argv = ["batch", str(scene), "-o", str(disk / "out"), "--no-progress"]
    err = _refused(capsys, disk, argv, *fragments)
    # docs/scenes.md: errors name the file (once) and are raised before any work
    assert err.startswith("orbviz: error: lab.toml") and err.count("lab.toml") == 1


@pytest.mark.parametrize(
    ("content", "fragments"),
    [
        (b'[[orbital]]\nspec = "2pz"\ntitle = "\xff\xfe"\n', ("not UTF-8 text", "byte 34")),
        (b"\xef\xbb\xbf\xef\xbb\xbf[[orbital]]\n", ("not valid TOML", "line 1")),  # two BOMs
    ],
)
def test_scene_bytes_refused(capsys, disk, content, fragments):
    scene = disk / "lab.toml"
    scene.write_bytes(content)
    _refused(capsys, disk, ["batch", "lab.toml", "-o", "out", "--no-progress"], *fragments)


@pytest.mark.parametrize(
    ("argv", "fragments"),
    [
        (["batch", "nothere.toml", "-o", "out"], ("'nothere.toml'", "No such file")),
        (["batch", "tables", "-o", "out"], ("'tables'", "it is a folder")),
        (["batch", "keep.bin", "-o", "out"], ("keep.bin", "not UTF-8 text")),
        (["batch", "keep.bin", "-o", "plain"], ("'plain'", "exists and is not a folder")),
        (["batch", "keep.bin", "-o", "out", "--jobs", "0"], ("got 0", "from 1 to 64")),
    ],
)
def test_batch_arguments_refused(capsys, disk, argv, fragments):
    _refused(capsys, disk, argv, *fragments)


def test_scene_with_a_byte_order_mark_loads(disk):
    # Windows editors write a UTF-8 byte-order mark; docs/scenes.md asks only for UTF-8 TOML
    from orbviz.scenes.load import load_scene

    scene = disk / "bom.toml"
    scene.write_bytes(b"\xef\xbb\xbf[[orbital]]\nspec = '2pz'\n")
    assert [item.spec for item in load_scene(scene).items] == ["2pz"]


# ---------------------------------------------------- inputs that once hung: run as processes
def _cli(*argv: str, cwd: Path, timeout: float = 120.0) -> subprocess.CompletedProcess[str]:
    """Run orbviz as its own process; the timeout only guards against a hang (never a target)."""
    return subprocess.run(
        [sys.executable, "-m", "orbviz", *argv],
        cwd=cwd,
        capture_output=True,
        text=True,
        timeout=timeout,
        env={**os.environ, "ORBVIZ_DEBUG": ""},
    )


def _clean_refusal(run: subprocess.CompletedProcess[str], *fragments: str) -> None:
    assert run.returncode == 2, run.stderr
    assert run.stderr.startswith("orbviz: error: ") and run.stderr.count("\n") == 1, run.stderr
    assert "Traceback" not in run.stderr
    for fragment in fragments:
        assert fragment in run.stderr, (fragment, run.stderr)


def test_bond_with_runs_of_spaces_is_refused_promptly(disk):
    # each run of spaces can sit on either side of a label: a pattern that tries every split
    # backtracks in time ~ (run length)^5, far beyond any timeout; docs/spec.md: bond(A,B,R,+-)
    pad = " " * 700
    spec = f"bond({pad}x{pad},{pad}y{pad},R=1{pad}"
    assert len(spec) <= LIMITS.spec_chars
    before = _snapshot(disk)
    _clean_refusal(_cli("info", spec, cwd=disk), "bond needs the form bond(1s,1s,R=2.0,+)")
    assert _snapshot(disk) == before


def test_scene_of_blank_lines_is_read_promptly(disk):
    # about 1 MB of blank lines after the item (docs/scenes.md allows 1 MB): the item headers
    # are found in linear time, and the one item's bad spec is reported
    (disk / "lab.toml").write_text("[[orbital]]\nspec = '2pq'\n" + "\n" * 990_000 + "# end\n")
    before = _snapshot(disk)
    run = _cli("batch", "lab.toml", "-o", "out", "--no-progress", cwd=disk)
    _clean_refusal(run, "lab.toml: orbital 1 ('2pq'): spec:", "expected an orbital")
    assert _snapshot(disk) == before


def test_repeated_shells_stop_at_the_first_collision(disk):
    # 40 000 copies of n = 12 would make 5.8 million items before a check at the end
    (disk / "lab.toml").write_text("[[shells]]\nn = [" + ", ".join(["12"] * 40_000) + "]\n")
    before = _snapshot(disk)
    run = _cli("batch", "lab.toml", "-o", "out", "--no-progress", cwd=disk)
    _clean_refusal(run, "both write '12s.png'")
    assert _snapshot(disk) == before


@pytest.mark.skipif(not Path("/dev/zero").exists(), reason="needs /dev/zero")
@pytest.mark.parametrize(
    ("argv", "fragments"),
    [
        (["batch", "/dev/zero", "-o", "out"], ("zero", "larger than 1000 kB")),
        (["info", "1s", "--potential", "table:/dev/zero"], ("'zero'", "larger than 50 MB")),
    ],
)
def test_endless_files_are_refused(disk, argv, fragments):
    # a device has no size: the readers stop at the documented limit (docs/scenes.md: 1 MB)
    before = _snapshot(disk)
    _clean_refusal(_cli(*argv, cwd=disk), *fragments)
    assert _snapshot(disk) == before


def test_refusal_as_a_process_exits_2(disk):
    run = _cli("info", "101s", cwd=disk)
    _clean_refusal(run, "n=101", N_MAX)
    assert run.stdout == ""


# ------------------------------------------------- the limits themselves: accepted, cleanly
def _accepted_json(capsys, *argv: str) -> dict:
    status = main(["info", "--json", *argv])
    out, err = capsys.readouterr()
    assert status == 0 and err == "", err  # no warning leaks at the edge of the range
    return json.loads(out)


def test_largest_n_at_the_largest_charge(capsys):
    # LIMITS.n_max and LIMITS.Z_max together; E = -Z^2 / (2 n^2) hartree (Bethe & Salpeter)
    for m in (-LIMITS.n_max + 1, LIMITS.n_max - 1):
        info = _accepted_json(capsys, f"{LIMITS.n_max},{LIMITS.n_max - 1},{m}", "--Z", "1000")
        assert info["energy_hartree"] == pytest.approx(-(1000.0**2) / (2 * 100**2), rel=1e-12)


@pytest.mark.parametrize("fraction", [LIMITS.fraction_min, LIMITS.fraction_max])
@pytest.mark.parametrize("Z", [LIMITS.Z_min, LIMITS.Z_max])
def test_fraction_and_charge_at_their_limits(capsys, fraction, Z):
    # 1s encloses P(r) = 1 - e^{-2Zr}(1 + 2Zr + 2Z^2 r^2) within r (closed form); the level is
    # |psi|^2 = Z^3 e^{-2Zr}/pi at the radius where P = fraction
    from scipy.optimize import brentq

    info = _accepted_json(capsys, "1s", "--Z", f"{Z:g}", "--fraction", f"{fraction:g}")
    x = brentq(lambda x: 1 - math.exp(-x) * (1 + x + x * x / 2) - fraction, 1e-6, 100.0)  # 2Zr
    assert info["isovalue"] == pytest.approx(Z**3 * math.exp(-x) / math.pi, rel=1e-3)


@pytest.mark.parametrize("R", [LIMITS.bond_distance_min, LIMITS.bond_distance_max])
def test_bond_distance_at_its_limits(capsys, R):
    # 1s-1s overlap S = e^{-R}(1 + R + R^2/3) (Mulliken et al. 1949; docs/spec.md)
    info = _accepted_json(capsys, _bond(f"{R:g}"))
    assert info["overlap"] == pytest.approx(math.exp(-R) * (1 + R + R * R / 3), rel=1e-9)


def test_lightest_nucleus(capsys):
    # LIMITS.nuclear_mass_min_u; E = -mu/2 with mu = 1/(1 + m_e/M) (CODATA m_e via scipy)
    from scipy.constants import physical_constants

    m_e = physical_constants["electron mass in u"][0]
    info = _accepted_json(capsys, "1s", "--nuclear-mass", f"{LIMITS.nuclear_mass_min_u:g}")
    mass = LIMITS.nuclear_mass_min_u
    assert info["energy_hartree"] == pytest.approx(-0.5 / (1 + m_e / mass), rel=1e-12)


@pytest.mark.parametrize(
    "spec", ["1e300*2s + 1e300*3s", "(1.5e308+1.5e308j)*2s + (1.5e308+1.5e308j)*3s"]
)
def test_huge_weights_are_normalised(capsys, spec):
    # docs/spec.md: weights are normalised; equal weights give <E> = (E_2 + E_3)/2 (closed form)
    info = _accepted_json(capsys, spec)
    assert info["energy_hartree"] == pytest.approx(0.5 * (-1 / 8 - 1 / 18), rel=1e-12)


# ------------------------------------------------------------------------------ fuzzing
SPEC_ALPHABET = "0123456789abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ+-*,.()[]:j "
VALID_SPECS = [
    "3dz2",
    "4,2,-1",
    "0.6*2s+0.8*2pz",
    "(1+1j)*2,1,1 - 3dxy",
    "2sp3[1]",
    "3sp3d2[6] + 0.5*3s",
    "Na:3s",
    "C:2px + 2py",
    "bond(1s,1s,R=2.0,+)",
    "bond(2pz,2pz,R=4,-)",
    "2,1,1 + 2,1,-1",
    "1e-3*4fxyz - 2j*3dx2-y2",
    "4fz(x2-y2)",
]


def _check_outcome(status: int, out: str, err: str, what: str) -> None:
    """Either success, or exit 2 with one clean line; nothing else (never 1, never a trace)."""
    assert "Traceback" not in out + err and "internal error" not in err, (what, err)
    if status == 0:
        json.loads(out)
        assert err == "", (what, err)
    else:
        assert status == 2, (what, status, err)
        assert err.startswith("orbviz: error: ") and err.count("\n") == 1, (what, err)


def _mutate(data, text: str, alphabet: str) -> str:
    """Apply a few random edits: insert, delete, replace or repeat a slice."""
    from hypothesis import strategies as st

    for _ in range(data.draw(st.integers(1, 4))):
        at = data.draw(st.integers(0, len(text)))
        kind = data.draw(st.sampled_from(["insert", "delete", "replace", "repeat"]))
        if kind == "insert":
            text = text[:at] + data.draw(st.text(alphabet, min_size=1, max_size=3)) + text[at:]
        elif kind == "delete":
            text = text[:at] + text[at + data.draw(st.integers(1, 3)) :]
        elif kind == "replace" and at < len(text):
            text = text[:at] + data.draw(st.sampled_from(alphabet)) + text[at + 1 :]
        elif kind == "repeat":
            end = data.draw(st.integers(at, min(len(text), at + 12)))
            text = text[:end] + text[at:end] * data.draw(st.integers(1, 3)) + text[end:]
    return text


@pytest.mark.slow
def test_fuzz_spec_text(capsys):
    # the documented contract (docs/spec.md, README): any spec text ends in success or in one
    # clean line with exit status 2
    from hypothesis import HealthCheck, given, settings
    from hypothesis import strategies as st

    def run(spec: str) -> None:
        status = main(["info", "--json", "--", spec])
        out, err = capsys.readouterr()
        _check_outcome(status, out, err, spec)

    checks = [HealthCheck.function_scoped_fixture, HealthCheck.too_slow]

    @settings(max_examples=700, deadline=None, suppress_health_check=checks, database=None)
    @given(st.text(SPEC_ALPHABET, max_size=40))
    def random_text(spec):
        run(spec)

    @settings(max_examples=700, deadline=None, suppress_health_check=checks, database=None)
    @given(st.sampled_from(VALID_SPECS), st.data())
    def mutated(spec, data):
        run(_mutate(data, spec, SPEC_ALPHABET))

    random_text()
    mutated()


VALID_SCENE = """\
title = "fuzz"

[defaults]
fraction = 0.9
grid = 32
outputs = ["png", "glb"]
render = { size = "320x240", extent = 24.0, view = "iso" }
model = { size = 60, stand = true }

[[orbital]]
spec = "2pz"
Z = 1
name = "carbon-like-2pz"

[[orbital]]
spec = "0.6*2s + 0.8*2pz"
render = { transparent = true, lighting = "studio", scale = 1.5 }
outputs = ["png", "model.stl"]

[[orbital]]
spec = "3s"
potential = "table:tables/well.dat"

[[shells]]
n = [1, 2]
atom = "C"
"""
SCENE_ALPHABET = "[]{}=,\"'#.:+-*_ \n0123456789abcdefghijklmnopqrstuvwxyzZ"


@pytest.mark.slow
def test_fuzz_scene_text(tmp_path_factory):
    # docs/scenes.md: a scene is either fully valid or refused with a SceneError (or another
    # OrbvizError) naming the file, before any work; nothing else escapes the loader
    from hypothesis import given, settings
    from hypothesis import strategies as st

    from orbviz.errors import OrbvizError
    from orbviz.scenes.load import parse_scene

    base = tmp_path_factory.mktemp("fuzz-scene")
    (base / "tables").mkdir()
    r = np.geomspace(1e-3, 60.0, 300)
    np.savetxt(base / "tables" / "well.dat", np.c_[r, -1.0 / r])  # hydrogen's -1/r
    assert len(parse_scene(VALID_SCENE, "fuzz.toml", base=base).items) == 3 + 1 + 4

    @settings(max_examples=3000, deadline=None, database=None)
    @given(st.data())
    def mutated(data):
        text = _mutate(data, VALID_SCENE, SCENE_ALPHABET)
        try:
            parse_scene(text, "fuzz.toml", base=base)
        except OrbvizError as error:
            message = str(error)
            assert "\n" not in message and message.startswith("fuzz.toml"), message

    mutated()


def test_batch_into_a_folder_whose_thumbs_is_a_file(capsys, tmp_path):
    # the contact sheet's thumbs/ must be a folder: a file there is named, never a traceback
    scene = tmp_path / "s.toml"
    scene.write_text('[[orbital]]\nspec = "2pz"\noutputs = ["png"]\n')
    out = tmp_path / "out"
    out.mkdir()
    (out / "thumbs").write_text("mine")
    status = main(["batch", str(scene), "-o", str(out), "--no-progress"])
    err = capsys.readouterr().err
    assert status == 2 and "thumbs" in err and "is not a folder" in err
    assert (out / "thumbs").read_text() == "mine"


@pytest.mark.slow
def test_a_level_the_solver_cannot_converge_on_is_refused_in_one_line(tmp_path, capsys):
    # found by test_fuzz_scene_text: "73s" under a table of -1/r to 60 bohr made ARPACK give up
    # (ArpackNoConvergence) and the command print an internal error
    r = np.geomspace(1e-3, 60.0, 300)
    np.savetxt(tmp_path / "well.dat", np.c_[r, -1.0 / r])
    status = main(["info", "73s", "--potential", f"table:{tmp_path / 'well.dat'}"])
    err = capsys.readouterr().err
    assert status == 2 and "n=73" in err and "internal error" not in err, err
    assert err.count("\n") == 1
