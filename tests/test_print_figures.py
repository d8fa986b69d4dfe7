"""Figures for print: sheets, printed sizes and formats, greyscale- and colour-blind-safe phases,
alt text from the physics, and slices whose nodes stand out.
"""

from __future__ import annotations

import math
import re

import numpy as np
import pytest
from PIL import Image

import orbviz
from orbviz.cli import main
from orbviz.figures.figure import figure
from orbviz.figures.options import FigureOptions
from tests.conftest import reference_real_harmonic

# ---------------------------------------------------------------- sheets, sizes and formats


@pytest.fixture(scope="module")
def sheet_files(tmp_path_factory):
    folder = tmp_path_factory.mktemp("sheet")
    runs = {
        "d.pdf": ["--width", "175mm"],
        "d.png": ["--width", "85mm", "--dpi", "600"],
        "d.tiff": ["--width", "85mm", "--dpi", "300"],
        "d.svg": ["--width", "85mm"],
    }
    for name, extra in runs.items():
        assert main(["render", "3d", "--grid", "48", "-o", str(folder / name), *extra]) == 0
    return folder


def test_pdf_sheet_has_five_labelled_panels_as_vector_text(sheet_files):
    from pypdf import PdfReader  # an independent PDF reader

    reader = PdfReader(sheet_files / "d.pdf")
    (page,) = reader.pages
    # 175 mm in PostScript points (72 per inch, 25.4 mm per inch)
    assert float(page.mediabox.width) == pytest.approx(175 / 25.4 * 72, abs=0.5)
    text = page.extract_text()
    for k, name in enumerate(["3dxy", "3dxz", "3dyz", "3dx2-y2", "3dz2"]):
        assert f"({'abcde'[k]}) {name}" in text
    assert "Å" in text and "0" in text  # the scale bar's label is text, not pixels
    assert "3dz2" in reader.metadata.subject  # the alt text rides in the metadata


def test_png_at_85mm_600dpi(sheet_files):
    with Image.open(sheet_files / "d.png") as image:
        # 85 mm at 600 dpi: 85 / 25.4 * 600 = 2007.9 pixels (the PNG spec's pHYs carries the dpi)
        assert image.size[0] == 2008
        assert image.info["dpi"] == pytest.approx((600, 600), abs=0.01)
        assert "3dz2" in image.info["Description"] and "ring" in image.info["Description"]
        assert image.info["Software"].startswith("orbviz")


def test_tiff_opens_with_resolution_tags(sheet_files):
    with Image.open(sheet_files / "d.tiff") as image:  # Pillow as the independent reader
        assert image.format == "TIFF" and image.info["compression"] == "tiff_lzw"
        assert image.info["dpi"] == pytest.approx((300, 300), abs=0.01)
        assert image.size[0] == round(85 / 25.4 * 300)
        assert "3dxy" in image.tag_v2[270]  # ImageDescription: the alt text


def test_svg_keeps_text_as_text(sheet_files):
    svg = (sheet_files / "d.svg").read_text(encoding="utf-8")
    assert "(a) 3dxy" in svg and "ψ &gt; 0" in svg  # <text> elements, not glyph paths
    assert "<image" in svg  # the 3D panels are embedded raster images


def test_a_layout_too_small_is_refused(tmp_path, capsys):
    status = main(["render", "3d", "--layout", "2x2", "-o", str(tmp_path / "x.png")])
    assert status == 2 and "--layout: 2x2 holds 4, not 5 panels" in capsys.readouterr().err


@pytest.mark.parametrize(
    "args, fragment",
    [
        # docs/limits.md: a layout must not leave a whole row or column empty, and a printed
        # panel is at least 25 mm wide (common practice, no source: 6-8 pt labels must fit)
        (["3d", "--layout", "9x9"], "--layout: 9x9 leaves a whole row or column empty"),
        (["3d", "--layout", "5x2"], "--layout: 5x2 leaves a whole row or column empty"),
        (["3d", "--width", "60mm"], "--width: 60 mm gives 20 mm a panel across 3 column(s)"),
        (["2pz", "--width", "20mm"], "--width: 20 mm gives 20 mm a panel"),
    ],
)
def test_pages_that_cannot_hold_their_panels_are_refused(tmp_path, capsys, args, fragment):
    status = main(["render", *args, "-o", str(tmp_path / "x.png")])
    assert status == 2 and fragment in capsys.readouterr().err
    assert not (tmp_path / "x.png").exists()


