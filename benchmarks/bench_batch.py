"""Benchmark: a 16-item scene at the default grid and image size, run, then rerun unchanged.

Issue 6 asks for images per minute on this 2-core machine, and a rerun of an unchanged scene in
under 10% of the first run's time. Both runs are whole `orbviz batch` processes in the same
session. Run: python benchmarks/bench_batch.py
"""

from __future__ import annotations

import json
import subprocess
import sys
import tempfile
import time
from pathlib import Path

from _common import save

SCENE = """
title = "benchmark: 16 figures"
[defaults]
outputs = ["png"]
[[shells]]
n = [1, 2, 3]
[[orbital]]
spec = "4fxyz"
[[orbital]]
spec = "3,2,1"
"""


def timed(argv: list[str]) -> float:
    start = time.perf_counter()
    subprocess.run(argv, check=True, capture_output=True)
    return time.perf_counter() - start


def main() -> None:
    with tempfile.TemporaryDirectory() as tmp:
        scene = Path(tmp) / "bench.toml"
        scene.write_text(SCENE)
        out = str(Path(tmp) / "out")
        argv = [sys.executable, "-m", "orbviz", "batch", str(scene), "-o", out, "--no-progress"]
        first = timed(argv)
        rerun = timed(argv)
        manifest = json.loads((Path(out) / "manifest.json").read_text())
    count = len(manifest["items"])
    result = {
        "items": count,
        "first_run_s": first,
        "images_per_minute": 60.0 * count / first,
        "rerun_s": rerun,
        "rerun_over_first": rerun / first,
        "rerun_target": "< 0.10",
    }
    save("batch", result)


if __name__ == "__main__":
    main()
