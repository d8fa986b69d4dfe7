"""Off-screen figures: size, coverage, colours present, transparency, overlays, plot data."""

from __future__ import annotations

import math

import numpy as np
import pytest
from PIL import Image
from scipy.constants import physical_constants

from orbviz.cli import main
from orbviz.figures.figure import figure
from orbviz.figures.options import FigureOptions, PlotOptions
from orbviz.states.orbital import Orbital
from orbviz.surface.colors import DEFAULT_PAIR

SMALL = (400, 300)


def _figure(spec, **options):
    options.setdefault("grid", 64)
    return figure(Orbital.from_spec(spec), FigureOptions(size=SMALL, **options))


def _render(spec, tmp_path, **options):
    with _figure(spec, **options) as fig:
        path = fig.save(tmp_path / "f.png")
        with Image.open(path) as image:
            return fig, np.asarray(image)


def _r90_1s() -> float:
    # closed form: P(r < R) = 1 - e^{-2R}(1 + 2R + 2R^2) for hydrogen 1s (Bethe & Salpeter 1957;
    # docs/references.md)
    from scipy.optimize import brentq

    return brentq(lambda p: 1 - math.exp(-2 * p) * (1 + 2 * p + 2 * p * p) - 0.9, 0.1, 10)


def _foreground(img: np.ndarray, background=(255, 255, 255)) -> np.ndarray:
    return np.any(np.abs(img[..., :3].astype(int) - background) > 12, axis=2)


def _near(img: np.ndarray, rgb, tol=60) -> float:
    """Share of pixels whose hue is close to a colour (shading scales brightness, not hue)."""
    pix = img[..., :3].astype(float)
    target = np.array(rgb, dtype=float)
    unit = lambda v: v / np.maximum(np.linalg.norm(v, axis=-1, keepdims=True), 1)  # noqa: E731
    cos = np.sum(unit(pix) * unit(target), axis=-1)
    bright = pix.sum(axis=-1) > tol
    return float(np.mean((cos > 0.985) & bright))


def test_size_coverage_and_both_phase_colours(tmp_path):
    _, img = _render("3dz2", tmp_path, scale_bar=False, key=False, axes=False)
    assert img.shape == (SMALL[1], SMALL[0], 3)  # opaque: written as RGB
    share = _foreground(img).mean()
    assert 0.15 < share < 0.85  # the orbital fills a sensible part of the frame
    assert _near(img, DEFAULT_PAIR[0][:3]) > 0.03 and _near(img, DEFAULT_PAIR[1][:3]) > 0.03


def test_scale_multiplies_size(tmp_path):
    _, img = _render("2pz", tmp_path, scale=2.0)
    assert img.shape[:2] == (2 * SMALL[1], 2 * SMALL[0])


def test_complex_state_shows_many_hues(tmp_path):
    _, img = _render("3,2,1", tmp_path, axes=False, scale_bar=False, key=False)
    fg = _foreground(img)
    rgb = img[..., :3][fg].astype(float)
    hue = np.degrees(
        np.arctan2(np.sqrt(3) * (rgb[:, 1] - rgb[:, 2]), 2 * rgb[:, 0] - rgb[:, 1] - rgb[:, 2])
    )
    chroma = rgb.max(axis=1) - rgb.min(axis=1)
    bins = np.histogram(hue[chroma > 25], bins=12, range=(-180, 180))[0]
    assert np.count_nonzero(bins > 0.01 * bins.sum()) >= 6


def test_transparent_corners_and_no_halo(tmp_path):
    _, img = _render("2pz", tmp_path, transparent=True, axes=False, scale_bar=False, key=False)
    corners = img[[0, 0, -1, -1], [0, -1, 0, -1]]
    assert np.all(corners[:, 3] == 0)
    # edge pixels are partly transparent, and their colour is the orbital's, not the background's:
    # no light (white) or dark (black) fringe where alpha is partial
    edge = (img[..., 3] > 20) & (img[..., 3] < 235)
    assert edge.any()
    rgb = img[..., :3][edge].astype(float)
    assert np.mean(rgb.min(axis=1) > 200) < 0.05


