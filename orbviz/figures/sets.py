"""One figure of a whole set of states (the four sp3 hybrids), each in its own colour."""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from orbviz._defaults import DEFAULTS
from orbviz._options import checked
from orbviz.figures.camera import camera_axes
from orbviz.figures.figure import Figure, figure, mesh_options
from orbviz.figures.options import FigureOptions
from orbviz.figures.overlays import polys
from orbviz.levels.grid import box_half_width
from orbviz.levels.isovalue import enclosing_isovalue
from orbviz.states.state import State
from orbviz.surface.colors import SET_PALETTE
from orbviz.surface.mesh import OrbitalMesh, build_mesh

__all__ = ["set_figure", "set_meshes"]


def set_meshes(
    states: Sequence[State], options: FigureOptions, *, fraction: float = DEFAULTS.fraction
) -> list[OrbitalMesh]:
    """Each member's mesh, all in one box (the largest any member needs, or the fixed extent)."""
    isos = [enclosing_isovalue(s, fraction=fraction, check=False) for s in states]
    width = options.extent or max(
        box_half_width(s, i, options.grid) for s, i in zip(states, isos, strict=True)
    )
    return [
        build_mesh(s, mesh_options(options), fraction=fraction, half_width=width, level=i)
        for s, i in zip(states, isos, strict=True)
    ]


def set_figure(
    states: Sequence[State],
    /,
    options: FigureOptions | None = None,
    *,
    fraction: float = DEFAULTS.fraction,
) -> Figure:
    """One figure of a whole set (e.g. the four sp3 hybrids), each in its own colour.

    Each member's positive body (its large lobe) is drawn opaque in a colour of the Okabe-Ito
    palette; the negative bodies (the small lobes) translucent grey. All share one box and one
    framing.
    """
    opts = checked(options or FigureOptions())
    meshes = set_meshes(states, opts, fraction=fraction)
    fig = figure(states[0], opts, fraction=fraction, mesh=meshes[0])
    try:
        for name in list(polys(meshes[0].bodies)):
            fig.plotter.remove_actor(name)
        for k, mesh in enumerate(meshes):
            for name, poly in polys(mesh.bodies).items():
                colour = np.array(SET_PALETTE[k % len(SET_PALETTE)]) / 255.0
                style = (
                    {"color": colour, "specular": 0.25, "specular_power": 30, "ambient": 0.18}
                    if name != "negative"
                    else {"color": (0.6, 0.6, 0.6), "opacity": 0.35}
                )
                fig.plotter.add_mesh(poly, smooth_shading=True, name=f"{k}-{name}", **style)
                fig.overlays.setdefault("members", []).append(f"{k}-{name}")
        if opts.extent is None:
            vertices = np.vstack([b.vertices for m in meshes for b in m.bodies])
            _, right, up = camera_axes(opts.view)
            w, h = opts.pixels
            fig.half_height = 1.2 * max(
                np.abs(vertices @ up).max(), np.abs(vertices @ right).max() * h / w
            )
            fig.plotter.camera.parallel_scale = fig.half_height
    except BaseException:
        fig.close()
        raise
    return fig
