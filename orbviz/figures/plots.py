"""2D companions drawn with matplotlib: slices through the nucleus and radial distributions.

Each function returns the matplotlib Figure and the data behind it, so that the numbers marked
on a plot can be checked against closed forms without reading pixels. Several states make one
figure: slices side by side on one scale, radial distributions on one axes with a legend.

Nodes must stand out from the map under them (WCAG 2.x non-text contrast, at least 3:1): a
density slice uses a map whose floor, where the nodes are, is its lightest colour, and the signed
wavefunction a diverging map through white at psi = 0; the nodes are drawn dark on both.
"""

from __future__ import annotations

import math
import os
from collections.abc import Sequence
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np

from orbviz._defaults import BOHR_IN_ANGSTROM, DEFAULTS
from orbviz._options import checked
from orbviz.figures.options import PlotOptions
from orbviz.figures.page import PAGE_SUFFIXES
from orbviz.figures.paint import encode_figure
from orbviz.figures.planes import choose_plane, panel_axes, plane_psi
from orbviz.levels.isovalue import enclosing_isovalue
from orbviz.states.state import NodalSurfaces, State
from orbviz.surface.colors import DEFAULT_PAIR, ColorPair

__all__ = [
    "RadialData",
    "SliceData",
    "plot",
    "radial_figure",
    "save_figure",
    "slice_figure",
]

NODE_INK = "#141414"  # dark lines on light floors: contrast over 10:1 at the nodes
_LEVEL_INK = "#141414"
_CURVES = ["#004488", "#BB5566", "#DDAA33", "#000000", "#009E73", "#56B4E9"]  # Tol, Okabe-Ito


@dataclass
class SliceData:
    """A slice through the nucleus.

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
        Radial node radii marked as circles, bohr.
    quantity : {"density", "psi"}
        What the map shows.
    colours : (N, N, 4) ndarray
        The map's RGBA colour at every sample, as drawn (for contrast checks).
    node_colour : str
        The colour of the node lines.
    label : str
        The state's label.
    nodes : NodalSurfaces
        The state's nodal surfaces (for the alt text).
    """

    plane: str
    axis: np.ndarray
    density: np.ndarray
    psi: np.ndarray
    level: float
    node_radii: list[float] = field(default_factory=list)
    quantity: str = "density"
    colours: np.ndarray = field(default_factory=lambda: np.empty((0, 0, 4)))
    node_colour: str = NODE_INK
    label: str = ""
    nodes: NodalSurfaces = field(default_factory=NodalSurfaces)

    def describe(self, units: str) -> str:
        """Return alt text: what the slice shows, its size, and the nodes it crosses."""
        from orbviz.figures.alt import nodal_text

        what = "the signed wavefunction" if self.quantity == "psi" else "the probability density"
        per_bohr, unit = (BOHR_IN_ANGSTROM, "Å") if units == "angstrom" else (1.0, "bohr")
        return (
            f"Slice of {what} of {self.label} in the {self.plane} plane through the nucleus, "
            f"{2 * self.axis[-1] * per_bohr:.3g} {unit} across, with the contour of the "
            f"isovalue (solid) and the nodes (dashed). {nodal_text(self.nodes, units)}."
        )


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
    label : str
        The state's label.
    """

    r: np.ndarray
    p: np.ndarray
    node_radii: list[float]
    mean_radius: float
    most_probable_radius: float
    label: str = ""


def _unit(options: PlotOptions) -> tuple[float, str]:
    """Return shown units per bohr and their name."""
    if options.units == "angstrom":
        return BOHR_IN_ANGSTROM, "Å"
    return 1.0, "bohr"


def _diverging(colors: ColorPair) -> Any:
    from matplotlib.colors import LinearSegmentedColormap

    negative, positive = (tuple(v / 255 for v in c[:3]) for c in (colors[1], colors[0]))
    return LinearSegmentedColormap.from_list("psi", [negative, (1.0, 1.0, 1.0), positive])


def _slice_data(
    state: State, opts: PlotOptions, fraction: float, points: int, half: float | None
) -> SliceData:
    iso = enclosing_isovalue(state, fraction=fraction)
    half = 1.15 * iso.max_radius if half is None else half
    axis = np.linspace(-half, half, points)
    plane = opts.plane or choose_plane(state, axis[:: max(1, points // 100)])
    psi = plane_psi(state, plane, axis)
    dens = np.abs(psi) ** 2
    signed = psi.real if state.is_real else np.abs(psi) * np.sign(psi.real)
    nodes = state.nodal_surfaces()
    return SliceData(
        plane,
        axis,
        dens,
        signed,
        iso.level,
        list(nodes.spheres),
        opts.quantity,
        label=state.label,
        nodes=nodes,
    )


def _draw_slice(
    ax: Any, data: SliceData, state: State, opts: PlotOptions, colors: ColorPair
) -> Any:
    """Draw one slice on axes; fill in the map's colours; return the image for a colour bar."""
    from matplotlib.colors import LogNorm, TwoSlopeNorm
    from matplotlib.patches import Circle

    per_bohr, name = _unit(opts)
    half = data.axis[-1] * per_bohr
    extent = (-half, half, -half, half)
    norm: Any
    if data.quantity == "psi":
        top = float(np.abs(data.psi).max()) or 1.0
        cmap, norm = _diverging(colors), TwoSlopeNorm(0.0, -top, top)
        shown = data.psi
    else:  # the floor (the nodes) is the lightest colour of the reversed map
        cmap, norm = "cividis_r", LogNorm(data.density.max() * 1e-6, data.density.max())
        shown = np.maximum(data.density, data.density.max() * 1e-6)
    image = ax.imshow(
        shown.T, origin="lower", cmap=cmap, norm=norm, extent=extent, interpolation="bilinear"
    )
    data.colours = image.cmap(image.norm(shown))
    axis = data.axis * per_bohr
    levels = (
        [-math.sqrt(data.level), math.sqrt(data.level)] if data.quantity == "psi" else [data.level]
    )
    ax.contour(
        axis,
        axis,
        (data.psi if data.quantity == "psi" else data.density).T,
        levels=sorted(levels),
        colors=_LEVEL_INK,
        linewidths=1.4,
    )
    if state.is_real:  # psi = 0: the angular nodes in this plane (and the radial ones)
        ax.contour(
            axis,
            axis,
            data.psi.T,
            levels=[0.0],
            colors=NODE_INK,
            linewidths=1.1,
            linestyles="dashed",
        )
    for r0 in data.node_radii:
        ax.add_patch(
            Circle(
                (0, 0),
                r0 * per_bohr,
                fill=False,
                edgecolor=NODE_INK,
                linestyle="dashed",
                linewidth=1.1,
            )
        )
    ax.set_xlabel(f"{data.plane[0]} ({name})")
    ax.set_ylabel(f"{data.plane[1]} ({name})")
    ax.set_aspect("equal")
    return image