def test_view_presets_and_bad_view():
    from orbviz._options import build
    from orbviz.errors import OptionError

    assert FigureOptions(view="x").view == "x"  # a raw value is converted when checked
    assert build(FigureOptions, {"view": "x"}).view == (0.0, 0.0)
    assert build(FigureOptions, {"view": "30,-10"}).view == (30.0, -10.0)
    with pytest.raises(OptionError, match="view: expected iso, x, y, z or AZ,EL"):
        build(FigureOptions, {"view": "sideways"})


def test_scale_bar_measured_against_the_1s_sphere(tmp_path):
    # The 1s 90% surface is a sphere of the closed-form radius r90 (Bethe & Salpeter 1957;
    # docs/references.md: 2.661 bohr); its
    # width in pixels gives pixels per angstrom (CODATA Bohr radius, scipy.constants). The bar
    # then has to be 1, 2 or 5 times a power of ten angstrom long at that scale.
    a0 = physical_constants["Bohr radius"][0] * 1e10
    _, img = _render("1s", tmp_path, axes=False, grid=96)
    # the ink is near-black grey (the bar), not the dark blue of a shaded lobe
    ink = np.all(img[..., :3] < 40, axis=2) & (np.ptp(img[..., :3].astype(int), axis=2) < 12)
    bar_row = int(np.argmax(ink.sum(axis=1)))
    bar = int(ink[bar_row].sum())
    sphere = _foreground(img)[SMALL[1] // 2]  # the middle row crosses the sphere only
    diameter = np.ptp(np.flatnonzero(sphere)) + 1
    per_angstrom = diameter / (2 * _r90_1s() * a0)
    nice = [s * 10.0**k for k in range(-3, 4) for s in (1, 2, 5)]
    label = min(nice, key=lambda v: abs(bar / per_angstrom / v - 1))
    assert abs(bar - label * per_angstrom) <= 1.5  # pixels: the sphere's edge and the bar's ends


@pytest.mark.parametrize(
    ("spec", "radial", "angular"),
    [
        ("2s", 1, 0),
        ("3pz", 1, 1),
        ("3dz2", 0, 2),
        ("3dxy", 0, 2),
        ("4fxyz", 0, 3),
        ("4fz3", 0, 3),
        ("5dx2-y2", 2, 2),
        ("4,2,1", 1, 1),
    ],
)
def test_node_overlays_count(spec, radial, angular):
    # n - l - 1 radial spheres and l angular surfaces (Bethe & Salpeter 1957; docs/references.md); a
    # complex eigenstate's
    # |psi| keeps only its l - |m| polar nodes (4,2,1: one cone pair -> 1 surface, the xy plane)
    with _figure(spec, grid=48, nodes=True) as fig:
        assert len(fig.overlays.get("radial_nodes", [])) == radial
        assert len(fig.overlays.get("angular_nodes", [])) == angular


def test_cutaway_and_outer_surface(tmp_path):
    fig, img = _render("4s", tmp_path, cut="quarter", outer=0.99)
    assert fig.overlays["caps"] and fig.overlays["outer"]
    # the inner positive shell shows through the cut (a small share), the outer negative one too
    assert _near(img, DEFAULT_PAIR[0][:3]) > 0.002 and _near(img, DEFAULT_PAIR[1][:3]) > 0.01


def test_extent_fixes_the_scale(tmp_path):
    with _figure("2pz", grid=48, extent=30.0) as a, _figure("3dz2", grid=48, extent=30.0) as b:
        assert a.half_height == b.half_height and a.mesh.grid.half_width == 30.0


def test_render_cli(tmp_path, capsys):
    out = tmp_path / "r.png"
    status = main(
        [
            "render",
            "2pz",
            "--grid",
            "40",
            "--size",
            "320x240",
            "-o",
            str(out),
            "--title",
            "2pz",
            "--lighting",
            "studio",
        ]
    )
    with Image.open(out) as image:
        assert status == 0 and image.size == (320, 240)
    status = main(["render", "2pz", "--size", "10x10", "-o", str(tmp_path / "x.png")])
    err = capsys.readouterr().err
    assert status == 2 and "--size" in err and not (tmp_path / "x.png").exists()


# ---------------------------------------------------------------- 2D plots: test the data


def test_slice_marks_nodes_at_closed_form_radii():
    from orbviz.figures.plots import slice_figure

    _, data = slice_figure(Orbital.from_spec("3s"), PlotOptions(plane="xz"), points=801)
    # closed form (Bethe & Salpeter 1957; docs/references.md): 3s nodes at (9 -+ 3 sqrt3)/2 bohr
    expected = [(9 - 3 * math.sqrt(3)) / 2, (9 + 3 * math.sqrt(3)) / 2]
    assert data.node_radii == pytest.approx(expected, rel=1e-10)
    # and the sampled psi changes sign there along +x
    mid = len(data.axis) // 2
    row = data.psi[mid:, mid]
    flips = data.axis[mid:][np.flatnonzero(np.sign(row[1:]) != np.sign(row[:-1]))]
    step = data.axis[1] - data.axis[0]
    assert flips == pytest.approx(expected, abs=step)


def test_slice_level_ring_is_the_closed_form_1s_radius():
    # the drawn level of 1s is |psi|^2 = e^{-2r}/pi at r = r90 (closed forms, Bethe & Salpeter 1957;
    # docs/references.md), so the
    # ring where the sampled density crosses it lies at r90
    from orbviz.figures.plots import slice_figure

    _, data = slice_figure(Orbital.from_spec("1s"), points=1601)
    r90 = _r90_1s()
    assert data.level == pytest.approx(math.exp(-2 * r90) / math.pi, rel=1e-4)
    mid = len(data.axis) // 2
    row = data.density[mid:, mid] - data.level
    crossing = data.axis[mid:][np.flatnonzero(np.sign(row[1:]) != np.sign(row[:-1]))]
    assert crossing == pytest.approx([r90], abs=data.axis[1] - data.axis[0])


@pytest.mark.parametrize(
    ("spec", "n", "l", "nodes"), [("2s", 2, 0, [2.0]), ("3pz", 3, 1, [6.0]), ("3dz2", 3, 2, [])]
)
def test_radial_plot_marks(spec, n, l, nodes):
    from orbviz.figures.plots import radial_figure

    _, data = radial_figure(Orbital.from_spec(spec))
    # <r> = [3n^2 - l(l+1)]/2 (Bethe & Salpeter); the marked maximum is the curve's maximum
    assert data.mean_radius == pytest.approx((3 * n * n - l * (l + 1)) / 2, rel=1e-12)
    assert data.most_probable_radius == pytest.approx(
        data.r[np.argmax(data.p)], abs=data.r[1] - data.r[0]
    )
    # node radii from the closed forms (Bethe & Salpeter 1957): 2s at 2 bohr, 3p at 6 bohr
    assert data.node_radii == pytest.approx(nodes, rel=1e-10)
    if l == n - 1:  # nodeless: most probable radius n^2 (Bethe & Salpeter 1957; docs/references.md)
        assert data.most_probable_radius == pytest.approx(n * n, rel=1e-7)


@pytest.mark.parametrize("suffix", [".png", ".svg", ".pdf"])
def test_plot_cli_formats(tmp_path, suffix):
    out = tmp_path / f"p{suffix}"
    assert main(["plot", "3pz", "--kind", "radial", "-o", str(out)]) == 0
    head = out.read_bytes()[:8]
    assert head.startswith({".png": b"\x89PNG", ".svg": b"<?xml", ".pdf": b"%PDF"}[suffix])
