"""VTK actors for a figure's stage: lit surfaces, lines, dots, labels and a glowing volume.

Also the simple shapes the overlays need (disc, open cone, sphere, line, a flat sheet) from
VTK's sources, and cuts of a surface by a plane, a box or a scalar. Everything returned is a
VTK object for :class:`orbviz.figures.stage.Stage`.
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

import numpy as np

__all__ = [
    "clip_outside_box",
    "clip_scalar",
    "clip_under_plane",
    "cone",
    "disc",
    "label",
    "line",
    "points",
    "sheet",
    "sphere",
    "surface",
    "volume",
]

Colour = Sequence[float]  # RGB, each 0 to 1


def surface(
    poly: Any,
    *,
    color: Colour | None = None,
    opacity: float = 1.0,
    ambient: float = 0.0,
    diffuse: float = 1.0,
    specular: float = 0.0,
    specular_power: float = 30.0,
    lighting: bool = True,
    line_width: float | None = None,
) -> Any:
    """Return an actor for a PolyData: Phong-shaded, coloured by ``color`` or its RGBA scalars.

    Without ``color`` the PolyData's active scalars (uint8 RGBA or RGB) are its colours.
    """
    from vtkmodules.vtkRenderingCore import vtkActor, vtkPolyDataMapper

    mapper = vtkPolyDataMapper()
    mapper.SetInputData(poly)
    actor = vtkActor()
    actor.SetMapper(mapper)
    prop = actor.GetProperty()
    if color is None:
        mapper.SetColorModeToDirectScalars()
        mapper.ScalarVisibilityOn()
    else:
        mapper.ScalarVisibilityOff()
        prop.SetColor(*color)
    prop.SetInterpolationToPhong()
    prop.SetOpacity(opacity)
    prop.SetAmbient(ambient)
    prop.SetDiffuse(diffuse)
    prop.SetSpecular(specular)
    prop.SetSpecularPower(specular_power)
    if not lighting:
        prop.LightingOff()
    if line_width is not None:
        prop.SetLineWidth(line_width)
    return actor


def points(positions: np.ndarray, rgb: np.ndarray, *, size: float) -> Any:
    """Return dots at ``positions`` in uint8 ``rgb`` colours, drawn as small lit spheres."""
    from vtkmodules.util.numpy_support import numpy_to_vtk, numpy_to_vtkIdTypeArray
    from vtkmodules.vtkCommonCore import vtkPoints
    from vtkmodules.vtkCommonDataModel import vtkCellArray, vtkPolyData

    count = len(positions)
    coords = vtkPoints()
    coords.SetData(numpy_to_vtk(np.ascontiguousarray(positions, dtype=np.float32), deep=True))
    verts = vtkCellArray()
    verts.SetData(
        numpy_to_vtkIdTypeArray(np.arange(count + 1, dtype=np.int64), deep=True),
        numpy_to_vtkIdTypeArray(np.arange(count, dtype=np.int64), deep=True),
    )
    poly = vtkPolyData()
    poly.SetPoints(coords)
    poly.SetVerts(verts)
    poly.GetPointData().SetScalars(
        numpy_to_vtk(np.ascontiguousarray(rgb[:, :3], dtype=np.uint8), deep=True)
    )
    actor = surface(poly, ambient=0.3, diffuse=0.8)
    actor.GetProperty().SetRenderPointsAsSpheres(True)
    actor.GetProperty().SetPointSize(size)
    return actor


def label(
    text: str,
    at: Sequence[float],
    *,
    font_size: int,
    color: Colour,
    box: Colour | None = None,
) -> Any:
    """Return bold text centred on a point of the scene, drawn over everything.

    With ``box``, the text sits on a box of that colour (80% opaque).
    """
    from vtkmodules.vtkRenderingCore import vtkTextActor

    actor = vtkTextActor()
    actor.SetInput(text)
    actor.GetPositionCoordinate().SetCoordinateSystemToWorld()
    actor.GetPositionCoordinate().SetValue(*(float(v) for v in at))
    style = actor.GetTextProperty()
    style.SetFontSize(font_size)
    style.SetColor(*color)
    style.BoldOn()
    style.SetJustificationToCentered()
    style.SetVerticalJustificationToCentered()
    if box is not None:
        style.SetBackgroundColor(*box)
        style.SetBackgroundOpacity(0.8)
    return actor


def volume(image: Any, *, unit_distance: float) -> Any:
    """Return a volume prop for an image whose point scalars are uint8 RGBA.

    The colour is the RGB; alpha 255 is full opacity, accumulated over ``unit_distance``.
    """
    from vtkmodules.vtkCommonDataModel import vtkPiecewiseFunction
    from vtkmodules.vtkRenderingCore import vtkVolume, vtkVolumeProperty
    from vtkmodules.vtkRenderingVolumeOpenGL2 import vtkSmartVolumeMapper

    mapper = vtkSmartVolumeMapper()
    mapper.SetInputData(image)
    mapper.SetBlendModeToComposite()
    opacity = vtkPiecewiseFunction()
    opacity.AddPoint(0.0, 0.0)
    opacity.AddPoint(255.0, 1.0)
    prop = vtkVolumeProperty()
    prop.IndependentComponentsOff()  # RGB are colours, A the opacity
    prop.SetScalarOpacity(opacity)
    prop.SetScalarOpacityUnitDistance(unit_distance)
    prop.SetInterpolationTypeToLinear()
    prop.ShadeOff()
    out = vtkVolume()
    out.SetMapper(mapper)
    out.SetProperty(prop)
    return out


# ------------------------------------------------------------------ shapes
def _output(source: Any) -> Any:
    source.Update()
    return source.GetOutput()


def disc(radius: float, normal: Sequence[float]) -> Any:
    """Return a flat disc through the origin."""
    from vtkmodules.vtkFiltersSources import vtkDiskSource

    source = vtkDiskSource()
    source.SetInnerRadius(0.0)
    source.SetOuterRadius(radius)
    source.SetCircumferentialResolution(96)
    source.SetNormal(*(float(v) for v in normal))
    return _output(source)


def cone(center: Sequence[float], direction: Sequence[float], height: float, radius: float) -> Any:
    """Return an open cone (no base) of this height and base radius."""
    from vtkmodules.vtkFiltersSources import vtkConeSource

    source = vtkConeSource()
    source.SetCenter(*center)
    source.SetDirection(*direction)
    source.SetHeight(height)
    source.SetRadius(radius)
    source.SetResolution(96)
    source.CappingOff()
    return _output(source)


def sphere(radius: float) -> Any:
    """Return a sphere about the origin."""
    from vtkmodules.vtkFiltersSources import vtkSphereSource

    source = vtkSphereSource()
    source.SetRadius(radius)
    source.SetThetaResolution(96)
    source.SetPhiResolution(48)
    return _output(source)


def line(start: Sequence[float], end: Sequence[float]) -> Any:
    """Return a straight line."""
    from vtkmodules.vtkFiltersSources import vtkLineSource

    source = vtkLineSource()
    source.SetPoint1(*start)
    source.SetPoint2(*end)
    return _output(source)


def sheet(corner: Sequence[float], right: Sequence[float], up: Sequence[float], n: int) -> Any:
    """Return a flat parallelogram of n x n points, corners ``corner``, ``right``, ``up``."""
    from vtkmodules.vtkFiltersSources import vtkPlaneSource

    source = vtkPlaneSource()
    source.SetOrigin(*corner)
    source.SetPoint1(*right)
    source.SetPoint2(*up)
    source.SetResolution(n - 1, n - 1)
    return _output(source)


# ------------------------------------------------------------------ cuts
def _clip(poly: Any, function: Any, *, inside_out: bool) -> Any:
    from vtkmodules.vtkFiltersCore import vtkClipPolyData

    clip = vtkClipPolyData()
    clip.SetInputData(poly)
    clip.SetClipFunction(function)
    clip.SetInsideOut(inside_out)
    return _output(clip)


def clip_under_plane(poly: Any, normal: Sequence[float]) -> Any:
    """Keep the part with normal . x <= 0 (the plane through the origin)."""
    from vtkmodules.vtkCommonDataModel import vtkPlane

    plane = vtkPlane()
    plane.SetOrigin(0.0, 0.0, 0.0)
    plane.SetNormal(*normal)
    return _clip(poly, plane, inside_out=True)


def clip_outside_box(poly: Any, bounds: Sequence[float]) -> Any:
    """Keep the part outside the box (xmin, xmax, ymin, ymax, zmin, zmax)."""
    from vtkmodules.vtkCommonDataModel import vtkBox

    box = vtkBox()
    box.SetBounds(*bounds)
    return _clip(poly, box, inside_out=False)


def clip_scalar(poly: Any, values: np.ndarray, threshold: float) -> Any:
    """Keep the part where the point ``values`` are at least ``threshold``, cut smoothly."""
    from vtkmodules.util.numpy_support import numpy_to_vtk
    from vtkmodules.vtkFiltersCore import vtkClipPolyData

    poly.GetPointData().SetScalars(
        numpy_to_vtk(np.ascontiguousarray(values, dtype=np.float64), deep=True)
    )
    clip = vtkClipPolyData()
    clip.SetInputData(poly)
    clip.SetValue(threshold)
    clip.InsideOutOff()
    return _output(clip)
