"""A figure's page: rendered 3D panels in a grid, with their labels, key and scale bar.

The page is laid out once, as a list of marks in page pixels from the bottom left: the panels'
pictures, words, colour swatches and the scale bar's rule. Sizes of text and lines are in
points, so they keep their printed size at any resolution. :mod:`orbviz.figures.paint` draws
the marks: with Pillow for PNG and TIFF (fast: no plotting library to import), with matplotlib
for PDF and SVG, where text stays vector text. Text is set in DejaVu Sans (it ships with
matplotlib) in both.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from orbviz._defaults import BOHR_IN_ANGSTROM
from orbviz.figures.marks import Mark, Picture, Rule, Swatch, Words
from orbviz.figures.options import FigureOptions
from orbviz.surface.colors import phase_colors

__all__ = ["PAGE_SUFFIXES", "Geometry", "Page", "PanelImage", "geometry", "nice_length"]

PAGE_SUFFIXES = (".png", ".tiff", ".tif", ".pdf", ".svg")
_SMALL_LOBES = (153, 153, 153)  # the grey of a set's small lobes (figures.overlays.add_members)
TITLE_PT, LABEL_PT, SMALL_PT = 8.0, 7.0, 6.5  # at print size: 6-8 pt (common practice)


def _ring(n: int = 96) -> np.ndarray:
    """Return the phase wheel's picture: a ring in the cyclic phase colours, (n, n, 4) uint8."""
    yy, xx = np.mgrid[0:n, 0:n] - (n - 1) / 2.0
    r = np.hypot(xx, yy) / (n / 2.0)
    rgba = phase_colors(np.arctan2(-yy, xx).ravel()).reshape(n, n, 4)
    rgba[..., 3] = np.where((r <= 1.0) & (r >= 0.55), 255, 0).astype(np.uint8)
    return rgba


def _wheel(left: float, bottom: float, size: float) -> list[Mark]:
    """Return the phase wheel in a square box: the ring, its four angles and "arg psi" below.

    In the box the ring has radius ``size / 4``, its centre a quarter of the box from the top
    and half across; the words sit around it.
    """
    unit = size / 4.0  # the ring's radius
    cx, cy = left + size / 2, bottom + 2.5 * unit
    marks: list[Mark] = [Picture(_ring(), cx - unit, cy - unit, 2 * unit, 2 * unit, smooth=True)]
    for text, (x, y, ha, va) in {
        "0": (1.08, 0, "left", "center"),
        "π/2": (0, 1.08, "center", "bottom"),
        "π": (-1.08, 0, "right", "center"),
        "−π/2": (0, -1.08, "center", "top"),
        "arg ψ": (0, -1.75, "center", "top"),
    }.items():
        marks.append(Words(text, cx + x * unit, cy + y * unit, SMALL_PT, ha, va))
    return marks


def nice_length(length: float) -> float:
    """Return 1, 2 or 5 times a power of ten, not above ``length``."""
    power = 10 ** math.floor(math.log10(length))
    return max(s * power for s in (1, 2, 5) if s * power <= length)


@dataclass(frozen=True)
class PanelImage:
    """One rendered panel: its pixels, the bohr it spans, and its label.

    Attributes
    ----------
    rgba : (H, W, 4) ndarray of uint8
        The orthographic view, the nucleus at the centre.
    half_height : float
        Half the height of the view, bohr (the width follows from the pixels).
    label : str
        Panel label ("(a) 3dxy"), or empty.
    complex_phase : bool
        The panel is coloured by phase angle (it needs the phase wheel).
    members : tuple of (str, (int, int, int))
        A set drawn in one panel: each member's label and colour (its key replaces the phases').
    """

    rgba: np.ndarray
    half_height: float
    label: str = ""
    complex_phase: bool = False
    members: tuple[tuple[str, tuple[int, int, int]], ...] = ()


def _ink(rgba: np.ndarray, size: float, *, right: bool) -> float:
    """Share of drawn pixels (not the background) in a top corner square of ``size`` pixels."""
    n = max(1, int(size))
    corner = rgba[:n, -n:] if right else rgba[:n, :n]
    border = np.concatenate([rgba[0], rgba[-1], rgba[:, 0], rgba[:, -1]]).astype(int)
    background = np.median(border, axis=0)  # the panel's edge is mostly background
    return float((np.abs(corner.astype(int) - background).sum(axis=2) > 24).mean())


