"""The stand: a round plinth under the model with a post up to the nucleus and a label.

The plinth's front (towards -y) is cut flat to carry one line of text, raised
:data:`~orbviz.models.features.LABEL_RELIEF_MM`. The plinth's shape does not depend on the text,
so a model with a label and one without differ only by the letters.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from orbviz.models.features import LABEL_RELIEF_MM, text_solid
from orbviz.models.solids import cylinder, union

__all__ = ["Plinth", "plinth", "stand"]

FRONT = 0.55  # the flat front lies at 0.55 of the radius from the centre


@dataclass(frozen=True)
class Plinth:
    """The stand's plinth (mm): centre, radius, top and bottom z, and its flat front's y."""

    radius: float
    bottom: float
    top: float
    front_y: float

    @property
    def front_width(self) -> float:
        """Width of the flat front face."""
        return 2 * self.radius * math.sqrt(1 - FRONT**2)


def plinth(lowest: float, rod_mm: float, size: float) -> Plinth:
    """Return the plinth under a model whose lowest point is at z = ``lowest``."""
    thickness = max(2.0, 1.5 * rod_mm, 0.08 * size + 2.0)
    top = lowest - 0.5 * rod_mm
    radius = 0.3 * size
    return Plinth(radius, top - thickness, top, -FRONT * radius)


def _label(text: str, base: Plinth) -> Any:
    """Return the raised text on the plinth's flat front (shrunk to the face if long)."""
    height = 0.7 * (base.top - base.bottom)
    letters, width = text_solid(text, height, LABEL_RELIEF_MM + 0.2)
    room = base.front_width - 0.15 * base.radius
    if width > room:  # shrink a long label to the face
        height *= room / width
        letters, width = text_solid(text, height, LABEL_RELIEF_MM + 0.2)
    # text in x (along the face) and y (up): stand it up on the face, raised towards -y
    turn = np.array([[1.0, 0.0, 0.0], [0.0, 0.0, -1.0], [0.0, 1.0, 0.0]])
    middle = 0.5 * (base.top + base.bottom)
    matrix = np.column_stack([turn, [0.0, base.front_y + 0.2, middle]])
    return letters.transform(matrix.tolist())


def stand(lowest: float, rod_mm: float, size: float, label: str = "", grow: float = 0.0) -> Any:
    """Return the plinth, its post up to the nucleus and its label, as one solid.

    ``grow`` widens the post (for the clearance a kit's lower lobe needs around it).
    """
    import manifold3d

    base = plinth(lowest, rod_mm, size)
    thickness = base.top - base.bottom
    disc = manifold3d.Manifold.cylinder(
        thickness, base.radius, base.radius, circular_segments=96
    ).translate((0.0, 0.0, base.bottom))
    span = 4 * base.radius
    cut = manifold3d.Manifold.cube((span, span, 2 * thickness + 2))
    cut = cut.translate((-span / 2, base.front_y - span, base.bottom - thickness - 1))
    post = cylinder(
        np.array([0.0, 0.0, base.top - 0.5 * thickness]), np.zeros(3), 0.5 * rod_mm + grow
    )
    parts = [disc - cut, post]
    if label:
        parts.append(_label(label, base))
    return union(parts)
