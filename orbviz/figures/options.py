"""The options of figures, plots and animations: one frozen dataclass each, one rule per option."""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from orbviz._defaults import DEFAULTS, DISPLAY_UNITS, LIMITS
from orbviz._options import boolean, choice, integer, number, option, text
from orbviz.errors import OptionError
from orbviz.figures.values import (
    VIEWS,
    background_colour,
    grid_layout,
    pixel_size,
    print_length,
    view_angles,
)
from orbviz.surface.colors import ColorPair
from orbviz.surface.options import colors_option, grid_option

__all__ = [
    "LIGHTING",
    "SET_VIEW",
    "VIEWS",
    "AnimationOptions",
    "FigureOptions",
    "PlotOptions",
    "background_colour",
    "MIN_PANEL_MM",
    "grid_layout",
    "page_layout",
    "pixel_size",
    "print_length",
    "view_angles",
]

SET_VIEW = (20.0, 55.0)  # d and f sets: lobes between the axes and along them look apart
LIGHTING = ("soft", "studio", "flat")
CUTS = ("half", "quarter")


def _image_option(default: tuple[int, int], help: str) -> Any:
    return option(default, f"{help}, 16 to 8192 a side", pixel_size, unit="pixels", metavar="WxH")


def _length_option(help: str) -> Any:
    """Return a printed width or height option: ``85mm``, ``8.5cm`` or ``3.35in``, kept in mm."""
    return option(None, help, print_length, metavar="LENGTH")


def _dpi_option(help: str) -> Any:
    return option(300, f"{help}, 72 to 2400", integer(72, 2400), metavar="N")


