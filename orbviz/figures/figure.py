"""Publication figures rendered off-screen with PyVista (VTK).

A figure is an orthographic view of the phase-coloured bodies. The camera looks at the
nucleus, framed so that the orbital fills about 80% of the image (or a fixed extent, so that
figures of different orbitals share a scale). Lighting is three-point, shading smooth from the
bodies' gradient normals, and anti-aliasing multisampled. Transparent images are made by
difference matting (the scene on black and on white), so edges carry true partial alpha with no
halo of either background. The scale bar, title and phase wheel are drawn on the finished image
(:mod:`orbviz.figures.annotate`).

A :class:`Figure` holds an off-screen render window: close it when done (it is a context
manager), or many figures in one process grow without bound.
"""

from __future__ import annotations

import os
from dataclasses import dataclass, field
from pathlib import Path
from types import TracebackType
from typing import Any

import numpy as np

from orbviz._defaults import DEFAULTS
from orbviz._options import checked
from orbviz.errors import ParameterError
from orbviz.figures.annotate import annotate
from orbviz.figures.camera import camera_axes, place_lights
from orbviz.figures.options import FigureOptions
from orbviz.figures.overlays import add_bodies, add_caps, add_nodes
from orbviz.states.state import State
from orbviz.surface.mesh import OrbitalMesh, build_mesh
from orbviz.surface.options import MeshOptions

__all__ = ["Figure", "figure", "mesh_options"]


def _offscreen() -> None:
    """Use EGL off-screen rendering (no X server probe, no warning), before VTK makes a window."""
    os.environ.setdefault("VTK_DEFAULT_OPENGL_WINDOW", "vtkEGLRenderWindow")


def mesh_options(options: FigureOptions) -> MeshOptions:
    """Return the mesh a figure with these options shows: its grid and colours."""
    return MeshOptions(grid=options.grid, colors=options.colors)


@dataclass
class Figure:
    """A composed figure: the PyVista plotter, and what went into it.

    Attributes
    ----------
    plotter : pyvista.Plotter
        The off-screen scene, for further changes before :meth:`image`.
    mesh : OrbitalMesh
        The bodies shown.
    options : FigureOptions
        How it was set up.
    overlays : dict
        Overlay actor names by kind: ``radial_nodes``, ``angular_nodes``, ``outer``, ``caps``.
    half_height : float
        Half the height of the view in bohr (orthographic).
    """

    plotter: Any
    mesh: OrbitalMesh
    options: FigureOptions
    overlays: dict[str, list[str]] = field(default_factory=dict)
    half_height: float = 1.0

    def __repr__(self) -> str:
        w, h = self.options.pixels
        return f"Figure({self.mesh.state.label!r}, {w}x{h}, view {self.options.view})"

    def __enter__(self) -> Figure:
        return self

    def __exit__(
        self,
        kind: type[BaseException] | None,
        error: BaseException | None,
        trace: TracebackType | None,
    ) -> None:
        self.close()

    def close(self) -> None:
        """Release the render window and its memory; the figure cannot render after this."""
        if self.plotter is not None:
            self.plotter.close()
            self.plotter.deep_clean()
            self.plotter = None

    def _screenshot(self, background: Any) -> np.ndarray:
        if self.plotter is None:
            raise ParameterError("this figure was closed; make a new one")
        self.plotter.set_background(background)
        self.plotter.render()
        return np.asarray(self.plotter.screenshot(return_img=True))

    def image(self) -> np.ndarray:
        """Render to an (H, W, 4) uint8 RGBA array with the 2D annotations drawn on."""
        if self.options.transparent:
            black = self._screenshot("black").astype(np.float64) / 255.0
            white = self._screenshot("white").astype(np.float64) / 255.0
            # difference matting: on black C = a F, on white C = a F + (1 - a)
            alpha = np.clip(1.0 - (white - black).mean(axis=2), 0.0, 1.0)
            colour = np.where(
                alpha[..., None] > 1e-6, black / np.maximum(alpha[..., None], 1e-6), 0
            )
            img = np.round(255 * np.dstack([np.clip(colour, 0, 1), alpha])).astype(np.uint8)
        else:
            from PIL import ImageColor

            rgb = self._screenshot(ImageColor.getrgb(self.options.background)[:3])
            img = np.dstack([rgb, np.full(rgb.shape[:2], 255, np.uint8)])
        return annotate(
            img,
            title=self.options.title,
            scale_bar=self.options.scale_bar,
            bohr_per_pixel=2.0 * self.half_height / img.shape[0],
            phase_wheel=not self.mesh.state.is_real,
        )

    def png(self, *, size: tuple[int, int] | None = None) -> bytes:
        """Render to PNG bytes (shrunk to fit ``size``, if given, as a thumbnail)."""
        import io

        from PIL import Image

        picture = Image.fromarray(self.image(), "RGBA")
        if size is not None:
            picture.thumbnail(size)
        buffer = io.BytesIO()
        picture.save(buffer, format="PNG")
        return buffer.getvalue()

    def save(self, path: str | os.PathLike[str]) -> Path:
        """Render and write a PNG, all or nothing; returns the path."""
        from orbviz.export import check_output, write_files

        (target,) = check_output(path, [".png"])
        write_files({target: self.png()})
        return target


