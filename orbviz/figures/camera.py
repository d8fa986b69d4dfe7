"""Camera directions, the default view and the three-point lights of an off-screen figure."""

from __future__ import annotations

import math
from collections.abc import Sequence
from typing import TYPE_CHECKING

import numpy as np

from orbviz.figures.options import SET_VIEW, VIEWS
from orbviz.figures.page import geometry
from orbviz.figures.stage import Light

if TYPE_CHECKING:
    from orbviz.figures.figure import Figure, Panel

__all__ = ["camera_axes", "default_view", "frame", "lights"]


def camera_axes(view: tuple[float, float]) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Return unit vectors towards the camera, image right and image up (z up, except along z)."""
    az, el = (math.radians(v) for v in view)
    toward = np.array([math.cos(el) * math.cos(az), math.cos(el) * math.sin(az), math.sin(el)])
    # z up; looking along z, the image up is the azimuth direction turned by 90 degrees
    # (so the top view has x to the right and y up)
    up_hint = (
        np.array([0.0, 0.0, 1.0])
        if abs(math.sin(el)) < 0.999
        else np.array([-math.sin(az), math.cos(az), 0.0])
    )
    right = np.cross(up_hint, toward)
    right /= np.linalg.norm(right)
    up = np.cross(toward, right)
    return toward, right, up


def lights(preset: str, toward: np.ndarray, right: np.ndarray, up: np.ndarray) -> list[Light]:
    """Return the lights of a preset: one camera light (flat), or key, fill and rim lights."""
    if preset == "flat":
        return [("camera", tuple(toward * 100), 1.0)]
    key, fill, rim = (0.75, 0.35, 0.45) if preset == "soft" else (1.0, 0.25, 0.6)
    return [
        ("scene", tuple(direction * 100), intensity)
        for direction, intensity in [
            (toward + 0.8 * up - 0.7 * right, key),  # key: above left
            (toward - 0.2 * up + 0.9 * right, fill),  # fill: right, low
            (-toward + 0.9 * up + 0.3 * right, rim),  # rim: behind, above
        ]
    ]


def _lobe_axes(panels: Sequence[Panel]) -> list[np.ndarray]:
    """Return the directions of the lopsided positive parts shown (a hybrid's large lobe)."""
    axes = []
    for panel in panels:
        for mesh in panel.shown:
            for body in mesh.bodies:
                if body.name == "negative" or not len(body.vertices):
                    continue
                centre = body.vertices.mean(axis=0)
                reach = float(np.abs(body.vertices).max())
                if np.linalg.norm(centre) > 0.25 * reach:  # not centred on the nucleus
                    axes.append(centre / np.linalg.norm(centre))
    return axes


def default_view(panels: Sequence[Panel], oriented: bool) -> tuple[float, float]:
    """Return the set view for d and f sets that differ by orientation, else iso.

    Iso is turned when it looks within 30 degrees along a lobe (the demo's 2sp3[1] points at
    (1, 1, 1), nearly at the iso camera, and showed as a disc): the view kept is the one, at
    elevations 10 to 40 degrees, farthest from every lobe's axis.
    """
    atoms = [p.state.eigenstate for p in panels]
    if oriented and all(a is not None and a.l >= 2 for a in atoms):
        return SET_VIEW
    axes = _lobe_axes(panels)

    def clearance(view: tuple[float, float]) -> float:
        toward = camera_axes(view)[0]
        return min((math.degrees(math.acos(min(1.0, abs(toward @ a)))) for a in axes), default=90)

    if clearance(VIEWS["iso"]) >= 30:
        return VIEWS["iso"]
    candidates = [(float(az), float(el)) for el in (25, 10, 40) for az in range(0, 360, 15)]
    return max(candidates, key=clearance)


def frame(fig: Figure, vertices: np.ndarray) -> float:
    """Point an orthographic camera at the nucleus; return the half height of every panel."""
    options = fig.options
    toward, right, up = camera_axes(fig.view)
    panel_w, panel_h = geometry(options, *fig.layout).panel
    aspect = panel_h / panel_w
    reach = float(np.abs(vertices).max()) if options.extent is None else options.extent
    if options.extent is None:
        half_w = np.abs(vertices @ right).max()
        half_h = np.abs(vertices @ up).max()
        half_height = 1.2 * max(half_h, half_w * aspect)
    else:
        half_height = 1.05 * options.extent * max(1.0, aspect)
    far = max(reach, 1.0)
    if fig.stage is None:
        raise ValueError("the figure is closed")
    fig.stage.look(toward, up, half_height, distance=10 * far, clip=(1e-3, 40 * far))
    fig.stage.light(lights(options.lighting, toward, right, up))
    return float(half_height)
