"""What a scene can make besides meshes: figure formats, sheets, plots, animations, titles,
thumbnails that can be read, a model's own thumbnail, and alt text in the manifest.

Files are read back with independent readers (Pillow, pypdf, the XML parser).
"""

from __future__ import annotations

import json
import xml.etree.ElementTree as ET

import numpy as np
import pytest
from PIL import Image

from orbviz.cli import main

pytestmark = pytest.mark.slow  # one whole batch of every output kind (about 7 s)

SCENE = """
title = "Harlowmere Study Circle: test set"
[defaults]
grid = 40
render = { size = "400x300" }

[[orbital]]
spec = "3dz2"
outputs = ["png", "pdf", "slice.png", "radial.svg"]
render = { title = "{label}, {fraction}" }

[[orbital]]
spec = "1s + 2pz"
name = "beat"
outputs = ["gif"]
animate = { frames = 5, grid = 24, size = "160x120" }

[[orbital]]
spec = "2pz"
name = "2pz-model"
outputs = ["model.3mf"]
model = { stand = true }

[[sheet]]
specs = ["3d"]
name = "d-set"
outputs = ["pdf", "tiff", "radial.png"]
render = { width = "175mm", dpi = 100 }

[[sheet]]
specs = ["3s", "3p", "3d"]
name = "n3"
outputs = ["radial.svg"]
"""


@pytest.fixture(scope="module")
def batch(tmp_path_factory):
    folder = tmp_path_factory.mktemp("scene")
    (folder / "s.toml").write_text(SCENE)
    out = folder / "out"
    assert main(["batch", str(folder / "s.toml"), "-o", str(out), "--no-progress"]) == 0
    manifest = json.loads((out / "manifest.json").read_text())
    return out, {e["name"]: e for e in manifest["items"]}


def test_every_output_is_written_under_its_own_name(batch):
    out, entries = batch
    assert all(e["status"] == "done" for e in entries.values())
    assert entries["3dz2"]["files"] == [
        "3dz2.png",
        "3dz2.pdf",
        "3dz2-slice.png",
        "3dz2-radial.svg",
    ]
    assert entries["2pz-model"]["files"] == ["2pz-model.3mf"]  # no doubled "-model"
    assert entries["d-set"]["files"] == ["d-set.pdf", "d-set.tiff", "d-set-radial.png"]
    for entry in entries.values():
        assert all((out / f).is_file() for f in entry["files"])


def test_title_placeholders_are_filled(batch):
    out, _ = batch
    with Image.open(out / "3dz2.png") as image:  # Pillow reads the PNG text chunks
        assert image.info["Title"] == "3dz2, 90%"


def test_no_title_unless_asked(batch):
    from pypdf import PdfReader

    text = PdfReader(out_pdf := batch[0] / "d-set.pdf").pages[0].extract_text()
    assert "d-set" not in text  # the item's file name is not drawn as a title
    assert "(a) 3dxy" in text and "(e) 3dz2" in text
    assert out_pdf.stat().st_size > 0


def test_sheet_tiff_has_print_resolution(batch):
    with Image.open(batch[0] / "d-set.tiff") as image:
        assert tuple(float(v) for v in image.info["dpi"]) == pytest.approx((100, 100))
        # 175 mm at 100 dpi: 175 / 25.4 * 100 = 689 pixels across
        assert abs(image.size[0] - 175 / 25.4 * 100) <= 1.5


def test_radial_plot_of_a_sheet_names_each_subshell_once(batch):
    svg = ET.parse(batch[0] / "n3-radial.svg")
    text = " ".join(t.text or "" for t in svg.iter() if t.tag.endswith("text"))
    for name in ("3s", "3p", "3d"):
        assert name in text
    assert "3px" not in text  # the 3p set is one curve: its members share R_31


def test_animation_has_the_frames_asked_for(batch):
    with Image.open(batch[0] / "beat.gif") as image:
        assert image.n_frames == 5


def test_model_thumbnail_shows_the_model_with_its_stand(batch):
    from orbviz.models.build import SUPPORT_RGBA

    rgb = np.asarray(Image.open(batch[0] / "thumbs" / "2pz-model.png").convert("RGB"), float)
    grey = np.asarray(SUPPORT_RGBA[:3], float)
    # the stand is printed in the support grey: shaded, so compare the direction of the colour
    norm = np.linalg.norm(rgb, axis=2) * np.linalg.norm(grey) + 1e-9
    greyish = (rgb @ grey / norm > 0.999) & (rgb.sum(axis=2) < 3 * 235) & (rgb.sum(axis=2) > 150)
    assert greyish.sum() > 300