@dataclass(frozen=True)
class FigureOptions:
    """How a 3D figure looks.

    Attributes
    ----------
    grid : int, default: 128
        Samples per axis of the mesh.
    size : (int, int), default: (1600, 1200)
        Image width and height in pixels, before ``scale`` (with ``width``, only its aspect
        counts: a panel's shape).
    scale : float, default: 1
        Resolution multiplier (2 for print).
    width, height : float or None, default: None
        Printed width and height in mm (given as ``85mm``, ``8.5cm``, ``3.35in``); with
        ``dpi`` they set the pixels. Without height it follows from the layout.
    dpi : int, default: 300
        Resolution at the printed size; written into the file's resolution tags.
    view : (float, float) or None, default: None
        Camera azimuth from +x towards +y and elevation above the xy plane, degrees. None:
        ``iso`` (35, 25), or (20, 55) for a sheet of d or f orbitals that differ by orientation.
    transparent : bool, default: False
        Transparent background (PNG alpha).
    background : str, default: "white"
        Background colour (name or #RRGGBB) when not transparent.
    axes : bool, default: True
        Draw an axes triad in the corner.
    axis_lines : bool or None, default: None
        Draw labelled x, y and z axes through the nucleus; None: on for sheets of a set whose
        members differ by orientation (2p, 3d, 4f, hybrids).
    scale_bar : bool, default: True
        Draw a scale bar.
    units : {"angstrom", "bohr"}, default: "angstrom"
        Length unit of the scale bar (and of sizes in the alt text).
    key : bool, default: True
        Draw the key of the phase colours (psi > 0 / psi < 0, or the phase wheel).
    title : str or None
        Text at the top left.
    labels : {"letters", "specs", "none"}, default: "letters"
        Panel labels of a sheet: "(a) 3dxy", "3dxy", or none.
    layout : (int, int) or None, default: None
        Columns and rows of a sheet's panels; None chooses them.
    overlay : bool, default: False
        Draw a set's members in one panel, each in its own colour, instead of a sheet.
    lighting : {"soft", "studio", "flat"}, default: "soft"
        Lighting preset.
    nodes : bool, default: False
        Draw radial and angular nodal surfaces translucent.
    cut : {None, "half", "quarter"}
        Cut away the half x > 0 or the quarter x > 0, y > 0 (facing the iso camera).
    outer : float or None
        Also draw a translucent surface enclosing this (larger) fraction.
    extent : float or None
        Half-width in bohr of the region shown (and of the sampling box), for comparable sets.
    style : {"surface", "cloud", "volume"}, default: "surface"
        The enclosing surface; a cloud of dots drawn exactly as |psi|^2; or a translucent
        volume of |psi|^2 coloured by phase.
    points : int, default: 40000
        Dots of a cloud (1000 to 10^6).
    colors : pair of RGBA
        Phase colours of a real state.
    """

    grid: int = grid_option()
    size: tuple[int, int] = _image_option(DEFAULTS.image_size, "image size")
    scale: float = option(
        1.0, "resolution multiplier, 0.25 to 8 (2 for print)", number(0.25, 8.0), metavar="K"
    )
    width: float | None = _length_option(
        "printed width, 10 to 1000 mm, as 85mm, 8.5cm or 3.35in (sets the pixels with --dpi)"
    )
    height: float | None = _length_option("printed height, as --width (default: from the layout)")
    dpi: int = _dpi_option("resolution at the printed size")
    view: tuple[float, float] | None = option(
        None,
        "camera direction: iso, x, y, z, or AZ,EL in degrees (default: iso; 20,55 for sheets "
        "of d and f sets, which shows the lobes between the axes apart from those along them)",
        lambda raw: None if raw is None else view_angles(raw),
        metavar="VIEW",
    )
    transparent: bool = option(False, "transparent background (PNG alpha)", boolean())
    background: str = option(
        "white", "background colour, a name or #RRGGBB", background_colour, metavar="COLOUR"
    )
    axes: bool = option(True, "leave out the axes triad", boolean(), flag="--no-axes", negate=True)
    axis_lines: bool | None = option(
        None,
        "draw labelled x, y, z axes through the nucleus (default: on for sheets of sets that "
        "differ by orientation, such as 3d)",
        lambda raw: None if raw is None else boolean()(raw),
        switch=True,
    )
    scale_bar: bool = option(
        True, "leave out the scale bar", boolean(), flag="--no-scale-bar", negate=True
    )
    units: str = option(
        DEFAULTS.display_units,
        "length unit of the scale bar and the alt text",
        choice(*DISPLAY_UNITS),
        metavar="{angstrom,bohr}",
    )
    key: bool = option(
        True, "leave out the key of phase colours", boolean(), flag="--no-key", negate=True
    )
    title: str | None = option(
        None, "a title at the top left", text(200, allow_none=True), metavar="TEXT"
    )
    labels: str = option(
        "letters",
        "panel labels of a sheet: (a) 3dxy, 3dxy, or none",
        choice("letters", "specs", "none"),
        metavar="{letters,specs,none}",
    )
    layout: tuple[int, int] | None = option(
        None, "columns and rows of a sheet, like 3x2 (default: chosen)", grid_layout, metavar="CxR"
    )
    overlay: bool = option(
        False, "draw a set's members in one panel, each in its own colour", boolean()
    )
    lighting: str = option(
        "soft", "lighting preset", choice(*LIGHTING), metavar="{soft,studio,flat}"
    )
    nodes: bool = option(False, "draw the radial and angular nodal surfaces translucent", boolean())
    cut: str | None = option(
        None,
        "cut away x > 0 (half) or x > 0, y > 0 (quarter)",
        choice(*CUTS, allow_none=True),
        metavar="{half,quarter}",
    )
    outer: float | None = option(
        None,
        "add a translucent surface enclosing this larger fraction",
        number(LIMITS.fraction_min, LIMITS.fraction_max, allow_none=True),
        metavar="F",
    )
    extent: float | None = option(
        None,
        "fix the box and the view to this half-width (comparable sets)",
        number(0.0, LIMITS.extent_max, low_open=True, allow_none=True, unit="bohr"),
        unit="bohr",
        metavar="L",
    )
    style: str = option(
        "surface",
        "draw the enclosing surface, a cloud of dots sampled exactly from |psi|^2, or a "
        "translucent volume of |psi|^2",
        choice("surface", "cloud", "volume"),
        metavar="{surface,cloud,volume}",
    )
    points: int = option(
        40_000, "dots of a cloud figure, 1000 to 1000000", integer(1000, 1_000_000), metavar="N"
    )
    colors: ColorPair = colors_option()

    def relations(self) -> list[tuple[str, str]]:
        """Cross-option problems: the image's total size (of one panel's page)."""
        w, h = self.pixels
        if w * h / 1e6 > LIMITS.image_megapixels:
            return [
                (
                    "dpi" if self.width else "scale",
                    f"the image would be {w * h / 1e6:.0f} megapixels; at most "
                    f"{LIMITS.image_megapixels:g}",
                )
            ]
        return []

    @property
    def pixels(self) -> tuple[int, int]:
        """Width and height of a one-panel figure's image, in pixels."""
        w, h = self.size
        if self.width is None:
            page_w = w * self.scale
        else:
            page_w = self.width / 25.4 * self.dpi
        page_h = self.height / 25.4 * self.dpi if self.height is not None else page_w * h / w
        return int(round(page_w)), int(round(page_h))

    @property
    def page_dpi(self) -> float:
        """Pixels per inch: ``dpi`` at a printed size; else text scales with the image.

        Without a printed width, 1600 pixels count as 5.33 inches (300 dpi), so a point of
        text is the same share of the image at every pixel size.
        """
        if self.width is not None:
            return float(self.dpi)
        return 300.0 * self.size[0] * self.scale / DEFAULTS.image_size[0]