def _frame(fig: Figure, vertices: np.ndarray, extent: float | None) -> float:
    """Point an orthographic camera at the nucleus; return the half height of the view."""
    toward, right, up = camera_axes(fig.options.view)
    width, height = fig.options.pixels
    reach = float(np.abs(vertices).max()) if extent is None else extent
    if extent is None:
        half_w = np.abs(vertices @ right).max()
        half_h = np.abs(vertices @ up).max()
        half_height = 1.2 * max(half_h, half_w * height / width)
    else:
        half_height = 1.05 * extent * max(1.0, height / width)
    camera = fig.plotter.camera
    fig.plotter.enable_parallel_projection()
    camera.focal_point = (0.0, 0.0, 0.0)
    camera.position = tuple(toward * 10 * max(reach, 1.0))
    camera.up = tuple(up)
    camera.parallel_scale = half_height
    camera.clipping_range = (1e-3, 40 * max(reach, 1.0))
    place_lights(fig.plotter, fig.options.lighting, toward, right, up)
    return float(half_height)


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
        Looks, overlays and framing (checked here by their rules).
    fraction : float, default: 0.9
        Probability enclosed by the surface.
    mesh : OrbitalMesh, optional
        Bodies already built with this fraction and the options' grid, colours and extent.

    Returns
    -------
    Figure
        ``figure.plotter`` is a ``pyvista.Plotter`` to adjust further; ``figure.image()``
        renders it, ``figure.save(path)`` writes a PNG. Close it when done.
    """
    opts = checked(options or FigureOptions())
    if opts.outer is not None and not opts.outer > fraction:
        raise ParameterError(f"outer: {opts.outer:g} must exceed the fraction {fraction:g}")
    if mesh is None:
        mesh = build_mesh(state, mesh_options(opts), fraction=fraction, half_width=opts.extent)
    shown = list(mesh.bodies)
    outer = None
    if opts.outer is not None:
        outer = build_mesh(state, mesh_options(opts), fraction=opts.outer, half_width=opts.extent)
        shown += outer.bodies
    _offscreen()
    import pyvista

    plotter = pyvista.Plotter(off_screen=True, window_size=list(opts.pixels), lighting="none")
    fig = Figure(plotter, mesh, opts)
    try:
        add_bodies(fig, mesh.bodies)
        if opts.cut:
            add_caps(fig, opts.cut)
        if outer is not None:
            fig.overlays["outer"] = add_bodies(fig, outer.bodies, prefix="outer-", opacity=0.18)
        vertices = np.vstack([b.vertices for b in shown])
        if opts.nodes:
            add_nodes(fig, float(np.abs(vertices).max()) if opts.extent is None else opts.extent)
        fig.half_height = _frame(fig, vertices, opts.extent)
        plotter.enable_anti_aliasing("msaa", multi_samples=8)
        if opts.axes:
            plotter.add_axes(  # type: ignore[call-arg]
                line_width=3, labels_off=False, color="black", viewport=(0, 0, 0.16, 0.2)
            )
    except BaseException:
        fig.close()
        raise
    return fig
