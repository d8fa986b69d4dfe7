"""An off-screen VTK scene: named actors, an orthographic camera, lights and snapshots.

Figures are drawn with VTK's own rendering modules. A plotting wrapper would do the same
drawing, but importing one here costs about 1 s (it imports matplotlib.pyplot at start-up)
against 0.25 s for the modules a figure uses, and a figure command is short.

The render window is EGL off-screen (no display, no X server probe). Edges are smoothed by
FXAA, a screen-space pass, by default: in the software renderer a 1600x1200 frame takes
0.09 s with it and 0.14 s with 8x multisampling, for edges about as close to a 4x4
supersampled frame (benchmarks/bench_antialias.py), and two batch workers' multisampled
frames contend for the cores.
:class:`Stage` keeps its actors by name, so a figure takes one panel's actors away and shows
the next in the same window; ``renderer`` and ``window`` are the VTK objects, to adjust freely.
"""

from __future__ import annotations

import os
from collections.abc import Sequence
from typing import Any, Literal

import numpy as np

__all__ = ["Light", "Stage", "offscreen"]

Light = tuple[str, Sequence[float], float]  # ("camera" or "scene", position, intensity)
Colour = Sequence[float]  # RGB, each 0 to 1
# x, y, z of the corner triad: vermillion, bluish green, blue of Okabe & Ito's palette (2008),
# told apart with any colour vision; the letters name them too
_TRIAD = ((0.835, 0.369, 0.0), (0.0, 0.620, 0.451), (0.0, 0.447, 0.698))


def offscreen() -> None:
    """Use EGL off-screen rendering (no X server probe, no warning), before VTK makes a window."""
    os.environ.setdefault("VTK_DEFAULT_OPENGL_WINDOW", "vtkEGLRenderWindow")


