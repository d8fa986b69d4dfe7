"""Benchmark: a 48-frame animation of 1s+2pz at 128^3 as a whole process (issue 8: <= 60 s).

Reported beside one `orbviz render` of the same grid and frame size, measured in the same run.
Run: python benchmarks/bench_animate.py
"""

from __future__ import annotations

import sys
import tempfile
from pathlib import Path

from _common import save, wall


def main() -> None:
    orbviz = [sys.executable, "-m", "orbviz"]
    with tempfile.TemporaryDirectory() as tmp:
        movie = wall(
            [
                *orbviz,
                "animate",
                "1s+2pz",
                "--frames",
                "48",
                "--grid",
                "128",
                "-o",
                str(Path(tmp) / "a.gif"),
            ],
            repeats=1,
        )
        still = wall(
            [
                *orbviz,
                "render",
                "1s+2pz",
                "--grid",
                "128",
                "--size",
                "800x600",
                "-o",
                str(Path(tmp) / "f.png"),
            ],
            repeats=3,
        )
    save(
        "animate",
        {
            "animate_48_frames_128_s": movie,
            "over_target_60s": movie / 60.0,
            "one_render_same_grid_s": still,
            "seconds_per_frame": movie / 48,
            "frame_over_single_render": movie / 48 / still,
        },
    )


if __name__ == "__main__":
    main()
