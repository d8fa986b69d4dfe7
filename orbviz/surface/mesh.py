"""From an orbital to finished, closed, phase-coloured bodies and a report: the mesh pipeline."""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from orbviz._defaults import DEFAULTS
from orbviz.errors import ParameterError
from orbviz.levels.fields import field_of
from orbviz.levels.grid import Grid, box_half_width, check_grid_points, sample
from orbviz.levels.isovalue import Isovalue, check_isovalue, enclosing_isovalue
from orbviz.states.orbital import Orbital
from orbviz.surface.checks import mesh_facts
from orbviz.surface.colors import DEFAULT_PAIR
from orbviz.surface.contour import Body, contour, finish_body

__all__ = ["OrbitalMesh", "build_mesh", "decimate", "smooth"]


@dataclass
class OrbitalMesh:
    """The bodies of one orbital's isosurface, with what made them.

    Attributes
    ----------
    bodies : list of Body
        ``positive`` and ``negative`` for a real state, one ``surface`` for a complex one.
    isovalue : Isovalue
        The level, from the grid-free quadrature; :meth:`report` adds its check.
    grid : Grid
        The samples the surface was contoured from.
    notes : list of str
        Advice about the result, such as a grid too coarse for thin shells.
    """

    bodies: list[Body]
    isovalue: Isovalue
    grid: Grid
    notes: list[str] = field(default_factory=list)

    def to_trimesh(self) -> dict[str, Any]:
        """Each body as a ``trimesh.Trimesh`` (vertex normals and colours), keyed by name."""
        return {body.name: body.to_trimesh() for body in self.bodies}

    def to_pyvista(self) -> dict[str, Any]:
        """Each body as a ``pyvista.PolyData`` with ``Normals``, ``RGBA`` and ``phase`` arrays."""
        import pyvista

        out = {}
        for body in self.bodies:
            cells = np.hstack([np.full((len(body.faces), 1), 3), body.faces]).ravel()
            poly = pyvista.PolyData(body.vertices, cells)
            poly.point_data["Normals"] = body.normals
            poly.point_data["RGBA"] = body.colors
            poly.point_data["phase"] = body.phase
            out[body.name] = poly
        return out

    def body_facts(self) -> list[dict[str, Any]]:
        """Per body: name, vertex and face counts, pieces, volume, area, watertightness."""
        bodies = []
        for body in self.bodies:
            facts = mesh_facts(body.vertices, body.faces)
            bodies.append(
                {
                    "name": body.name,
                    "vertices": len(body.vertices),
                    "faces": len(body.faces),
                    "pieces": facts.pieces,
                    "volume_bohr3": facts.volume,
                    "area_bohr2": facts.area,
                    "watertight": facts.watertight,
                    "winding_consistent": facts.consistent,
                }
            )
        return bodies

    def report(self) -> dict[str, Any]:
        """Numbers for ``--report``: level, grid fractions, counts, volume, area, watertightness.

        This adds the level's finer check and sums the grid outside the window, so it costs
        about as much again as the sampling did.
        """
        self.isovalue = check_isovalue(self.grid.field.orbital, self.isovalue)
        above, total = self.grid.probability_sums(self.isovalue.level)
        bodies = self.body_facts()
        return {
            "spec": self.grid.field.orbital.spec,
            "field": self.grid.field.kind,
            "fraction": self.isovalue.fraction,
            "isovalue": self.isovalue.level,
            "isovalue_enclosed_fraction": self.isovalue.enclosed_fraction,
            "grid_points": self.grid.points,
            "grid_spacing_bohr": self.grid.spacing,
            "box_half_width_bohr": self.grid.half_width,
            "grid_enclosed_fraction": above,
            "in_box_probability": total,
            "vertices": sum(b["vertices"] for b in bodies),
            "faces": sum(b["faces"] for b in bodies),
            "watertight": all(b["watertight"] for b in bodies),
            "bodies": bodies,
            "notes": list(self.notes),
        }


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


def build_mesh(
    orbital: Orbital,
    /,
    *,
    fraction: float = DEFAULTS.fraction,
    grid: int = DEFAULTS.grid,
    smoothing: int = 0,
    faces: int | None = None,
    colors=DEFAULT_PAIR,
    half_width: float | None = None,
    level: Isovalue | None = None,
    window: bool = True,
) -> OrbitalMesh:
    """Isosurface bodies of an orbital enclosing ``fraction`` of its probability.

    Parameters
    ----------
    orbital : Orbital
        The state.
    fraction : float, default: 0.9
        Probability inside the surface.
    grid : int, default: 128
        Samples per axis.
    smoothing : int, default: 0
        Taubin smoothing iterations (0: none).
    faces : int, optional
        Face budget over all bodies; bodies are decimated in proportion to their size.
    colors : pair of RGBA tuples
        Positive and negative colours of a real state.
    half_width : float, optional
        Fix the box (bohr) instead of sizing it from the probability; it must hold the surface.
    level : Isovalue, optional
        Use this level instead of solving for ``fraction`` (frames of one animation share it).
    window : bool, default: True
        Sample only the window the surface reaches (``level.axis_reach`` or ``max_radius``; see
        :func:`orbviz.levels.grid.sample`). Pass False when ``level`` does not bound this state's
        surface, as a level shared by the frames of an animation does not.

    Returns
    -------
    OrbitalMesh
        Closed bodies wound outward, with gradient normals and phase colours.
    """
    grid = check_grid_points(grid)
    if faces is not None and (isinstance(faces, bool) or int(faces) < 100):
        raise ParameterError(f"--faces must be an integer of at least 100, got {faces!r}")
    if smoothing < 0:
        raise ParameterError(f"smoothing iterations must be >= 0, got {smoothing}")
    iso = enclosing_isovalue(orbital, fraction=fraction, check=False) if level is None else level
    contoured = field_of(orbital)
    width = box_half_width(orbital, iso, grid) if half_width is None else float(half_width)
    if not (math.isfinite(width) and width > iso.max_radius):
        raise ParameterError(
            f"the box half-width {width:g} bohr does not hold the surface, which reaches "
            f"{iso.max_radius:.4g} bohr"
        )
    samples = sample(contoured, width, grid, surface=iso if window else None)
    bodies = contour(samples, iso.level)
    if smoothing:
        bodies = [smooth(b, iterations=smoothing) for b in bodies]
    if faces is not None:
        total = sum(len(b.faces) for b in bodies)
        bodies = [decimate(b, max(4, int(faces * len(b.faces) / total))) for b in bodies]
    bodies = [finish_body(b, samples, colors=colors) for b in bodies]
    return OrbitalMesh(bodies, iso, samples, _grid_notes(iso, samples))


def _grid_notes(iso: Isovalue, grid: Grid) -> list[str]:
    """Advise a finer grid where a shell of the surface is under 0.4 cells thick.

    Measured (docs/meshes.md): 10s at 128^3, thinnest shell 0.45 cells, keeps the 95th
    percentile vertex level 4% over c; 12s, 0.33 cells, 6%; 15s, 0.22 cells, 9%.
    """
    thin = iso.thinnest_shell
    if thin is None or thin >= 0.4 * grid.spacing:
        return []
    need = math.ceil(grid.half_width / thin) + 1  # half a cell across the thinnest shell
    advice = f"use --grid {need} or more" if need <= 2048 else "no grid up to 2048 resolves it"
    return [
        f"the thinnest shell is {thin / grid.spacing:.2f} grid cells thick, so vertex levels "
        f"may stray beyond +-5% of the isovalue; {advice}"
    ]