def test_a_folder_given_as_the_output_is_named_as_a_folder(tmp_path, capsys):
    status = main(["render", "2pz", "-o", str(tmp_path) + "/"])
    assert status == 2 and "it is a folder; give a file name" in capsys.readouterr().err


# ---------------------------------------------------------------- greyscale and colour vision


def _phase_pixels(img: np.ndarray, colour) -> np.ndarray:
    """Pixels whose hue is the phase colour's (shading scales brightness, not hue)."""
    rgb = img[..., :3].reshape(-1, 3).astype(float)
    target = np.asarray(colour[:3], dtype=float)
    cos = rgb @ target / np.maximum(np.linalg.norm(rgb, axis=1) * np.linalg.norm(target), 1e-9)
    return rgb[(cos > 0.995) & (rgb.sum(axis=1) > 30)] / 255.0


def test_phases_stay_apart_in_greyscale_and_for_colour_blind_readers():
    # CIELAB lightness and the Machado et al. (2009) deuteranopia/protanopia simulation, both
    # from the colorspacious library; the thresholds are the issue's: L* medians apart by >= 15
    from colorspacious import cspace_convert

    from orbviz.surface.colors import DEFAULT_PAIR

    options = FigureOptions(size=(480, 360), grid=64, axes=False, key=False, scale_bar=False)
    with figure(orbviz.state("3dxy"), options) as fig:
        img = fig.image()
    groups = [_phase_pixels(img, c) for c in DEFAULT_PAIR]
    assert all(len(g) > 2000 for g in groups)
    lightness = [np.median(cspace_convert(g, "sRGB1", "CIELab")[:, 0]) for g in groups]
    assert abs(lightness[0] - lightness[1]) >= 15
    for deficiency in ("deuteranomaly", "protanomaly"):
        space = {"name": "sRGB1+CVD", "cvd_type": deficiency, "severity": 100}
        seen = [
            np.median(
                cspace_convert(np.clip(cspace_convert(g, space, "sRGB1"), 0, 1), "sRGB1", "CIELab"),
                axis=0,
            )
            for g in groups
        ]
        hue = [math.degrees(math.atan2(lab[2], lab[1])) for lab in seen]
        gap = abs((hue[0] - hue[1] + 180) % 360 - 180)
        assert gap >= 90 and abs(seen[0][0] - seen[1][0]) >= 15, (deficiency, seen)


def test_real_figures_carry_a_phase_key():
    options = FigureOptions(size=(480, 360), grid=48, axes=False, scale_bar=False)
    with figure(orbviz.state("2pz"), options) as fig:
        with_key = fig.image()
    with figure(
        orbviz.state("2pz"),
        FigureOptions(size=(480, 360), grid=48, axes=False, scale_bar=False, key=False),
    ) as fig:
        without = fig.image()
    corner = (slice(0, 60), slice(400, 480))  # the key sits at the top right
    assert np.any(with_key[corner] != without[corner])


# ---------------------------------------------------------------- alt text from the physics