@dataclass(frozen=True)
class PlotOptions:
    """A 2D companion plot.

    Attributes
    ----------
    kind : {"slice", "radial", "dots"}
        A density slice through the nucleus, the radial distribution, or a dot-density
        figure: exact samples of |psi|^2 projected on the plane (or a slab of it).
    plane : {"xz", "xy", "yz"} or None, default: None
        The slice's plane; None chooses, for each state, the one of the three holding the most
        probability (xz on a tie), so that 3dxy is not sliced along its nodal plane.
    quantity : {"density", "psi"}, default: "density"
        A slice of |psi|^2 (log scale), or of the signed psi on a diverging map.
    units : {"angstrom", "bohr"}, default: "angstrom"
        Length unit of the axes.
    extent : float or None
        Half-width of the slice in bohr (default: 1.15 times the surface's reach).
    title : str or None
        Axes title.
    width, height : float or None, default: None
        Printed size in mm (given as ``85mm``, ``8.5cm``, ``3.35in``); the text keeps its point
        sizes. Default: 6.4 in wide for a radial plot, 3.4 in per slice panel.
    dpi : int, default: 300
        Resolution of PNG and TIFF output (and of PDF/SVG raster parts), written into the file.
    slab : float or None, default: None
        Dots: keep only the samples within half this thickness of the plane, bohr; None
        projects them all.
    points : int, default: 20000
        Dots drawn (1000 to 10^6).
    """

    kind: str = option(
        "slice",
        "a slice through the nucleus, the radial distribution, or dots sampled from |psi|^2",
        choice("slice", "radial", "dots"),
        metavar="{slice,radial,dots}",
    )
    plane: str | None = option(
        None,
        "plane of a slice (default: of xz, xy and yz the one holding the most probability, xz on "
        "a tie)",
        choice("xz", "xy", "yz", allow_none=True),
        metavar="{xz,xy,yz}",
    )
    quantity: str = option(
        "density",
        "what a slice shows: |psi|^2 (log scale) or the signed psi in the phase colours",
        choice("density", "psi"),
        metavar="{density,psi}",
    )
    units: str = option(
        DEFAULTS.display_units,
        "length unit of the axes",
        choice(*DISPLAY_UNITS),
        metavar="{angstrom,bohr}",
    )
    extent: float | None = option(
        None,
        "half-width of the slice (default: 1.15 times the surface's reach)",
        number(0.0, LIMITS.extent_max, low_open=True, allow_none=True, unit="bohr"),
        unit="bohr",
        metavar="L",
    )
    title: str | None = option(
        None,
        "the plot's title (default: the orbital's label)",
        text(200, allow_none=True),
        metavar="TEXT",
    )
    width: float | None = _length_option(
        "printed width, 10 to 1000 mm, as 85mm, 8.5cm or 3.35in (default: from the kind)"
    )
    height: float | None = _length_option("printed height, as --width (default: from the width)")
    dpi: int = _dpi_option("resolution of PNG and TIFF output")
    slab: float | None = option(
        None,
        "dots: only those within half this thickness of the plane (default: all, projected)",
        number(0.0, LIMITS.extent_max, low_open=True, allow_none=True, unit="bohr"),
        unit="bohr",
        metavar="T",
    )
    points: int = option(
        20_000, "dots drawn, 1000 to 1000000", integer(1000, 1_000_000), metavar="N"
    )

    def inches(self, natural: tuple[float, float]) -> tuple[float, float]:
        """Return the printed size in inches: the options' width and height, else ``natural``.

        Raises
        ------
        OptionError
            When the size at ``dpi`` exceeds the image limit (LIMITS.image_megapixels).
        """
        width = natural[0] if self.width is None else self.width / 25.4
        if self.height is not None:
            height = self.height / 25.4
        else:
            height = natural[1] * width / natural[0]
        megapixels = width * height * self.dpi**2 / 1e6
        if megapixels > LIMITS.image_megapixels:
            raise OptionError(
                "size",
                f"{width * 25.4:.0f} x {height * 25.4:.0f} mm at {self.dpi} dpi is "
                f"{megapixels:.0f} megapixels; at most {LIMITS.image_megapixels:g} (lower the "
                "width or the dpi)",
            )
        return width, height


