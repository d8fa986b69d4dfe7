"""Phase colours: a colour-blind-safe pair for real states, a cyclic map for complex ones.

Defaults (our choice, documented in ../docs/meshes.md):
- positive: blue #0072B2; negative: vermillion #D55E00. Both are from the Okabe & Ito palette
  for colour-blind readers ("Color Universal Design", 2008), and they differ in lightness as
  well as hue, so they also print apart in grey.
- phase angle: a circle of constant lightness L* = 68 and chroma 40 in CIELAB, hue angle equal to
  arg psi. It is isoluminant and close to uniform in perceived hue steps (the design idea of the
  cyclic maps in Kovesi, arXiv:1509.03700), and it has no seam at +-pi.
"""

from __future__ import annotations

import functools
import math
import re

import numpy as np

from orbviz.errors import ParameterError

__all__ = ["DEFAULT_PAIR", "parse_colors", "phase_colors", "sign_colors"]

DEFAULT_PAIR: tuple[tuple[int, int, int, int], tuple[int, int, int, int]] = (
    (0, 114, 178, 255),
    (213, 94, 0, 255),
)
_HEX = re.compile(r"#?([0-9a-fA-F]{6})")


def parse_colors(text: str) -> tuple[tuple[int, int, int, int], tuple[int, int, int, int]]:
    """Read ``"#RRGGBB,#RRGGBB"`` (positive, negative) into two RGBA tuples."""
    parts = [p.strip() for p in text.split(",")]
    if len(parts) != 2 or not all(_HEX.fullmatch(p) for p in parts):
        raise ParameterError(
            "--colors takes two hex colours 'POSITIVE,NEGATIVE' like '#0072B2,#D55E00', "
            f"got {text!r}"
        )
    out = []
    for p in parts:
        h = _HEX.fullmatch(p).group(1)
        out.append((int(h[0:2], 16), int(h[2:4], 16), int(h[4:6], 16), 255))
    return out[0], out[1]


def sign_colors(sign: np.ndarray, pair=DEFAULT_PAIR) -> np.ndarray:
    """(V, 4) uint8 RGBA: ``pair[0]`` where sign >= 0, ``pair[1]`` elsewhere."""
    rgba = np.empty((len(sign), 4), dtype=np.uint8)
    rgba[:] = pair[0]
    rgba[np.asarray(sign) < 0] = pair[1]
    return rgba


@functools.cache
def _cyclic_table(size: int = 512) -> np.ndarray:
    from skimage.color import lab2rgb

    hue = np.linspace(-math.pi, math.pi, size, endpoint=False)
    lab = np.stack([np.full(size, 68.0), 40.0 * np.cos(hue), 40.0 * np.sin(hue)], axis=-1)
    rgb = np.clip(lab2rgb(lab[None, :, :])[0], 0.0, 1.0)
    return np.round(255 * rgb).astype(np.uint8)


def phase_colors(angle: np.ndarray) -> np.ndarray:
    """(V, 4) uint8 RGBA for phase angles in radians, on the cyclic map (wraps at +-pi)."""
    table = _cyclic_table()
    index = np.floor((np.asarray(angle) + math.pi) / (2 * math.pi) * len(table)).astype(np.int64)
    rgba = np.full((len(index), 4), 255, dtype=np.uint8)
    rgba[:, :3] = table[index % len(table)]
    return rgba