# expected lobes by phase, in the alt text's words; each direction's sign is confirmed below
# with the scipy reference harmonic (sph_harm_y, tests/conftest.py)
ALT = [
    (
        "1s",
        None,
        ["The psi > 0 part (dark blue): one body, around the nucleus", "No nodal surfaces"],
    ),
    ("2s", None, ["one shell, around the nucleus", "one sphere at r = 1.06 Å"]),
    (
        "2px",
        (1, 1),
        ["The psi > 0 part (dark blue): one lobe, along +x", "one lobe, along -x", "the yz plane"],
    ),
    ("2py", (1, -1), ["The psi > 0 part (dark blue): one lobe, along +y", "the xz plane"]),
    # 3p: R_31 changes sign at 6 bohr = 3.175 angstrom (closed form), so the psi > 0 part is the
    # inner lobe along +z and the outer one along -z
    ("3pz", None, ["The psi > 0 part (dark blue): two lobes, along +z and along -z", "r = 3.18 Å"]),
    (
        "3dxy",
        (2, -2),
        ["two lobes, between +x and +y and between -x and -y", "the xz plane and the yz plane"],
    ),
    ("3dxz", (2, 1), ["two lobes, between +x and +z and between -x and -z"]),
    (
        "3dx2-y2",
        (2, 2),
        ["two lobes, along +x and along -x", "the plane x = y and the plane x = -y"],
    ),
    (
        "3dz2",
        (2, 0),
        [
            "two lobes, along +z and along -z",
            "one ring, around the z axis",
            "54.7 and 125.3 degrees",
        ],
    ),
    (
        "4fxyz",
        (3, -2),
        [
            "four lobes, towards the (+x, +y, +z) octant",
            "the xz plane, the yz plane and the xy plane",
        ],
    ),
    ("4fz3", (3, 0), ["one lobe, along +z", "39.2 and 140.8 degrees"]),
    ("5,4,0", (4, 0), ["two lobes, along +z and along -z", "four cones"]),
    (
        "5,4,4",
        (4, 4),
        ["The psi > 0 part (dark blue): four lobes, along +x, along +y, along -x and along -y"],
    ),
    # (2s + 2px + 2py + 2pz)/2: its large lobe points along (1, 1, 1); psi = 0 where
    # R_20 + R_21 (x + y + z)/r = 0, a curved sheet, not a plane, cone or sphere
    (
        "2sp3[1]",
        None,
        ["one lobe, towards the (+x, +y, +z) octant", "meet at a curved nodal surface"],
    ),
    (
        "3,2,1",
        None,
        [
            "two rings, around the z axis on the +z side and around the z axis on the -z side",
            "the z axis (a nodal line)",
        ],
    ),
]


@pytest.mark.parametrize(("spec", "lm", "phrases"), ALT, ids=[a[0] for a in ALT])
def test_alt_text_counts_and_directions(spec, lm, phrases):
    state = orbviz.state(spec, real=spec.startswith("5,"))
    with figure(state, FigureOptions(size=(240, 180), grid=64)) as fig:
        text = fig.alt_text
    for phrase in phrases:
        assert phrase in text, (phrase, text)
    if lm is not None:  # the named positive directions are where the real harmonic is > 0
        l, m = lm
        for word, (polar, azimuth) in {
            "+x": (math.pi / 2, 0),
            "-x": (math.pi / 2, math.pi),
            "+y": (math.pi / 2, math.pi / 2),
            "-y": (math.pi / 2, -math.pi / 2),
            "+z": (0.0, 0.0),
            "-z": (math.pi, 0.0),
        }.items():
            value = float(reference_real_harmonic(l, m, np.array(polar), np.array(azimuth)))
            if (
                f"The psi > 0 part (dark blue): one lobe, along {word}" in text
                or f"lobes, along {word}" in text.split("The psi < 0")[0]
            ):
                assert value > 0, (spec, word, value)


def test_two_s_node_radius_in_the_alt_text_is_the_closed_form():
    # the 2s node at r = 2 bohr (Bethe & Salpeter 1957) is 1.06 angstrom with CODATA's a0
    from scipy.constants import physical_constants

    a0 = physical_constants["Bohr radius"][0] * 1e10
    assert f"{2 * a0:.3g}" == "1.06"


# ---------------------------------------------------------------- slices whose nodes show


def _luminance(rgb) -> float:
    # WCAG 2.x relative luminance of an sRGB colour (channels 0..1)
    c = np.asarray(rgb, dtype=float)[:3]
    lin = np.where(c <= 0.04045, c / 12.92, ((c + 0.055) / 1.055) ** 2.4)
    return float(lin @ [0.2126, 0.7152, 0.0722])


def _contrast(a, b) -> float:
    la, lb = sorted((_luminance(a), _luminance(b)), reverse=True)
    return (la + 0.05) / (lb + 0.05)  # WCAG 2.x contrast ratio


