"""Benchmark: `orbviz model 2pz` at default settings as a whole process on 2 cores.

Target (issue 5): at most 5 s. Reported beside `orbviz mesh 2pz` (the same surface, no booleans)
measured in the same run. Run: python benchmarks/bench_model.py
"""

from __future__ import annotations

import sys
import tempfile
from pathlib import Path

from _common import save, wall


def main() -> None:
    orbviz = [sys.executable, "-m", "orbviz"]
    with tempfile.TemporaryDirectory() as tmp:
        model = wall([*orbviz, "model", "2pz", "--size", "60", "-o", str(Path(tmp) / "m.stl")])
        model_3mf = wall([*orbviz, "model", "2pz", "--size", "60", "-o", str(Path(tmp) / "m.3mf")])
        mesh = wall([*orbviz, "mesh", "2pz", "-o", str(Path(tmp) / "s.stl")])
    result = {
        "model_2pz_stl_s": model,
        "model_2pz_3mf_s": model_3mf,
        "model_over_target_5s": max(model, model_3mf) / 5.0,
        "mesh_2pz_s": mesh,
        "model_over_mesh": model / mesh,
    }
    save("model", result)


if __name__ == "__main__":
    main()
