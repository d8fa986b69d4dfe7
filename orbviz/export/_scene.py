"""trimesh objects built from bodies, shared by the OBJ and glTF writers."""

from __future__ import annotations

import numpy as np

__all__ = ["body_mesh", "combined_mesh"]


def body_mesh(body, scale: float, *, material: bool):
    """Build one body's trimesh: a named material (real) or vertex colours (complex)."""
    import trimesh
    from trimesh.visual import ColorVisuals, TextureVisuals
    from trimesh.visual.material import PBRMaterial

    mesh = trimesh.Trimesh(
        vertices=body.vertices * scale,
        faces=body.faces,
        vertex_normals=body.normals,
        process=False,
    )
    if material and body.name != "surface":
        colour = body.colors[0]
        mesh.visual = TextureVisuals(
            material=PBRMaterial(
                name=body.name,
                baseColorFactor=colour,
                metallicFactor=0.0,
                roughnessFactor=0.6,
                doubleSided=False,
            )
        )
    else:
        mesh.visual = ColorVisuals(mesh, vertex_colors=body.colors)
    return mesh


def combined_mesh(bodies, scale: float):
    """All bodies as one trimesh, with vertex colours and per-vertex ``phase`` and ``body``."""
    import trimesh

    offsets = np.cumsum([0] + [len(b.vertices) for b in bodies])
    mesh = trimesh.Trimesh(
        vertices=np.vstack([b.vertices for b in bodies]) * scale,
        faces=np.vstack([b.faces + o for b, o in zip(bodies, offsets, strict=False)]),
        vertex_normals=np.vstack([b.normals for b in bodies]),
        vertex_colors=np.vstack([b.colors for b in bodies]),
        process=False,
    )
    mesh.vertex_attributes["phase"] = np.concatenate([b.phase for b in bodies]).astype(np.float32)
    mesh.vertex_attributes["body"] = np.concatenate(
        [np.full(len(b.vertices), i, dtype=np.uint8) for i, b in enumerate(bodies)]
    )
    return mesh
