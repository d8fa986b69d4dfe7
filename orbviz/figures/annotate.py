"""The 2D annotations drawn on a rendered figure: title, scale bar and phase wheel (Pillow).

Text is set in DejaVu Sans, which ships with matplotlib.
"""

from __future__ import annotations

import math
from pathlib import Path
from typing import Any

import numpy as np

from orbviz.surface.colors import phase_colors

__all__ = ["BOHR_IN_ANGSTROM", "annotate", "nice_length"]

BOHR_IN_ANGSTROM = 0.529177210544  # CODATA 2022; checked against scipy.constants in the tests
_INK = (20, 20, 20, 255)


def _font(size: int) -> Any:
    from PIL import ImageFont

    try:
        import matplotlib

        path = Path(matplotlib.__file__).parent / "mpl-data" / "fonts" / "ttf" / "DejaVuSans.ttf"
        return ImageFont.truetype(str(path), size)
    except (ImportError, OSError):
        return ImageFont.load_default(size)


def nice_length(length: float) -> float:
    """Return 1, 2 or 5 times a power of ten, not above ``length``."""
    power = 10 ** math.floor(math.log10(length))
    return max(s * power for s in (1, 2, 5) if s * power <= length)


def annotate(
    img: np.ndarray,
    *,
    title: str | None,
    scale_bar: str | None,
    bohr_per_pixel: float,
    phase_wheel: bool,
) -> np.ndarray:
    """Draw the title, scale bar and (for a complex state) phase wheel on an RGBA image.

    Parameters
    ----------
    img : (H, W, 4) ndarray of uint8
        The rendered image.
    title : str or None
        Text at the top left.
    scale_bar : {"angstrom", "bohr", None}
        Unit of the scale bar, or none.
    bohr_per_pixel : float
        The image's scale (orthographic view).
    phase_wheel : bool
        Draw the key of phase colours.
    """
    from PIL import Image, ImageDraw

    h, w = img.shape[:2]
    unit = max(0.35, min(w / 1600.0, h / 1200.0))
    canvas = Image.fromarray(img, "RGBA")
    draw = ImageDraw.Draw(canvas)
    if title:
        draw.text((int(40 * unit), int(30 * unit)), title, fill=_INK, font=_font(int(44 * unit)))
    if scale_bar:
        per_bohr = 1.0 / bohr_per_pixel
        per_unit = per_bohr / BOHR_IN_ANGSTROM if scale_bar == "angstrom" else per_bohr
        length = nice_length(0.22 * w / per_unit)
        bar = length * per_unit
        x0, y0 = w - int(60 * unit) - bar, h - int(70 * unit)
        draw.rectangle([x0, y0, x0 + bar - 1, y0 + int(8 * unit)], fill=_INK)  # bar pixels
        label = f"{length:g} {'Å' if scale_bar == 'angstrom' else 'bohr'}"
        font = _font(int(34 * unit))
        tw = draw.textlength(label, font=font)
        draw.text((x0 + bar / 2 - tw / 2, y0 - int(46 * unit)), label, fill=_INK, font=font)
    if phase_wheel:
        _phase_wheel(canvas, draw, unit)
    return np.asarray(canvas)


def _phase_wheel(canvas: Any, draw: Any, unit: float) -> None:
    """Draw a ring in the cyclic phase map at the top right, labelled arg psi."""
    from PIL import Image

    size = int(150 * unit)
    yy, xx = np.mgrid[0:size, 0:size] - (size - 1) / 2.0
    r = np.hypot(xx, yy) / (size / 2.0)
    angle = np.arctan2(-yy, xx)
    rgba = phase_colors(angle.ravel()).reshape(size, size, 4)
    rgba[..., 3] = np.where((r <= 1.0) & (r >= 0.55), 255, 0).astype(np.uint8)
    wheel = Image.fromarray(rgba, "RGBA")
    w, _ = canvas.size
    x0, y0 = w - size - int(50 * unit), int(50 * unit)
    canvas.alpha_composite(wheel, (x0, y0))
    font = _font(int(26 * unit))
    cx, cy = x0 + size / 2, y0 + size / 2
    for text, (dx, dy) in {"0": (1, 0), "π/2": (0, -1), "π": (-1, 0), "−π/2": (0, 1)}.items():
        tw = draw.textlength(text, font=font)
        px = cx + dx * (size / 2 + 8 * unit) - (tw if dx < 0 else 0 if dx > 0 else tw / 2)
        py = (
            cy
            + dy * (size / 2 + 6 * unit)
            - (int(30 * unit) if dy < 0 else 0 if dy > 0 else 14 * unit)
        )
        draw.text((px, py), text, fill=_INK, font=font)
    label = "arg ψ"
    tw = draw.textlength(label, font=font)
    draw.text((cx - tw / 2, cy - 14 * unit), label, fill=_INK, font=font)
