"""Binary PLY: all bodies in one mesh, with vertex colours and per-vertex ``phase`` and ``body``.

``phase`` is the sign of psi (+1, -1) for a real state and arg psi in radians for a complex one;
``body`` is the body's index in the order positive, negative (or 0 for a complex surface).
"""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path

from orbviz.surface.contour import Body
from orbviz.surface.convert import combined_trimesh


def companions(path: Path) -> list[Path]:
    """No companion files."""
    return []


def encode(bodies: Sequence[Body], path: Path, *, scale: float, units: str) -> dict[Path, bytes]:
    """Return a binary PLY of all bodies."""
    from trimesh.exchange.ply import export_ply

    data = export_ply(
        combined_trimesh(bodies, scale),
        encoding="binary",
        vertex_normal=True,
        include_attributes=True,
    )
    return {path: data}
