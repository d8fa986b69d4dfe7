"""Wavefront OBJ: one ``o`` object per body; a material file named after the OBJ.

A real state gets ``STEM.mtl`` with one material per phase, so two exports in one folder never
share a material file. A complex state carries its phase colours per vertex (``v x y z r g b``),
which no material can express, so it needs no material file.
"""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path

from orbviz.surface.contour import Body
from orbviz.surface.convert import trimesh_scene


def companions(path: Path) -> list[Path]:
    """Return the material file ``STEM.mtl`` (written for real states)."""
    return [path.with_suffix(".mtl")]


def encode(bodies: Sequence[Body], path: Path, *, scale: float, units: str) -> dict[Path, bytes]:
    """Return the OBJ text, and its MTL for a real state."""
    from trimesh.exchange.obj import export_obj

    mtl = path.with_suffix(".mtl")
    text, extra = export_obj(
        trimesh_scene(bodies, scale, white_under_colours=False),
        include_normals=True,
        include_color=True,
        include_texture=True,
        return_texture=True,
        mtl_name=mtl.name,
        header=f"orbviz mesh, coordinates in {units}",
    )
    files = {path: text.encode()}
    if mtl.name in extra:
        files[mtl] = extra[mtl.name]
    return files
