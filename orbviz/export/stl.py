"""Binary STL: all bodies in one solid (STL names no objects); slicers read it as millimetres."""

from __future__ import annotations

from pathlib import Path

from orbviz.export._atomic import atomic_paths
from orbviz.export._scene import combined_mesh


def write(bodies, path: Path, *, scale: float, units: str) -> list[Path]:
    """Write a binary STL."""
    from trimesh.exchange.stl import export_stl

    data = export_stl(combined_mesh(bodies, scale))
    with atomic_paths(path) as (temp,):
        temp.write_bytes(data)
    return [path]
