"""Benchmark: peak memory of a 20-item batch on 2 workers, the whole process tree summed.

Issue 13 asks for the peak of a 20-item batch before and after the memory fixes. The scene is
20 orbitals at grid 128 with a 1600x1200 PNG and a GLB each, run with ``--jobs 2``; the
resident memory of the batch process and all its descendants (workers, resource tracker) is
summed from /proc every 0.2 s. ``--code DIR`` runs another checkout of orbviz the same way
(through PYTHONPATH), so two versions can be compared in one run.
Run: python benchmarks/bench_batch_memory.py [--code /path/to/other/checkout]
"""

from __future__ import annotations

import argparse
import os
import subprocess
import sys
import tempfile
import time
from pathlib import Path

from _common import save

SCENE = """
title = "benchmark: 20 items"
[defaults]
grid = 128
outputs = ["png", "glb"]
[[shells]]
n = [1, 2, 3]
[[orbital]]
spec = "4fxyz"
[[orbital]]
spec = "4fz3"
[[orbital]]
spec = "4s"
[[orbital]]
spec = "4pz"
[[orbital]]
spec = "3,2,1"
[[orbital]]
spec = "4,3,2"
"""


def _tree_rss_mb(root: int) -> float:
    """Sum VmRSS of a process and all its descendants (Linux /proc)."""
    children: dict[int, list[int]] = {}
    for entry in Path("/proc").iterdir():
        if not entry.name.isdigit():
            continue
        try:
            fields = (entry / "stat").read_text().rsplit(")", 1)[1].split()
            children.setdefault(int(fields[1]), []).append(int(entry.name))
        except (OSError, IndexError, ValueError):
            continue
    total, todo = 0.0, [root]
    while todo:
        pid = todo.pop()
        todo += children.get(pid, [])
        try:
            for line in Path(f"/proc/{pid}/status").read_text().splitlines():
                if line.startswith("VmRSS:"):
                    total += int(line.split()[1]) / 1024
        except OSError:
            pass
    return total


def run(code: str | None) -> dict[str, float]:
    env = dict(os.environ)
    if code:
        env["PYTHONPATH"] = code
    with tempfile.TemporaryDirectory() as tmp:
        scene = Path(tmp) / "bench.toml"
        scene.write_text(SCENE)
        argv = [sys.executable, "-m", "orbviz", "batch", str(scene), "-o", str(Path(tmp) / "o")]
        start = time.perf_counter()
        proc = subprocess.Popen(
            [*argv, "--jobs", "2", "--no-progress"],
            env=env,
            cwd=tmp,
            stdout=subprocess.DEVNULL,
            stderr=subprocess.DEVNULL,
        )
        peak = 0.0
        while proc.poll() is None:
            peak = max(peak, _tree_rss_mb(proc.pid))
            time.sleep(0.2)
        if proc.returncode != 0:
            raise SystemExit(f"batch failed with status {proc.returncode}")
        return {"peak_mb": round(peak, 1), "seconds": round(time.perf_counter() - start, 2)}


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--code", help="another orbviz checkout to compare, run the same way")
    args = parser.parse_args()
    result: dict[str, object] = {"this": run(None)}
    if args.code:
        result["other"] = run(args.code)
        result["this"] = run(None)  # again, so that both orders are seen
        result["peak_ratio_this_over_other"] = (
            result["this"]["peak_mb"] / result["other"]["peak_mb"]  # type: ignore[index]
        )
    save("batch_memory", result)


if __name__ == "__main__":
    main()
