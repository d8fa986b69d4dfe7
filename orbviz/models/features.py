"""Relief on a printed model: phase marks on the lobes and a text label on the stand.

A mark is a "+" on a positive lobe and a "-" on a negative one, at the lobe's point farthest
from the nucleus, so that the phase reads by touch and in one colour. The glyph is a flat
extrusion sunk into the surface far enough to meet it everywhere under the glyph (a curved lobe
falls away from a flat glyph) and standing ``relief`` above it at its foot, or, engraved, cut
that deep. Labels are text from the DejaVu Sans font that ships with matplotlib.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

from orbviz.models.solids import arrays, pieces

__all__ = [
    "LABEL_RELIEF_MM",
    "MARK_RELIEF_MM",
    "Mark",
    "add_marks",
    "check_text",
    "frame",
    "text_solid",
]

MARK_RELIEF_MM = 1.0  # height of a mark above the lobe at its foot (at least 1 mm to feel it)
LABEL_RELIEF_MM = 0.8  # height of stand lettering (common FDM practice, no source)
SIGNS = {"positive": 1, "negative": -1}


@dataclass(frozen=True)
class Mark:
    """One phase mark on a lobe (lengths in mm, in the model's frame).

    Attributes
    ----------
    part : str
        The colour part it was added to (``positive`` or ``negative``).
    sign : int
        +1 for "+", -1 for "-".
    foot : ndarray
        The lobe's surface point under the glyph's centre.
    normal : ndarray
        The outward direction the glyph faces.
    size, stroke, relief : float
        Arm length, stroke width and height (depth if engraved) at the foot.
    """

    part: str
    sign: int
    foot: np.ndarray
    normal: np.ndarray
    size: float
    stroke: float
    relief: float


def frame(normal: np.ndarray, up: np.ndarray | None = None) -> np.ndarray:
    """Return a rotation whose third column is ``normal`` and second points along ``up``.

    The first two columns span the plane across ``normal``; ``up`` (default +z, else +x when
    ``normal`` is near z) is projected into that plane.
    """
    n = normal / np.linalg.norm(normal)
    guess = np.array([0.0, 0.0, 1.0]) if up is None else np.asarray(up, float)
    if abs(float(guess @ n)) > 0.95 * np.linalg.norm(guess):
        guess = np.array([1.0, 0.0, 0.0]) if abs(n[0]) < 0.9 else np.array([0.0, 1.0, 0.0])
    v = guess - (guess @ n) * n
    v /= np.linalg.norm(v)
    return np.column_stack([np.cross(v, n), v, n])


def _placed(solid: Any, rotation: np.ndarray, origin: np.ndarray) -> Any:
    """Return ``solid`` turned by ``rotation`` and moved to ``origin``."""
    matrix = np.column_stack([rotation, origin])
    return solid.transform(matrix.tolist())


def _glyph(sign: int, size: float, stroke: float, low: float, high: float) -> Any:
    """Make a "+" (sign 1) or "-" (sign -1) of arm ``size``, in z from ``low`` to ``high``."""
    import manifold3d

    def bar(width: float, height: float) -> Any:
        box = manifold3d.Manifold.cube((width, height, high - low))
        return box.translate((-width / 2, -height / 2, low))

    across = bar(size, stroke)
    return across + bar(stroke, size) if sign > 0 else across


def _about(solid: Any, centre: np.ndarray, factor: float) -> Any:
    """Return ``solid`` scaled by ``factor`` about ``centre``."""
    return solid.translate(tuple(-centre)).scale((factor,) * 3).translate(tuple(centre))


def _sag(piece: Any, foot: np.ndarray, rotation: np.ndarray, arm: float) -> float:
    """Return how far the lobe falls below the glyph's plane at the ends of its arms."""
    normal = rotation[:, 2]
    sag = 0.0
    for du, dv in ((1, 0), (-1, 0), (0, 1), (0, -1)):
        start = foot + arm * (du * rotation[:, 0] + dv * rotation[:, 1]) + 5 * arm * normal
        hits = piece.ray_cast(tuple(start), tuple(start - 20 * arm * normal))
        if hits:
            sag = max(sag, float((foot - np.asarray(hits[0].position)) @ normal))
    return max(sag, 0.0)


def _mark_piece(
    piece: Any, name: str, style: str, min_feature: float, relief: float, foot: np.ndarray
) -> tuple[Any, Mark] | None:
    """Return the glyph solid and its mark for one lobe, or None if the lobe is too small.

    The glyph is a deep extrusion cut to a copy of the lobe scaled about its middle so that
    its surface stands ``relief`` out at the foot (embossed), or to the layer between that
    surface and one ``relief`` in (engraved): it follows the lobe's curve.
    """
    vertices, _ = arrays(piece)
    centre = vertices.mean(axis=0)
    reach = float(np.linalg.norm(foot - centre))
    normal = (foot - centre) / reach if reach > 1e-6 else foot / np.linalg.norm(foot)
    extent = float(np.sort(np.ptp(vertices, axis=0))[1])  # the lobe's middle dimension
    size = min(0.35 * extent, 15.0)
    stroke = max(min_feature, 0.2 * size)
    if size < 3 * stroke or reach <= 2 * relief:
        return None
    rotation = frame(normal)
    if style == "engraved":  # a groove as deep as the lobe falls away under the arms, plus relief
        sag = _sag(piece, foot, rotation, 0.5 * size)
        low = -min(relief + sag, 0.5 * size)
        solid = _placed(_glyph(SIGNS[name], size, stroke, low, 2 * relief), rotation, foot)
    else:
        deep = _placed(_glyph(SIGNS[name], size, stroke, -0.5 * size, 2 * relief), rotation, foot)
        solid = deep ^ _about(piece, centre, (reach + relief) / reach)
    return solid, Mark(name, SIGNS[name], foot, normal, size, stroke, relief)


def _feet(piece: Any) -> list[np.ndarray]:
    """Return where a mark may go: the point farthest from the nucleus, then others.

    The others are the lobe's outermost points towards -y, +x, -x and +y (a lower lobe's
    tip faces the stand).
    """
    vertices, _ = arrays(piece)
    feet = [vertices[int(np.argmax(np.linalg.norm(vertices, axis=1)))]]
    for axis, sign in ((1, -1.0), (0, 1.0), (0, -1.0), (1, 1.0)):
        feet.append(vertices[int(np.argmax(sign * vertices[:, axis]))])
    return feet


def _covered(mark: Mark, rest: Any) -> bool:
    """Return whether another part lies in front of the glyph (an inner shell's mark)."""
    rotation = frame(mark.normal)
    reach = 1e4
    for du, dv in ((0, 0), (1, 0), (-1, 0), (0, 1), (0, -1)):
        start = mark.foot + 0.5 * mark.size * (du * rotation[:, 0] + dv * rotation[:, 1])
        start = start + (mark.relief + 0.01) * mark.normal
        if rest.ray_cast(tuple(start), tuple(start + reach * mark.normal)):
            return True
    return False


def add_marks(
    parts: dict[str, Any], style: str, min_feature: float, relief: float = MARK_RELIEF_MM
) -> tuple[dict[str, Any], list[Mark], int, list[Any]]:
    """Return the parts with a mark on each lobe that can hold one, and what was done.

    Also returned: the marks, the number of lobes skipped, and the glyph solids (to add to,
    or cut from, the whole model).

    Embossed glyphs join their lobe's part (less every other part, so the parts stay
    disjoint); engraved ones are cut from it. A lobe whose glyph would reach another part (an
    inner shell inside an outer one) or that is too small for strokes of ``min_feature`` is
    skipped and counted.
    """
    import manifold3d

    out = dict(parts)
    marks: list[Mark] = []
    glyphs: list[Any] = []
    skipped = 0
    for name in ("positive", "negative"):
        if name not in parts:
            continue
        others = [v for k, v in out.items() if k != name]
        rest = manifold3d.Manifold.batch_boolean(others, manifold3d.OpType.Add)
        for piece in pieces(parts[name]):
            for foot in _feet(piece):  # the outermost point, else the outermost sideways
                made = _mark_piece(piece, name, style, min_feature, relief, foot)
                if made is not None and not _covered(made[1], rest):
                    break
            else:
                skipped += 1
                continue
            glyph, mark = made
            if style == "engraved":
                out[name] = out[name] - glyph
            else:
                out[name] = out[name] + (glyph - rest)
            marks.append(mark)
            glyphs.append(glyph)
    return out, marks, skipped, glyphs


def check_text(text: str) -> str:
    """Return ``text`` if the label font can print it, else raise ValueError naming the rule.

    Every character must have a glyph in DejaVu Sans Bold, and the text must draw something
    (not only spaces or invisible characters).
    """
    import unicodedata

    from matplotlib import font_manager
    from matplotlib.ft2font import FT2Font
    from matplotlib.textpath import TextPath

    hidden = sorted({c for c in text if unicodedata.category(c).startswith("C")})
    if hidden:  # control and format characters (line breaks, direction marks): nothing to cut
        shown = ", ".join(repr(c) for c in hidden)
        raise ValueError(f"expected printable characters, not {shown}")
    font = font_manager.FontProperties(family="DejaVu Sans", weight="bold")
    face = FT2Font(font_manager.findfont(font))
    missing = sorted({c for c in text if face.get_char_index(ord(c)) == 0})
    if missing:
        shown = ", ".join(repr(c) for c in missing)
        raise ValueError(f"expected text the stand's font (DejaVu Sans Bold) has, not {shown}")
    try:  # matplotlib's TextPath fails on text with no outline at all
        polygons = TextPath((0.0, 0.0), text, size=10.0, prop=font).to_polygons()
    except (AttributeError, ValueError):
        polygons = []
    if not any(np.asarray(p).shape[0] >= 3 for p in polygons):
        raise ValueError(f"expected text with something to print, got {text!r}")
    return text


def text_solid(text: str, height: float, depth: float) -> tuple[Any, float]:
    """Return ``text`` as a solid (x along the line, y up, z from 0 to ``depth``) and its width.

    The letters are ``height`` mm tall (capital height about 0.73 of it), centred on x = 0 and
    on y = 0, in DejaVu Sans Bold from matplotlib.
    """
    import manifold3d
    from matplotlib.font_manager import FontProperties
    from matplotlib.textpath import TextPath

    font = FontProperties(family="DejaVu Sans", weight="bold")
    path = TextPath((0.0, 0.0), text, size=height, prop=font)
    polygons = [
        np.asarray(p, dtype=np.float64) for p in path.to_polygons() if np.asarray(p).shape[0] >= 3
    ]
    section = manifold3d.CrossSection(polygons, manifold3d.FillRule.EvenOdd)
    (x0, y0, x1, y1) = section.bounds()
    section = section.translate((-(x0 + x1) / 2, -(y0 + y1) / 2))
    return section.extrude(depth), float(x1 - x0)
