"""Optional tidying of a body: Taubin smoothing and quadric decimation.

Normals and colours are evaluated again on the new vertices afterwards
(:func:`orbviz.surface.contour.finish_body`).
"""

from __future__ import annotations

import numpy as np

from orbviz.surface.contour import Body

__all__ = ["decimate", "smooth"]


def smooth(body: Body, *, iterations: int = 10) -> Body:
    """Taubin smoothing (no shrinkage) of a body's vertices; normals and colours are redone later.

    Uses ``trimesh.smoothing.filter_taubin`` (Taubin, SIGGRAPH 1995).
    """
    import trimesh
    from trimesh.smoothing import filter_taubin

    mesh = trimesh.Trimesh(body.vertices, body.faces, process=False)
    filter_taubin(mesh, iterations=iterations)
    return Body(body.name, np.asarray(mesh.vertices, dtype=np.float64), body.faces)


def decimate(body: Body, target_faces: int) -> Body:
    """Reduce a body to about ``target_faces`` triangles by VTK quadric decimation.

    The result keeps its volume and stays closed. Normals and colours are evaluated again on the
    new vertices afterwards.
    """
    if target_faces >= len(body.faces):
        return body
    from vtkmodules.util.numpy_support import vtk_to_numpy
    from vtkmodules.vtkFiltersCore import vtkQuadricDecimation

    from orbviz.surface.convert import vtk_polydata

    poly = vtk_polydata(body.vertices, body.faces)
    reducer = vtkQuadricDecimation()
    reducer.SetInputData(poly)
    reducer.SetTargetReduction(1.0 - target_faces / len(body.faces))
    reducer.VolumePreservationOn()
    reducer.Update()
    out = reducer.GetOutput()
    vertices = vtk_to_numpy(out.GetPoints().GetData()).astype(np.float64)
    faces = vtk_to_numpy(out.GetPolys().GetConnectivityArray()).astype(np.int64).reshape(-1, 3)
    return Body(body.name, vertices, faces)