@pytest.mark.parametrize("quantity", ["density", "psi"])
@pytest.mark.parametrize("spec", ["3s", "3pz"])
def test_slice_nodes_have_3_to_1_contrast_with_the_map_under_them(spec, quantity):
    # WCAG 2.1 success criterion 1.4.11 (non-text contrast): at least 3:1
    from matplotlib.colors import to_rgb

    from orbviz.figures.options import PlotOptions
    from orbviz.figures.plots import slice_figure

    _, data = slice_figure(orbviz.state(spec), PlotOptions(quantity=quantity), points=401)
    line = to_rgb(data.node_colour)
    # where psi changes sign between neighbouring samples: the nodes under the dashed lines
    signs = np.sign(data.psi)
    flips = signs[1:, :] != signs[:-1, :]
    under = data.colours[:-1, :][flips]
    assert len(under) > 50
    ratios = [_contrast(line, c) for c in under]
    assert min(ratios) >= 3.0


def test_radial_plot_of_subshells_on_one_axes(tmp_path, capsys):
    out = tmp_path / "r.svg"
    assert main(["plot", "3s", "3p", "3d", "--kind", "radial", "-o", str(out)]) == 0
    svg = out.read_text()
    assert all(f">{name}<" in svg or name in svg for name in ("3s", "3p", "3d"))


# ---------------------------------------------------------------- one unit for every output


def test_bohr_in_angstrom_is_codata():
    from scipy.constants import physical_constants

    from orbviz._defaults import BOHR_IN_ANGSTROM

    # CODATA Bohr radius via scipy.constants, in metres
    a0 = physical_constants["Bohr radius"][0]
    assert BOHR_IN_ANGSTROM == pytest.approx(a0 / 1e-10, rel=1e-10)


def test_info_radii_follow_units(capsys):
    from scipy.constants import physical_constants

    a0 = physical_constants["Bohr radius"][0] / 1e-10  # CODATA, angstrom per bohr
    assert main(["info", "2s"]) == 0
    angstrom = capsys.readouterr().out
    assert main(["info", "2s", "--units", "bohr"]) == 0
    bohr = capsys.readouterr().out
    # hydrogen 2s: radial node at r = 2 bohr, <r> = [3n^2 - l(l+1)]/2 = 6 bohr (Bethe & Salpeter
    # 1957)
    assert "radial nodes at r = 2 bohr" in bohr and "<r> = 6 bohr" in bohr
    assert f"radial nodes at r = {2 * a0:.6g} Å" in angstrom
    assert f"<r> = {6 * a0:.6g} Å" in angstrom


def test_info_units_is_refused_outside_its_choices(capsys):
    assert main(["info", "2s", "--units", "parsec"]) == 2
    assert "--units: expected angstrom or bohr, got 'parsec'" in capsys.readouterr().err


def test_plot_axes_follow_units(tmp_path):
    from scipy.constants import physical_constants

    from orbviz.figures.options import PlotOptions
    from orbviz.figures.plots import radial_figure

    a0 = physical_constants["Bohr radius"][0] / 1e-10
    fig_b, _ = radial_figure(orbviz.state("1s"), PlotOptions(kind="radial", units="bohr"))
    fig_a, _ = radial_figure(orbviz.state("1s"), PlotOptions(kind="radial", units="angstrom"))
    xb, xa = fig_b.axes[0].get_xlim()[1], fig_a.axes[0].get_xlim()[1]
    assert xa == pytest.approx(xb * a0, rel=1e-9)
    assert "bohr" in fig_b.axes[0].get_xlabel() and "Å" in fig_a.axes[0].get_xlabel()


# ---------------------------------------------------------------- plots at print size


def test_plot_png_and_tiff_at_a_printed_width(tmp_path):
    from scipy.constants import physical_constants

    png, tiff = tmp_path / "r.png", tmp_path / "r.tiff"
    assert (
        main(["plot", "3s", "--kind", "radial", "--width", "85mm", "--dpi", "400", "-o", str(png)])
        == 0
    )
    assert main(["plot", "3s", "--kind", "radial", "--width", "3.5in", "-o", str(tiff)]) == 0
    with Image.open(png) as image:
        # 85 mm at 400 dpi: 85 / 25.4 * 400 = 1338.6 pixels (PNG pHYs holds the resolution)
        assert abs(image.size[0] - 85 / 25.4 * 400) <= 1.5
        assert image.info["dpi"] == pytest.approx((400, 400), abs=0.01)
        # hydrogen 3s: R_30 ~ 27 - 18r + 2r^2 vanishes at r = (9 -+ 3 sqrt 3)/2 bohr (closed
        # form, Bethe & Salpeter 1957); a0 from CODATA via scipy.constants
        a0 = physical_constants["Bohr radius"][0] / 1e-10
        nodes = [(9 - 3 * math.sqrt(3)) / 2 * a0, (9 + 3 * math.sqrt(3)) / 2 * a0]
        text = f"radial nodes at {nodes[0]:.3g}, {nodes[1]:.3g} Å"
        assert text in image.info["Description"]
    with Image.open(tiff) as image:
        assert abs(image.size[0] - 3.5 * 300) <= 1.5  # 3.5 in at the default 300 dpi
        assert tuple(float(v) for v in image.info["dpi"]) == pytest.approx((300, 300))


