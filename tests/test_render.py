"""Off-screen figures: size, coverage, colours present, transparency, overlays, plot data."""

from __future__ import annotations

import math

import numpy as np
import pytest
from PIL import Image
from scipy.constants import physical_constants

from orbviz.cli import main
from orbviz.figures.render import FigureOptions, figure, render_png
from orbviz.states.orbital import Orbital
from orbviz.surface.colors import DEFAULT_PAIR

SMALL = (400, 300)


def _render(spec, tmp_path, **options):
    fig = figure(Orbital.from_spec(spec), grid=64, options=FigureOptions(size=SMALL, **options))
    path = render_png(fig, tmp_path / "f.png")
    with Image.open(path) as image:
        return fig, np.asarray(image)


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
    _, img = _render("3dz2", tmp_path, scale_bar=None, axes=False)
    assert img.shape == (SMALL[1], SMALL[0], 4)
    share = _foreground(img).mean()
    assert 0.15 < share < 0.85  # the orbital fills a sensible part of the frame
    assert _near(img, DEFAULT_PAIR[0][:3]) > 0.03 and _near(img, DEFAULT_PAIR[1][:3]) > 0.03


def test_scale_multiplies_size(tmp_path):
    _, img = _render("2pz", tmp_path, scale=2.0)
    assert img.shape[:2] == (2 * SMALL[1], 2 * SMALL[0])


def test_complex_state_shows_many_hues(tmp_path):
    _, img = _render("3,2,1", tmp_path, axes=False, scale_bar=None)
    fg = _foreground(img)
    rgb = img[..., :3][fg].astype(float)
    hue = np.degrees(
        np.arctan2(np.sqrt(3) * (rgb[:, 1] - rgb[:, 2]), 2 * rgb[:, 0] - rgb[:, 1] - rgb[:, 2])
    )
    chroma = rgb.max(axis=1) - rgb.min(axis=1)
    bins = np.histogram(hue[chroma > 25], bins=12, range=(-180, 180))[0]
    assert np.count_nonzero(bins > 0.01 * bins.sum()) >= 6


def test_transparent_corners_and_no_halo(tmp_path):
    _, img = _render("2pz", tmp_path, transparent=True, axes=False, scale_bar=None)
    corners = img[[0, 0, -1, -1], [0, -1, 0, -1]]
    assert np.all(corners[:, 3] == 0)
    # edge pixels are partly transparent, and their colour is the orbital's, not the background's:
    # no light (white) or dark (black) fringe where alpha is partial
    edge = (img[..., 3] > 20) & (img[..., 3] < 235)
    assert edge.any()
    rgb = img[..., :3][edge].astype(float)
    assert np.mean(rgb.min(axis=1) > 200) < 0.05


def test_view_presets_and_bad_view():
    from orbviz.errors import ParameterError
    from orbviz.figures.render import parse_view

    assert parse_view("x") == (0.0, 0.0) and parse_view("30,-10") == (30.0, -10.0)
    with pytest.raises(ParameterError):
        parse_view("sideways")


