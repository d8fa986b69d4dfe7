"""Benchmark: a print kit with phase marks, against today's one-piece model, as whole processes.

Target (issue 17): `orbviz model 3dz2 --kit --marks -o DIR` at most 3x `orbviz model 3dz2 -o
x.3mf`, both whole processes (start-up, mesh, booleans, files; the kit also renders its
assembly sheet), medians of 3 alternating runs in one session.
Run: python benchmarks/bench_kit.py
"""

from __future__ import annotations

import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

from _common import save

ORBVIZ = str(Path(sys.executable).with_name("orbviz"))


def _time(args: list[str]) -> float:
    start = time.perf_counter()
    subprocess.run([ORBVIZ, *args], check=True, capture_output=True)
    return time.perf_counter() - start


def main() -> None:
    with tempfile.TemporaryDirectory() as tmp:
        plain, kit = [], []
        for k in range(3):  # alternate, so that drift hits both alike
            plain.append(_time(["model", "3dz2", "-o", f"{tmp}/m{k}.3mf"]))
            kit.append(_time(["model", "3dz2", "--kit", "--marks", "-o", f"{tmp}/kit{k}"]))
    a, b = statistics.median(plain), statistics.median(kit)
    print(f"orbviz model 3dz2 (one piece, 3MF)      {a:6.2f} s")
    print(f"orbviz model 3dz2 --kit --marks           {b:6.2f} s")
    print(f"kit / one piece                           {b / a:6.2f}x  (target <= 3x)")
    save("kit", {"model_s": a, "kit_marks_s": b, "ratio": b / a})


if __name__ == "__main__":
    main()
