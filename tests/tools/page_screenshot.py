"""Open an orbviz page offline in Debian's chromium; save a screenshot; print load times.

    python tests/tools/page_screenshot.py PAGE.html SHOT.png [--runs N] [--json]

Used for docs/img/page-3dz2.png and for the load-time figure in benchmarks/README.md: the time
from navigation to the page's first drawn frame (``data-ready``), with software WebGL.
"""

from __future__ import annotations

import argparse
import json
import shutil
import statistics
import time
from pathlib import Path

from playwright.sync_api import sync_playwright


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("page", type=Path)
    parser.add_argument("shot", type=Path)
    parser.add_argument("--runs", type=int, default=1)
    parser.add_argument("--json", action="store_true", help="print the times as a JSON list")
    args = parser.parse_args()
    exe = shutil.which("chromium") or shutil.which("chromium-browser")
    times = []
    with sync_playwright() as p:
        browser = p.chromium.launch(
            executable_path=exe,
            args=["--use-angle=swiftshader", "--enable-unsafe-swiftshader", "--no-sandbox"],
        )
        for _ in range(args.runs):
            context = browser.new_context(viewport={"width": 900, "height": 820}, offline=True)
            page = context.new_page()
            start = time.perf_counter()
            page.goto(args.page.resolve().as_uri())
            page.wait_for_selector("#orbviz[data-ready=yes]", timeout=120_000)
            times.append(time.perf_counter() - start)
            page.screenshot(path=str(args.shot))
            context.close()
        browser.close()
    if args.json:
        print(json.dumps(times))
    else:
        print(f"first frame: median {statistics.median(times):.2f} s over {len(times)} run(s)")


if __name__ == "__main__":
    main()
