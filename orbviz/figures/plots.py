"""2D companions drawn with matplotlib: a density slice and the radial distribution.

Each function returns the matplotlib Figure and the data behind it (so the numbers marked on a
plot can be checked against closed forms without reading pixels).
"""

from __future__ import annotations

import os
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np

from orbviz._defaults import DEFAULTS
from orbviz._options import checked
from orbviz.figures.options import PlotOptions
from orbviz.levels.isovalue import enclosing_isovalue
from orbviz.states.state import State

__all__ = ["RadialData", "SliceData", "plot", "radial_figure", "save_figure", "slice_figure"]

PLANES = {"xz": (0, 2), "xy": (0, 1), "yz": (1, 2)}
_INK = "#1a1a1a"


@dataclass
class SliceData:
    """A density slice through the nucleus.

    Attributes
    ----------
    plane : {"xz", "xy", "yz"}
        The plane; its first letter is the horizontal axis.
    axis : (N,) ndarray
        Sample coordinates along both in-plane axes, bohr.
    density : (N, N) ndarray
        |psi|^2 in bohr^-3, indexed [horizontal, vertical].
    psi : (N, N) ndarray
        psi itself (real states; complex: its modulus times the sign of its real part).
    level : float
        The isovalue drawn (bohr^-3).
    node_radii : list of float
        Radial node radii marked as circles (one-shell states), bohr.
    """

    plane: str
    axis: np.ndarray
    density: np.ndarray
    psi: np.ndarray
    level: float
    node_radii: list[float] = field(default_factory=list)


@dataclass
class RadialData:
    """The radial distribution P(r) = r^2 times the angular integral of |psi|^2.

    Attributes
    ----------
    r, p : (N,) ndarray
        Radii (bohr) and P(r) (1/bohr).
    node_radii : list of float
        Radial nodes (one-shell states), bohr.
    mean_radius : float
        <r>, bohr.
    most_probable_radius : float
        Position of the maximum of P(r), bohr.
    """

    r: np.ndarray
    p: np.ndarray
    node_radii: list[float]
    mean_radius: float
    most_probable_radius: float


def slice_figure(
    state: State,
    /,
    options: PlotOptions | None = None,
    *,
    fraction: float = DEFAULTS.fraction,
    points: int = 501,
) -> tuple[Any, SliceData]:
    """Density slice through the nucleus with the isovalue contour and the nodes marked.

    Parameters
    ----------
    state : State
        Any kind of state.
    options : PlotOptions, optional
        Plane, extent (default: 1.15 times the surface's reach) and title.
    fraction : float, default: 0.9
        The isovalue drawn encloses this probability (in 3D).
    points : int, default: 501
        Samples per side.

    Returns
    -------
    (matplotlib.figure.Figure, SliceData)
    """
    from matplotlib.figure import Figure

    opts = checked(options or PlotOptions())
    plane, title = opts.plane, opts.title
    iso = enclosing_isovalue(state, fraction=fraction)
    half = 1.15 * iso.max_radius if opts.extent is None else opts.extent
    axis = np.linspace(-half, half, points)
    u, v = np.meshgrid(axis, axis, indexing="ij")
    coords = [np.zeros_like(u)] * 3
    i, j = PLANES[plane]
    coords[i], coords[j] = u, v
    psi = state.psi(*coords, dtype=np.float64)
    dens = np.abs(psi) ** 2
    signed = psi.real if state.is_real else np.abs(psi) * np.sign(psi.real)
    spheres = list(state.nodal_surfaces().spheres)
    data = SliceData(plane, axis, dens, signed, iso.level, spheres)

    fig = Figure(figsize=(6.4, 5.6), layout="constrained")
    ax = fig.add_subplot()
    floor = dens.max() * 1e-6
    image = ax.imshow(
        np.log10(np.maximum(dens, floor)).T,
        origin="lower",
        cmap="cividis",
        extent=(-half, half, -half, half),
        interpolation="bilinear",
    )
    bar = fig.colorbar(image, ax=ax, shrink=0.85)
    bar.set_label(r"$\log_{10}\,|\psi|^2$  (bohr$^{-3}$)")
    ax.contour(axis, axis, dens.T, levels=[iso.level], colors="white", linewidths=1.6)
    if state.is_real:
        ax.contour(
            axis, axis, signed.T, levels=[0.0], colors=_INK, linewidths=1.0, linestyles="dashed"
        )
    for r0 in data.node_radii:
        ax.add_patch(_circle(r0))
    ax.set_xlabel(f"{plane[0]} (bohr)")
    ax.set_ylabel(f"{plane[1]} (bohr)")
    ax.set_aspect("equal")
    ax.set_title(
        title
        or f"{state.label}: {plane} plane; white: {100 * fraction:g}% isovalue, dashed: nodes",
        fontsize=10,
    )
    return fig, data


