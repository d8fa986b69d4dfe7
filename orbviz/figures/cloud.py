"""The cloud and volume styles of a 3D figure: dots drawn as |psi|^2, or a glowing density.

``cloud``: exact samples of |psi|^2 (:mod:`orbviz.levels.sampling`, a fixed seed so a figure
is reproducible) drawn as small shaded spheres in the phase colours. The rare far samples
beyond the 99.5% radius are left out, so they do not set the frame. ``volume``: |psi|^2 on a
grid rendered as a translucent volume, coloured by the phase, opaque where the density
reaches the figure's isovalue (through VTK's volume mapper, off-screen).
"""

from __future__ import annotations

import dataclasses
from typing import TYPE_CHECKING, Any

import numpy as np

from orbviz.figures import actors
from orbviz.figures.options import FigureOptions
from orbviz.figures.stage import Stage
from orbviz.levels.sampling import Points, sample
from orbviz.states.state import State

if TYPE_CHECKING:
    from orbviz.figures.figure import Panel

__all__ = ["add_cloud", "add_volume", "styled"]

_REACH = 0.995  # radial quantile beyond which cloud dots are left out
_VOLUME_GRID = 112  # samples per axis of a volume figure
_SEED = 20261202  # figures are reproducible: the same dots every time
# each sample's alpha: 0.06 at the isovalue, growing as sqrt(density) up to 0.5 (VTK
# composites RGBA volumes sample by sample; chosen by eye on 3dz2, 3,2,1 and 3s)
_AT_LEVEL, _CAP = 0.06, 0.5


def cloud_points(state: State, count: int) -> Points:
    """Draw a figure's dots: ``count`` exact samples, the far 0.5% left out."""
    points = sample(state, count, seed=_SEED)
    near = np.linalg.norm(points.positions, axis=1) <= state.radial_quantile(_REACH)
    return dataclasses.replace(points, positions=points.positions[near], phase=points.phase[near])


def volume_grid(state: State, level: float, options: FigureOptions) -> Any:
    """Return |psi|^2 on a grid as a ``vtkImageData`` with RGBA point colours.

    The colour is the phase colour; each sample's alpha grows as the square root of the
    density, 0.06 at the figure's isovalue and at most 0.5, so an s state's outer shells show
    beside its dense core.
    """
    from vtkmodules.util.numpy_support import numpy_to_vtk
    from vtkmodules.vtkCommonDataModel import vtkImageData

    from orbviz.surface.colors import point_colors

    half = 1.05 * state.radial_quantile(_REACH)
    axis = np.linspace(-half, half, _VOLUME_GRID, dtype=np.float32)
    x, y, z = np.meshgrid(axis, axis, axis, indexing="ij")
    psi = state.psi(x.ravel(order="F"), y.ravel(order="F"), z.ravel(order="F"))
    density = np.abs(psi) ** 2
    phase = np.sign(psi) if state.is_real else np.angle(psi)
    rgba = point_colors(phase, state.is_real, options.colors)
    alpha = np.clip(_AT_LEVEL * np.sqrt(density / level), 0.0, _CAP)
    rgba[:, 3] = np.round(255 * alpha).astype(np.uint8)
    xyz = np.column_stack([x.ravel(order="F"), y.ravel(order="F"), z.ravel(order="F")])
    rgba[~_cut(xyz, options.cut), 3] = 0  # a cutaway empties its part of the volume
    grid = vtkImageData()
    grid.SetDimensions((_VOLUME_GRID,) * 3)
    grid.SetSpacing((float(axis[1] - axis[0]),) * 3)
    grid.SetOrigin((float(axis[0]),) * 3)
    colours = numpy_to_vtk(np.ascontiguousarray(rgba, dtype=np.uint8), deep=True)
    colours.SetName("RGBA")
    grid.GetPointData().SetScalars(colours)
    return grid


def styled(panel: Panel, options: FigureOptions) -> Panel:
    """Return the panel with its dots or its volume, as the figure's style asks."""
    if options.style == "cloud":
        return dataclasses.replace(panel, cloud=cloud_points(panel.state, options.points))
    if options.style == "volume":
        grid = volume_grid(panel.state, panel.mesh.isovalue.level, options)
        return dataclasses.replace(panel, volume=grid)
    return panel


def _cut(positions: np.ndarray, cut: str | None) -> np.ndarray:
    """Mask of the dots kept by a cutaway (x > 0, or x > 0 and y > 0, taken away)."""
    if cut == "half":
        return positions[:, 0] <= 0
    if cut == "quarter":
        return ~((positions[:, 0] > 0) & (positions[:, 1] > 0))
    return np.ones(len(positions), dtype=bool)


def add_cloud(
    stage: Stage, options: FigureOptions, points: Points, *, prefix: str = ""
) -> list[str]:
    """Add the dots, in the phase colours, as small lit spheres (sized to the window)."""
    from orbviz.surface.colors import point_colors

    keep = _cut(points.positions, options.cut)
    colours = point_colors(points.phase[keep], points.real, options.colors)
    size = max(2.0, stage.size[1] / 260)
    return [stage.add(f"{prefix}cloud", actors.points(points.positions[keep], colours, size=size))]


def add_volume(stage: Stage, volume: Any, *, prefix: str = "") -> list[str]:
    """Add the translucent density, its colour and opacity from its RGBA samples."""
    # full alpha accumulates to opacity 1 - 1/e over half the box side
    side = volume.GetSpacing()[0] * volume.GetDimensions()[0]
    return [stage.add(f"{prefix}volume", actors.volume(volume, unit_distance=side / 2))]