class Stage:
    """An off-screen render window with one renderer, its actors kept by name.

    Parameters
    ----------
    size : (int, int)
        Width and height of the window, pixels.
    antialias : {"fxaa", "msaa", "none"}, default: "fxaa"
        How edges are smoothed: FXAA (a pass over the finished frame), 8x multisampling, or
        not at all.

    Attributes
    ----------
    renderer : vtkRenderer
        The scene; add any VTK prop to it.
    window : vtkRenderWindow
        The off-screen window.
    """

    def __init__(
        self, size: tuple[int, int], *, antialias: Literal["fxaa", "msaa", "none"] = "fxaa"
    ) -> None:
        offscreen()
        import vtkmodules.vtkRenderingFreeType  # noqa: F401  (text)
        import vtkmodules.vtkRenderingOpenGL2  # noqa: F401  (the OpenGL implementations)
        from vtkmodules.vtkRenderingCore import vtkRenderer, vtkRenderWindow

        self.renderer = vtkRenderer()
        self.renderer.AutomaticLightCreationOff()
        self.renderer.GetActiveCamera().ParallelProjectionOn()
        self.window = vtkRenderWindow()
        self.window.SetOffScreenRendering(1)
        if antialias not in ("fxaa", "msaa", "none"):
            raise ValueError(f"antialias {antialias!r}: one of fxaa, msaa, none")
        self.renderer.SetUseFXAA(antialias == "fxaa")
        self.window.SetMultiSamples(8 if antialias == "msaa" else 0)
        self.window.SetSize(*size)
        self.window.AddRenderer(self.renderer)
        self._props: dict[str, Any] = {}
        self._corner: Any = None

    # --------------------------------------------------------------- actors
    @property
    def size(self) -> tuple[int, int]:
        """Width and height of the window, pixels."""
        w, h = self.window.GetSize()
        return int(w), int(h)

    def resize(self, width: int, height: int) -> None:
        """Change the window's size (the next snapshot renders anew)."""
        self.window.SetSize(width, height)

    def add(self, name: str, prop: Any) -> str:
        """Add a VTK prop under ``name`` (replacing one of that name); return the name."""
        self.remove(name)
        self.renderer.AddViewProp(prop)
        self._props[name] = prop
        return name

    def remove(self, name: str) -> None:
        """Take the prop of that name away, if there is one."""
        prop = self._props.pop(name, None)
        if prop is not None:
            self.renderer.RemoveViewProp(prop)

    # --------------------------------------------------------------- view
    def look(
        self,
        toward: np.ndarray,
        up: np.ndarray,
        half_height: float,
        *,
        distance: float,
        clip: tuple[float, float],
    ) -> None:
        """Point the orthographic camera at the origin from ``distance`` along ``toward``."""
        camera = self.renderer.GetActiveCamera()
        camera.ParallelProjectionOn()
        camera.SetFocalPoint(0.0, 0.0, 0.0)
        camera.SetPosition(*(distance * np.asarray(toward, dtype=float)))
        camera.SetViewUp(*np.asarray(up, dtype=float))
        camera.SetParallelScale(half_height)
        camera.SetClippingRange(*clip)

    def light(self, lights: Sequence[Light]) -> None:
        """Replace the lights: camera lights (position in the camera's frame) or scene lights."""
        from vtkmodules.vtkRenderingCore import vtkLight

        self.renderer.RemoveAllLights()
        for kind, position, intensity in lights:
            light = vtkLight()
            if kind == "camera":
                light.SetLightTypeToCameraLight()
            else:
                light.SetLightTypeToSceneLight()
            light.SetPosition(*position)
            light.SetFocalPoint(0.0, 0.0, 0.0)
            light.SetIntensity(intensity)
            self.renderer.AddLight(light)

    def triad(self, viewport: tuple[float, float, float, float], *, line_width: float = 3) -> None:
        """Draw an x, y, z triad in a corner of the window, turned with the camera."""
        from vtkmodules.vtkRenderingAnnotation import vtkAxesActor
        from vtkmodules.vtkRenderingCore import vtkRenderer

        axes = vtkAxesActor()
        axes.SetShaftTypeToLine()
        for caption in (
            axes.GetXAxisCaptionActor2D(),
            axes.GetYAxisCaptionActor2D(),
            axes.GetZAxisCaptionActor2D(),
        ):
            text = caption.GetCaptionTextProperty()
            text.SetColor(0.0, 0.0, 0.0)
            text.ShadowOff()
        for shaft, tip, colour in zip(
            (
                axes.GetXAxisShaftProperty(),
                axes.GetYAxisShaftProperty(),
                axes.GetZAxisShaftProperty(),
            ),
            (axes.GetXAxisTipProperty(), axes.GetYAxisTipProperty(), axes.GetZAxisTipProperty()),
            _TRIAD,
            strict=True,
        ):
            shaft.SetLineWidth(line_width)
            shaft.SetColor(*colour)
            tip.SetColor(*colour)
        corner = vtkRenderer()
        corner.SetViewport(*viewport)
        corner.SetLayer(1)
        corner.InteractiveOff()
        corner.SetUseFXAA(self.renderer.GetUseFXAA())
        corner.AddViewProp(axes)
        self.window.SetNumberOfLayers(2)
        self.window.AddRenderer(corner)
        self._corner = corner

    def _turn_triad(self) -> None:
        """Give the corner's camera the main camera's direction (the triad turns with the view)."""
        main = self.renderer.GetActiveCamera()
        camera = self._corner.GetActiveCamera()
        toward = np.subtract(main.GetPosition(), main.GetFocalPoint())
        camera.SetFocalPoint(0.0, 0.0, 0.0)
        camera.SetPosition(*(toward / np.linalg.norm(toward)))
        camera.SetViewUp(*main.GetViewUp())
        self._corner.ResetCamera()

    # --------------------------------------------------------------- pictures
    def snapshot(self, background: Colour) -> np.ndarray:
        """Render on this background; return the (H, W, 3) uint8 image, top row first."""
        from vtkmodules.util.numpy_support import vtk_to_numpy
        from vtkmodules.vtkRenderingCore import vtkWindowToImageFilter

        self.renderer.SetBackground(*background)
        if self._corner is not None:
            self._turn_triad()
        self.window.Render()
        grab = vtkWindowToImageFilter()
        grab.SetInput(self.window)
        grab.SetInputBufferTypeToRGB()
        grab.ReadFrontBufferOff()
        grab.ShouldRerenderOff()  # rendered just above
        grab.Update()
        image = grab.GetOutput()
        w, h, _ = image.GetDimensions()
        pixels = vtk_to_numpy(image.GetPointData().GetScalars()).reshape(h, w, 3)
        return np.ascontiguousarray(pixels[::-1])

    def close(self) -> None:
        """Release the window, its context and every actor."""
        self.renderer.RemoveAllViewProps()
        if self._corner is not None:
            self._corner.RemoveAllViewProps()
            self.window.RemoveRenderer(self._corner)
            self._corner = None
        self.window.RemoveRenderer(self.renderer)
        self.window.Finalize()
        self._props.clear()