def test_plot_that_would_be_too_many_pixels_is_refused(tmp_path, capsys):
    out = tmp_path / "r.png"
    assert main(["plot", "3s", "--width", "1000mm", "--dpi", "2400", "-o", str(out)]) == 2
    assert "megapixels" in capsys.readouterr().err and not out.exists()


@pytest.mark.parametrize(
    ("spec", "plane"),
    # closed forms: dxy ~ xy vanishes on x = 0 and y = 0, so its lobes lie in xy;
    # dyz ~ yz lies in yz; pz ~ z and dz2 ~ 3z^2 - r^2 are largest along z (xz on a tie with yz)
    [
        ("3dxy", "xy"),
        ("3dx2-y2", "xy"),
        ("3dyz", "yz"),
        ("3dxz", "xz"),
        ("2pz", "xz"),
        ("3s", "xz"),
    ],
)
def test_default_slice_plane_is_not_a_nodal_plane(spec, plane):
    from orbviz.figures.options import PlotOptions
    from orbviz.figures.plots import slice_figure

    _, data = slice_figure(orbviz.state(spec), PlotOptions(), points=101)
    assert data.plane == plane
    assert data.density.max() > 10 * data.level  # the lobes are in the slice


# ---------------------------------------------------------------- sets told apart at a glance


def test_dxy_and_dx2_y2_panels_look_different_in_a_sheet():
    # closed forms: dxy ~ xy has its positive lobes between the axes (azimuth 45 and 225
    # degrees), dx2-y2 ~ x^2 - y^2 along +-x; in the set view their positive parts must cover
    # clearly different pixels (intersection over union well below 1)
    from orbviz.figures.figure import sheet
    from orbviz.surface.colors import DEFAULT_PAIR

    options = FigureOptions(size=(320, 240), grid=48, key=False, scale_bar=False)
    states = [orbviz.state("3dxy"), orbviz.state("3dx2-y2")]
    with sheet(states, options, oriented=True) as fig:
        assert fig.axis_lines  # a set that differs by orientation gets axes through the nucleus
        masks = []
        for k in range(2):
            rgba = fig.panel_image(k)[..., :3].reshape(-1, 3).astype(float)
            blue = np.asarray(DEFAULT_PAIR[0][:3], float)
            cos = rgba @ blue / (np.linalg.norm(rgba, axis=1) * np.linalg.norm(blue) + 1e-9)
            masks.append((cos > 0.995) & (rgba.sum(axis=1) > 30))
    overlap = np.sum(masks[0] & masks[1]) / np.sum(masks[0] | masks[1])
    assert min(m.sum() for m in masks) > 500
    assert overlap < 0.5


@pytest.mark.parametrize("specs", [["3d"], ["4,2,1"]])
def test_every_text_is_at_least_6_pt_at_print_size(specs):
    # journals ask for text of at least 6 pt at the printed size (common practice, no source)
    from orbviz.figures.figure import sheet
    from orbviz.figures.marks import Words
    from orbviz.states.make import set_members

    states = [orbviz.state(s) for spec in specs for s in set_members(spec) or [spec]]
    options = FigureOptions(grid=32, width=85.0, dpi=150, title="a title")
    with sheet(states, options, oriented=len(states) > 1) as fig:
        page = fig.page(show_progress=False)
        texts = [m for m in page.marks if isinstance(m, Words) and m.text.strip()]
        assert len(texts) >= 3  # the title, labels or wheel, the scale bar
        assert min(t.size for t in texts) >= 6.0


