"""The scene's own page ``DIR/orbitals.html``: every item's interactive page in one chooser.

Made from the item pages the run wrote (their data are read back, not computed again). Items
whose levels differ from the most common set stay on their own pages and are named in a note.
"""

from __future__ import annotations

import json
import re
from collections import Counter
from pathlib import Path
from typing import Any

__all__ = ["SCENE_PAGE", "write_scene_page"]

SCENE_PAGE = "orbitals.html"
_DATA = re.compile(r'<script type="application/json" id="orbviz-data">(.*?)</script>', re.S)


def _page_data(path: Path) -> dict[str, Any] | None:
    """Read a page's data back; None if the file is missing or not one of our pages."""
    try:
        match = _DATA.search(path.read_text(encoding="utf-8"))
        return json.loads(match.group(1)) if match else None
    except (OSError, ValueError):
        return None


def write_scene_page(out: Path, manifest: dict[str, Any]) -> tuple[Path | None, list[str]]:
    """Write the scene page when two or more items made pages.

    Returns
    -------
    path : Path or None
        The page written, or None (fewer than two item pages).
    left_out : list of str
        Items whose pages offer other levels, left on their own pages.
    """
    from orbviz.export import write_files
    from orbviz.pages.build import page_html

    found = []
    for entry in manifest["items"]:
        if entry.get("status") == "failed":
            continue
        pages = [f for f in entry.get("files", []) if f.endswith(".html")]
        data = _page_data(out / pages[0]) if pages else None
        if data is not None:
            found.append((entry["name"], data))
    if len(found) < 2:
        return None, []
    common = Counter(tuple(d["levels"]) for _, d in found).most_common(1)[0][0]
    kept = [(name, d) for name, d in found if tuple(d["levels"]) == common]
    left_out = [name for name, d in found if tuple(d["levels"]) != common]
    first = kept[0][1]
    panels = []
    for name, data in kept:
        for panel in data["panels"]:
            label = panel["label"] if len(data["panels"]) == 1 else f"{name}: {panel['label']}"
            panels.append({**panel, "label": label})
    merged = {
        **first,
        "title": manifest["title"],
        "arrangement": "chooser",
        "wheel": next((d["wheel"] for _, d in kept if d["wheel"]), None),
        "panels": panels,
    }
    path = out / SCENE_PAGE
    write_files({path: page_html(merged)})
    return path, left_out
