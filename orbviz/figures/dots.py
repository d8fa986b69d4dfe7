"""The dot-density figure: exact samples of |psi|^2 seen on a plane, in the phase colours.

The textbook's "probability cloud": each dot is one sampled position of the electron
(:mod:`orbviz.levels.sampling`, a fixed seed so the figure is reproducible), projected on the
plane or, with a slab, only those within half its thickness of it. Dots take the phase colours
(psi > 0 and psi < 0; a complex state's phase on the cyclic map). Several states make panels
side by side on one scale.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

from orbviz._defaults import BOHR_IN_ANGSTROM
from orbviz._options import checked
from orbviz.figures.options import PlotOptions
from orbviz.figures.planes import best_plane, panel_axes
from orbviz.levels.sampling import sample
from orbviz.states.state import State
from orbviz.surface.colors import DEFAULT_PAIR, ColorPair, point_colors

__all__ = ["DotsData", "dots_figure"]

_PLANES = {"xz": (0, 2, 1), "xy": (0, 1, 2), "yz": (1, 2, 0)}  # horizontal, vertical, normal
_SEED = 20261202


@dataclass
class DotsData:
    """The dots of one panel.

    Attributes
    ----------
    plane : {"xz", "xy", "yz"}
        The plane; its first letter is the horizontal axis.
    xy : (N, 2) ndarray
        Dot positions on the plane, bohr.
    phase : (N,) ndarray
        Sign (real states) or phase angle (complex) of psi at each dot.
    drawn : int
        Samples drawn before the slab kept some of them.
    slab : float or None
        Thickness of the slab, bohr (None: a projection).
    label : str
        The state's label.
    real : bool
        Whether ``phase`` holds signs.
    """

    plane: str
    xy: np.ndarray
    phase: np.ndarray
    drawn: int
    slab: float | None
    label: str
    real: bool = True

    def describe(self, units: str) -> str:
        """Return alt text: what the dots show and where they are thickest."""
        per_bohr, unit = (BOHR_IN_ANGSTROM, "Å") if units == "angstrom" else (1.0, "bohr")
        how = (
            f"within {self.slab * per_bohr / 2:.3g} {unit} of the {self.plane} plane"
            if self.slab is not None
            else f"projected on the {self.plane} plane"
        )
        r = np.hypot(self.xy[:, 0], self.xy[:, 1])
        half = float(np.median(r)) * per_bohr if len(r) else 0.0
        return (
            f"Dot-density figure of {self.label}: {len(self.xy):,} positions of the electron "
            f"drawn at random with probability |psi|^2, {how}; half of them lie within "
            f"{half:.3g} {unit} of the nucleus."
        )


def _plane(state: State, options: PlotOptions) -> str:
    if options.plane is not None:
        return options.plane
    return best_plane(state, state.radial_quantile(0.99))


def _dots(state: State, options: PlotOptions) -> DotsData:
    plane = _plane(state, options)
    h, v, normal = _PLANES[plane]
    points = sample(state, options.points, seed=_SEED)
    xyz = points.positions.astype(np.float64)
    keep = (
        np.abs(xyz[:, normal]) <= options.slab / 2
        if options.slab is not None
        else np.ones(len(xyz), dtype=bool)
    )
    return DotsData(
        plane,
        xyz[keep][:, [h, v]],
        points.phase[keep],
        len(xyz),
        options.slab,
        state.label,
        points.real,
    )


def dots_figure(
    state: State | Sequence[State],
    /,
    options: PlotOptions | None = None,
    *,
    colors: ColorPair = DEFAULT_PAIR,
) -> tuple[Any, DotsData | list[DotsData]]:
    """Dot-density figure(s): samples of |psi|^2 on a plane, one panel per state.

    Parameters
    ----------
    state : State or sequence of State
        Any kind of state; several make panels side by side on one scale.
    options : PlotOptions, optional
        Plane, slab, points, units, extent (default: the 99th percentile of the dots' reach,
        times 1.1), title and printed size.
    colors : pair of RGBA
        Phase colours of a real state.

    Returns
    -------
    (matplotlib.figure.Figure, DotsData or list of DotsData)
    """
    opts = checked(options or PlotOptions(kind="dots"))
    states = list(state) if isinstance(state, (list, tuple)) else [state]
    datas = [_dots(s, opts) for s in states]  # type: ignore[arg-type]
    per_bohr, unit = (BOHR_IN_ANGSTROM, "Å") if opts.units == "angstrom" else (1.0, "bohr")
    reach = [np.percentile(np.abs(d.xy), 99) for d in datas if len(d.xy)]
    half = opts.extent or 1.1 * max(reach, default=1.0)
    fig, axes = panel_axes(len(states), opts, panel=(3.2, 3.2), extra=(0.4, 0.5))
    for ax, d in zip(axes, datas, strict=False):
        rgba = point_colors(d.phase, d.real, colors)
        # dot area in points^2: small enough that dense regions read as dense
        size = max(0.3, 4000.0 / max(len(d.xy), 1))
        ax.scatter(
            d.xy[:, 0] * per_bohr,
            d.xy[:, 1] * per_bohr,
            s=size,
            c=rgba / 255.0,
            linewidths=0,
            rasterized=True,  # vector text, raster dots in PDF and SVG
        )
        ax.set_xlim(-half * per_bohr, half * per_bohr)
        ax.set_ylim(-half * per_bohr, half * per_bohr)
        ax.set_aspect("equal")
        ax.set_xlabel(f"{d.plane[0]} ({unit})")
        ax.set_ylabel(f"{d.plane[1]} ({unit})")
        ax.set_title(f"{d.label}: {d.plane} plane", fontsize=9)
    shown = sum(len(d.xy) for d in datas)
    how = f"a slab {opts.slab * per_bohr:.3g} {unit} thick" if opts.slab else "projected"
    fig.suptitle(opts.title or f"{shown:,} dots drawn as |ψ|², {how}", fontsize=10)
    return fig, datas if len(states) > 1 else datas[0]