def test_thumbnail_text_is_sized_for_the_thumbnail(batch):
    # the key is drawn at 6.5 pt for a 320-pixel page at 150 dpi, about 13 px per em: its first
    # line ("psi > 0" and its swatch) is a run of dark rows at least 10 px tall
    grey = np.asarray(Image.open(batch[0] / "thumbs" / "3dz2.png").convert("L"))
    dark = (grey[:60, 230:] < 120).any(axis=1)  # the key, dark on white, at the top right
    first = np.flatnonzero(dark)[0]
    height = np.argmin(dark[first:]) if not dark[first:].all() else dark[first:].size
    assert height >= 10  # measured 15 px here; the shrunk full-size figure gives 6


def test_an_item_of_plots_or_a_movie_shows_what_it_makes(batch):
    out, entries = batch
    # a sheet that makes only its radial plot: the thumbnail and the description are the plot's
    # (3s has nodes at (9 -+ 3 sqrt 3)/2 bohr, Bethe & Salpeter 1957: 1.01 and 3.76 angstrom)
    assert entries["n3"]["alt_text"].startswith("Radial distribution of 3s")
    assert "radial nodes at 1.01, 3.76 Å" in entries["n3"]["alt_text"]
    with Image.open(out / "thumbs" / "n3.png") as image:
        assert image.size[0] == 320  # drawn at the thumbnail's size, not shrunk
    assert entries["beat"]["alt_text"].startswith("1s + 2pz in motion: 5 frames")
    assert "faces" not in entries["beat"]


def test_alt_text_reaches_the_manifest_and_the_contact_sheet(batch):
    out, entries = batch
    alt = entries["3dz2"]["alt_text"]
    # 3dz2 ~ 3z^2 - r^2: two positive lobes along z and a negative ring (closed form)
    assert "two lobes, along +z and along -z" in alt and "ring" in alt
    assert entries["2pz-model"]["alt_text"].startswith("Printable model")
    assert "(e) 3dz2" in entries["d-set"]["alt_text"]
    page = (out / "index.html").read_text()
    assert 'alt="3dz2, 90%. 3dz2 (real' in page


PAGES = """
title = "Harlowmere Study Circle: pages"
[defaults]
grid = 32
outputs = ["html"]
page = { levels = [0.5, 0.9], faces = 2000 }

[[orbital]]
spec = "2pz"

[[orbital]]
spec = "3,2,1"

[[sheet]]
specs = ["2p"]
name = "p-set"
outputs = ["png", "html"]

[[orbital]]
spec = "1s"
page = { levels = [0.9] }
"""


def test_items_make_pages_that_the_contact_sheet_and_the_scene_page_link(tmp_path, capsys):
    import re
    from html.parser import HTMLParser

    scene = tmp_path / "pages.toml"
    scene.write_text(PAGES)
    out = tmp_path / "out"
    assert main(["batch", str(scene), "-o", str(out), "--no-progress"]) == 0
    err = capsys.readouterr().err
    assert "1s offer other levels than the other pages: left out of" in err

    def data(name):
        text = (out / name).read_text(encoding="utf-8")
        found = re.search(r'id="orbviz-data">(.*?)</script>', text, re.S)
        return json.loads(found.group(1))

    assert [p["label"] for p in data("p-set.html")["panels"]] == ["2px", "2py", "2pz"]

    class Links(HTMLParser):  # the standard library's parser as the independent reader
        def __init__(self):
            super().__init__()
            self.pictures, self.href = {}, None

        def handle_starttag(self, tag, attrs):
            attrs = dict(attrs)
            if tag == "a":
                self.href = attrs.get("href")
            elif tag == "img":
                self.pictures[attrs["src"]] = self.href

        def handle_endtag(self, tag):
            if tag == "a":
                self.href = None

    links = Links()
    links.feed((out / "index.html").read_text(encoding="utf-8"))
    assert links.pictures == {
        "thumbs/2pz.png": "2pz.html",
        "thumbs/3_2_1.png": "3_2_1.html",
        "thumbs/p-set.png": "p-set.html",
        "thumbs/1s.png": "1s.html",
    }
    assert 'href="orbitals.html"' in (out / "index.html").read_text(encoding="utf-8")
    whole = data("orbitals.html")
    assert whole["arrangement"] == "chooser" and whole["levels"] == [0.5, 0.9]
    labels = [p["label"] for p in whole["panels"]]
    assert labels == ["2pz", "3d(m=+1)", "p-set: 2px", "p-set: 2py", "p-set: 2pz"]
    assert whole["wheel"] is not None  # 3,2,1 is complex: the page keys its phase wheel
