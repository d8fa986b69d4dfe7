"""Part codes cut into a kit half's cut face, which is hidden once the lobe is assembled.

The code is cut 0.4 mm deep (two 0.2 mm layers, common FDM practice, no source) in DejaVu Sans
Bold, reading the right way round when the face is looked at. It goes where a box around the
text fits inside the face, clear of the rod's channel, the pin sockets and any magnets; where
the full code (``3dz2 +1a``) does not fit, the short one (``+1a``) is tried, larger.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np

from orbviz.models.features import frame, text_solid

__all__ = ["CODE_DEPTH_MM", "engrave_codes"]

CODE_DEPTH_MM = 0.4  # two 0.2 mm layers (common FDM practice, no source)


def _code_spot(
    section: Any, width: float, height: float, avoid: list[np.ndarray]
) -> np.ndarray | None:
    """Return a point of the cut section (plane coordinates) where a width x height box fits."""
    room = section.offset(-(0.5 * math.hypot(width, height) + 0.6))
    if room.is_empty():
        return None
    points = [np.asarray(p) for poly in room.to_polygons() for p in poly]
    far = [p for p in points if all(np.linalg.norm(p - a) > 0.5 * width + 2.0 for a in avoid)]
    pool = far or points
    middle = np.mean(pool, axis=0)
    return min(pool, key=lambda p: float(np.linalg.norm(p - middle)))


def engrave_codes(
    upper: Any, lower: Any, carved: Any, normal: np.ndarray, code: str, avoid3: list[np.ndarray]
) -> tuple[Any, Any, float]:
    """Cut each half's code into its cut face; return the two halves and the letter height.

    The height is 0 where no code fits (the halves come back unchanged).
    """
    rotation = frame(normal)  # columns u, v, n: plane coordinates (u, v)
    section = carved.transform(np.column_stack([rotation.T, np.zeros(3)]).tolist()).slice(0.0)
    x0, y0, x1, y1 = section.bounds()
    avoid = [(rotation.T @ p)[:2] for p in avoid3]
    for text_of, scale in ((lambda c: c, 0.12), (lambda c: c.split(" ")[-1], 0.18)):
        height = min(5.0, max(2.5, scale * min(x1 - x0, y1 - y0)))
        sample, width = text_solid(text_of(code + "a"), height, CODE_DEPTH_MM + 0.01)
        spot = _code_spot(section, width, height, avoid)
        if spot is not None:
            break
    else:
        return upper, lower, 0.0
    u, v, n = rotation[:, 0], rotation[:, 1], rotation[:, 2]
    centre = u * spot[0] + v * spot[1]
    out = []
    for half, suffix, axes in ((upper, "a", (v, u, -n)), (lower, "b", (u, v, n))):
        letters, _ = text_solid(text_of(code + suffix), height, CODE_DEPTH_MM + 0.01)
        origin = centre - axes[2] * CODE_DEPTH_MM
        placed = letters.transform(np.column_stack([*axes, origin]).tolist())
        out.append(half - placed)
    return out[0], out[1], height
