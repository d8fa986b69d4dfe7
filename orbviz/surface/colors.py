"""Phase colours: a colour-blind-safe pair for real states, a cyclic map for complex ones.

Defaults (our choice, documented in ../docs/meshes.md):
- positive: dark blue #004488; negative: yellow #DDAA33, the pair of Paul Tol's high-contrast
  scheme (P. Tol, "Colour Schemes", SRON/EPS/TN/09-002, 2021), made to stay apart for
  colour-blind readers and in greyscale. Their CIELAB lightness differs by 43 (29 against 72),
  where the Okabe & Ito blue and vermillion used before differ by 8 (46 against 54) and merge
  on a greyscale page; under simulated deuteranopia and protanopia (Machado et al. 2009) the
  two still differ by over 35 in lightness and lie at opposite ends of the blue-yellow axis.
- phase angle: a circle of constant lightness L* = 68 and chroma 40 in CIELAB, hue angle equal to
  arg psi. It is isoluminant and close to uniform in perceived hue steps (the design idea of the
  cyclic maps in Kovesi, arXiv:1509.03700), and it has no seam at +-pi.
"""

from __future__ import annotations

import functools
import math
import re

import numpy as np

__all__ = [
    "DEFAULT_PAIR",
    "SET_PALETTE",
    "RGBA",
    "ColorPair",
    "color_pair",
    "phase_colors",
    "point_colors",
    "linear_bytes",
    "sign_colors",
]

RGBA = tuple[int, int, int, int]
ColorPair = tuple[RGBA, RGBA]
DEFAULT_PAIR: ColorPair = (
    (0x00, 0x44, 0x88, 255),
    (0xDD, 0xAA, 0x33, 255),
)
SET_PALETTE: tuple[tuple[int, int, int], ...] = (  # Okabe & Ito (2008): one colour per member
    (0, 114, 178),
    (213, 94, 0),
    (0, 158, 115),
    (204, 121, 167),
    (230, 159, 0),
    (86, 180, 233),
)
_HEX = re.compile(r"#?([0-9a-fA-F]{6})")


def color_pair(raw: object) -> ColorPair:
    """Read ``"#RRGGBB,#RRGGBB"`` (positive, negative), or a pair of RGB(A) tuples, into RGBA.

    A converter of the options model: raises ``ValueError`` with the rule on a bad value.
    """
    rule = "expected two hex colours 'POSITIVE,NEGATIVE' like '#004488,#DDAA33'"
    if isinstance(raw, str):
        parts = [p.strip() for p in raw.split(",")]
        if len(parts) != 2 or not all(_HEX.fullmatch(p) for p in parts):
            raise ValueError(f"{rule}, got {raw!r}")
        pair = []
        for p in parts:
            match = _HEX.fullmatch(p)
            assert match is not None
            h = match.group(1)
            pair.append((int(h[0:2], 16), int(h[2:4], 16), int(h[4:6], 16), 255))
        return pair[0], pair[1]
    if isinstance(raw, (tuple, list)) and len(raw) == 2:
        out = []
        for colour in raw:
            values = list(colour) if isinstance(colour, (tuple, list)) else []
            if len(values) == 3:
                values.append(255)
            if len(values) != 4 or not all(
                isinstance(v, int) and not isinstance(v, bool) and 0 <= v <= 255 for v in values
            ):
                raise ValueError(f"{rule}, or two (R, G, B[, A]) tuples of 0-255, got {raw!r}")
            out.append((values[0], values[1], values[2], values[3]))
        return out[0], out[1]
    raise ValueError(f"{rule}, got {raw!r}")


def sign_colors(sign: np.ndarray, pair: ColorPair = DEFAULT_PAIR) -> np.ndarray:
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


def point_colors(phase: np.ndarray, real: bool, pair: ColorPair = DEFAULT_PAIR) -> np.ndarray:
    """(N, 4) uint8 RGBA of sampled points: the sign colours (real) or the phase map."""
    return sign_colors(phase, pair) if real else phase_colors(phase)


def phase_colors(angle: np.ndarray) -> np.ndarray:
    """(V, 4) uint8 RGBA for phase angles in radians, on the cyclic map (wraps at +-pi)."""
    table = _cyclic_table()
    index = np.floor((np.asarray(angle) + math.pi) / (2 * math.pi) * len(table)).astype(np.int64)
    rgba = np.full((len(index), 4), 255, dtype=np.uint8)
    rgba[:, :3] = table[index % len(table)]
    return rgba


def linear_bytes(rgba: np.ndarray) -> np.ndarray:
    """Return sRGB-encoded RGBA bytes as linear-light bytes (alpha kept), as glTF stores colour.

    glTF 2.0 (section 3.9.2) takes ``baseColorFactor`` and ``COLOR_0`` as linear values; the
    sRGB transfer function is IEC 61966-2-1's, tabulated once for the 256 byte values.
    """
    rgba = np.asarray(rgba, dtype=np.uint8)
    out = rgba.copy()
    out[..., :3] = _LINEAR_BYTES[rgba[..., :3]]
    return out


def _linear_table() -> np.ndarray:
    c = np.arange(256) / 255.0
    linear = np.where(c <= 0.04045, c / 12.92, ((c + 0.055) / 1.055) ** 2.4)
    return np.round(255.0 * linear).astype(np.uint8)


_LINEAR_BYTES = _linear_table()
