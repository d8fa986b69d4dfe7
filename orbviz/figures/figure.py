"""Publication figures rendered off-screen with VTK: one orbital, or a sheet of them.

A figure is a page of panels (:mod:`orbviz.figures.page`), each an orthographic view of one
state's phase-coloured bodies. Every panel shares one camera, one lighting and one scale: the
view is framed so that the largest surface fills about 80% of a panel, or to a fixed extent.
Lighting is three-point, shading smooth from the bodies' gradient normals, and edges smoothed
by FXAA (:class:`~orbviz.figures.stage.Stage`). Transparent images are made by difference
matting (the scene on black and on white), so edges carry true partial alpha with no halo.
Labels, the phase key and the scale bar are vector text drawn on the page; the alt text is
made from the physics (:mod:`.alt`).

A :class:`Figure` holds an off-screen render window (:class:`~orbviz.figures.stage.Stage`):
close it when done (it is a context
manager), or many figures in one process grow without bound.
"""

from __future__ import annotations

import os
from collections.abc import Iterable, Sequence
from dataclasses import dataclass, field
from pathlib import Path
from types import TracebackType
from typing import Any

import numpy as np

from orbviz._defaults import DEFAULTS, LIMITS
from orbviz._options import checked
from orbviz._progress import progress
from orbviz.errors import OptionError, ParameterError
from orbviz.figures.camera import default_view, frame
from orbviz.figures.cloud import add_cloud, add_volume, styled
from orbviz.figures.options import FigureOptions, page_layout
from orbviz.figures.overlays import add_axis_lines, add_bodies, add_caps, add_members, add_nodes
from orbviz.figures.page import PAGE_SUFFIXES, Page, PanelImage, geometry
from orbviz.figures.stage import Stage
from orbviz.levels.sampling import Points
from orbviz.states.state import State
from orbviz.surface.colors import SET_PALETTE
from orbviz.surface.mesh import OrbitalMesh, build_mesh
from orbviz.surface.options import MeshOptions

__all__ = ["Figure", "Panel", "figure", "mesh_options", "sheet"]

AXIS_REACH = 1.15  # axes through the nucleus run this far beyond the largest surface


def mesh_options(options: FigureOptions) -> MeshOptions:
    """Return the mesh options a figure with these options shows: its grid and colours."""
    return MeshOptions(grid=options.grid, colors=options.colors)


@dataclass
class Panel:
    """One panel of a figure: a state's surface, and what is drawn beside it.

    Attributes
    ----------
    state : State
        The state shown.
    mesh : OrbitalMesh
        Its bodies.
    label : str
        The panel's label ("(a) 3dxy"), or empty.
    outer : OrbitalMesh or None
        A translucent surface of a larger fraction.
    members : list of OrbitalMesh
        A set drawn in this one panel, each member in its own colour (then ``mesh`` is the
        first member's).
    cloud, volume : Points or vtkImageData, optional
        Dots or a translucent density drawn instead of the surface (the ``style`` option).
    overlays : dict
        Actor names by kind (``radial_nodes``, ``angular_nodes``, ``outer``, ``caps``,
        ``axis_lines``, ``members``) while the panel is shown.
    """

    state: State
    mesh: OrbitalMesh
    label: str = ""
    outer: OrbitalMesh | None = None
    members: list[OrbitalMesh] = field(default_factory=list)
    overlays: dict[str, list[str]] = field(default_factory=dict)
    cloud: Points | None = None
    volume: Any = None

    @property
    def shown(self) -> list[OrbitalMesh]:
        """Every mesh the panel draws."""
        meshes = self.members or [self.mesh]
        return meshes + ([self.outer] if self.outer is not None else [])