def _circle(radius: float):
    from matplotlib.patches import Circle

    return Circle((0, 0), radius, fill=False, edgecolor=_INK, linestyle="dashed", linewidth=1.0)


def radial_figure(state: State, /, options: PlotOptions | None = None) -> tuple[Any, RadialData]:
    """Radial distribution r^2 |R|^2 (summed over the angular parts) with nodes and radii marked.

    Raises
    ------
    Unsupported
        For a state with no single centre (a bond).

    Returns
    -------
    (matplotlib.figure.Figure, RadialData)
    """
    from matplotlib.figure import Figure

    opts = checked(options or PlotOptions(kind="radial"))
    title = opts.title
    state.radial_distribution(np.zeros(1))  # a kind without one says so before any work
    r_max = state.radial_quantile(0.9995)
    r = np.linspace(0.0, r_max, 4001)
    p = state.radial_distribution(r)
    props = state.properties()
    assert props.mean_radius is not None and props.most_probable_radius is not None
    spheres = list(state.nodal_surfaces().spheres)
    data = RadialData(r, p, spheres, props.mean_radius, props.most_probable_radius)

    fig = Figure(figsize=(6.4, 4.0), layout="constrained")
    ax = fig.add_subplot()
    ax.plot(r, p, color="#0072B2", linewidth=2.0, label=r"$P(r) = r^2 \int |\psi|^2 d\Omega$")
    for k, r0 in enumerate(data.node_radii):
        ax.axvline(
            r0,
            color=_INK,
            linestyle="dashed",
            linewidth=1.0,
            label="radial nodes" if k == 0 else None,
        )
    ax.axvline(
        data.mean_radius,
        color="#D55E00",
        linewidth=1.4,
        label=rf"$\langle r\rangle$ = {data.mean_radius:.3g} bohr",
    )
    ax.axvline(
        data.most_probable_radius,
        color="#009E73",
        linestyle="dotted",
        linewidth=1.8,
        label=f"most probable r = {data.most_probable_radius:.3g} bohr",
    )
    ax.set_xlim(0, r_max)
    ax.set_ylim(0, None)
    ax.set_xlabel("r (bohr)")
    ax.set_ylabel("P(r) (bohr$^{-1}$)")
    ax.set_title(title or f"{state.label}: radial distribution", fontsize=10)
    ax.legend(frameon=False, fontsize=9)
    return fig, data


def plot(
    state: State, /, options: PlotOptions | None = None, *, fraction: float = DEFAULTS.fraction
) -> tuple[Any, SliceData | RadialData]:
    """Return the plot ``options.kind`` names: a slice or the radial distribution."""
    opts = checked(options or PlotOptions())
    if opts.kind == "radial":
        return radial_figure(state, opts)
    return slice_figure(state, opts, fraction=fraction)


def save_figure(fig: Any, path: str | os.PathLike[str]) -> Path:
    """Save a matplotlib figure as PNG, SVG or PDF (by suffix), all or nothing."""
    from orbviz.export import atomic_paths, check_output

    (target,) = check_output(path, [".png", ".svg", ".pdf"])
    with atomic_paths(target) as (temp,):
        fig.savefig(temp, format=target.suffix[1:].lower(), dpi=200)
    return target