def test_a_set_in_one_panel_keys_its_members_not_the_phases(tmp_path):
    out = tmp_path / "sp3.svg"
    assert main(["render", "2sp3", "--overlay", "--grid", "32", "-o", str(out)]) == 0
    svg = out.read_text()
    for k in range(1, 5):
        assert f"2sp3[{k}]" in svg
    assert "small lobes" in svg and "ψ &gt; 0" not in svg and "ψ > 0" not in svg


def test_the_default_view_does_not_look_down_a_hybrid_lobe():
    # 2sp3[1] = (2s + 2px + 2py + 2pz)/2 points along (1, 1, 1)/sqrt 3 (closed form), which is
    # 10 degrees from the iso camera (azimuth 35, elevation 25): seen end on it is a disc
    from orbviz.figures.camera import camera_axes

    with figure(orbviz.state("2sp3[1]"), FigureOptions(grid=32, size=(200, 150))) as fig:
        toward = camera_axes(fig.view)[0]
    angle = math.degrees(math.acos(abs(toward @ (np.ones(3) / math.sqrt(3)))))
    assert angle >= 30


@pytest.mark.parametrize(("inked", "expected_side"), [("right", "left"), ("left", "right")])
def test_the_phase_wheel_takes_the_emptier_top_corner(inked, expected_side):
    # a panel drawn only in one top corner: the wheel must not be placed over the drawing
    from orbviz.figures.marks import Picture
    from orbviz.figures.options import FigureOptions
    from orbviz.figures.page import Page, PanelImage

    rgba = np.full((300, 400, 4), 255, dtype=np.uint8)
    if inked == "right":
        rgba[:120, 260:, :3] = 40
    else:
        rgba[:120, :140, :3] = 40
    panel = PanelImage(rgba, half_height=10.0, complex_phase=True)
    page = Page([panel], FigureOptions(size=(400, 300), scale_bar=False), (1, 1))
    (wheel,) = [m for m in page.marks if isinstance(m, Picture) and m.smooth]  # the ring
    side = "left" if wheel.left + wheel.width / 2 < page.pixels[0] / 2 else "right"
    assert side == expected_side


def test_a_tiny_figure_still_draws_its_words_and_key(tmp_path):
    # FreeType refuses fonts under one pixel; the key and the scale bar shrink with the page
    out = tmp_path / "x.png"
    assert main(["render", "2pz", "--grid", "32", "--size", "16x16", "-o", str(out)]) == 0
    with Image.open(out) as image:
        assert image.size == (16, 16)


def test_a_css_hsl_background_reaches_vector_pages(tmp_path):
    import colorsys  # the standard library's HLS conversion, independent of Pillow's parser

    svg = tmp_path / "x.svg"
    colour = "hsl(200, 30%, 90%)"
    assert main(["render", "2pz", "--grid", "32", "--background", colour, "-o", str(svg)]) == 0
    expected = colorsys.hls_to_rgb(200 / 360, 0.90, 0.30)
    fills = {m for m in re.findall(r"fill: ?#([0-9a-f]{6})", svg.read_text())}
    near = [
        f
        for f in fills
        if max(
            abs(int(f[i : i + 2], 16) - 255 * e) for i, e in zip((0, 2, 4), expected, strict=True)
        )
        <= 1
    ]
    assert near, f"no fill near {expected} among {sorted(fills)}"
    assert (
        main(
            ["render", "2pz", "--grid", "32", "--background", colour, "-o", str(tmp_path / "x.pdf")]
        )
        == 0
    )


def test_the_scale_bar_label_clears_its_bar(tmp_path):
    out = tmp_path / "x.png"
    assert main(["render", "3d", "--grid", "48", "--size", "800x600", "-o", str(out)]) == 0
    with Image.open(out) as image:  # a sheet: its bar and label are small
        ink = np.asarray(image.convert("L"))[-60:, -120:] < 128  # the bottom right corner
    rows = ink.sum(axis=1)
    bar = int(np.argmax(rows))  # the bar is the widest run of ink there
    assert rows[bar] > 20
    top = bar
    while top > 0 and rows[top - 1] > 0.5 * rows[bar]:  # up to the bar's top edge
        top -= 1
    above = np.nonzero(rows[:top])[0]  # the label's ink
    assert len(above) and top - 1 - above.max() >= 2, "the label touches the bar"