@dataclass
class Figure:
    """A composed figure: the off-screen stage, the panels, and how they are laid out.

    Attributes
    ----------
    stage : Stage or None
        The off-screen scene (None once closed); ``stage.renderer`` is its ``vtkRenderer``.
    panels : list of Panel
        What each panel shows.
    options : FigureOptions
        How it was set up.
    layout : (int, int)
        Columns and rows of panels.
    half_height : float
        Half the height of every panel's view, bohr (orthographic).
    axis_lines : bool
        Axes through the nucleus are drawn.
    view : (float, float)
        Camera azimuth and elevation, degrees (the options' view, or the default for the set).
    """

    stage: Stage | None
    panels: list[Panel]
    options: FigureOptions
    layout: tuple[int, int] = (1, 1)
    half_height: float = 1.0
    axis_lines: bool = False
    view: tuple[float, float] = (35.0, 25.0)
    _current: int = -1
    _alt: tuple[Any, str] | None = None

    def __repr__(self) -> str:
        page = geometry(self.options, *self.layout)
        w, h = page.width, page.height
        labels = ", ".join(p.state.label for p in self.panels)
        return f"Figure({labels}, {w}x{h}, layout {self.layout[0]}x{self.layout[1]})"

    def _repr_html_(self) -> str:
        """Show the figure's orbitals in a notebook as an interactive page."""
        from orbviz.pages.notebook import show

        return show(
            self, **{k: getattr(self.options, k) for k in ("grid", "units", "colors")}
        )._repr_html_()

    def _repr_png_(self) -> bytes:
        """Show the figure in a notebook, as its PNG."""
        return self.png()

    def __enter__(self) -> Figure:
        return self

    def __exit__(
        self,
        kind: type[BaseException] | None,
        error: BaseException | None,
        trace: TracebackType | None,
    ) -> None:
        self.close()

    @property
    def page_size(self) -> tuple[int, int]:
        """Width and height of the page in pixels."""
        page = geometry(self.options, *self.layout)
        return page.width, page.height

    @property
    def mesh(self) -> OrbitalMesh:
        """The first panel's mesh."""
        return self.panels[0].mesh

    @property
    def overlays(self) -> dict[str, list[str]]:
        """The overlays of the panel shown last (the first, once rendered)."""
        self._show(0 if self._current < 0 else self._current)
        return self.panels[self._current].overlays

    def close(self) -> None:
        """Release the render window and its memory; the figure cannot render after this."""
        if self.stage is not None:
            self.stage.close()
            self.stage = None

    # --------------------------------------------------------------- panels
    def replace_panel(self, k: int, panel: Panel) -> None:
        """Show ``panel`` in place of panel k (the frames of an animation share one window)."""
        if k == self._current:
            self._hide()
        self.panels[k] = panel

    def _hide(self) -> None:
        if self._current >= 0 and self.stage is not None:
            old = self.panels[self._current]
            for names in old.overlays.values():
                for name in names:
                    self.stage.remove(name)
            old.overlays = {}
        self._current = -1

    def _show(self, k: int) -> None:
        """Put panel k's actors on the stage, taking the shown panel's away."""
        if k == self._current:
            return
        if self.stage is None:
            raise ParameterError("this figure was closed; make a new one")
        self._hide()
        panel, prefix = self.panels[k], f"p{k}-"
        options, stage = self.options, self.stage
        if panel.cloud is not None:
            panel.overlays["cloud"] = add_cloud(stage, options, panel.cloud, prefix=prefix)
        elif panel.volume is not None:
            panel.overlays["volume"] = add_volume(stage, panel.volume, prefix=prefix)
        elif panel.members:
            panel.overlays["members"] = add_members(stage, panel.members, prefix=prefix)
        else:
            panel.overlays["bodies"] = add_bodies(stage, options, panel.mesh.bodies, prefix=prefix)
        if options.cut and options.style == "surface":
            panel.overlays["caps"] = add_caps(stage, options, panel.mesh, prefix=prefix)
        if panel.outer is not None:
            panel.overlays["outer"] = add_bodies(
                stage, options, panel.outer.bodies, prefix=f"{prefix}outer-", opacity=0.18
            )
        reach = self._reach()
        if options.nodes:
            panel.overlays.update(
                add_nodes(stage, panel.state.nodal_surfaces(), reach, prefix=prefix)
            )
        if self.axis_lines:
            panel.overlays["axis_lines"] = add_axis_lines(stage, AXIS_REACH * reach, prefix=prefix)
        self._current = k

    def _reach(self) -> float:
        if self.options.extent is not None:
            return self.options.extent
        return max(
            float(np.abs(b.vertices).max()) for p in self.panels for m in p.shown for b in m.bodies
        )

    def panel_image(self, k: int) -> np.ndarray:
        """Render panel k to an (H, W, 4) uint8 RGBA array (no annotations)."""
        if self.stage is None:
            raise ParameterError("the figure is closed: make a new one to render again")
        self._show(k)
        if self.options.transparent:
            black = self.stage.snapshot((0.0, 0.0, 0.0)).astype(np.float64) / 255.0
            white = self.stage.snapshot((1.0, 1.0, 1.0)).astype(np.float64) / 255.0
            # difference matting: on black C = a F, on white C = a F + (1 - a)
            alpha = np.clip(1.0 - (white - black).mean(axis=2), 0.0, 1.0)
            colour = np.where(
                alpha[..., None] > 1e-6, black / np.maximum(alpha[..., None], 1e-6), 0
            )
            return np.round(255 * np.dstack([np.clip(colour, 0, 1), alpha])).astype(np.uint8)
        from PIL import ImageColor

        background = ImageColor.getrgb(self.options.background)[:3]
        rgb = self.stage.snapshot(tuple(c / 255.0 for c in background))
        return np.dstack([rgb, np.full(rgb.shape[:2], 255, np.uint8)])

    # --------------------------------------------------------------- pages and files
    @property
    def alt_text(self) -> str:
        """A description of the figure from the physics, for readers who cannot see it."""
        from orbviz.figures.alt import describe_panels

        key = (tuple(id(p) for p in self.panels), self.options.units, self.options.colors)
        if self._alt is None or self._alt[0] != key:  # computed once per set of panels
            self._alt = (key, describe_panels(self))
        title = f"{self.options.title}. " if self.options.title else ""
        return title + self._alt[1]

    def page(self, *, show_progress: bool = True) -> Page:
        """Render every panel and lay them out with their labels, key and scale bar."""
        steps: Iterable[tuple[int, Panel]] = enumerate(self.panels)
        long = len(self.panels) > 2 or self.options.scale >= 2 or self.options.width is not None
        if show_progress and long:
            steps = progress(steps, total=len(self.panels), desc="orbviz render", unit="panel")
        images = [
            PanelImage(
                self.panel_image(k),
                self.half_height,
                p.label,
                not p.state.is_real and not p.members,
                tuple(
                    (m.state.label, SET_PALETTE[j % len(SET_PALETTE)])
                    for j, m in enumerate(p.members)
                ),
            )
            for k, p in steps
        ]
        return Page(images, self.options, self.layout, alt_text=self.alt_text)

    def image(self) -> np.ndarray:
        """Render to an (H, W, 4) uint8 RGBA array with the annotations drawn on."""
        return self.page().rgba()

    def encode(self, suffix: str = ".png") -> bytes:
        """Render to the bytes of a PNG, TIFF, PDF or SVG file."""
        if suffix.lower() not in PAGE_SUFFIXES:
            raise ParameterError(
                f"figures are written as {', '.join(PAGE_SUFFIXES)}, not {suffix!r}"
            )
        return self.page().encode(suffix)

    def png(self, *, size: tuple[int, int] | None = None) -> bytes:
        """Render to PNG bytes; with ``size``, a thumbnail with panels that size."""
        if size is None:
            return self.encode(".png")
        return self.thumbnail(size)

    def thumbnail(self, size: tuple[int, int] = (320, 240), *, dpi: int = 150) -> bytes:
        """Render a PNG whose panels are ``size`` pixels, with text sized for it.

        The page is laid out as if printed ``size[0]`` pixels wide at ``dpi``, so the labels,
        key and scale bar keep their point sizes (6.5 pt is 13 pixels at 150 dpi) instead of
        shrinking with the image; the title is left out (a thumbnail's caption names it). The
        render window is reused and restored afterwards.
        """
        if self.stage is None:
            raise ParameterError("the figure is closed: make a new one to render again")
        import dataclasses

        stage = self.stage
        saved, window = self.options, stage.size
        cols = self.layout[0]
        self.options = dataclasses.replace(  # no title: a thumbnail's caption names it
            saved,
            size=size,
            scale=1.0,
            width=cols * size[0] / dpi * 25.4,
            height=None,
            dpi=dpi,
            title=None,
        )
        try:
            self._hide()
            stage.resize(*geometry(self.options, *self.layout).panel)
            return self.page(show_progress=False).encode(".png")
        finally:
            self._hide()
            self.options = saved
            stage.resize(*window)  # the next snapshot renders anew

    def save(self, path: str | os.PathLike[str]) -> Path:
        """Render and write a PNG, TIFF, PDF or SVG (by suffix), all or nothing."""
        from orbviz.export import check_output, write_files

        (target,) = check_output(path, list(PAGE_SUFFIXES))
        write_files({target: self.encode(target.suffix)})
        return target


