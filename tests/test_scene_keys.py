"""Every key of a scene file (docs/scenes.md) is checked at load: a bad value anywhere is
refused before any work, with exit status 2, one line naming the file, the item and the key,
and nothing written.
"""

from __future__ import annotations

import pytest

from orbviz.cli import main

# key, a bad value (TOML), the fragment the message must carry after "lab.toml: <item>: "
COMMON = [
    ("Z", "-1", "Z: expected a number from 0.001 to 1000"),
    ("Z", "1e150", "Z: expected a number"),
    ("real", '"yes please"', "real: expected true or false"),
    ("fraction", "1.5", "fraction: expected a number from 0.01 to 0.999"),
    ("grid", '"fine"', "grid: expected a whole number from 16 to 1024"),
    ("grid", "7", "grid: expected a whole number"),
    ("colors", '"red,blue"', "colors: expected two hex colours"),
    ("potential", '"morse:1"', "potential: expected coulomb, yukawa:LENGTH"),
    ("potential", '"yukawa:0"', "potential: yukawa takes a number from"),
    ("atom", '"Qq"', "spec: unknown element 'Qq'"),
    ("atom", "3", "atom: expected an element symbol"),
    ("outputs", '["webm"]', "outputs: expected a non-empty list"),
    ("outputs", '["gif"]', "outputs: an animation (gif, mp4) needs motion"),
    ("outputs", "[]", "outputs: expected a non-empty list"),
    ("reduced_mass", "3", "reduced_mass: expected true or false"),
    ("nuclear_mass", "-2", "nuclear_mass: expected a number from 0.00054"),
    ("fracton", "0.5", "fracton: unknown key"),
]
RENDER = [
    ("size", '"big"', "render.size: expected WIDTHxHEIGHT"),
    ("size", '"10x10"', "render.size: expected WIDTHxHEIGHT"),
    ("scale", "100", "render.scale: expected a number from 0.25 to 8"),
    ("view", '"sideways"', "render.view: expected iso, x, y, z or AZ,EL"),
    ("transparent", "2", "render.transparent: expected true or false"),
    ("background", '"neon-ish"', "render.background: expected a colour name or #RRGGBB"),
    ("axes", '"off-ish"', "render.axes: expected true or false"),
    ("scale_bar", '"feet"', "render.scale_bar: expected true or false"),
    ("units", '"feet"', "render.units: expected angstrom or bohr"),
    ("width", '"2 miles"', "render.width: expected a printed length"),
    ("height", '"5mm"', "render.height: expected a printed length from 10 mm"),
    ("axis_lines", '"x"', "render.axis_lines: expected true or false"),
    ("overlay", "3", "render.overlay: expected true or false"),
    ("title", '"{nope}"', "render.title: unknown placeholder {nope}"),
    ("title", '"{label"', "render.title: "),
    ("dpi", "10", "render.dpi: expected a whole number from 72 to 2400"),
    ("layout", '"0x3"', "render.layout: expected COLSxROWS"),
    # docs/limits.md: no empty row or column, at least 25 mm a printed panel (common practice,
    # no source: 6-8 pt labels, the key and the scale bar need that width)
    ("layout", '"2x1"', "render.layout: 2x1 leaves a whole row or column empty for 1 panel"),
    ("width", '"20mm"', "render.width: 20 mm gives 20 mm a panel across 1 column(s)"),
    ("labels", '"roman"', "render.labels: expected letters, specs or none"),
    ("key", '"maybe"', "render.key: expected true or false"),
    ("title", "3", "render.title: expected text"),
    ("lighting", '"neon"', "render.lighting: expected soft, studio or flat"),
    ("nodes", "1.5", "render.nodes: expected true or false"),
    ("cut", '"third"', "render.cut: expected half, quarter or none"),
    ("outer", "2", "render.outer: expected a number from 0.01"),
    ("extent", "-3", "render.extent: expected a number above 0"),
    ("colour", '"red"', "render.colour: unknown key"),
    ("style", '"fog"', "render.style: expected surface, cloud or volume"),
    ("points", "10", "render.points: expected a whole number from 1000 to 1000000"),
]
PLOT = [
    ("plane", '"ab"', "plot.plane: expected xz, xy, yz or none"),
    ("quantity", '"phase"', "plot.quantity: expected density or psi"),
    ("units", '"feet"', "plot.units: expected angstrom or bohr"),
    ("extent", "0", "plot.extent: expected a number above 0"),
    ("title", "3", "plot.title: expected text"),
    ("width", '"1km"', "plot.width: expected a printed length"),
    ("height", "5", "plot.height: expected a printed length"),
    ("dpi", "5000", "plot.dpi: expected a whole number from 72 to 2400"),
    ("kind", '"radial"', "plot.kind: unknown key"),
    ("slab", "-1", "plot.slab: expected a number above 0"),
    ("points", "5", "plot.points: expected a whole number from 1000 to 1000000"),
]
SAMPLE = [
    ("points", "0", "sample.points: expected a whole number from 1 to 10000000"),
    ("seed", '"x"', "sample.seed: expected a whole number"),
    ("size", "1", "sample.size: expected a number from 5 to 1000"),
    ("block", '"50x50"', "sample.block: expected WxDxH with a unit"),
    ("margin", "-1", "sample.margin: expected a number from 0 to 100"),
    ("min_spacing", "0.1", "sample.min_spacing: needs a physical size"),
    ("inside", "2", "sample.inside: expected a number from 0.01 to 0.999"),
    ("units", '"mm"', "sample.units: expected bohr or angstrom"),
]
ANIMATE = [
    ("frames", "0", "animate.frames: expected a whole number"),
    ("periods", "-1", "animate.periods: expected a number"),
    ("seconds", "0", "animate.seconds: expected a number"),
    ("grid", "5", "animate.grid: expected a whole number"),
    ("size", '"1x1"', "animate.size: expected WIDTHxHEIGHT"),
    ("colors", '"red"', "animate.colors: unknown key"),
]
MODEL = [
    ("size", "-5", "model.size: expected a number from 5 to 500 mm"),
    ("rod", "1000", "model.rod: expected a number"),
    ("rod", "30", "model.rod: a 30 mm rod would hide a 60 mm model"),
    ("min_feature", "0", "model.min_feature: expected a number from 0.1 to 10 mm"),
    ("stand", "4", "model.stand: expected true or false"),
    ("cut", '"slice"', "model.cut: expected half, quarter or none"),
    ("split", "true", "model.split: unknown key"),
    ("kit", "true", "model.kit: unknown key"),
    ("marks", '"raised"', "model.marks: expected embossed, engraved or none"),
    ("label", "3", "model.label: expected text"),
    ("clearance", "2", "model.clearance: expected a number from 0.05 to 1 mm"),
    ("magnets", '"big"', "model.magnets: expected two lengths in mm such as 6x3mm"),
    ("bed", '"10x10"', "model.bed: expected 50 to 1000 mm"),
]
PAGE = [
    ("levels", "[0.5, 2]", "page.levels: expected 1 to 5 fractions from 0.01 to 0.999"),
    ("levels", '"many"', "page.levels: expected 1 to 5 fractions"),
    ("faces", "10", "page.faces: expected a whole number from 1000 to 200000"),
    ("arrangement", '"pile"', "page.arrangement: expected grid, chooser or none"),
    ("dots", "-1", "page.dots: expected a whole number from 0 to 100000"),
    ("size", "3", "page.size: unknown key"),
]


