"""Drawing a page's marks: Pillow for PNG and TIFF, matplotlib for PDF and SVG.

Both painters draw the same marks (:mod:`orbviz.figures.marks`) at the page's size: pictures
stretched to their boxes, words in DejaVu Sans at their size in points, swatches with a 0.5 pt
ink edge, and the scale bar's rule. Pillow makes the raster pages without importing a plotting
library (0.5 s saved on every PNG); matplotlib keeps the text of PDF and SVG as text. The files
carry the resolution, the title and the alt text as metadata.
"""

from __future__ import annotations

import functools
import importlib.util
import io
from pathlib import Path
from typing import TYPE_CHECKING, Any

import numpy as np

from orbviz import __version__
from orbviz.figures.marks import INK, Picture, Rule, Swatch, Words

if TYPE_CHECKING:
    from PIL import Image as PILImage

    from orbviz.figures.page import Page

__all__ = ["encode_figure", "encode_page", "encode_raster", "raster"]

_EDGE_PT = 0.5  # a swatch's ink edge
_PNG_LEVEL = 3  # zlib: half the time of the default 6 for ~40% more bytes (1600 x 1200 3dz2)
_ANCHOR_X = {"left": "l", "center": "m", "right": "r"}
# matplotlib's "bottom" takes in the descenders; Pillow's "d" is that line, "b" the glyphs' own
_ANCHOR_Y = {"top": "t", "center": "m", "bottom": "d", "baseline": "s"}


def _font_file() -> Path:
    """DejaVu Sans, from matplotlib's data (found without importing matplotlib)."""
    spec = importlib.util.find_spec("matplotlib")
    if spec is None or spec.origin is None:  # matplotlib is a dependency: not reached
        raise ImportError("matplotlib is needed for its DejaVu Sans font")
    return Path(spec.origin).parent / "mpl-data" / "fonts" / "ttf" / "DejaVuSans.ttf"


@functools.lru_cache(maxsize=16)
def _font(pixels: float) -> Any:
    from PIL import ImageFont

    return ImageFont.truetype(str(_font_file()), size=max(1.0, pixels))  # FreeType: ppem ≥ 1


def raster(page: Page) -> PILImage.Image:
    """Draw the page with Pillow; return an RGBA image of its pixel size."""
    from PIL import Image, ImageColor, ImageDraw

    width, height = page.pixels
    points = page.dpi / 72.0  # pixels per point
    if page.options.transparent:
        canvas = Image.new("RGBA", (width, height), (0, 0, 0, 0))
    else:
        canvas = Image.new("RGBA", (width, height), ImageColor.getrgb(page.options.background))
    ink = Image.new("L", (width, height), 0)  # every ink mark, composited once at the end
    pen, brush = ImageDraw.Draw(ink), ImageDraw.Draw(canvas)

    def flip(y: float) -> float:
        return height - y

    for mark in page.marks:
        if isinstance(mark, Picture):
            box = (round(mark.width), round(mark.height))
            picture = Image.fromarray(np.ascontiguousarray(mark.rgba), "RGBA")
            if picture.size != box:
                way = Image.Resampling.BILINEAR if mark.smooth else Image.Resampling.NEAREST
                picture = picture.resize(box, way)
            top = round(flip(mark.bottom + mark.height))
            canvas.alpha_composite(picture, (round(mark.left), top))
        elif isinstance(mark, Words):
            anchor = _ANCHOR_X[mark.ha] + _ANCHOR_Y[mark.va]
            font = _font(mark.size * points)
            pen.text((mark.x, flip(mark.y)), mark.text, fill=255, font=font, anchor=anchor)
        elif isinstance(mark, Swatch):  # Pillow's boxes include both end pixels
            side = max(1, round(mark.size))
            left, top = round(mark.left), round(flip(mark.bottom + mark.size))
            square = [left, top, left + side - 1, top + side - 1]
            brush.rectangle(square, fill=(*mark.colour, 255))
            pen.rectangle(square, outline=255, width=max(1, round(_EDGE_PT * points)))
        elif isinstance(mark, Rule):
            thick = max(1, round(mark.width * points))
            top = round(flip(mark.y) - thick / 2)
            x0 = round(mark.x0)
            x1 = max(x0, round(mark.x1) - 1)  # at least one pixel wide
            pen.rectangle([x0, top, x1, top + thick - 1], fill=255)
    colour = Image.new("RGBA", (width, height), (*INK, 255))
    colour.putalpha(ink)
    canvas.alpha_composite(colour)
    return canvas


