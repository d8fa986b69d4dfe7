"""Benchmark: interactive pages, their weight, the time to make them and to draw them.

Targets (issue 15): a 3dz2 page with three levels weighs at most 3 MB. Reported beside it, in
the same run: ``orbviz render 3dz2 -o p.html`` as a whole process against ``orbviz render 3dz2
-o one.png`` (alternating, median of 5), the five 3d orbitals' page, and the time from
navigation to the first drawn frame in headless chromium with software WebGL (median of 5).
Run: python benchmarks/bench_page.py
"""

from __future__ import annotations

import json
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

from _common import save


def _once(argv: list[str]) -> float:
    start = time.perf_counter()
    subprocess.run(argv, check=True, capture_output=True)
    return time.perf_counter() - start


def _first_frames(page: Path, runs: int) -> list[float]:
    """Times to the first drawn frame, by the screenshot tool of the tests (headless chromium)."""
    tool = Path(__file__).parents[1] / "tests" / "tools" / "page_screenshot.py"
    shot = page.with_suffix(".png")
    argv = [sys.executable, str(tool), str(page), str(shot), "--runs", str(runs), "--json"]
    return json.loads(subprocess.run(argv, check=True, capture_output=True, text=True).stdout)


def main(repeats: int = 5) -> None:
    orbviz = [sys.executable, "-m", "orbviz", "render"]
    with tempfile.TemporaryDirectory() as tmp:
        out = Path(tmp)
        runs: dict[str, list[float]] = {"png": [], "page": []}
        for _ in range(repeats):
            runs["png"].append(_once([*orbviz, "3dz2", "-o", str(out / "one.png")]))
            runs["page"].append(_once([*orbviz, "3dz2", "-o", str(out / "one.html")]))
        set_time = _once([*orbviz, "3d", "-o", str(out / "set.html")])
        sizes = {
            "page_3dz2_bytes": (out / "one.html").stat().st_size,
            "page_3d_set_bytes": (out / "set.html").stat().st_size,
            "viewer_bytes": (Path(__file__).parents[1] / "orbviz/pages/viewer.js").stat().st_size,
        }
        frames = _first_frames(out / "one.html", repeats)
        frames_set = _first_frames(out / "set.html", repeats)
    medians = {key: statistics.median(values) for key, values in runs.items()}
    result = {
        **sizes,
        "page_3dz2_over_target": sizes["page_3dz2_bytes"] / 3e6,
        "render_3dz2_png_s": medians["png"],
        "render_3dz2_page_s": medians["page"],
        "page_over_png": medians["page"] / medians["png"],
        "page_3d_set_s": set_time,
        "first_frame_3dz2_s": statistics.median(frames),
        "first_frame_3d_set_s": statistics.median(frames_set),
        "all_runs_s": {**runs, "first_frame_3dz2": frames, "first_frame_3d_set": frames_set},
    }
    save("page", result)


if __name__ == "__main__":
    main()