def test_scale_bar_length_in_angstrom(tmp_path):
    # the bar's pixel length equals its label in angstrom times pixels per angstrom, using the
    # CODATA Bohr radius (scipy.constants) and the orthographic view height
    from orbviz.figures.render import _BOHR_IN_ANGSTROM, _nice

    a0 = physical_constants["Bohr radius"][0] * 1e10
    assert _BOHR_IN_ANGSTROM == pytest.approx(a0, rel=1e-10)
    fig, img = _render("2pz", tmp_path, axes=False)
    per_angstrom = SMALL[1] / (2 * fig.half_height) / a0
    length = _nice(0.22 * SMALL[0] / per_angstrom)
    dark = np.all(img[..., :3] < 40, axis=2)[SMALL[1] // 2 :]  # the bar is in the lower half
    longest = max(dark[r].sum() for r in range(dark.shape[0]))
    assert abs(longest - length * per_angstrom) <= 2


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
    # n - l - 1 radial spheres and l angular surfaces (REFERENCES.md); a complex eigenstate's
    # |psi| keeps only its l - |m| polar nodes (4,2,1: one cone pair -> 1 surface, the xy plane)
    fig = figure(Orbital.from_spec(spec), grid=48, options=FigureOptions(size=SMALL, nodes=True))
    assert len(fig.overlays.get("radial_nodes", [])) == radial
    assert len(fig.overlays.get("angular_nodes", [])) == angular


def test_cutaway_and_outer_surface(tmp_path):
    fig, img = _render("4s", tmp_path, cut="quarter", outer=0.99)
    assert fig.overlays["caps"] and fig.overlays["outer"]
    # the inner positive shell shows through the cut (a small share), the outer negative one too
    assert _near(img, DEFAULT_PAIR[0][:3]) > 0.002 and _near(img, DEFAULT_PAIR[1][:3]) > 0.01


def test_extent_fixes_the_scale(tmp_path):
    a = figure(Orbital.from_spec("2pz"), grid=48, options=FigureOptions(size=SMALL, extent=30.0))
    b = figure(Orbital.from_spec("3dz2"), grid=48, options=FigureOptions(size=SMALL, extent=30.0))
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
    from orbviz.figures.plot import slice_figure

    _, data = slice_figure(Orbital.from_spec("3s"), plane="xz", points=801)
    # closed form (REFERENCES.md): 3s nodes at (9 -+ 3 sqrt3)/2 bohr
    expected = [(9 - 3 * math.sqrt(3)) / 2, (9 + 3 * math.sqrt(3)) / 2]
    assert data.node_radii == pytest.approx(expected, rel=1e-10)
    # and the sampled psi changes sign there along +x
    mid = len(data.axis) // 2
    row = data.psi[mid:, mid]
    flips = data.axis[mid:][np.flatnonzero(np.sign(row[1:]) != np.sign(row[:-1]))]
    step = data.axis[1] - data.axis[0]
    assert flips == pytest.approx(expected, abs=step)


def test_slice_isovalue_is_the_enclosing_level():
    from orbviz.figures.plot import slice_figure
    from orbviz.levels.isovalue import enclosing_isovalue

    orbital = Orbital.from_spec("2pz")
    _, data = slice_figure(orbital)
    assert data.level == enclosing_isovalue(orbital).level


@pytest.mark.parametrize(("spec", "n", "l"), [("2s", 2, 0), ("3pz", 3, 1), ("3dz2", 3, 2)])
def test_radial_plot_marks(spec, n, l):
    from orbviz.figures.plot import radial_figure
    from orbviz.states.radial import radial_node_radii

    _, data = radial_figure(Orbital.from_spec(spec))
    # <r> = [3n^2 - l(l+1)]/2 (Bethe & Salpeter); the marked maximum is the curve's maximum
    assert data.mean_radius == pytest.approx((3 * n * n - l * (l + 1)) / 2, rel=1e-12)
    assert data.most_probable_radius == pytest.approx(
        data.r[np.argmax(data.p)], abs=data.r[1] - data.r[0]
    )
    assert data.node_radii == pytest.approx(radial_node_radii(n, l).tolist())
    if l == n - 1:  # nodeless: most probable radius n^2 (REFERENCES.md)
        assert data.most_probable_radius == pytest.approx(n * n, rel=1e-7)
    if spec == "2s":  # closed form: node at 2 bohr
        assert data.node_radii == pytest.approx([2.0])


@pytest.mark.parametrize("suffix", [".png", ".svg", ".pdf"])
def test_plot_cli_formats(tmp_path, suffix):
    out = tmp_path / f"p{suffix}"
    assert main(["plot", "3pz", "--kind", "radial", "-o", str(out)]) == 0
    head = out.read_bytes()[:8]
    assert head.startswith({".png": b"\x89PNG", ".svg": b"<?xml", ".pdf": b"%PDF"}[suffix])
