"""Benchmark: `orbviz info` as a whole process, against Python's own start-up in the same run.

Target (issue 2): under 0.5 s for an eigenstate. Run: python benchmarks/bench_info.py
"""

from __future__ import annotations

import json
import statistics
import subprocess
import sys
import time
from pathlib import Path

ORBVIZ = [sys.executable, "-m", "orbviz"]
REPEATS = 7


def wall(argv: list[str]) -> float:
    """Median wall time of a command over REPEATS runs (after one warm-up)."""
    subprocess.run(argv, check=True, capture_output=True)
    times = []
    for _ in range(REPEATS):
        start = time.perf_counter()
        subprocess.run(argv, check=True, capture_output=True)
        times.append(time.perf_counter() - start)
    return statistics.median(times)


def main() -> None:
    python = wall([sys.executable, "-c", "pass"])
    imports = wall([sys.executable, "-c", "import numpy, scipy.special"])
    rows = {}
    for spec in ["3dz2", "2pz", "4fxyz", "10,4,2", "30,0,0"]:
        rows[spec] = wall([*ORBVIZ, "info", spec, "--json"])
    result = {
        "python_startup_s": python,
        "numpy_scipy_import_s": imports,
        "info_s": rows,
        "info_3dz2_over_target_0.5s": rows["3dz2"] / 0.5,
        "info_3dz2_over_numpy_scipy_import": rows["3dz2"] / imports,
    }
    print(json.dumps(result, indent=2))
    out = Path(__file__).with_name("results")
    out.mkdir(exist_ok=True)
    (out / "info.json").write_text(json.dumps(result, indent=2) + "\n")


if __name__ == "__main__":
    main()