def test_every_key_of_every_table_is_listed_here():
    from orbviz._options import external_keys
    from orbviz.figures.options import AnimationOptions, FigureOptions, PlotOptions
    from orbviz.models.engraving import SampleOptions
    from orbviz.models.options import ModelOptions
    from orbviz.pages.options import PageOptions

    listed = {
        "render": {k for k, _, _ in RENDER},
        "plot": {k for k, _, _ in PLOT},
        "animate": {k for k, _, _ in ANIMATE},
        "model": {k for k, _, _ in MODEL},
        "page": {k for k, _, _ in PAGE},
        "sample": {k for k, _, _ in SAMPLE},
    }
    shared = {"grid", "colors"}  # checked as common keys
    for table, cls in [
        ("render", FigureOptions),
        ("plot", PlotOptions),
        ("animate", AnimationOptions),
        ("model", ModelOptions),
        ("page", PageOptions),
        ("sample", SampleOptions),
    ]:
        keys = set(external_keys(cls).values()) - shared - {"kind", "split", "kit"}
        if table == "animate":
            keys |= {"grid"} - listed[table]  # the animation keeps its own grid
        assert keys <= listed[table], (table, keys - listed[table])


def _run(tmp_path, capsys, text: str) -> str:
    scene = tmp_path / "lab.toml"
    scene.write_text(text)
    out = tmp_path / "out"
    status = main(["batch", str(scene), "-o", str(out), "--no-progress"])
    err = capsys.readouterr().err
    assert status == 2 and err.count("\n") == 1 and err.startswith("orbviz: error: lab.toml: ")
    assert not out.exists()  # refused at load: nothing written
    return err


