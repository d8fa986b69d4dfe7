"""Benchmark: `orbviz info` as a whole process, against Python's own start-up in the same run.

Target (issue 2): under 0.5 s for an eigenstate. Run: python benchmarks/bench_info.py
"""

from __future__ import annotations

import sys

from _common import save, wall

ORBVIZ = [sys.executable, "-m", "orbviz"]
REPEATS = 7


def main() -> None:
    python = wall([sys.executable, "-c", "pass"], REPEATS)
    imports = wall([sys.executable, "-c", "import numpy, scipy.special"], REPEATS)
    rows = {}
    for spec in ["3dz2", "2pz", "4fxyz", "10,4,2", "30,0,0"]:
        rows[spec] = wall([*ORBVIZ, "info", spec, "--json"], REPEATS)
    result = {
        "python_startup_s": python,
        "numpy_scipy_import_s": imports,
        "info_s": rows,
        "info_3dz2_over_target_0.5s": rows["3dz2"] / 0.5,
        "info_3dz2_over_numpy_scipy_import": rows["3dz2"] / imports,
    }
    save("info", result)


if __name__ == "__main__":
    main()
