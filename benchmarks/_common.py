"""Helpers shared by the benchmark scripts: timing whole processes and saving results."""

from __future__ import annotations

import json
import statistics
import subprocess
import time
from pathlib import Path

RESULTS = Path(__file__).with_name("results")


def wall(argv: list[str], repeats: int = 5) -> float:
    """Median wall time (s) of running a command ``repeats`` times."""
    times = []
    for _ in range(repeats):
        start = time.perf_counter()
        subprocess.run(argv, check=True, capture_output=True)
        times.append(time.perf_counter() - start)
    return statistics.median(times)


def save(name: str, result: dict) -> None:
    """Print a result and keep it as benchmarks/results/NAME.json (git ignores the folder)."""
    text = json.dumps(result, indent=2)
    print(text)
    RESULTS.mkdir(exist_ok=True)
    (RESULTS / f"{name}.json").write_text(text + "\n")
