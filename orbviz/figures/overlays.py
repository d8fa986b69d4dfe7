"""What a panel draws: the bodies, cut caps, nodal surfaces, outer surfaces, axes.

Beside the phase-coloured bodies, a panel may show cut caps, nodal surfaces, an outer surface,
a set's members in their own colours, and axes through the nucleus.

Each function adds actors to a :class:`~orbviz.figures.stage.Stage` and returns their names, so
that a figure can take one panel's actors away and show the next with the same render window.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from typing import Any

import numpy as np

from orbviz.figures import actors
from orbviz.figures.options import FigureOptions
from orbviz.figures.stage import Stage
from orbviz.states.state import NodalSurfaces
from orbviz.surface.colors import SET_PALETTE
from orbviz.surface.contour import Body
from orbviz.surface.convert import vtk_polydata
from orbviz.surface.mesh import OrbitalMesh

__all__ = [
    "add_axis_lines",
    "add_bodies",
    "add_caps",
    "add_members",
    "add_nodes",
    "cut_away",
]

_NODE_STYLE: dict[str, Any] = {"color": (0.45, 0.45, 0.5), "opacity": 0.22}
_AXIS_INK = (0.25, 0.25, 0.28)


def _poly(body: Body) -> Any:
    return vtk_polydata(body.vertices, body.faces, normals=body.normals, colors=body.colors)


def cut_away(poly: Any, cut: str | None) -> Any:
    """Remove x > 0 (half) or x > 0, y > 0 (quarter) from a PolyData."""
    if cut is None:
        return poly
    if cut == "half":
        return actors.clip_under_plane(poly, (1, 0, 0))
    big = 1e6
    return actors.clip_outside_box(poly, (0, big, 0, big, -big, big))


def add_bodies(
    stage: Stage,
    options: FigureOptions,
    bodies: Sequence[Body],
    *,
    prefix: str = "",
    opacity: float = 1.0,
) -> list[str]:
    """Add phase-coloured bodies; return the actor names."""
    flat = options.lighting == "flat"
    names = []
    for body in bodies:
        actor = actors.surface(
            cut_away(_poly(body), options.cut),
            opacity=opacity,
            specular=0.0 if flat or opacity < 1 else 0.25,
            specular_power=30,
            ambient=0.55 if flat else 0.18,
            diffuse=0.85,
        )
        names.append(stage.add(f"{prefix}{body.name}", actor))
    return names


def add_members(stage: Stage, members: Sequence[OrbitalMesh], *, prefix: str = "") -> list[str]:
    """Add a set's members in one panel: each large lobe in its palette colour, small lobes grey.

    The palette is Okabe & Ito's (2008), one colour per member.
    """
    names = []
    for k, mesh in enumerate(members):
        for body in mesh.bodies:
            colour = tuple(np.array(SET_PALETTE[k % len(SET_PALETTE)]) / 255.0)
            style: dict[str, Any] = (
                {"color": colour, "specular": 0.25, "specular_power": 30, "ambient": 0.18}
                if body.name != "negative"
                else {"color": (0.6, 0.6, 0.6), "opacity": 0.35}
            )
            names.append(
                stage.add(f"{prefix}{k}-{body.name}", actors.surface(_poly(body), **style))
            )
    return names


def add_caps(
    stage: Stage, options: FigureOptions, mesh: OrbitalMesh, *, prefix: str = ""
) -> list[str]:
    """Add phase-coloured cross-sections on the cut planes, so nested shells read as rings."""
    from vtkmodules.util.numpy_support import vtk_to_numpy

    grid, level = mesh.grid, mesh.isovalue.level
    n, h = min(grid.points * 2, 600), grid.half_width
    planes = [("x", None)] if options.cut == "half" else [("x", "y>0"), ("y", "x>0")]
    threshold = math.sqrt(level)
    names = []
    for axis, keep in planes:
        if axis == "x":  # the plane x = 0, spanned by y and z
            plane = actors.sheet((0, -h, -h), (0, h, -h), (0, -h, h), n)
        else:
            plane = actors.sheet((-h, 0, -h), (h, 0, -h), (-h, 0, h), n)
        if keep == "y>0":
            plane = actors.clip_under_plane(plane, (0, -1, 0))
        elif keep == "x>0":
            plane = actors.clip_under_plane(plane, (-1, 0, 0))
        xyz = vtk_to_numpy(plane.GetPoints().GetData()).astype(np.float64)
        field = np.asarray(grid.field(xyz[:, 0], xyz[:, 1], xyz[:, 2]), dtype=np.float64)
        sides = [(1.0, 0), (-1.0, 1)] if grid.field.two_sided else [(1.0, 0)]
        for sign, index in sides:
            part = actors.clip_scalar(plane, sign * field, threshold)
            if part.GetNumberOfPoints() == 0:
                continue
            # lighter than the surface, so the cut face reads as a cut
            colour: Any = tuple(0.65 * np.array(options.colors[index][:3]) / 255.0 + 0.35)
            if not grid.field.state.is_real:
                colour = (0.75, 0.75, 0.75)
            cap = actors.surface(part, color=colour, lighting=False)
            names.append(stage.add(f"{prefix}cap-{axis}-{index}", cap))
    return names


def _cone(radius: float, polar: float) -> Any:
    if abs(polar - math.pi / 2) < 1e-3:
        return actors.disc(radius, (0, 0, 1))
    height = radius * math.cos(polar)
    return actors.cone(
        (0, 0, height / 2), (0, 0, -np.sign(height)), abs(height), radius * math.sin(polar)
    )


def add_nodes(
    stage: Stage, nodes: NodalSurfaces, radius: float, *, prefix: str = ""
) -> dict[str, list[str]]:
    """Add translucent radial node spheres and angular nodal planes and cones, by kind."""
    out: dict[str, list[str]] = {"radial_nodes": [], "angular_nodes": []}
    for k, r0 in enumerate(nodes.spheres):
        node = actors.surface(actors.sphere(r0), **_NODE_STYLE)
        out["radial_nodes"].append(stage.add(f"{prefix}radial-node-{k}", node))
    surfaces: list[tuple[str, Any]] = [
        (f"{prefix}angular-plane-{k}", actors.disc(radius, normal))
        for k, normal in enumerate(nodes.planes)
    ]
    surfaces += [(f"{prefix}angular-cone-{k}", _cone(radius, t)) for k, t in enumerate(nodes.cones)]
    for name, shape in surfaces:
        out["angular_nodes"].append(stage.add(name, actors.surface(shape, **_NODE_STYLE)))
    return out


def add_axis_lines(stage: Stage, radius: float, *, prefix: str = "") -> list[str]:
    """Add x, y and z axes through the nucleus, labelled at their positive ends.

    The labels are sized to the render window (a twentieth of its height), so they read alike
    at every resolution.
    """
    names = []
    font_size = max(12, round(stage.size[1] / 20))
    for letter, direction in zip("xyz", np.eye(3), strict=True):
        axis = actors.line(tuple(-radius * direction), tuple(radius * direction))
        names.append(
            stage.add(f"{prefix}axis-{letter}", actors.surface(axis, color=_AXIS_INK, line_width=2))
        )
        tip = actors.label(
            letter, tuple(1.12 * radius * direction), font_size=font_size, color=_AXIS_INK
        )
        names.append(stage.add(f"{prefix}axis-label-{letter}", tip))
    return names
