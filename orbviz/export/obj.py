"""Wavefront OBJ: one ``o`` object per body; a material file named after the OBJ.

A real state gets ``STEM.mtl`` with one material per phase, so two exports in one folder never
share a material file. A complex state carries its phase colours per vertex (``v x y z r g b``),
which no material can express, so it needs no material file.
"""

from __future__ import annotations

from pathlib import Path

from orbviz.export._atomic import atomic_paths
from orbviz.export._scene import body_mesh


def write(bodies, path: Path, *, scale: float, units: str) -> list[Path]:
    """Write OBJ (and its MTL for a real state)."""
    import trimesh
    from trimesh.exchange.obj import export_obj

    scene = trimesh.Scene()
    for body in bodies:
        scene.add_geometry(
            body_mesh(body, scale, material=True), geom_name=body.name, node_name=body.name
        )
    mtl_name = path.with_suffix(".mtl").name
    text, extra = export_obj(
        scene,
        include_normals=True,
        include_color=True,
        include_texture=True,
        return_texture=True,
        mtl_name=mtl_name,
        header=f"orbviz mesh, coordinates in {units}",
    )
    targets = [path] + ([path.with_suffix(".mtl")] if mtl_name in extra else [])
    with atomic_paths(*targets) as temps:
        temps[0].write_text(text)
        if len(temps) > 1:
            temps[1].write_bytes(extra[mtl_name])
    return targets
