"""The marks a page is drawn with, in page pixels from the bottom left.

:mod:`orbviz.figures.page` lays a figure out as these; :mod:`orbviz.figures.paint` draws them.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

__all__ = ["INK", "Mark", "Picture", "Rule", "Swatch", "Words"]

INK = (20, 20, 20)  # text, edges and the scale bar


@dataclass(frozen=True)
class Picture:
    """A raster on the page, stretched to its box (nearest pixels, or smoothly)."""

    rgba: np.ndarray
    left: float
    bottom: float
    width: float
    height: float
    smooth: bool = False


@dataclass(frozen=True)
class Words:
    """A line of text in the ink colour; ``size`` in points, anchored by ``ha`` and ``va``."""

    text: str
    x: float
    y: float
    size: float
    ha: str = "left"  # left, center, right
    va: str = "baseline"  # top, center, bottom, baseline


@dataclass(frozen=True)
class Swatch:
    """A square of colour (RGB, 0-255) with a thin ink edge."""

    left: float
    bottom: float
    size: float
    colour: tuple[int, int, int]


@dataclass(frozen=True)
class Rule:
    """A horizontal ink line from x0 to x1 at height y, ``width`` in points, square ends."""

    x0: float
    x1: float
    y: float
    width: float


Mark = Picture | Words | Swatch | Rule
