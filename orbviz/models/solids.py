"""Solids in millimetres (manifold3d): conversion, cylinders, unions and the support.

The phases are joined by a rod along the quantisation axis and a bead at the nucleus. A piece
that the rod does not reach (the dz2 ring, the lobes of dxy or of the f orbitals) gets a spoke
from the nucleus through its nearest point, and one from the mirror image of that point where
the piece is there too.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np

from orbviz.errors import ModelError

__all__ = ["arrays", "cylinder", "support", "to_manifold", "union"]


def to_manifold(vertices: np.ndarray, faces: np.ndarray) -> Any:
    """Return a closed triangle mesh as a manifold3d solid (ModelError if it is not one)."""
    import manifold3d

    mesh = manifold3d.Mesh(
        vert_properties=np.ascontiguousarray(vertices, dtype=np.float32),
        tri_verts=np.ascontiguousarray(faces, dtype=np.uint32),
    )
    solid = manifold3d.Manifold(mesh)
    if solid.status() != manifold3d.Error.NoError:
        raise ModelError(f"a surface is not a closed manifold ({solid.status()}); try another grid")
    return solid


def arrays(solid: Any) -> tuple[np.ndarray, np.ndarray]:
    """Vertices (V, 3) and faces (F, 3) of a manifold3d solid."""
    mesh = solid.to_mesh()
    return np.asarray(mesh.vert_properties, dtype=np.float64)[:, :3], np.asarray(
        mesh.tri_verts, dtype=np.int64
    )


def cylinder(a: np.ndarray, b: np.ndarray, radius: float) -> Any:
    """Make a cylinder from point a to point b (mm)."""
    import manifold3d

    axis = b - a
    length = float(np.linalg.norm(axis))
    rod = manifold3d.Manifold.cylinder(length, radius, radius, circular_segments=32)
    polar = math.degrees(math.acos(max(-1.0, min(1.0, axis[2] / length))))
    azimuth = math.degrees(math.atan2(axis[1], axis[0]))
    return rod.rotate((0.0, polar, 0.0)).rotate((0.0, 0.0, azimuth)).translate(tuple(a))


def union(items: list[Any]) -> Any:
    """Return the union of solids (empty ones skipped)."""
    import manifold3d

    items = [m for m in items if m is not None and not m.is_empty()]
    return manifold3d.Manifold.batch_boolean(items, manifold3d.OpType.Add)


def support(pieces: list[Any], radius: float) -> Any:
    """Rod along z through every piece the axis crosses, bead, and spokes to the other pieces."""
    import manifold3d

    bead = manifold3d.Manifold.sphere(2.5 * radius, circular_segments=48)
    near_axis = []
    for piece in pieces:
        v, _ = arrays(piece)
        close = v[(v[:, 0] ** 2 + v[:, 1] ** 2) < (1.5 * radius) ** 2]
        if close.size:
            near_axis.append(close[:, 2])
    parts = [bead]
    if near_axis:
        z = np.concatenate(near_axis)
        lo, hi = min(z.min() + radius, -radius), max(z.max() - radius, radius)
        parts.append(cylinder(np.array([0, 0, lo]), np.array([0, 0, hi]), radius))
    held = union(parts)
    for piece in pieces:
        if not (piece ^ held).is_empty():
            continue
        v, _ = arrays(piece)
        nearest = v[np.argmin(np.linalg.norm(v, axis=1))]
        depth = min(3.0 * 2 * radius, 0.5 * float(np.ptp(v, axis=0).max()))
        for target in (nearest, nearest * np.array([-1.0, -1.0, 1.0])):
            if np.min(np.linalg.norm(v - target, axis=1)) > 2 * radius:
                continue  # the mirrored point is not on this piece
            direction = target / max(np.linalg.norm(target), 1e-9)
            held = held + cylinder(np.zeros(3), target + depth * direction, radius)
    return held
