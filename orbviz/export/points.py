"""Point clouds to files: binary PLY, CSV, XYZ and NumPy ``.npy``, chosen by suffix.

Every format carries the positions and, per point, the sign of psi (+1, -1) for a real state or
its phase angle in radians for a complex one. PLY adds the phase colour of each point; CSV and
XYZ name the state, the count and the length unit in ``#`` comment lines; ``.npy`` holds one
(N, 4) float32 array, columns x, y, z, phase (the unit is the one asked for; mm for a physical
size).
"""

from __future__ import annotations

import io
from pathlib import Path

import numpy as np

from orbviz.levels.sampling import Points

__all__ = ["POINT_SUFFIXES", "encode_points"]

POINT_SUFFIXES = (".ply", ".csv", ".xyz", ".npy")


def _colours(points: Points) -> np.ndarray:
    from orbviz.surface.colors import point_colors

    return point_colors(points.phase, points.real)


def _header(points: Points, units: str) -> str:
    what = "sign of psi (+1/-1)" if points.real else "phase of psi (radians)"
    return f"orbviz sample: {points.label}, {len(points)} points, x y z in {units}, then the {what}"


def _ply(points: Points, units: str) -> bytes:
    import trimesh
    from trimesh.exchange.ply import export_ply
    from trimesh.visual import ColorVisuals

    cloud = trimesh.Trimesh(
        vertices=points.positions, faces=np.empty((0, 3), dtype=np.int64), process=False
    )
    cloud.visual = ColorVisuals(cloud, vertex_colors=_colours(points))
    cloud.vertex_attributes["phase"] = points.phase.astype(np.float32)
    data = export_ply(cloud, encoding="binary", vertex_normal=False, include_attributes=True)
    head, sep, body = data.partition(b"end_header\n")
    lines = [b"comment " + _header(points, units).encode("ascii", "replace")]
    kept = [line for line in head.split(b"\n") if not line.startswith(b"comment")]
    return b"\n".join([kept[0], kept[1], *lines, *kept[2:]]) + sep + body


def _text(points: Points, units: str, delimiter: str) -> bytes:
    table = np.column_stack([points.positions, points.phase]).astype(np.float64)
    out = io.StringIO()
    names = delimiter.join(["x", "y", "z", "sign" if points.real else "phase"])
    np.savetxt(
        out,
        table,
        fmt="%.6g",
        delimiter=delimiter,
        header=f"{_header(points, units)}\n{names}",
        comments="# ",
    )
    return out.getvalue().encode("utf-8")


def encode_points(points: Points, path: Path, units: str) -> dict[Path, bytes]:
    """Return the bytes of the points in the format the suffix of ``path`` names."""
    suffix = path.suffix.lower()
    if suffix == ".ply":
        return {path: _ply(points, units)}
    if suffix == ".npy":
        buffer = io.BytesIO()
        np.save(buffer, np.column_stack([points.positions, points.phase]).astype(np.float32))
        return {path: buffer.getvalue()}
    return {path: _text(points, units, "," if suffix == ".csv" else " ")}