@dataclass(frozen=True)
class Geometry:
    """Where everything goes on a page, in pixels.

    Attributes
    ----------
    width, height : int
        The page.
    panel : (int, int)
        One panel's width and height (the render window's size).
    top, bottom : int
        The title strip above a sheet's panels and the legend strip (key, scale bar) below.
    dpi : float
        Pixels per inch, so that text keeps its size in points.
    """

    width: int
    height: int
    panel: tuple[int, int]
    top: int
    bottom: int
    dpi: float


def geometry(options: FigureOptions, cols: int, rows: int) -> Geometry:
    """Lay out a page of ``cols`` x ``rows`` panels.

    One panel's page is ``size`` times ``scale`` pixels, or ``width`` (and ``height``) at
    ``dpi``; its title, key and scale bar lie over the panel. A sheet keeps that width, gives
    each panel the aspect of ``size``, and adds a strip for its title and one below for the key
    and the scale bar; its height follows unless ``height`` is given.
    """
    dpi = options.page_dpi
    w, h = options.size
    page_w = options.width / 25.4 * dpi if options.width is not None else w * options.scale
    sheet = cols * rows > 1
    top = round(2.2 * TITLE_PT / 72 * dpi) if sheet and options.title else 0
    bottom = round(2.6 * SMALL_PT / 72 * dpi) if sheet and (options.key or options.scale_bar) else 0
    panel_w = page_w / cols
    if options.height is not None:
        page_h = options.height / 25.4 * dpi
        panel_h = (page_h - top - bottom) / rows
    else:
        panel_h = panel_w * h / w
        page_h = rows * panel_h + top + bottom
    panel = (max(16, round(panel_w)), max(16, round(panel_h)))
    return Geometry(round(page_w), round(page_h), panel, top, bottom, dpi)


