"""From a state to finished, closed, phase-coloured bodies and a report: the mesh pipeline."""

from __future__ import annotations

import math
import os
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from orbviz._defaults import DEFAULTS, LIMITS
from orbviz._options import checked
from orbviz.errors import ParameterError
from orbviz.levels.fields import field_of
from orbviz.levels.grid import Grid, box_half_width, sample
from orbviz.levels.isovalue import Isovalue, check_fraction, check_isovalue, enclosing_isovalue
from orbviz.states.state import State
from orbviz.surface.checks import mesh_facts
from orbviz.surface.contour import Body, contour, finish_body
from orbviz.surface.convert import pyvista_blocks, trimesh_scene
from orbviz.surface.options import MeshOptions
from orbviz.surface.tidy import decimate, smooth

__all__ = ["OrbitalMesh", "build_mesh"]


@dataclass
class OrbitalMesh:
    """The bodies of one state's isosurface, with what made them.

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

    def __repr__(self) -> str:
        bodies = ", ".join(f"{b.name} ({len(b.faces)} faces)" for b in self.bodies)
        return (
            f"OrbitalMesh({self.grid.field.state.label!r}, {100 * self.isovalue.fraction:g}% at "
            f"{self.isovalue.level:.4g} bohr^-3, grid {self.grid.points}: {bodies})"
        )

    def _repr_html_(self) -> str:
        """Show the mesh's state at its fraction in a notebook as an interactive page."""
        from orbviz.pages.notebook import show

        return show(self)._repr_html_()

    def _repr_png_(self) -> bytes:
        """Show the mesh's state at its fraction in a notebook as a still figure."""
        from orbviz.pages.notebook import show

        return show(self)._repr_png_()

    @property
    def state(self) -> State:
        """The state the surface belongs to."""
        return self.grid.field.state

    def to_trimesh(self) -> Any:
        """One ``trimesh.Scene``: each body a named geometry with its phase material (bohr)."""
        return trimesh_scene(self.bodies)

    def to_pyvista(self) -> Any:
        """One ``pyvista.MultiBlock``: a PolyData per body with Normals, RGBA and phase (bohr)."""
        return pyvista_blocks(self.bodies)

    def export(
        self,
        path: str | os.PathLike[str],
        *,
        units: str = "bohr",
        display_size: float | str | None = None,
    ) -> list[Path]:
        """Write the bodies in the format the suffix names (.stl .obj .glb .gltf .ply .3mf).

        Parameters
        ----------
        path : str or path-like
            Output file; companions (``.mtl``, ``.bin``) go beside it. Every file is checked
            before writing and the set is replaced as a whole.
        units : {"bohr", "angstrom", "nm", "pm"}, default: "bohr"
            Length unit of the written coordinates.
        display_size : float or str, optional
            glTF only: the longest side in metres (``0.2`` or ``"20cm"``), for AR and
            room-scale viewers, instead of ``units``.

        Returns
        -------
        list of Path
            Every file written.
        """
        from orbviz._options import build
        from orbviz.export import write_bodies
        from orbviz.surface.options import MeshOptions

        size = build(MeshOptions, {"display_size": display_size}).display_size
        return write_bodies(self.bodies, path, units=units, display_size=size)

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
        self.isovalue = check_isovalue(self.grid.field.state, self.isovalue)
        above, total = self.grid.probability_sums(self.isovalue.level)
        bodies = self.body_facts()
        return {
            "spec": self.grid.field.state.spec,
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


def build_mesh(
    state: State,
    /,
    options: MeshOptions | None = None,
    *,
    fraction: float = DEFAULTS.fraction,
    half_width: float | None = None,
    level: Isovalue | None = None,
    window: bool = True,
) -> OrbitalMesh:
    """Isosurface bodies of a state enclosing ``fraction`` of its probability.

    Parameters
    ----------
    state : State
        Any kind of state.
    options : MeshOptions, optional
        Grid, face budget, smoothing and colours (checked here by their rules).
    fraction : float, default: 0.9
        Probability inside the surface.
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
    opts = checked(options or MeshOptions())
    fraction = check_fraction(fraction)
    iso = enclosing_isovalue(state, fraction=fraction, check=False) if level is None else level
    contoured = field_of(state)
    width = box_half_width(state, iso, opts.grid) if half_width is None else float(half_width)
    if not (math.isfinite(width) and width > iso.max_radius):
        raise ParameterError(
            f"extent: the box half-width {width:g} bohr does not hold the surface, which reaches "
            f"{iso.max_radius:.4g} bohr"
        )
    samples = sample(contoured, width, opts.grid, surface=iso if window else None)
    bodies = contour(samples, iso.level)
    if opts.smooth:
        bodies = [smooth(b, iterations=opts.smooth) for b in bodies]
    if opts.faces is not None:
        total = sum(len(b.faces) for b in bodies)
        bodies = [decimate(b, max(4, int(opts.faces * len(b.faces) / total))) for b in bodies]
    bodies = [finish_body(b, samples, colors=opts.colors) for b in bodies]
    return OrbitalMesh(bodies, iso, samples, _grid_notes(iso, samples))


def _advice(need: int) -> str:
    if need <= LIMITS.grid_max:
        return f"use a grid of {need} or more"
    return f"no supported grid (up to {LIMITS.grid_max}) resolves it"


def _grid_notes(iso: Isovalue, grid: Grid) -> list[str]:
    """Advise a finer grid where the surface has features too thin for it.

    Radial shells: under 0.4 cells thick. Measured (docs/meshes.md): 10s at 128^3, thinnest
    shell 0.45 cells, keeps the 95th percentile vertex level 4% over c; 12s, 0.33 cells, 6%;
    15s, 0.22 cells, 9%.

    Angular lobes: a harmonic of degree l changes sign l times over the polar angle, so its
    lobes are about pi / (l + 1) radians wide; at half the surface's reach that is
    pi r_max / (2 (l + 1)). Under two cells the lobes break into pieces (80,79,0 at 128^3
    gave over a thousand).
    """
    notes = []
    thin = iso.thinnest_shell
    if thin is not None and thin < 0.4 * grid.spacing:
        need = math.ceil(grid.half_width / thin) + 1  # half a cell across the thinnest shell
        notes.append(
            f"the thinnest shell is {thin / grid.spacing:.2f} grid cells thick, so vertex levels "
            f"may stray beyond +-5% of the isovalue; {_advice(need)}"
        )
    l_top = max(l for c in grid.field.state.centres for (_, l, _), _ in c.orbital.basis)
    lobe = math.pi * iso.max_radius / (2 * (l_top + 1))
    if l_top > 0 and lobe < 2 * grid.spacing:
        need = math.ceil(2 * grid.half_width / (lobe / 2)) + 1  # two cells across a lobe
        notes.append(
            f"the l = {l_top} lobes are about {lobe / grid.spacing:.1f} grid cells wide, so they "
            f"break into pieces; {_advice(need)}"
        )
    return notes
