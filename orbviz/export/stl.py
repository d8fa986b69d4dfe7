"""Binary STL: all bodies in one solid (STL names no objects); slicers read it as millimetres."""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path

from orbviz.surface.contour import Body
from orbviz.surface.convert import combined_trimesh


def companions(path: Path) -> list[Path]:
    """No companion files."""
    return []


def encode(bodies: Sequence[Body], path: Path, *, scale: float, units: str) -> dict[Path, bytes]:
    """Return a binary STL of all bodies."""
    from trimesh.exchange.stl import export_stl

    return {path: export_stl(combined_trimesh(bodies, scale))}