@pytest.mark.parametrize(("key", "value", "fragment"), COMMON)
def test_item_keys(tmp_path, capsys, key, value, fragment):
    err = _run(tmp_path, capsys, f'[[orbital]]\nspec = "2pz"\n{key} = {value}\n')
    assert f"lab.toml: orbital 1 ('2pz'): {fragment}" in err


@pytest.mark.parametrize(("key", "value", "fragment"), COMMON)
def test_default_keys(tmp_path, capsys, key, value, fragment):
    err = _run(tmp_path, capsys, f'[defaults]\n{key} = {value}\n[[orbital]]\nspec = "2pz"\n')
    assert f"lab.toml: [defaults]: {fragment}" in err


@pytest.mark.parametrize(("key", "value", "fragment"), RENDER)
def test_render_keys(tmp_path, capsys, key, value, fragment):
    err = _run(tmp_path, capsys, f'[[orbital]]\nspec = "2pz"\nrender = {{ {key} = {value} }}\n')
    assert f"lab.toml: orbital 1 ('2pz'): {fragment}" in err


@pytest.mark.parametrize(("key", "value", "fragment"), PLOT)
def test_plot_keys(tmp_path, capsys, key, value, fragment):
    text = f'[[orbital]]\nspec = "2pz"\noutputs = ["slice.png"]\nplot = {{ {key} = {value} }}\n'
    err = _run(tmp_path, capsys, text)
    assert f"lab.toml: orbital 1 ('2pz'): {fragment}" in err


@pytest.mark.parametrize(("key", "value", "fragment"), SAMPLE)
def test_sample_keys(tmp_path, capsys, key, value, fragment):
    text = f'[[orbital]]\nspec = "2pz"\noutputs = ["points.ply"]\nsample = {{ {key} = {value} }}\n'
    err = _run(tmp_path, capsys, text)
    assert f"lab.toml: orbital 1 ('2pz'): {fragment}" in err


@pytest.mark.parametrize(("key", "value", "fragment"), PAGE)
def test_page_keys(tmp_path, capsys, key, value, fragment):
    text = f'[[orbital]]\nspec = "2pz"\noutputs = ["html"]\npage = {{ {key} = {value} }}\n'
    err = _run(tmp_path, capsys, text)
    assert f"lab.toml: orbital 1 ('2pz'): {fragment}" in err


def test_a_sheet_page_must_hold_its_orbitals(tmp_path, capsys):
    text = '[[sheet]]\nspecs = ["4f", "3d"]\noutputs = ["html"]\npage = { arrangement = "grid" }\n'
    err = _run(tmp_path, capsys, text)
    assert "sheet 1 ('4f 3d'): page.arrangement: a grid page holds at most 8 orbitals" in err


def test_an_item_may_not_take_a_file_the_batch_keeps(tmp_path, capsys):
    text = '[[orbital]]\nspec = "2pz"\nname = "Index"\noutputs = ["html"]\n'
    err = _run(tmp_path, capsys, text)
    assert "writes 'Index.html', which the batch keeps for its contact sheet" in err


@pytest.mark.parametrize(("key", "value", "fragment"), ANIMATE)
def test_animate_keys(tmp_path, capsys, key, value, fragment):
    text = f'[[orbital]]\nspec = "1s + 2pz"\noutputs = ["gif"]\nanimate = {{ {key} = {value} }}\n'
    err = _run(tmp_path, capsys, text)
    assert f"lab.toml: orbital 1 ('1s + 2pz'): {fragment}" in err


