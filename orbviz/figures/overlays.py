"""What a figure can draw beside the surface: cut caps, nodal surfaces, an outer surface."""

from __future__ import annotations

import math
from typing import TYPE_CHECKING, Any

import numpy as np

from orbviz.surface.contour import Body
from orbviz.surface.convert import pyvista_blocks

if TYPE_CHECKING:
    from orbviz.figures.figure import Figure

__all__ = ["add_bodies", "add_caps", "add_nodes", "cut_away", "polys"]

_NODE_STYLE = {"color": (0.45, 0.45, 0.5), "opacity": 0.22, "smooth_shading": True}


def polys(bodies: list[Body]) -> dict[str, Any]:
    """Each body as PyVista PolyData (normals active), by name."""
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
    fig: Figure, bodies: list[Body], *, prefix: str = "", opacity: float = 1.0
) -> list[str]:
    """Add phase-coloured bodies to the figure's plotter; returns the actor names."""
    flat = fig.options.lighting == "flat"
    names = []
    for name, poly in polys(bodies).items():
        fig.plotter.add_mesh(
            cut_away(poly, fig.options.cut),
            scalars="RGBA",
            rgb=True,
            opacity=opacity,
            smooth_shading=True,
            specular=0.0 if flat or opacity < 1 else 0.25,
            specular_power=30,
            ambient=0.55 if flat else 0.18,
            diffuse=0.85,
            name=f"{prefix}{name}",
        )
        names.append(f"{prefix}{name}")
    return names


def add_caps(fig: Figure, cut: str) -> None:
    """Phase-coloured cross-sections on the cut planes, so nested shells read as rings."""
    import pyvista

    grid, level = fig.mesh.grid, fig.mesh.isovalue.level
    n = min(grid.points * 2, 600)
    a = np.linspace(-grid.half_width, grid.half_width, n)
    planes = [("x", None)] if cut == "half" else [("x", "y>0"), ("y", "x>0")]
    threshold = math.sqrt(level)
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
            name = f"cap-{axis}-{index}"
            # lighter than the surface, so the cut face reads as a cut
            colour: Any = 0.65 * np.array(fig.options.colors[index][:3]) / 255.0 + 0.35
            if not grid.field.state.is_real:
                colour = (0.75, 0.75, 0.75)
            fig.plotter.add_mesh(part, color=colour, name=name, lighting=False)
            fig.overlays.setdefault("caps", []).append(name)


def add_nodes(fig: Figure, radius: float) -> None:
    """Translucent radial node spheres and angular nodal planes and cones (the state's own)."""
    import pyvista

    nodes = fig.mesh.state.nodal_surfaces()
    plotter = fig.plotter
    for k, r0 in enumerate(nodes.spheres):
        name = f"radial-node-{k}"
        plotter.add_mesh(
            pyvista.Sphere(radius=r0, theta_resolution=96, phi_resolution=48),
            name=name,
            **_NODE_STYLE,
        )
        fig.overlays.setdefault("radial_nodes", []).append(name)
    surfaces: list[tuple[str, Any]] = [
        (
            f"angular-plane-{k}",
            pyvista.Disc(center=(0, 0, 0), inner=0, outer=radius, normal=normal, c_res=96),
        )
        for k, normal in enumerate(nodes.planes)
    ]
    for k, theta in enumerate(nodes.cones):
        if abs(theta - math.pi / 2) < 1e-3:
            cone = pyvista.Disc(center=(0, 0, 0), inner=0, outer=radius, normal=(0, 0, 1), c_res=96)
        else:
            height = radius * math.cos(theta)
            cone = pyvista.Cone(
                center=(0, 0, height / 2),
                direction=(0, 0, -np.sign(height)),
                height=abs(height),
                radius=radius * math.sin(theta),
                resolution=96,
                capping=False,
            )
        surfaces.append((f"angular-cone-{k}", cone))
    for name, surface in surfaces:
        plotter.add_mesh(surface, name=name, **_NODE_STYLE)
        fig.overlays.setdefault("angular_nodes", []).append(name)