def slice_figure(
    state: State | Sequence[State],
    /,
    options: PlotOptions | None = None,
    *,
    fraction: float = DEFAULTS.fraction,
    points: int = 501,
    colors: ColorPair = DEFAULT_PAIR,
) -> tuple[Any, SliceData | list[SliceData]]:
    """Slice(s) through the nucleus with the isovalue contour and the nodes marked.

    Parameters
    ----------
    state : State or sequence of State
        Any kind of state; several make panels side by side on one scale.
    options : PlotOptions, optional
        Plane, quantity, units, extent (default: 1.15 times the largest surface's reach) and
        title.
    fraction : float, default: 0.9
        The isovalue drawn encloses this probability (in 3D).
    points : int, default: 501
        Samples per side.
    colors : pair of RGBA
        The phase colours of a signed slice (``quantity="psi"``).

    Returns
    -------
    (matplotlib.figure.Figure, SliceData or list of SliceData)
    """
    opts = checked(options or PlotOptions())
    states: list[State] = list(state) if isinstance(state, (list, tuple)) else [state]  # type: ignore[list-item]
    first = [_slice_data(s, opts, fraction, points, opts.extent) for s in states]
    half = opts.extent or max(d.axis[-1] for d in first)
    datas = (
        [_slice_data(s, opts, fraction, points, half) for s in states] if len(states) > 1 else first
    )
    fig, axes = panel_axes(len(states), opts, panel=(3.4, 3.1), extra=(1.0, 0.4))
    image: Any = None
    for ax, s, d in zip(axes, states, datas, strict=False):
        image = _draw_slice(ax, d, s, opts, colors)
        ax.set_title(f"{s.label}: {d.plane} plane", fontsize=9)
    per_bohr, name = _unit(opts)
    bar = fig.colorbar(image, ax=list(axes[: len(states)]), shrink=0.85)
    bar.set_label(
        r"$\psi$  (bohr$^{-3/2}$)"
        if opts.quantity == "psi"
        else r"$|\psi|^2$  (bohr$^{-3}$, log scale)"
    )
    note = f"solid: the {100 * fraction:g}% isovalue; dashed: nodes"
    fig.suptitle(opts.title or note, fontsize=10)
    return fig, datas if len(states) > 1 else datas[0]


def _radial_data(state: State) -> RadialData:
    state.radial_distribution(np.zeros(1))  # a kind without one says so before any work
    r_max = state.radial_quantile(0.9995)
    r = np.linspace(0.0, r_max, 4001)
    p = state.radial_distribution(r)
    props = state.properties()
    assert props.mean_radius is not None and props.most_probable_radius is not None
    spheres = list(state.nodal_surfaces().spheres)
    return RadialData(r, p, spheres, props.mean_radius, props.most_probable_radius, state.label)