def _grid(count: int, cols: int, rows: int) -> list[tuple[int, int]]:
    return [(k % cols, k // cols) for k in range(count)]


class Page:
    """A page of panels laid out as marks; drawn by :mod:`orbviz.figures.paint` when encoded.

    Attributes
    ----------
    marks : list of Mark
        Everything on the page in drawing order, in pixels from the bottom left.
    pixels : (int, int)
        Width and height.
    dpi : float
        Pixels per inch (text and lines keep their size in points).
    """

    def __init__(
        self,
        panels: Sequence[PanelImage],
        options: FigureOptions,
        layout: tuple[int, int],
        *,
        alt_text: str = "",
    ) -> None:
        self.options, self.layout, self.alt_text = options, layout, alt_text
        self.images = list(panels)
        cols, rows = layout
        self.geometry = g = geometry(options, cols, rows)
        self.pixels = (g.width, g.height)
        self.dpi = g.dpi
        self.marks: list[Mark] = []
        boxes = [
            self._panel(p, where)
            for p, where in zip(panels, _grid(len(panels), cols, rows), strict=True)
        ]
        # page pixels per bohr: a panel's height spans twice its half height
        self.pixels_per_bohr = g.panel[1] / (2 * panels[0].half_height)
        if options.title:
            top = g.height - 0.25 * TITLE_PT / 72 * g.dpi
            self.marks.append(Words(options.title, 0.012 * g.width, top, TITLE_PT, "left", "top"))
        sheet = cols * rows > 1
        if options.scale_bar:
            self._scale_bar(None if sheet else boxes[-1])
        if options.key:
            if any(p.complex_phase for p in panels):
                self._wheel(sheet)
            else:
                members = next((p.members for p in panels if p.members), ())
                entries = [(c, name) for name, c in members] + [(_SMALL_LOBES, "small lobes")]
                phases = [(options.colors[0][:3], "ψ > 0"), (options.colors[1][:3], "ψ < 0")]
                self._key(entries if members else phases, sheet)

    def _panel(self, panel: PanelImage, where: tuple[int, int]) -> tuple[float, float]:
        """Place a panel's picture and label; return its bottom left corner."""
        g = self.geometry
        col, row = where
        (pw, ph), rows = g.panel, self.layout[1]
        left, bottom = col * pw, g.bottom + (rows - 1 - row) * ph
        self.marks.append(Picture(panel.rgba, left, bottom, pw, ph))
        if panel.label:
            x, y = left + 0.03 * pw, bottom + 0.97 * ph
            self.marks.append(Words(panel.label, x, y, LABEL_PT, "left", "top"))
        return left, bottom

    def _scale_bar(self, corner: tuple[float, float] | None) -> None:
        """Draw a bar of a round length at the bottom right: of the panel, or of a sheet's strip."""
        g = self.geometry
        angstrom = self.options.units == "angstrom"
        per_unit = 1.0 / BOHR_IN_ANGSTROM if angstrom else 1.0  # bohr per shown unit
        pw, ph = g.panel
        length = nice_length(0.22 * pw / self.pixels_per_bohr / per_unit)
        bar = length * per_unit * self.pixels_per_bohr
        if corner is None:  # the strip below a sheet
            right, base, lift = g.width - 0.04 * pw, 0.3 * g.bottom, 0.02 * g.bottom
        else:
            right, base, lift = corner[0] + 0.96 * pw, corner[1] + 0.06 * ph, 0.02 * ph
        label = f"{length:g} {'Å' if angstrom else 'bohr'}"
        self.marks.append(Rule(right - bar, right, base, 2.0))
        self.marks.append(Words(label, right - bar / 2, base + lift, SMALL_PT, "center", "bottom"))

    def _wheel(self, sheet: bool) -> None:
        """Draw the key of a complex state, the phase wheel, in the strip or a free corner.

        On one panel it goes to whichever top corner covers the least of the drawing (the
        right one on a tie, the left only without a title), so it does not sit on a lobe.
        """
        g = self.geometry
        box = SMALL_PT / 72 * g.dpi
        if sheet:
            self.marks += _wheel(0.02 * g.width, 0.02 * g.bottom, 0.95 * g.bottom)
            return
        size = min(9.0 * box, 0.3 * g.height)
        low = g.height - 1.05 * size
        left = g.width - 1.05 * size
        rgba = self.images[0].rgba
        seen = size * rgba.shape[1] / g.panel[0]  # the square in the panel image's pixels
        if not self.options.title and _ink(rgba, seen, right=False) < _ink(rgba, seen, right=True):
            left = 0.05 * size
        self.marks += _wheel(left, low, size)

    def _key(self, entries: Sequence[tuple[Sequence[int], str]], sheet: bool) -> None:
        """Say which colour is which: swatches with their words (the phases, or a set's members).

        They stack at the top right of one panel, or stand side by side in a sheet's strip.
        """
        g = self.geometry
        box = SMALL_PT / 72 * g.dpi  # a swatch as tall as the text, in pixels
        widths = [(1.4 + 0.62 * len(text)) * box for _, text in entries]  # swatch and words
        if not sheet:  # one panel: stacked at the top right
            left = g.width - max(widths) - 0.6 * box
            spots = [(left, g.height - 1.2 * box - k * 1.5 * box) for k in range(len(entries))]
        else:  # a sheet: side by side in the strip
            mid, x, spots = 0.5 * g.bottom + 0.5 * box, 0.02 * g.width, []
            for width in widths:
                spots.append((x, mid))
                x += width + 1.2 * box
        for (left, y), (colour, text) in zip(spots, entries, strict=True):
            rgb = (int(colour[0]), int(colour[1]), int(colour[2]))
            self.marks.append(Swatch(left, y - box, box, rgb))
            self.marks.append(
                Words(text, left + 1.4 * box, y - box / 2, SMALL_PT, "left", "center")
            )

    def rgba(self) -> np.ndarray:
        """Return the page as an (H, W, 4) uint8 array."""
        from orbviz.figures.paint import raster

        return np.asarray(raster(self))

    def encode(self, suffix: str) -> bytes:
        """Return the page as a PNG, TIFF, PDF or SVG file, with title and alt text as metadata."""
        from orbviz.figures.paint import encode_page

        return encode_page(self, suffix)