@pytest.mark.parametrize(
    ("text", "fragment"),
    [
        ("[[sheet]]\nname = 'x'\n", "lab.toml: sheet 1: specs: missing"),
        ("[[sheet]]\nspecs = '3d'\n", "lab.toml: sheet 1: specs: expected a list of 1 to 24"),
        ("[[sheet]]\nspecs = []\n", "lab.toml: sheet 1: specs: expected a list"),
        (
            "[[sheet]]\nspecs = ['4f', '5f', '6f', '7f']\n",
            "specs: 28 panels; a sheet holds at most 24",
        ),
        ("[[sheet]]\nspecs = ['3d', '2pq']\n", "sheet 1 ('3d 2pq'): spec: expected an orbital"),
        ("[[sheet]]\nspecs = ['3d']\noutputs = ['glb']\n", "sheet 1 ('3d'): outputs: expected"),
        ("[[sheet]]\nspecs = ['3d']\nspec = '3d'\n", "sheet 1 ('3d'): spec: unknown key"),
        ("[[orbital]]\nspec = '3d'\n", "orbital 1 ('3d'): spec: '3d' names a set of 5 orbitals"),
    ],
)
def test_sheet_keys(tmp_path, capsys, text, fragment):
    assert fragment in _run(tmp_path, capsys, text)


@pytest.mark.parametrize(("key", "value", "fragment"), MODEL)
def test_model_keys(tmp_path, capsys, key, value, fragment):
    text = f'[[orbital]]\nspec = "2pz"\noutputs = ["model.stl"]\nmodel = {{ {key} = {value} }}\n'
    err = _run(tmp_path, capsys, text)
    assert f"lab.toml: orbital 1 ('2pz'): {fragment}" in err


@pytest.mark.parametrize(
    ("text", "fragment"),
    [
        ('title = 3\n[[orbital]]\nspec = "1s"\n', "lab.toml: title: expected text"),
        ("[[orbital]]\nspec = 3\n", "lab.toml: orbital 1: spec: expected spec text"),
        ('[[orbital]]\nspec = "2pq"\n', "lab.toml: orbital 1 ('2pq'): spec: expected an orbital"),
        ('[[orbital]]\nspec = "2pz"\nname = "../x"\n', "lab.toml: orbital 1 ('2pz'): name:"),
        ("[[shells]]\nn = 13\n", "lab.toml: shells 1: n: expected whole numbers 1..12"),
        ("[[shells]]\nn = [1, true]\n", "lab.toml: shells 1: n: expected whole numbers"),
        ("orbital = [1, 2]\n", "lab.toml: orbital 1: expected a table"),
        ("[defaults]\nrender = 3\n[[orbital]]\nspec = '1s'\n", "lab.toml: [defaults]: render:"),
        ("[[orbital]]\nspec = '2pz'\n[[orbital]]\nspec = '2PZ'\n", "both write"),
        (
            "[[orbital]]\nspec = '1s'\nname = 'x'\noutputs = ['model.stl']\n"
            "[[orbital]]\nspec = '2pz'\nname = 'x-model'\noutputs = ['stl']\n",
            "both write 'x-model.stl'",
        ),
        (
            "[[orbital]]\nspec = '2pz'\nname = 'x-model'\noutputs = ['stl', 'model.stl']\n",
            "outputs: two outputs would share a file name",
        ),
        ("x = " + "[" * 5000 + "]" * 5000 + "\n", "lab.toml: not"),
    ],
)
def test_structure(tmp_path, capsys, text, fragment):
    assert fragment in _run(tmp_path, capsys, text)


def test_not_utf8_and_a_folder(tmp_path, capsys):
    scene = tmp_path / "lab.toml"
    scene.write_bytes(b'[[orbital]]\nspec = "2pz"\ntitle = "\xff\xfe"\n')
    assert main(["batch", str(scene), "-o", str(tmp_path / "out")]) == 2
    assert "lab.toml: not UTF-8 text" in capsys.readouterr().err
    assert main(["batch", str(tmp_path), "-o", str(tmp_path / "out")]) == 2
    assert "it is a folder" in capsys.readouterr().err
    assert not (tmp_path / "out").exists()