def radial_figure(
    state: State | Sequence[State],
    /,
    options: PlotOptions | None = None,
    *,
    labels: Sequence[str] | None = None,
) -> tuple[Any, RadialData | list[RadialData]]:
    """Radial distribution(s) r^2 |R|^2 with nodes and radii marked; several on one axes.

    Raises
    ------
    Unsupported
        For a state with no single centre (a bond).

    Returns
    -------
    (matplotlib.figure.Figure, RadialData or list of RadialData)
    """
    from matplotlib.figure import Figure

    opts = checked(options or PlotOptions(kind="radial"))
    states: list[State] = list(state) if isinstance(state, (list, tuple)) else [state]  # type: ignore[list-item]
    datas = [_radial_data(s) for s in states]
    for d, label in zip(datas, labels or [], strict=False):  # a set's curve takes its name
        d.label = label
    per_bohr, name = _unit(opts)
    fig = Figure(figsize=opts.inches((6.4, 4.0)), dpi=opts.dpi, layout="constrained")
    ax = fig.add_subplot()
    single = len(datas) == 1
    for k, d in enumerate(datas):
        colour = _CURVES[k % len(_CURVES)]
        label = r"$P(r) = r^2 \int |\psi|^2 d\Omega$" if single else d.label
        ax.plot(d.r * per_bohr, d.p / per_bohr, color=colour, linewidth=2.0, label=label)
        for j, r0 in enumerate(d.node_radii):
            ax.axvline(
                r0 * per_bohr,
                color=colour if not single else NODE_INK,
                linestyle="dashed",
                linewidth=1.0,
                label="radial nodes" if single and j == 0 else None,
            )
    if single:
        d = datas[0]
        ax.axvline(
            d.mean_radius * per_bohr,
            color="#BB5566",
            linewidth=1.4,
            label=rf"$\langle r\rangle$ = {d.mean_radius * per_bohr:.3g} {name}",
        )
        ax.axvline(
            d.most_probable_radius * per_bohr,
            color="#009E73",
            linestyle="dotted",
            linewidth=1.8,
            label=f"most probable r = {d.most_probable_radius * per_bohr:.3g} {name}",
        )
    ax.set_xlim(0, max(d.r[-1] for d in datas) * per_bohr)
    ax.set_ylim(0, None)
    ax.set_xlabel(f"r ({name})")
    ax.set_ylabel(f"P(r) ({name}$^{{-1}}$)")
    default = f"{datas[0].label}: radial distribution" if single else "radial distributions"
    ax.set_title(opts.title or default, fontsize=10)
    ax.legend(frameon=False, fontsize=9)
    return fig, datas[0] if single else datas


def plot(
    state: State | Sequence[State],
    /,
    options: PlotOptions | None = None,
    *,
    fraction: float = DEFAULTS.fraction,
    colors: ColorPair = DEFAULT_PAIR,
    labels: Sequence[str] | None = None,
) -> tuple[Any, Any]:
    """Return the plot ``options.kind`` names: a slice, the radial distribution or dots."""
    opts = checked(options or PlotOptions())
    if opts.kind == "radial":
        return radial_figure(state, opts, labels=labels)
    if opts.kind == "dots":
        from orbviz.figures.dots import dots_figure

        return dots_figure(state, opts, colors=colors)
    return slice_figure(state, opts, fraction=fraction, colors=colors)


def describe_plot(data: SliceData | RadialData | Sequence[Any], units: str) -> str:
    """Return alt text for a plot from the numbers behind its marks."""
    datas = list(data) if isinstance(data, (list, tuple)) else [data]
    per_bohr, name = (BOHR_IN_ANGSTROM, "Å") if units == "angstrom" else (1.0, "bohr")
    parts = []
    for d in datas:
        if isinstance(d, RadialData):
            nodes = ", ".join(f"{r * per_bohr:.3g}" for r in d.node_radii)
            parts.append(
                f"Radial distribution of {d.label}: most probable radius "
                f"{d.most_probable_radius * per_bohr:.3g} {name}, mean radius "
                f"{d.mean_radius * per_bohr:.3g} {name}"
                + (f", radial nodes at {nodes} {name}" if nodes else ", no radial node")
                + "."
            )
        elif hasattr(d, "describe"):  # a slice, or the dots of a dot-density figure
            parts.append(d.describe(units))
    return " ".join(parts)


def save_figure(
    fig: Any, path: str | os.PathLike[str], *, alt_text: str = "", title: str = ""
) -> Path:
    """Save a matplotlib figure as PNG, TIFF, PDF or SVG (by suffix), all or nothing.

    The file carries the figure's resolution (its ``dpi``), the title and the alt text as
    metadata (see :func:`orbviz.figures.paint.encode_figure`).
    """
    from orbviz.export import check_output, write_files

    (target,) = check_output(path, list(PAGE_SUFFIXES))
    data = encode_figure(fig, target.suffix, dpi=fig.dpi, title=title, alt_text=alt_text)
    write_files({target: data})
    return target