def _compose(
    panels: list[Panel], options: FigureOptions, axis_lines: bool, oriented: bool = False
) -> Figure:
    """Open the render window and frame every panel at one scale."""
    cols, rows = page_layout(len(panels), options)
    page = geometry(options, cols, rows)
    if page.width * page.height / 1e6 > LIMITS.image_megapixels:
        raise OptionError(
            "size",
            f"the page would be {page.width * page.height / 1e6:.0f} megapixels; at most "
            f"{LIMITS.image_megapixels:g}",
        )
    stage = Stage(page.panel)
    fig = Figure(stage, panels, options, (cols, rows), axis_lines=axis_lines)
    fig.view = options.view or default_view(panels, oriented)
    try:
        vertices = np.vstack(
            [b.vertices for p in panels for m in p.shown for b in m.bodies]
            + [p.cloud.positions for p in panels if p.cloud is not None]
            + [r * np.vstack([np.eye(3), -np.eye(3)]) for r in _volume_reach(panels)]
        )
        if axis_lines:  # frame the axes and their labels too
            tips = AXIS_REACH * 1.12 * fig._reach() * np.eye(3)
            vertices = np.vstack([vertices, tips, -tips])
        fig.half_height = frame(fig, vertices)
        if options.axes and not axis_lines:  # axes through the nucleus make the triad redundant
            stage.triad((0, 0, 0.16, 0.2), line_width=3)
    except BaseException:
        fig.close()
        raise
    return fig


