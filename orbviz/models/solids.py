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

__all__ = ["arrays", "cylinder", "pieces", "support", "to_manifold", "union"]


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


def pieces(solid: Any) -> list[Any]:
    """Return the separate solid pieces of ``solid``, each with the cavities it holds.

    manifold3d's decompose returns each closed surface on its own: a hollow shell comes back
    as its outside and, with negative volume, its inside. Each cavity goes back to the
    smallest piece whose box holds it.
    """
    import manifold3d

    parts = solid.decompose()
    outer = sorted((p for p in parts if p.volume() > 0), key=lambda p: p.volume())
    holes: list[list[Any]] = [[] for _ in outer]
    for cavity in (p for p in parts if p.volume() <= 0):
        lo, hi = np.array(cavity.bounding_box()[:3]), np.array(cavity.bounding_box()[3:])
        for k, piece in enumerate(outer):
            box = np.array(piece.bounding_box())
            if np.all(box[:3] <= lo + 1e-6) and np.all(hi <= box[3:] + 1e-6):
                holes[k].append(cavity)
                break
    return [
        manifold3d.Manifold.compose([p, *h]) if h else p for p, h in zip(outer, holes, strict=True)
    ]


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


def support(pieces: list[Any], radius: float, grow: float = 0.0, deep: bool = False) -> Any:
    """Rod along z through every piece the axis crosses, bead, and spokes to the other pieces.

    ``grow`` widens every rod, spoke and the bead by that much (the clearance a kit's parts
    need around the support), keeping the layout of the support of ``radius``. ``deep``
    spokes reach a third of the way into their piece, where a kit's pin finds room.
    """
    import manifold3d

    near_axis, on_rod = [], []
    for piece in pieces:
        v, _ = arrays(piece)
        close = v[(v[:, 0] ** 2 + v[:, 1] ** 2) < (1.5 * radius) ** 2][:, 2]
        # where the axis itself pierces the piece (a coarse mesh may have no vertex near it)
        hits = [h.position[2] for h in piece.ray_cast((0.0, 0.0, -1e5), (0.0, 0.0, 1e5))]
        z = np.concatenate([close, np.asarray(hits, dtype=np.float64)])
        on_rod.append(bool(z.size))
        if z.size:
            near_axis.append(z)
    parts, plain = [manifold3d.Manifold.sphere(2.5 * radius + grow, circular_segments=48)], []
    plain.append(manifold3d.Manifold.sphere(2.5 * radius, circular_segments=48))
    if near_axis:
        z = np.concatenate(near_axis)
        lo, hi = min(z.min() + radius, -radius), max(z.max() - radius, radius)
        parts.append(
            cylinder(np.array([0, 0, lo - grow]), np.array([0, 0, hi + grow]), radius + grow)
        )
        plain.append(cylinder(np.array([0, 0, lo]), np.array([0, 0, hi]), radius))
    held = union(plain)  # the layout is decided on the support of ``radius`` alone
    spokes = []
    least = 0.01 * max((p.volume() for p in pieces), default=0.0)
    for piece, rod in zip(pieces, on_rod, strict=True):
        if deep and piece.volume() < least:
            continue  # a kit leaves specks out: no spoke for them (it would cross real lobes)
        if rod or (not deep and not (piece ^ held).is_empty()):
            continue  # held already (a kit's lobes get spokes for their pins)
        v, _ = arrays(piece)
        nearest = v[np.argmin(np.linalg.norm(v, axis=1))]
        span = float(np.ptp(v, axis=0).max())
        middle = v.mean(axis=0)
        if deep and np.linalg.norm(middle) > 0.2 * span:  # a kit's spoke runs along the lobe
            along = middle / np.linalg.norm(middle) * np.linalg.norm(nearest)
            if np.min(np.linalg.norm(v - along, axis=1)) <= 2 * radius:  # if that meets it
                nearest = along
        depth = max(6 * radius, span / 3) if deep else min(6 * radius, 0.5 * span)
        for target in (nearest, nearest * np.array([-1.0, -1.0, 1.0])):
            if np.min(np.linalg.norm(v - target, axis=1)) > 2 * radius:
                continue  # the mirrored point is not on this piece
            direction = target / max(np.linalg.norm(target), 1e-9)
            spokes.append(cylinder(np.zeros(3), target + (depth + grow) * direction, radius + grow))
            held = held + cylinder(np.zeros(3), target + depth * direction, radius)
    return union([*parts, *spokes])
