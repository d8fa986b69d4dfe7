"""Frames of a moving superposition: one fixed level and box, phase colours, a captioned period."""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np

from orbviz._defaults import DEFAULTS
from orbviz._options import checked
from orbviz._progress import progress
from orbviz.figures.figure import Figure, Panel, figure
from orbviz.figures.options import AnimationOptions, FigureOptions
from orbviz.levels.grid import box_half_width
from orbviz.levels.isovalue import Isovalue, enclosing_isovalue
from orbviz.states.dynamics import Beat
from orbviz.states.state import State
from orbviz.surface.contour import Body
from orbviz.surface.mesh import build_mesh
from orbviz.surface.options import MeshOptions

__all__ = ["Animation", "animate"]


@dataclass
class Animation:
    """The frames of an animation and what made them.

    Attributes
    ----------
    images : list of (H, W, 4) uint8 arrays
        The rendered frames.
    times : list of float
        Frame times in atomic units (midpoints of equal steps).
    beat : Beat
        The period of the density.
    level : float
        The one density level (bohr^-3) of every frame.
    bodies : list of list of Body
        Each frame's surface bodies (kept for an animated GLB; empty otherwise).
    seconds : float
        Playing time of one pass.
    """

    images: list[np.ndarray]
    times: list[float]
    beat: Beat
    level: float
    bodies: list[list[Body]]
    seconds: float = 3.0

    def __repr__(self) -> str:
        return (
            f"Animation({len(self.images)} frames, T = {self.beat.femtoseconds:.4g} fs, "
            f"level {self.level:.4g} bohr^-3)"
        )


def _fixed_level(state: State, beat: Beat, fraction: float, samples: int = 4) -> Isovalue:
    """One level for the whole period: the geometric mean of the enclosing levels at a few times."""
    levels, reach = [], 0.0
    for k in range(samples):
        iso = enclosing_isovalue(state.evolve((k + 0.5) * beat.period / samples), fraction=fraction)
        levels.append(iso.level)
        reach = max(reach, iso.max_radius)
    level = math.exp(sum(math.log(v) for v in levels) / samples)
    return Isovalue(level, fraction, float("nan"), reach, "period mean")


def animate(
    state: State,
    /,
    options: AnimationOptions | None = None,
    *,
    fraction: float = DEFAULTS.fraction,
    keep_bodies: bool = False,
) -> Animation:
    """Render the frames of a superposition over ``options.periods`` beat periods.

    Parameters
    ----------
    state : State
        A superposition of states of different energies.
    options : AnimationOptions, optional
        Frames, periods, grid, frame size and colours (checked here by their rules).
    fraction : float, default: 0.9
        Probability the surfaces enclose (one level for all frames).
    keep_bodies : bool, default: False
        Keep each frame's bodies (an animated GLB needs them).

    Raises
    ------
    Unsupported
        For a state without energies (a bond), or one that does not move (a superposition of
        degenerate states: StationaryError).
    """
    opts = checked(options or AnimationOptions())
    beat = state.beat()
    iso = _fixed_level(state, beat, fraction)
    width = box_half_width(state, iso, opts.grid)
    looks = FigureOptions(grid=opts.grid, size=opts.size, colors=opts.colors, extent=width)
    meshes = MeshOptions(grid=opts.grid, colors=opts.colors)
    times = [(k + 0.5) * opts.periods * beat.period / opts.frames for k in range(opts.frames)]
    fs = beat.femtoseconds / beat.period
    images, kept = [], []
    fig: Figure | None = None
    try:
        for t in progress(times, total=len(times), desc="orbviz animate", unit="frame"):
            moved = state.evolve(t)
            # the shared level's reach is sampled at four times, not this one: no window
            mesh = build_mesh(
                moved, meshes, fraction=fraction, half_width=width, level=iso, window=False
            )
            caption = f"{state.spec}   t = {t * fs:.3f} fs of T = {beat.femtoseconds:.3f} fs" + (
                "" if beat.exact else " (not exactly periodic)"
            )
            frame_looks = replace(looks, title=caption)
            if fig is None:  # one plotter for all frames: the EGL context opens once
                fig = figure(moved, frame_looks, fraction=fraction, mesh=mesh)
            else:
                fig.replace_panel(0, Panel(moved, mesh))
                fig.options = frame_looks
            images.append(fig.image())
            if keep_bodies:
                kept.append(mesh.bodies)
    finally:
        if fig is not None:
            fig.close()
    return Animation(images, times, beat, iso.level, kept, opts.seconds)
