"""Benchmark: FXAA against 8x multisampling for figure edges, in quality and in time.

Each way renders the 3dxy figure's panel at 800x600; the reference is the same panel rendered
without smoothing at 3200x2400 and averaged over 4x4 blocks (a box-filtered supersample). The
error is the mean absolute difference, in 0-255 grey levels, over the pixels where the
reference is an edge (its own neighbours differ by more than 8 levels). The time is one warm
1600x1200 snapshot, best of five. Run: python benchmarks/bench_antialias.py
"""

from __future__ import annotations

import time

import numpy as np
from _common import save

import orbviz.figures.figure as figure_module
from orbviz.figures.figure import figure
from orbviz.figures.options import FigureOptions
from orbviz.figures.stage import Stage
from orbviz.states.make import make_state
from orbviz.states.physics import Physics


def panel(way: str, size: tuple[int, int]) -> tuple[np.ndarray, float]:
    """The panel's grey image with edges smoothed ``way``, and its best snapshot time."""

    class Smoothed(Stage):
        def __init__(self, pixels: tuple[int, int]) -> None:
            super().__init__(pixels, antialias=way)

    figure_module.Stage = Smoothed  # type: ignore[misc]
    try:
        fig = figure(make_state("3dxy", Physics()), FigureOptions(size=size, grid=96))
        image = fig.panel_image(0)
        times = []
        for _ in range(5):
            start = time.perf_counter()
            fig.panel_image(0)
            times.append(time.perf_counter() - start)
        fig.close()
    finally:
        figure_module.Stage = Stage  # type: ignore[misc]
    grey = image[..., :3].astype(np.float64).mean(axis=2)
    return grey, min(times)


def main() -> None:
    big, _ = panel("none", (3200, 2400))
    reference = big.reshape(600, 4, 800, 4).mean(axis=(1, 3))
    jumps = np.zeros_like(reference, dtype=bool)
    jumps[1:-1, 1:-1] = (
        np.maximum(
            np.abs(np.diff(reference, axis=0))[:-1, 1:-1],
            np.abs(np.diff(reference, axis=1))[1:-1, :-1],
        )
        > 8
    )
    result: dict[str, float | int] = {"edge_pixels": int(jumps.sum())}
    for way in ("none", "fxaa", "msaa"):
        grey, _ = panel(way, (800, 600))
        _, seconds = panel(way, (1600, 1200))
        result[f"{way}_edge_error_levels"] = float(np.abs(grey - reference)[jumps].mean())
        result[f"{way}_snapshot_1600x1200_s"] = seconds
    save("antialias", result)


if __name__ == "__main__":
    main()
