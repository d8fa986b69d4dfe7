"""The options of figures, plots and animations: one frozen dataclass each, one rule per option."""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from orbviz._defaults import DEFAULTS, LIMITS
from orbviz._options import boolean, choice, integer, number, option, text
from orbviz.surface.colors import ColorPair
from orbviz.surface.options import colors_option, grid_option

__all__ = [
    "LIGHTING",
    "VIEWS",
    "AnimationOptions",
    "FigureOptions",
    "PlotOptions",
    "background_colour",
    "pixel_size",
    "view_angles",
]

VIEWS = {"iso": (35.0, 25.0), "x": (0.0, 0.0), "y": (90.0, 0.0), "z": (0.0, 90.0)}
LIGHTING = ("soft", "studio", "flat")
CUTS = ("half", "quarter")


def view_angles(raw: Any) -> tuple[float, float]:
    """``iso``, ``x``, ``y``, ``z``, ``AZ,EL`` in degrees or an (az, el) pair -> (az, el)."""
    rule = "expected iso, x, y, z or AZ,EL in degrees (elevation -90 to 90)"
    if isinstance(raw, str) and raw.strip().lower() in VIEWS:
        return VIEWS[raw.strip().lower()]
    parts: list[Any] = (
        raw.split(",")
        if isinstance(raw, str)
        else list(raw)
        if isinstance(raw, (tuple, list))
        else []
    )
    try:
        az, el = (float(v) for v in parts)
    except (TypeError, ValueError):
        raise ValueError(f"{rule}, got {raw!r}") from None
    if not (math.isfinite(az) and math.isfinite(el) and -90 <= el <= 90 and abs(az) <= 3600):
        raise ValueError(f"{rule}, got {raw!r}")
    return az, el


def pixel_size(raw: Any) -> tuple[int, int]:
    """``WIDTHxHEIGHT`` text or a (width, height) pair of pixels, each side in range."""
    low, high = LIMITS.image_side_min, LIMITS.image_side_max
    rule = f"expected WIDTHxHEIGHT in pixels like 1600x1200, each side {low} to {high}"
    if isinstance(raw, str):
        parts: list[Any] = raw.lower().split("x")
    elif isinstance(raw, (tuple, list)):
        parts = list(raw)
    else:
        parts = []
    try:
        if len(parts) != 2 or any(isinstance(v, (bool, float)) for v in parts):
            raise ValueError
        w, h = (int(v) for v in parts)
    except (TypeError, ValueError):
        raise ValueError(f"{rule}, got {raw!r}") from None
    if not (low <= w <= high and low <= h <= high):
        raise ValueError(f"{rule}, got {raw!r}")
    return w, h


def background_colour(raw: Any) -> str:
    """Return a colour name or ``#RRGGBB`` (CSS names, as Pillow knows them)."""
    from PIL import ImageColor

    if isinstance(raw, str) and len(raw) <= 40:
        try:
            ImageColor.getrgb(raw.strip())
            return raw.strip()
        except ValueError:
            pass
    raise ValueError(f"expected a colour name or #RRGGBB, got {raw!r}")


def _image_option(default: tuple[int, int], help: str) -> Any:
    return option(default, f"{help}, 16 to 8192 a side", pixel_size, unit="pixels", metavar="WxH")


@dataclass(frozen=True)
class FigureOptions:
    """How a 3D figure looks.

    Attributes
    ----------
    grid : int, default: 128
        Samples per axis of the mesh.
    size : (int, int), default: (1600, 1200)
        Image width and height in pixels, before ``scale``.
    scale : float, default: 1
        Resolution multiplier (2 for print).
    view : (float, float), default: iso
        Camera azimuth from +x towards +y and elevation above the xy plane, degrees.
    transparent : bool, default: False
        Transparent background (PNG alpha).
    background : str, default: "white"
        Background colour (name or #RRGGBB) when not transparent.
    axes : bool, default: True
        Draw an axes triad.
    scale_bar : {"angstrom", "bohr", None}, default: "angstrom"
        Scale bar unit, or none.
    title : str or None
        Text at the top left.
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
    colors : pair of RGBA
        Phase colours of a real state.
    """

    grid: int = grid_option()
    size: tuple[int, int] = _image_option(DEFAULTS.image_size, "image size")
    scale: float = option(
        1.0, "resolution multiplier, 0.25 to 8 (2 for print)", number(0.25, 8.0), metavar="K"
    )
    view: tuple[float, float] = option(
        VIEWS["iso"],
        "camera direction: iso, x, y, z, or AZ,EL in degrees",
        view_angles,
        metavar="VIEW",
    )
    transparent: bool = option(False, "transparent background (PNG alpha)", boolean())
    background: str = option(
        "white", "background colour, a name or #RRGGBB", background_colour, metavar="COLOUR"
    )
    axes: bool = option(True, "leave out the axes triad", boolean(), flag="--no-axes", negate=True)
    scale_bar: str | None = option(
        "angstrom",
        "scale bar unit",
        choice("angstrom", "bohr", allow_none=True),
        metavar="{angstrom,bohr,none}",
    )
    title: str | None = option(
        None, "a title at the top left", text(200, allow_none=True), metavar="TEXT"
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
    colors: ColorPair = colors_option()

    def relations(self) -> list[tuple[str, str]]:
        """Cross-option problems: the image's total size."""
        w, h = self.size
        megapixels = w * h * self.scale**2 / 1e6
        if megapixels > LIMITS.image_megapixels:
            return [
                (
                    "scale",
                    f"the image would be {megapixels:.0f} megapixels; at most "
                    f"{LIMITS.image_megapixels:g} after {{scale}}",
                )
            ]
        return []

    @property
    def pixels(self) -> tuple[int, int]:
        """Width and height of the rendered image, after ``scale``."""
        w, h = self.size
        return int(round(w * self.scale)), int(round(h * self.scale))


@dataclass(frozen=True)
class PlotOptions:
    """A 2D companion plot.

    Attributes
    ----------
    kind : {"slice", "radial"}
        A density slice through the nucleus, or the radial distribution.
    plane : {"xz", "xy", "yz"}, default: "xz"
        The slice's plane.
    extent : float or None
        Half-width of the slice in bohr (default: 1.15 times the surface's reach).
    title : str or None
        Axes title.
    """

    kind: str = option(
        "slice",
        "a slice through the nucleus, or the radial distribution",
        choice("slice", "radial"),
        metavar="{slice,radial}",
    )
    plane: str = option("xz", "plane of a slice", choice("xz", "xy", "yz"), metavar="{xz,xy,yz}")
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
