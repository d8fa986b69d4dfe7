"""What a panel draws: the bodies, cut caps, nodal surfaces, outer surfaces, axes.

Beside the phase-coloured bodies, a panel may show cut caps, nodal surfaces, an outer surface,
a set's members in their own colours, and axes through the nucleus.

Each function adds actors to a PyVista plotter and returns their names, so that a figure can
take one panel's actors away and show the next with the same render window.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from typing import Any

import numpy as np

from orbviz.figures.options import FigureOptions
from orbviz.states.state import NodalSurfaces
from orbviz.surface.colors import SET_PALETTE
from orbviz.surface.contour import Body
from orbviz.surface.convert import pyvista_blocks
from orbviz.surface.mesh import OrbitalMesh

__all__ = [
    "add_axis_lines",
    "add_bodies",
    "add_caps",
    "add_members",
    "add_nodes",
    "cut_away",
    "polys",
]

_NODE_STYLE = {"color": (0.45, 0.45, 0.5), "opacity": 0.22, "smooth_shading": True}
_AXIS_INK = (0.25, 0.25, 0.28)


def polys(bodies: Sequence[Body]) -> dict[str, Any]:
    """Return each body as PyVista PolyData (normals active), by name."""
    blocks = pyvista_blocks(bodies)
    return {blocks.get_block_name(i): blocks[i] for i in range(len(blocks))}


def cut_away(poly: Any, cut: str | None) -> Any:
    """Remove x > 0 (half) or x > 0, y > 0 (quarter) from a PolyData."""
    if cut is None:
        return poly
    if cut == "half":
        return poly.clip(normal=(1, 0, 0), origin=(0, 0, 0))
    big = 1e6
    return poly.clip_box((0, big, 0, big, -big, big), invert=True)


def add_bodies(
    plotter: Any,
    options: FigureOptions,
    bodies: Sequence[Body],
    *,
    prefix: str = "",
    opacity: float = 1.0,
) -> list[str]:
    """Add phase-coloured bodies; return the actor names."""
    flat = options.lighting == "flat"
    names = []
    for name, poly in polys(bodies).items():
        plotter.add_mesh(
            cut_away(poly, options.cut),
            scalars="RGBA",
            rgb=True,
            opacity=opacity,
            smooth_shading=True,
            specular=0.0 if flat or opacity < 1 else 0.25,
            specular_power=30,
            ambient=0.55 if flat else 0.18,
            diffuse=0.85,
            name=f"{prefix}{name}",
            render=False,
        )
        names.append(f"{prefix}{name}")
    return names


def add_members(plotter: Any, members: Sequence[OrbitalMesh], *, prefix: str = "") -> list[str]:
    """Add a set's members in one panel: each large lobe in its palette colour, small lobes grey.

    The palette is Okabe & Ito's (2008), one colour per member.
    """
    names = []
    for k, mesh in enumerate(members):
        for name, poly in polys(mesh.bodies).items():
            colour = np.array(SET_PALETTE[k % len(SET_PALETTE)]) / 255.0
            style: dict[str, Any] = (
                {"color": colour, "specular": 0.25, "specular_power": 30, "ambient": 0.18}
                if name != "negative"
                else {"color": (0.6, 0.6, 0.6), "opacity": 0.35}
            )
            plotter.add_mesh(
                poly, smooth_shading=True, name=f"{prefix}{k}-{name}", render=False, **style
            )
            names.append(f"{prefix}{k}-{name}")
    return names


def add_caps(
    plotter: Any, options: FigureOptions, mesh: OrbitalMesh, *, prefix: str = ""
) -> list[str]:
    """Add phase-coloured cross-sections on the cut planes, so nested shells read as rings."""
    import pyvista

    grid, level = mesh.grid, mesh.isovalue.level
    n = min(grid.points * 2, 600)
    a = np.linspace(-grid.half_width, grid.half_width, n)
    planes = [("x", None)] if options.cut == "half" else [("x", "y>0"), ("y", "x>0")]
    threshold = math.sqrt(level)
    names = []
    for axis, keep in planes:
        u, v = np.meshgrid(a, a, indexing="ij")
        x, y, z = (np.zeros_like(u), u, v) if axis == "x" else (u, np.zeros_like(u), v)
        sheet = pyvista.StructuredGrid(x, y, z)
        sheet.point_data["f"] = np.asarray(grid.field(x, y, z), dtype=np.float64).ravel(order="F")
        if keep == "y>0":
            sheet = sheet.clip(normal=(0, -1, 0), origin=(0, 0, 0))
        elif keep == "x>0":
            sheet = sheet.clip(normal=(-1, 0, 0), origin=(0, 0, 0))
        sides = [(1.0, 0), (-1.0, 1)] if grid.field.two_sided else [(1.0, 0)]
        for sign, index in sides:
            sheet.point_data["g"] = sign * sheet.point_data["f"]
            part = sheet.clip_scalar(scalars="g", value=threshold, invert=False)
            if part.n_points == 0:
                continue
            name = f"{prefix}cap-{axis}-{index}"
            # lighter than the surface, so the cut face reads as a cut
            colour: Any = 0.65 * np.array(options.colors[index][:3]) / 255.0 + 0.35
            if not grid.field.state.is_real:
                colour = (0.75, 0.75, 0.75)
            plotter.add_mesh(part, color=colour, name=name, lighting=False, render=False)
            names.append(name)
    return names


def _cone(radius: float, theta: float) -> Any:
    import pyvista

    if abs(theta - math.pi / 2) < 1e-3:
        return pyvista.Disc(center=(0, 0, 0), inner=0, outer=radius, normal=(0, 0, 1), c_res=96)
    height = radius * math.cos(theta)
    return pyvista.Cone(
        center=(0, 0, height / 2),
        direction=(0, 0, -np.sign(height)),
        height=abs(height),
        radius=radius * math.sin(theta),
        resolution=96,
        capping=False,
    )


def add_nodes(
    plotter: Any, nodes: NodalSurfaces, radius: float, *, prefix: str = ""
) -> dict[str, list[str]]:
    """Add translucent radial node spheres and angular nodal planes and cones, by kind."""
    import pyvista

    out: dict[str, list[str]] = {"radial_nodes": [], "angular_nodes": []}
    for k, r0 in enumerate(nodes.spheres):
        name = f"{prefix}radial-node-{k}"
        sphere = pyvista.Sphere(radius=r0, theta_resolution=96, phi_resolution=48)
        plotter.add_mesh(sphere, name=name, render=False, **_NODE_STYLE)
        out["radial_nodes"].append(name)
    surfaces: list[tuple[str, Any]] = [
        (
            f"{prefix}angular-plane-{k}",
            pyvista.Disc(center=(0, 0, 0), inner=0, outer=radius, normal=normal, c_res=96),
        )
        for k, normal in enumerate(nodes.planes)
    ]
    surfaces += [(f"{prefix}angular-cone-{k}", _cone(radius, t)) for k, t in enumerate(nodes.cones)]
    for name, surface in surfaces:
        plotter.add_mesh(surface, name=name, render=False, **_NODE_STYLE)
        out["angular_nodes"].append(name)
    return out


def add_axis_lines(plotter: Any, radius: float, *, prefix: str = "") -> list[str]:
    """Add x, y and z axes through the nucleus, labelled at their positive ends.

    The labels are sized to the render window (a twentieth of its height), so they read alike
    at every resolution.
    """
    import pyvista

    names = []
    for label, direction in zip("xyz", np.eye(3), strict=True):
        name = f"{prefix}axis-{label}"
        line = pyvista.Line(tuple(-radius * direction), tuple(radius * direction))
        plotter.add_mesh(line, color=_AXIS_INK, line_width=2, name=name, render=False)
        tip = f"{prefix}axis-label-{label}"
        plotter.add_point_labels(
            np.array([1.06 * radius * direction]),
            [label],
            name=tip,
            font_size=max(12, round(plotter.window_size[1] / 20)),
            text_color=_AXIS_INK,
            shape=None,
            show_points=False,
            always_visible=True,
            render=False,
        )
        names += [name, tip]
    return names
