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
    from vtkmodules.util.numpy_support import numpy_to_vtk, numpy_to_vtkIdTypeArray, vtk_to_numpy
    from vtkmodules.vtkCommonCore import vtkPoints
    from vtkmodules.vtkCommonDataModel import vtkCellArray, vtkPolyData
    from vtkmodules.vtkFiltersCore import vtkQuadricDecimation

    points = vtkPoints()
    points.SetData(numpy_to_vtk(body.vertices, deep=True))
    cells = vtkCellArray()
    offsets = np.arange(0, 3 * len(body.faces) + 1, 3, dtype=np.int64)
    cells.SetData(
        numpy_to_vtkIdTypeArray(offsets, deep=True),
        numpy_to_vtkIdTypeArray(body.faces.astype(np.int64).ravel(), deep=True),
    )
    poly = vtkPolyData()
    poly.SetPoints(points)
    poly.SetPolys(cells)
    reducer = vtkQuadricDecimation()
    reducer.SetInputData(poly)
    reducer.SetTargetReduction(1.0 - target_faces / len(body.faces))
    reducer.VolumePreservationOn()
    reducer.Update()
    out = reducer.GetOutput()
    vertices = vtk_to_numpy(out.GetPoints().GetData()).astype(np.float64)
    faces = vtk_to_numpy(out.GetPolys().GetConnectivityArray()).astype(np.int64).reshape(-1, 3)
    return Body(body.name, vertices, faces)
