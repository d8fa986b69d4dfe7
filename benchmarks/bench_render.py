"""Benchmark: `orbviz render` of 3dz2 at 256^3, 1600x1200, as a whole process on 2 cores.

Target (issue 4): at most 3 s. Reported beside `orbviz mesh` of the same orbital and grid (the
part of the work that is not rendering) and the bare import of the VTK modules a figure draws
with, measured in the same run.
Run: python benchmarks/bench_render.py
"""

from __future__ import annotations

import sys
import tempfile
from pathlib import Path

from _common import save, wall


def main() -> None:
    with tempfile.TemporaryDirectory() as tmp:
        png, glb = str(Path(tmp) / "f.png"), str(Path(tmp) / "m.glb")
        orbviz = [sys.executable, "-m", "orbviz"]
        render = wall(
            [*orbviz, "render", "3dz2", "--grid", "256", "--size", "1600x1200", "-o", png]
        )
        mesh = wall([*orbviz, "mesh", "3dz2", "--grid", "256", "-o", glb])
        modules = "vtkRenderingCore, vtkRenderingOpenGL2, vtkRenderingFreeType, vtkFiltersCore"
        vtk = wall([sys.executable, "-c", f"from vtkmodules import {modules}"])
    result = {
        "render_3dz2_256_1600x1200_s": render,
        "render_over_target_3s": render / 3.0,
        "mesh_same_grid_s": mesh,
        "import_vtk_rendering_s": vtk,
        "render_over_mesh": render / mesh,
    }
    save("render", result)


if __name__ == "__main__":
    main()
