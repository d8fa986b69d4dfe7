"""Benchmark: a five-panel 3d sheet at print size against one single-orbital render.

Target (issue 14): ``orbviz render 3d -o d.png --width 175mm --dpi 300`` as a whole process
costs at most 2.5x ``orbviz render 3dz2 -o one.png`` (the default single figure), both timed
here in the same run, alternating, median of 5. The PDF of the same sheet is timed too.
Run: python benchmarks/bench_sheet.py
"""

from __future__ import annotations

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


def main(repeats: int = 5) -> None:
    orbviz = [sys.executable, "-m", "orbviz", "render"]
    with tempfile.TemporaryDirectory() as tmp:
        out = Path(tmp)
        runs: dict[str, list[float]] = {"single": [], "sheet_png": [], "sheet_pdf": []}
        for _ in range(repeats):
            runs["single"].append(_once([*orbviz, "3dz2", "-o", str(out / "one.png")]))
            sheet = [*orbviz, "3d", "--width", "175mm", "--dpi", "300"]
            runs["sheet_png"].append(_once([*sheet, "-o", str(out / "d.png")]))
            runs["sheet_pdf"].append(_once([*sheet, "-o", str(out / "d.pdf")]))
    medians = {key: statistics.median(values) for key, values in runs.items()}
    result = {
        "single_render_3dz2_s": medians["single"],
        "sheet_3d_175mm_300dpi_png_s": medians["sheet_png"],
        "sheet_3d_175mm_300dpi_pdf_s": medians["sheet_pdf"],
        "sheet_png_over_single": medians["sheet_png"] / medians["single"],
        "sheet_pdf_over_single": medians["sheet_pdf"] / medians["single"],
        "target_ratio": 2.5,
        "all_runs_s": runs,
    }
    save("sheet", result)


if __name__ == "__main__":
    main()
