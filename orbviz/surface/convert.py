"""The bodies as trimesh, VTK and PyVista objects: one named geometry per body, materials complete.

A real state's bodies each get a matte PBR material in their phase colour; a complex state's
surface gets per-vertex phase colours under a matte white material (glTF's default material is
fully metallic, which viewers show as dark metal). The writers in :mod:`orbviz.export` build on
these, and :meth:`orbviz.surface.mesh.OrbitalMesh.to_trimesh` returns them.
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

import numpy as np

from orbviz.surface.contour import Body

__all__ = [
    "ROUGHNESS",
    "body_trimesh",
    "combined_trimesh",
    "pyvista_blocks",
    "trimesh_scene",
    "vtk_polydata",
]

ROUGHNESS = 0.6  # of every body's matte material


def _material(name: str, rgba: Sequence[int]) -> Any:
    from trimesh.visual.material import PBRMaterial

    return PBRMaterial(
        name=name,
        baseColorFactor=[int(v) for v in rgba],
        metallicFactor=0.0,
        roughnessFactor=ROUGHNESS,
        doubleSided=False,
    )


def body_trimesh(
    body: Body, scale: float = 1.0, *, white_under_colours: bool = True, linear: bool = False
) -> Any:
    """One body as a ``trimesh.Trimesh``: a named phase material, or vertex colours under white.

    With ``white_under_colours`` off, vertex colours come without any material (what OBJ's
    ``v x y z r g b`` lines carry). With ``linear``, colours are stored as linear light, as
    glTF reads them; otherwise as the sRGB values the figures show.
    """
    import trimesh
    from trimesh.visual import ColorVisuals, TextureVisuals

    from orbviz.surface.colors import linear_bytes

    mesh = trimesh.Trimesh(
        vertices=body.vertices * scale,
        faces=body.faces,
        vertex_normals=body.normals if len(body.normals) else None,
        process=False,
    )
    colors = linear_bytes(body.colors) if linear and len(body.colors) else body.colors
    uniform = len(colors) and bool(np.all(colors == colors[0]))
    if not uniform and not white_under_colours:
        mesh.visual = ColorVisuals(mesh, vertex_colors=colors)
        return mesh
    colour = colors[0] if uniform else (255, 255, 255, 255)
    mesh.visual = TextureVisuals(material=_material(body.name, colour))
    if not uniform and len(colors):
        mesh.visual.vertex_attributes["color"] = colors
    return mesh


def trimesh_scene(
    bodies: Sequence[Body],
    scale: float = 1.0,
    *,
    prefix: str = "",
    white_under_colours: bool = True,
    linear: bool = False,
) -> Any:
    """All bodies in one ``trimesh.Scene``, each a named geometry and node (``prefix`` + name).

    ``linear`` stores the colours as linear light, as glTF reads them (see :func:`body_trimesh`).
    """
    import trimesh

    scene = trimesh.Scene()
    for body in bodies:
        name = f"{prefix}{body.name}"
        mesh = body_trimesh(body, scale, white_under_colours=white_under_colours, linear=linear)
        scene.add_geometry(mesh, geom_name=name, node_name=name)
    return scene


def combined_trimesh(bodies: Sequence[Body], scale: float = 1.0) -> Any:
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


def pyvista_blocks(bodies: Sequence[Body]) -> Any:
    """Return a ``pyvista.MultiBlock``: one PolyData per body, normals active.

    Each carries the point arrays ``Normals``, ``RGBA`` and ``phase``.
    """
    import pyvista

    blocks = pyvista.MultiBlock()
    for body in bodies:
        cells = np.hstack([np.full((len(body.faces), 1), 3), body.faces]).ravel()
        poly = pyvista.PolyData(body.vertices, cells)
        poly.point_data["Normals"] = body.normals
        poly.point_data["RGBA"] = body.colors
        poly.point_data["phase"] = body.phase
        poly.point_data.active_normals_name = "Normals"
        blocks.append(poly, body.name)
    return blocks


def vtk_polydata(
    vertices: np.ndarray,
    faces: np.ndarray,
    *,
    normals: np.ndarray | None = None,
    colors: np.ndarray | None = None,
) -> Any:
    """Return triangles as a ``vtkPolyData`` (VTK's own modules: no PyVista import).

    Parameters
    ----------
    vertices : (V, 3) ndarray
        Positions.
    faces : (F, 3) ndarray of int
        Triangles.
    normals : (V, 3) ndarray, optional
        Point normals, set as the active normals.
    colors : (V, 4) ndarray of uint8, optional
        RGBA per point, set as the active scalars (named ``RGBA``).
    """
    from vtkmodules.util.numpy_support import numpy_to_vtk, numpy_to_vtkIdTypeArray
    from vtkmodules.vtkCommonCore import vtkPoints
    from vtkmodules.vtkCommonDataModel import vtkCellArray, vtkPolyData

    points = vtkPoints()
    points.SetData(numpy_to_vtk(np.ascontiguousarray(vertices), deep=True))
    cells = vtkCellArray()
    offsets = np.arange(0, 3 * len(faces) + 1, 3, dtype=np.int64)
    cells.SetData(
        numpy_to_vtkIdTypeArray(offsets, deep=True),
        numpy_to_vtkIdTypeArray(np.ascontiguousarray(faces, dtype=np.int64).ravel(), deep=True),
    )
    poly = vtkPolyData()
    poly.SetPoints(points)
    poly.SetPolys(cells)
    if normals is not None and len(normals):
        array = numpy_to_vtk(np.ascontiguousarray(normals, dtype=np.float32), deep=True)
        array.SetName("Normals")
        poly.GetPointData().SetNormals(array)
    if colors is not None and len(colors):
        array = numpy_to_vtk(np.ascontiguousarray(colors, dtype=np.uint8), deep=True)
        array.SetName("RGBA")
        poly.GetPointData().SetScalars(array)
    return poly