def _vector(page: Page) -> Any:
    """Draw the page with matplotlib; return the figure (one axes in page pixels)."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure
    from matplotlib.patches import Rectangle
    from PIL import ImageColor

    width, height = page.pixels
    ink = tuple(c / 255 for c in INK)
    figure = Figure(figsize=(width / page.dpi, height / page.dpi), dpi=page.dpi)
    FigureCanvasAgg(figure)
    figure.patch.set_alpha(0.0 if page.options.transparent else 1.0)
    # any colour Pillow reads (hsl(...) included), as matplotlib's 0-1 RGB
    red, green, blue = ImageColor.getrgb(page.options.background)[:3]
    figure.patch.set_facecolor((red / 255, green / 255, blue / 255))
    ax = figure.add_axes((0.0, 0.0, 1.0, 1.0), facecolor="none")
    ax.set_xlim(0, width)
    ax.set_ylim(0, height)
    ax.set_axis_off()
    for mark in page.marks:
        if isinstance(mark, Picture):
            h, w = mark.rgba.shape[:2]
            exact = (w, h) == (mark.width, mark.height) and float(mark.left).is_integer()
            if exact and float(mark.bottom).is_integer():  # pixel for pixel: no resampling
                figure.figimage(
                    mark.rgba, xo=int(mark.left), yo=int(mark.bottom), origin="upper", zorder=-1
                )
            else:
                extent = (mark.left, mark.left + mark.width, mark.bottom, mark.bottom + mark.height)
                way = "bilinear" if mark.smooth else "none"
                ax.imshow(mark.rgba, extent=extent, interpolation=way, aspect="auto")
        elif isinstance(mark, Words):
            ax.text(
                mark.x, mark.y, mark.text, ha=mark.ha, va=mark.va, fontsize=mark.size, color=ink
            )
        elif isinstance(mark, Swatch):
            square = Rectangle(
                (mark.left, mark.bottom),
                mark.size,
                mark.size,
                facecolor=tuple(c / 255 for c in mark.colour),
                edgecolor=ink,
                linewidth=_EDGE_PT,
            )
            ax.add_patch(square)
        elif isinstance(mark, Rule):
            ys = [mark.y, mark.y]
            ax.plot([mark.x0, mark.x1], ys, color=ink, linewidth=mark.width, solid_capstyle="butt")
    ax.set_xlim(0, width)  # imshow may have moved them
    ax.set_ylim(0, height)
    return figure


def encode_figure(
    figure: Any,
    suffix: str,
    *,
    dpi: float,
    title: str = "",
    alt_text: str = "",
    transparent: bool = False,
) -> bytes:
    """Encode a matplotlib figure as PNG, TIFF, PDF or SVG with its resolution and metadata.

    Parameters
    ----------
    figure : matplotlib.figure.Figure
        The page (an Agg canvas is attached if it has none).
    suffix : str
        ``.png``, ``.tiff``/``.tif``, ``.pdf`` or ``.svg``.
    dpi : float
        Pixels per inch: the raster size, and the resolution tags written.
    title, alt_text : str
        The figure's title and description: PNG ``Title``/``Description`` text chunks, TIFF
        ImageDescription, PDF ``Title``/``Subject``, SVG ``title``/``desc``.
    transparent : bool, default: False
        Transparent background (PNG, TIFF).

    Returns
    -------
    bytes
        The file's contents; text stays text in PDF (TrueType fonts) and SVG.
    """
    import matplotlib

    suffix = suffix.lower()
    software = f"orbviz {__version__}"
    if suffix in (".tiff", ".tif"):
        from matplotlib.backends.backend_agg import FigureCanvasAgg
        from PIL import Image

        canvas = FigureCanvasAgg(figure)
        figure.set_dpi(dpi)
        canvas.draw()
        picture = Image.fromarray(np.asarray(canvas.buffer_rgba()).copy(), "RGBA")
        return encode_raster(
            picture, suffix, dpi=dpi, title=title, alt_text=alt_text, transparent=transparent
        )
    metadata = {
        ".png": {"Title": title, "Description": alt_text, "Software": software},
        ".pdf": {"Title": title, "Subject": alt_text, "Creator": software},
        ".svg": {"Title": title, "Description": alt_text, "Creator": software},
    }[suffix]
    buffer = io.BytesIO()
    with matplotlib.rc_context({"svg.fonttype": "none", "pdf.fonttype": 42}):
        extra = {"pil_kwargs": {"compress_level": _PNG_LEVEL}} if suffix == ".png" else {}
        figure.savefig(
            buffer,
            format=suffix[1:],
            dpi=dpi,
            metadata=metadata,
            transparent=transparent,
            **extra,
        )
    return buffer.getvalue()


def encode_page(page: Page, suffix: str) -> bytes:
    """Return the page as a PNG or TIFF (Pillow) or a PDF or SVG (matplotlib)."""
    suffix = suffix.lower()
    title, alt_text = page.options.title or "", page.alt_text
    if suffix in (".pdf", ".svg"):
        figure = _vector(page)
        return encode_figure(figure, suffix, dpi=page.dpi, title=title, alt_text=alt_text)
    return encode_raster(
        raster(page),
        suffix,
        dpi=page.dpi,
        title=title,
        alt_text=alt_text,
        transparent=page.options.transparent,
    )


def encode_raster(
    picture: PILImage.Image,
    suffix: str,
    *,
    dpi: float,
    title: str = "",
    alt_text: str = "",
    transparent: bool = False,
) -> bytes:
    """Encode an RGBA image as PNG (text chunks, pHYs) or TIFF (LZW, resolution tags)."""
    from PIL import PngImagePlugin

    software = f"orbviz {__version__}"
    if not transparent:
        picture = picture.convert("RGB")
    buffer = io.BytesIO()
    if suffix in (".tiff", ".tif"):
        info = {270: alt_text, 305: software}
        picture.save(buffer, format="TIFF", compression="tiff_lzw", dpi=(dpi, dpi), tiffinfo=info)
        return buffer.getvalue()
    chunks = PngImagePlugin.PngInfo()
    for key, value in (("Title", title), ("Description", alt_text), ("Software", software)):
        if value:
            chunks.add_text(key, value)
    picture.save(buffer, format="PNG", pnginfo=chunks, dpi=(dpi, dpi), compress_level=_PNG_LEVEL)
    return buffer.getvalue()
