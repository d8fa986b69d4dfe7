"""Mesh checks with numpy: volume, area, closedness, winding, connected pieces.

These are the checks the mesh report needs, done directly on the face array. trimesh's
equivalents (``is_watertight``, ``split``) took 1.0 s on a 276k-face 3dz2 at 256^3, against
0.1 s here. The tests compare both on every body. Connected pieces are labelled by
:func:`components` in numpy: scipy's ``connected_components`` does the same, but importing
``scipy.sparse`` cost ``orbviz mesh`` 0.15 s of start-up (the tests compare the two).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

__all__ = ["MeshFacts", "components", "mesh_facts"]


@dataclass(frozen=True)
class MeshFacts:
    """Facts about one triangle mesh.

    Attributes
    ----------
    volume : float
        Signed volume (positive when wound outward).
    area : float
        Surface area.
    closed : bool
        Every undirected edge is shared by exactly two faces (a closed 2-manifold surface).
    consistent : bool
        Every directed edge occurs once, so neighbouring faces agree in winding.
    pieces : int
        Connected surface pieces (through shared vertices).
    solids : int
        Separate solid bodies: surface pieces that enclose positive volume. A body with a closed
        internal cavity has one outer piece and one inward-facing piece per cavity.
    cavities : int
        Closed internal voids: surface pieces that enclose negative volume.
    """

    volume: float
    area: float
    closed: bool
    consistent: bool
    pieces: int
    solids: int = 0
    cavities: int = 0

    @property
    def watertight(self) -> bool:
        """Closed, consistently wound and of positive volume."""
        return self.closed and self.consistent and self.volume > 0


def components(count: int, tail: np.ndarray, head: np.ndarray) -> np.ndarray:
    """Label the connected components of an undirected graph of ``count`` nodes.

    Each round hooks every root that an edge joins to a smaller root, then jumps pointers
    until every node points at its root (Shiloach & Vishkin, J. Algorithms 3, 57 (1982), in
    its simplest form); rounds stop when no edge joins two roots. Labels are each
    component's smallest node.

    Parameters
    ----------
    count : int
        Number of nodes.
    tail, head : (E,) ndarray of int
        The edges' ends.

    Returns
    -------
    (count,) ndarray of int64
        Component label of each node.
    """
    parent = np.arange(count, dtype=np.int64)
    while True:
        a, b = parent[tail], parent[head]
        apart = a != b
        if not apart.any():
            return parent
        low, high = np.minimum(a[apart], b[apart]), np.maximum(a[apart], b[apart])
        np.minimum.at(parent, high, low)  # roots only (after the jumps below), to the smallest
        while True:
            jumped = parent[parent]
            if np.array_equal(jumped, parent):
                break
            parent = jumped


def mesh_facts(vertices: np.ndarray, faces: np.ndarray) -> MeshFacts:
    """Compute :class:`MeshFacts` for (V, 3) vertices and (F, 3) integer faces."""
    a, b, c = (vertices[faces[:, k]] for k in range(3))
    cross = np.cross(b - a, c - a)
    volume = float(np.einsum("ij,ij->i", a, cross).sum() / 6.0)
    area = float(0.5 * np.linalg.norm(cross, axis=1).sum())
    n = len(vertices)
    tail = faces.ravel()
    head = np.roll(faces, -1, axis=1).ravel()
    directed = tail.astype(np.int64) * n + head
    undirected = np.minimum(tail, head).astype(np.int64) * n + np.maximum(tail, head)
    # sort and compare neighbours (numpy's hash-based unique took 0.1 s a call here)
    undirected.sort()
    starts = np.flatnonzero(np.concatenate([[True], undirected[1:] != undirected[:-1], [True]]))
    closed = bool(np.all(np.diff(starts) == 2))
    directed.sort()
    consistent = bool(np.all(directed[1:] != directed[:-1]))
    used = np.zeros(n, dtype=bool)
    used[tail] = True
    labels = components(n, tail, head)
    count = n
    pieces = int(np.count_nonzero(np.bincount(labels[used], minlength=count)))
    signed = np.einsum("ij,ij->i", a, cross) / 6.0
    per_piece = np.bincount(labels[faces[:, 0]], weights=signed, minlength=count)
    solids = int(np.count_nonzero(per_piece > 0))
    cavities = int(np.count_nonzero(per_piece < 0))
    return MeshFacts(volume, area, closed, consistent, pieces, solids, cavities)
