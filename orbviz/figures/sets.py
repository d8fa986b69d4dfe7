"""The meshes of a set of states drawn together: one sampling box, so one scale."""

from __future__ import annotations

from collections.abc import Sequence

from orbviz._defaults import DEFAULTS
from orbviz.figures.options import FigureOptions
from orbviz.levels.grid import box_half_width
from orbviz.levels.isovalue import enclosing_isovalue
from orbviz.states.state import State
from orbviz.surface.mesh import OrbitalMesh, build_mesh
from orbviz.surface.options import MeshOptions

__all__ = ["set_meshes"]


def set_meshes(
    states: Sequence[State], options: FigureOptions, *, fraction: float = DEFAULTS.fraction
) -> list[OrbitalMesh]:
    """Return each state's mesh, all in one box (the largest any needs, or the fixed extent)."""
    isos = [enclosing_isovalue(s, fraction=fraction, check=False) for s in states]
    width = options.extent or max(
        box_half_width(s, i, options.grid) for s, i in zip(states, isos, strict=True)
    )
    mesh_options = MeshOptions(grid=options.grid, colors=options.colors)
    return [
        build_mesh(s, mesh_options, fraction=fraction, half_width=width, level=i)
        for s, i in zip(states, isos, strict=True)
    ]