@dataclass(frozen=True)
class AnimationOptions:
    """A superposition in motion.

    Attributes
    ----------
    frames : int, default: 24
        Frames over the whole animation.
    periods : float, default: 1
        Beat periods shown.
    seconds : float, default: 3
        Playing time of one pass (GIF, MP4, animated GLB).
    grid : int, default: 96
        Samples per axis of each frame's mesh.
    size : (int, int), default: (800, 600)
        Frame size in pixels.
    colors : pair of RGBA
        Phase colours (a complex state's frames are coloured by phase angle).
    """

    frames: int = option(
        24, "frames over the whole animation, 2 to 600", integer(2, LIMITS.frames_max), metavar="N"
    )
    periods: float = option(
        1.0, "beat periods shown, up to 100", number(0.0, 100.0, low_open=True), metavar="P"
    )
    seconds: float = option(
        3.0,
        "playing time of one pass (GIF, MP4, GLB), 0.1 to 600",
        number(0.1, 600.0, unit="s"),
        unit="s",
        metavar="S",
    )
    grid: int = grid_option(DEFAULTS.animation_grid)
    size: tuple[int, int] = _image_option((800, 600), "frame size")
    colors: ColorPair = colors_option()

    def relations(self) -> list[tuple[str, str]]:
        """Cross-option problems: the frames must fit in memory (8 bytes a pixel)."""
        w, h = self.size
        gigabytes = self.frames * w * h * 8 / 1e9
        if gigabytes > 4.0:
            return [
                (
                    "frames",
                    f"{self.frames} frames of {w}x{h} need {gigabytes:.1f} GB; at most 4 GB: "
                    "use fewer {frames} or a smaller {size}",
                )
            ]
        return []


MIN_PANEL_MM = 25.0  # narrowest printed panel whose 6-8 pt labels, key and scale bar fit


def page_layout(count: int, options: FigureOptions) -> tuple[int, int]:
    """Return the (columns, rows) of a page of ``count`` panels.

    The options' layout, checked, or one chosen for the count.

    Raises
    ------
    OptionError
        For a layout that cannot hold the panels or leaves a row or column empty, or a printed
        width that gives a panel less than MIN_PANEL_MM.
    """
    if options.layout is not None:
        cols, rows = options.layout
        panels = f"{count} panel{'s' * (count != 1)}"
        if cols * rows < count:
            raise OptionError("layout", f"{cols}x{rows} holds {cols * rows}, not {panels}")
        if (cols - 1) * rows >= count or cols * (rows - 1) >= count:
            raise OptionError(
                "layout", f"{cols}x{rows} leaves a whole row or column empty for {panels}"
            )
    else:
        cols = {1: 1, 2: 2, 3: 3, 4: 2, 5: 3, 6: 3, 9: 3}.get(count, 4)
        rows = -(-count // cols)
    if options.width is not None and options.width / cols < MIN_PANEL_MM:
        raise OptionError(
            "width",
            f"{options.width:.0f} mm gives {options.width / cols:.0f} mm a panel across {cols} "
            f"column(s); at least {MIN_PANEL_MM:g} mm a panel, so that its 6-8 pt labels fit",
        )
    return cols, rows
