"""Cloud and volume figures, dot-density plots and the scene outputs that make them.

The 3D styles pass the checks of the surface figures (size, coverage, both phase colours, many
hues for a complex state); the dot plot is checked against an independent sampler written here.
"""

from __future__ import annotations

import numpy as np
import pytest
from PIL import Image

import orbviz
from orbviz.cli import main
from orbviz.figures.figure import figure
from orbviz.figures.options import FigureOptions, PlotOptions
from orbviz.surface.colors import DEFAULT_PAIR
from tests.test_render import _foreground, _near

SMALL = (400, 300)


def _image(spec: str, style: str, **options) -> np.ndarray:
    opts = FigureOptions(size=SMALL, grid=48, style=style, points=20_000, **options)
    with figure(orbviz.state(spec), opts) as fig:
        return fig.image()


@pytest.mark.parametrize("style", ["cloud", "volume"])
def test_styles_fill_the_frame_with_both_phase_colours(style):
    img = _image("3dz2", style, scale_bar=False, key=False, axes=False)
    assert img.shape[:2] == (SMALL[1], SMALL[0])
    share = _foreground(img).mean()
    assert 0.05 < share < 0.9
    if style == "cloud":  # opaque dots keep the phase hues
        assert _near(img, DEFAULT_PAIR[0][:3]) > 0.01 and _near(img, DEFAULT_PAIR[1][:3]) > 0.01
    else:  # a translucent glow over white: blue-dominant and yellow-dominant pixels
        rgb = img[..., :3].astype(int)
        assert ((rgb[..., 2] - rgb[..., 0]) > 60).mean() > 0.03  # #004488: blue over red
        assert ((rgb[..., 0] - rgb[..., 2]) > 60).mean() > 0.03  # #DDAA33: red over blue


@pytest.mark.parametrize("style", ["cloud", "volume"])
def test_a_complex_cloud_shows_many_hues(style):
    img = _image("3,2,1", style, scale_bar=False, key=False, axes=False)
    rgb = img[..., :3][_foreground(img)].astype(float)
    hue = np.degrees(
        np.arctan2(np.sqrt(3) * (rgb[:, 1] - rgb[:, 2]), 2 * rgb[:, 0] - rgb[:, 1] - rgb[:, 2])
    )
    chroma = rgb.max(axis=1) - rgb.min(axis=1)
    bins = np.histogram(hue[chroma > 20], bins=12, range=(-180, 180))[0]
    assert np.count_nonzero(bins > 0.01 * bins.sum()) >= 5


def test_2pz_cloud_is_positive_above_and_negative_below():
    # chemistry sign convention (Condon-Shortley phase; e.g. Atkins, Physical Chemistry): 2pz
    # is positive for z > 0. Seen from the side (view x), the blue dots sit above the yellow.
    img = _image("2pz", "cloud", view="x", scale_bar=False, key=False, axes=False)
    pix = img[..., :3].astype(float)
    unit = pix / np.maximum(np.linalg.norm(pix, axis=2, keepdims=True), 1)

    def rows(rgb) -> float:
        target = np.asarray(rgb, dtype=float) / np.linalg.norm(rgb)
        mask = (unit @ target > 0.985) & (pix.sum(axis=2) > 40)
        return float(np.nonzero(mask)[0].mean())

    assert rows(DEFAULT_PAIR[0][:3]) < rows(DEFAULT_PAIR[1][:3]) - 20  # image rows grow down


def test_the_dot_plot_of_1s_matches_an_independent_sampler():
    # 1s: P(r) = 4 r^2 e^{-2r}, a gamma distribution with shape 3 and scale 1/2 (closed form;
    # Griffiths, Introduction to QM, eq. 4.80); directions uniform. Drawn here with numpy's
    # gamma sampler, projected on the xz plane: the median projected radius.
    rng = np.random.default_rng(0)
    r = rng.gamma(3.0, 0.5, 400_000)
    cos_t = rng.uniform(-1, 1, r.size)
    phi = rng.uniform(0, 2 * np.pi, r.size)
    sin_t = np.sqrt(1 - cos_t**2)
    projected = r * np.hypot(sin_t * np.cos(phi), cos_t)
    expected = np.median(projected)
    _, data = orbviz.plot("1s", kind="dots", points=100_000, plane="xz")
    found = np.median(np.hypot(data.xy[:, 0], data.xy[:, 1]))
    assert found == pytest.approx(expected, rel=0.01)
    assert f"half of them lie within {found * 0.529177:.3g} Å" in data.describe("angstrom")


def test_a_slab_keeps_only_the_dots_near_the_plane():
    _, data = orbviz.plot("3dxy", kind="dots", points=20_000, slab=1.0)
    assert data.plane == "xy" and 0 < len(data.xy) < data.drawn


def test_dots_and_styles_through_the_command_line(tmp_path, capsys):
    out = tmp_path / "d.pdf"
    assert main(["plot", "3dz2", "2pz", "--kind", "dots", "-o", str(out)]) == 0
    assert out.read_bytes()[:5] == b"%PDF-"
    assert main(["render", "2s", "--style", "cloud", "--cut", "half", "--grid", "40",
                 "--size", "320x240", "-o", str(tmp_path / "c.png")]) == 0  # fmt: skip
    with Image.open(tmp_path / "c.png") as image:
        assert image.size == (320, 240)
    status = main(["render", "2pz", "--style", "fog", "-o", str(tmp_path / "x.png")])
    assert status == 2 and "--style: expected surface, cloud or volume" in capsys.readouterr().err


@pytest.mark.slow
def test_scene_outputs_make_clouds_volumes_points_and_dots(tmp_path):
    import meshio

    scene = tmp_path / "clouds.toml"
    scene.write_text(
        'title = "Clouds of the Marram Bay science club"\n'
        '[defaults]\ngrid = 40\nrender = { size = "320x240", points = 5000 }\n'
        '[[orbital]]\nspec = "3dz2"\n'
        'outputs = ["cloud.png", "volume.png", "points.ply", "dots.png"]\n'
        "sample = { points = 5000, seed = 1, size = 60 }\n"
        '[[sheet]]\nspecs = ["2p"]\nname = "p-set"\noutputs = ["cloud.png"]\n'
    )
    out = tmp_path / "out"
    assert main(["batch", str(scene), "-o", str(out), "--no-progress"]) == 0
    for name in ("3dz2-cloud.png", "3dz2-volume.png", "3dz2-dots.png", "p-set-cloud.png"):
        with Image.open(out / name) as image:  # Pillow as the independent reader
            assert image.format == "PNG"
    cloud = meshio.read(out / "3dz2-points.ply")  # meshio as the independent PLY reader
    sides = cloud.points.max(axis=0) - cloud.points.min(axis=0)
    # 60 mm on the longest side; the far 0.1% (beyond the 99.9% radius) left out
    assert sides.max() == pytest.approx(60, rel=1e-4)
    assert 5000 * 0.99 <= len(cloud.points) < 5000


def test_plot_options_for_dots_are_checked():
    from orbviz.errors import OptionError

    with pytest.raises(OptionError, match="slab"):
        orbviz.plot("1s", kind="dots", slab=-1)
    assert PlotOptions(kind="dots").points == 20_000
