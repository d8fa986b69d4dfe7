"""The contact sheet ``DIR/index.html``: thumbnails in a grid, labels, key numbers, file links.

Every text from the scene is escaped; the page loads nothing from the network.
"""

from __future__ import annotations

import html
from pathlib import Path
from typing import Any

__all__ = ["write_contact_sheet"]


def _kind(file: str, name: str) -> str:
    """Name a file by what follows the item's name: ``png``, ``slice.pdf``, ``model.3mf``."""
    rest = Path(file).name[len(name) :].lstrip(".-")
    return rest or Path(file).suffix[1:] or file


def write_contact_sheet(
    out: Path, manifest: dict[str, Any], *, scene_page: Path | None = None
) -> Path:
    """Write ``index.html``: a grid of thumbnails with labels, key numbers and file links.

    A card whose item made an interactive page links its thumbnail to the page; the scene's
    page of all pages, if any, is linked at the top.
    """
    from orbviz.export import write_files

    cards = []
    for entry in manifest["items"]:
        name = html.escape(entry["name"])
        spec = html.escape(entry["spec"])
        if entry.get("status") == "failed":
            cards.append(
                f'<figure class="card failed"><figcaption><b>{name}</b> '
                f"<code>{spec}</code><br>failed: {html.escape(entry.get('error', ''))}"
                "</figcaption></figure>"
            )
            continue
        links = " ".join(
            f'<a href="{html.escape(f)}">{html.escape(_kind(f, entry["name"]))}</a>'
            for f in entry.get("files", [])
        )
        if "isovalue" in entry:
            numbers = (
                f"{100 * entry.get('fraction', 0):g}% at |ψ|² = {entry['isovalue']:.3g} "
                f"bohr⁻³ · {entry.get('faces', 0):,} faces"
            )
        else:
            numbers = f"{entry.get('panels', 0)} panels · {100 * entry.get('fraction', 0):g}%"
        alt = html.escape(entry.get("alt_text") or entry["name"], quote=True)
        image = f'<img src="{html.escape(entry.get("thumbnail", ""))}" alt="{alt}" title="{alt}">'
        pages = [f for f in entry.get("files", []) if f.endswith(".html")]
        if pages:  # the thumbnail opens the interactive page
            image = f'<a href="{html.escape(pages[0])}">{image}</a>'
        cards.append(
            f'<figure class="card">{image}<figcaption><b>{name}</b> '
            f'<code>{spec}</code><br><span class="num">{numbers}</span><br>{links}'
            "</figcaption></figure>"
        )
    whole = (
        f'Every page in one: <a href="{html.escape(scene_page.name)}">{scene_page.name}</a>. '
        if scene_page is not None
        else ""
    )
    page = f"""<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>{html.escape(manifest["title"])}</title>
<style>
body {{ font-family: system-ui, sans-serif; margin: 24px; color: #1a1a1a; background: #fafafa; }}
.grid {{ display: grid; grid-template-columns: repeat(auto-fill, minmax(330px, 1fr)); gap: 16px; }}
.card {{ margin: 0; background: white; border: 1px solid #ddd; border-radius: 6px; padding: 6px; }}
.card img {{ display: block; width: 100%; height: auto; }}
.failed {{ border-color: #D55E00; }}
.num {{ color: #555; font-size: 0.9em; }}
figcaption {{ padding: 4px 2px; }}
</style></head>
<body><h1>{html.escape(manifest["title"])}</h1>
<p>{len(manifest["items"])} items; numbers are the enclosed probability, the isovalue and the
face count (or a sheet's panels). Each picture's description is its alt text; a picture
with an interactive page opens it. {whole}Made by orbviz.</p>
<div class="grid">
{chr(10).join(cards)}
</div>
<script>
window.addEventListener("load", () => {{
  const imgs = [...document.images];
  const ok = imgs.filter((i) => i.complete && i.naturalWidth > 0).length;
  document.body.dataset.thumbnails = ok + "/" + imgs.length;
}});
</script>
</body></html>
"""
    path = out / "index.html"
    write_files({path: page.encode("utf-8")})
    return path