def _volume_reach(panels: list[Panel]) -> list[float]:
    """Radii that hold 99% of each volume panel's density: its glow is framed to them."""
    return [p.state.radial_quantile(0.99) for p in panels if p.volume is not None]


def _outer(state: State, options: FigureOptions, fraction: float) -> OrbitalMesh | None:
    if options.outer is None:
        return None
    if not options.outer > fraction:
        raise OptionError("outer", f"{options.outer:g} must exceed the fraction {fraction:g}")
    return build_mesh(
        state, mesh_options(options), fraction=options.outer, half_width=options.extent
    )


def figure(
    state: State,
    /,
    options: FigureOptions | None = None,
    *,
    fraction: float = DEFAULTS.fraction,
    mesh: OrbitalMesh | None = None,
) -> Figure:
    """Compose an off-screen 3D figure of a state's isosurface.

    Parameters
    ----------
    state : State
        Any kind of state.
    options : FigureOptions, optional
        Looks, overlays, framing and page (checked here by their rules).
    fraction : float, default: 0.9
        Probability enclosed by the surface.
    mesh : OrbitalMesh, optional
        Bodies already built with this fraction and the options' grid, colours and extent.

    Returns
    -------
    Figure
        ``figure.stage.renderer`` is the ``vtkRenderer`` to adjust further; ``figure.image()``
        renders it, ``figure.save(path)`` writes PNG, TIFF, PDF or SVG. Close it when done.
    """
    opts = checked(options or FigureOptions())
    outer = _outer(state, opts, fraction)
    if mesh is None:
        mesh = build_mesh(state, mesh_options(opts), fraction=fraction, half_width=opts.extent)
    panel = styled(Panel(state, mesh, outer=outer), opts)
    return _compose([panel], opts, bool(opts.axis_lines))


def _label(k: int, state: State, style: str) -> str:
    if style == "none":
        return ""
    letter = f"({chr(ord('a') + k)}) " if style == "letters" and k < 26 else ""
    return f"{letter}{state.label}"


def sheet(
    states: Sequence[State],
    /,
    options: FigureOptions | None = None,
    *,
    fraction: float = DEFAULTS.fraction,
    oriented: bool = False,
) -> Figure:
    """Compose one figure of several states: a sheet of panels, or one panel (``overlay``).

    Parameters
    ----------
    states : sequence of State
        The states, in panel order.
    options : FigureOptions, optional
        As for :func:`figure`, with ``layout``, ``labels`` and ``overlay``.
    fraction : float, default: 0.9
        Probability enclosed by every surface.
    oriented : bool, default: False
        The states are a set that differs by orientation (2p, 3d, a hybrid set): unless the
        options say otherwise, axes are drawn through the nucleus.

    Returns
    -------
    Figure
        Every panel shares one camera, one lighting and one scale (one sampling box).
    """
    from orbviz.figures.sets import set_meshes

    opts = checked(options or FigureOptions())
    meshes = set_meshes(states, opts, fraction=fraction)
    axis_lines = oriented if opts.axis_lines is None else opts.axis_lines
    if opts.overlay:
        panels = [Panel(states[0], meshes[0], members=meshes)]
    else:
        panels = [
            styled(Panel(s, m, _label(k, s, opts.labels), outer=_outer(s, opts, fraction)), opts)
            for k, (s, m) in enumerate(zip(states, meshes, strict=True))
        ]
    return _compose(panels, opts, axis_lines, oriented)
