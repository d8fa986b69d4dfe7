"""Binary PLY: all bodies in one mesh, with vertex colours and per-vertex ``phase`` and ``body``.

``phase`` is the sign of psi (+1, -1) for a real state and arg psi in radians for a complex one;
``body`` is the body's index in the order positive, negative (or 0 for a complex surface).
"""

from __future__ import annotations

from pathlib import Path

from orbviz.export._atomic import atomic_paths
from orbviz.export._scene import combined_mesh


def write(bodies, path: Path, *, scale: float, units: str) -> list[Path]:
    """Write a binary PLY."""
    from trimesh.exchange.ply import export_ply

    data = export_ply(
        combined_mesh(bodies, scale), encoding="binary", vertex_normal=True, include_attributes=True
    )
    with atomic_paths(path) as (temp,):
        temp.write_bytes(data)
    return [path]
