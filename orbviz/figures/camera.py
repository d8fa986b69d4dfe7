"""Camera directions and the three-point lights of an off-screen figure."""

from __future__ import annotations

import math
from typing import Any

import numpy as np

__all__ = ["camera_axes", "place_lights"]


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


def place_lights(
    plotter: Any, preset: str, toward: np.ndarray, right: np.ndarray, up: np.ndarray
) -> None:
    """Replace the plotter's lights: one camera light (flat), or key, fill and rim lights."""
    import pyvista

    plotter.remove_all_lights()
    if preset == "flat":
        plotter.add_light(
            pyvista.Light(position=tuple(toward * 100), intensity=1.0, light_type="camera light")
        )
        return
    key, fill, rim = (0.75, 0.35, 0.45) if preset == "soft" else (1.0, 0.25, 0.6)
    for direction, intensity in [
        (toward + 0.8 * up - 0.7 * right, key),  # key: above left
        (toward - 0.2 * up + 0.9 * right, fill),  # fill: right, low
        (-toward + 0.9 * up + 0.3 * right, rim),  # rim: behind, above
    ]:
        light = pyvista.Light(
            position=tuple(direction * 100),
            focal_point=(0, 0, 0),
            intensity=intensity,
            light_type="scene light",
        )
        plotter.add_light(light)
