"""Benchmark: the level of a superposition as its number of terms grows, in process.

Target: issue 18, <= 0.1 s per added term of a distinct shell, up to 50 terms, with the level
within 1e-5 in probability. The terms are the shells in order (1s, 2s, 2p, 3s, ...), m cycling
through -l .. l, equal weights (complex, no mirror planes for most). Each size is timed once
with the check (as ``orbviz info`` does) and once without (as ``orbviz mesh`` does), beside
the code of the last commit before the windowed rays (``--code DIR``, optional) on the same
states. Run: python benchmarks/bench_mixture.py [--sizes 2,5,10,20,50] [--code DIR]
"""

from __future__ import annotations

import argparse
import json
import subprocess
import sys
import time

from _common import save

SHELLS = [(n, l) for n in range(1, 12) for l in range(n)]

_TIMER = """
import json, sys, time
from orbviz.levels.isovalue import enclosing_isovalue
from orbviz.states.orbital import Orbital
spec, check = sys.argv[1], sys.argv[2] == "1"
state = Orbital.from_spec(spec)
start = time.perf_counter()
iso = enclosing_isovalue(state, check=check)
print(json.dumps({"seconds": time.perf_counter() - start, "enclosed": iso.enclosed_fraction}))
"""


def mixture(terms: int) -> str:
    """The first ``terms`` shells, m cycling through -l .. l."""
    parts = []
    for i, (n, l) in enumerate(SHELLS[:terms]):
        parts.append(f"{n},{l},{i % (2 * l + 1) - l}")
    return " + ".join(parts)


def timed(spec: str, check: bool, code: str | None) -> dict:
    """Run the level in a fresh process (imports warm), optionally from another checkout."""
    prefix = "" if code is None else f"import sys; sys.path.insert(0, {code!r})\n"
    out = subprocess.run(
        [sys.executable, "-c", prefix + _TIMER, spec, "1" if check else "0"],
        check=True,
        capture_output=True,
        text=True,
    )
    return json.loads(out.stdout)


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--sizes", default="1,2,3,5,8,12,20,30,50")
    parser.add_argument("--code", default=None, help="another checkout to time beside")
    args = parser.parse_args()
    rows = []
    for size in (int(s) for s in args.sizes.split(",")):
        spec = mixture(size)
        row = {"terms": size, "top_shell": "{},{}".format(*SHELLS[size - 1])}
        row["info_s"] = timed(spec, True, None)["seconds"]
        row["mesh_s"] = timed(spec, False, None)["seconds"]
        if args.code:
            row["before_info_s"] = timed(spec, True, args.code)["seconds"]
        rows.append(row)
        print(row, flush=True)
    slopes = [
        (b["info_s"] - a["info_s"]) / (b["terms"] - a["terms"])
        for a, b in zip(rows, rows[1:], strict=False)
    ]
    save(
        "mixture",
        {
            "rows": rows,
            "seconds_per_added_term_info": slopes,
            "worst_seconds_per_added_term": max(slopes) if slopes else None,
            "when": time.strftime("%Y-%m-%d"),
        },
    )


if __name__ == "__main__":
    main()
