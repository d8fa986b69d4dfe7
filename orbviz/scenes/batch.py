"""Run a scene: every item in a worker, a manifest kept up to date, a contact sheet at the end.

The runner is built on :class:`concurrent.futures.Executor`. By default it is a local process
pool with one worker per core. Any executor whose futures work with
:func:`concurrent.futures.as_completed` can be passed in, for instance a Dask cluster's
``Client.get_executor()``. Items are plain data, and :func:`run_item` is a top-level function,
so both pickle.
"""

from __future__ import annotations

import concurrent.futures as cf
import html
import json
import os
import time
from pathlib import Path
from typing import Any

from orbviz.errors import OrbvizError
from orbviz.scenes.scene import Item

__all__ = ["MANIFEST", "run_item", "run_scene", "write_contact_sheet"]

MANIFEST = "manifest.json"
_MESH_SUFFIXES = ("glb", "gltf", "obj", "stl", "ply", "3mf")
_THUMB = (320, 240)


def _figure_options(item: Item, size=None):
    from orbviz.figures.render import FigureOptions, parse_view
    from orbviz.surface.colors import DEFAULT_PAIR, parse_colors

    r = dict(item.settings["render"])
    w, h = (int(v) for v in r.pop("size", "1600x1200").lower().split("x"))
    view = parse_view(r.pop("view", "iso"))
    scale_bar = r.pop("scale_bar", "angstrom")
    colors = parse_colors(item.settings["colors"]) if "colors" in item.settings else DEFAULT_PAIR
    return FigureOptions(
        size=size or (w, h),
        view=view,
        colors=colors,
        scale_bar=None if scale_bar == "none" else scale_bar,
        title=r.pop("title", item.name),
        **r,
    ).checked()


def run_item(item: Item, out_dir: str) -> dict[str, Any]:
    """Make every output of one item in ``out_dir``; never raises for a bad item.

    Returns
    -------
    dict
        The manifest entry: ``name``, ``spec``, ``status`` (``done`` or ``failed``), ``files``
        (relative to ``out_dir``), ``hash``, ``seconds``, and the isovalue and mesh statistics,
        or ``error``.
    """
    start = time.perf_counter()
    out = Path(out_dir)
    entry: dict[str, Any] = {"name": item.name, "spec": item.spec, "hash": item.digest}
    try:
        from orbviz.export import write_bodies
        from orbviz.scenes.scene import orbital_of
        from orbviz.surface.mesh import build_mesh

        s = item.settings
        orbital = orbital_of(item.spec, s)
        outputs = s["outputs"]
        files: list[Path] = []
        options = _figure_options(item)
        mesh = build_mesh(
            orbital,
            fraction=s["fraction"],
            grid=s["grid"],
            colors=options.colors,
            half_width=options.extent,
        )
        for suffix in (o for o in outputs if o in _MESH_SUFFIXES):
            files += write_bodies(mesh.bodies, out / f"{item.name}.{suffix}")
        from orbviz.figures.render import figure, render_png

        thumbs = out / "thumbs"
        thumbs.mkdir(exist_ok=True)
        thumb = thumbs / f"{item.name}.png"
        if "png" in outputs:
            png = render_png(
                figure(orbital, fraction=s["fraction"], grid=s["grid"], options=options, mesh=mesh),
                out / f"{item.name}.png",
            )
            files.append(png)
            _shrink(png, thumb)
        else:
            small = _figure_options(item, size=_THUMB)
            render_png(
                figure(orbital, fraction=s["fraction"], grid=s["grid"], options=small, mesh=mesh),
                thumb,
            )
        if any(o.startswith("model.") for o in outputs):
            # the figure's mesh serves the model too, unless a fixed extent changed its box
            shared = mesh if options.extent is None else None
            files += _models(item, orbital, out, options.colors, shared)
        report = mesh.report()
        entry.update(
            status="done",
            files=[str(p.relative_to(out)) for p in files],
            thumbnail=str(thumb.relative_to(out)),
            isovalue=report["isovalue"],
            fraction=report["fraction"],
            enclosed_fraction=report["isovalue_enclosed_fraction"],
            faces=report["faces"],
            vertices=report["vertices"],
            watertight=report["watertight"],
            volume_bohr3=sum(b["volume_bohr3"] for b in report["bodies"]),
        )
    except OrbvizError as error:
        entry.update(status="failed", error=str(error), files=[])
    except Exception as error:  # noqa: BLE001 - one bad item must not stop the set
        entry.update(status="failed", error=f"{type(error).__name__}: {error}", files=[])
    entry["seconds"] = round(time.perf_counter() - start, 3)
    return entry


def _shrink(png: Path, thumb: Path) -> None:
    from PIL import Image

    from orbviz.export import atomic_paths

    with Image.open(png) as image:
        image.thumbnail(_THUMB)
        with atomic_paths(thumb) as (temp,):
            image.save(temp, format="PNG")


def _models(item: Item, orbital, out: Path, colors, mesh=None) -> list[Path]:
    from orbviz.export.stl import write as write_stl
    from orbviz.export.threemf import write as write_3mf
    from orbviz.models.model import build_model

    m = item.settings["model"]
    model = build_model(
        orbital,
        size=m["size"],
        rod=m.get("rod"),
        min_feature=m.get("min_feature", 1.2),
        stand=m.get("stand", False),
        cut=m.get("cut"),
        fraction=item.settings["fraction"],
        grid=item.settings["grid"],
        colors=colors,
        mesh=mesh,
    )
    files = []
    if "model.stl" in item.settings["outputs"]:
        files += write_stl(
            model.bodies("solid"), out / f"{item.name}-model.stl", scale=1.0, units="mm"
        )
    if "model.3mf" in item.settings["outputs"]:
        files += write_3mf(
            model.bodies("parts"), out / f"{item.name}-model.3mf", scale=1.0, units="mm"
        )
    return files


def _write_manifest(out: Path, manifest: dict) -> None:
    from orbviz.export import atomic_paths

    with atomic_paths(out / MANIFEST) as (temp,):
        temp.write_text(json.dumps(manifest, indent=2) + "\n")


def _previous(out: Path) -> dict[str, dict]:
    try:
        data = json.loads((out / MANIFEST).read_text())
        return {entry["name"]: entry for entry in data.get("items", [])}
    except (OSError, ValueError, KeyError, TypeError):
        return {}


def _unchanged(entry: dict | None, item: Item, out: Path) -> bool:
    return (
        entry is not None
        and entry.get("status") in ("done", "skipped")
        and entry.get("hash") == item.digest
        and all((out / f).exists() for f in entry.get("files", []) + [entry.get("thumbnail", "")])
    )


def run_scene(
    items: list[Item],
    out_dir: str | os.PathLike,
    /,
    *,
    executor: cf.Executor | None = None,
    jobs: int | None = None,
    force: bool = False,
    progress: bool = True,
    title: str = "orbviz scene",
) -> dict[str, Any]:
    """Run every item; keep ``out_dir/manifest.json`` current; write ``out_dir/index.html``.

    Parameters
    ----------
    items : list of Item
        From :func:`orbviz.scenes.scene.load_scene`.
    out_dir : path-like
        Output folder (created if missing).
    executor : concurrent.futures.Executor, optional
        Where items run; default a process pool of ``jobs`` spawned workers. A process pool
        passed in should spawn its workers too (``mp_context=get_context("spawn")``): a forked
        pool made after VTK or numexpr started threads in the parent can hang.
    jobs : int, optional
        Workers of the default pool (default: one per core).
    force : bool, default: False
        Redo items even if unchanged.
    progress : bool, default: True
        Show a progress bar with item names and an ETA on stderr.
    title : str
        Heading of the contact sheet.

    Returns
    -------
    dict
        The manifest: ``{"title", "items": [entry, ...]}`` in scene order.
    """
    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    before = _previous(out)
    entries: dict[str, dict] = {}
    todo = []
    for item in items:
        old = before.get(item.name)
        if not force and _unchanged(old, item, out):
            entries[item.name] = {**old, "status": "skipped"}
        else:
            todo.append(item)
    manifest = {"title": title, "items": []}

    def save() -> None:
        manifest["items"] = [entries[i.name] for i in items if i.name in entries]
        _write_manifest(out, manifest)

    save()
    if todo:
        own = executor is None
        if own:
            import multiprocessing

            pool = cf.ProcessPoolExecutor(
                max_workers=jobs or os.cpu_count() or 1,
                mp_context=multiprocessing.get_context("spawn"),
            )
        else:
            pool = executor
        bar = None
        if progress:
            from tqdm import tqdm

            bar = tqdm(total=len(todo), unit="item", desc="orbviz batch", dynamic_ncols=True)
        try:
            futures = {pool.submit(run_item, item, str(out)): item for item in todo}
            for future in cf.as_completed(futures):
                item = futures[future]
                try:
                    entries[item.name] = future.result()
                except Exception as error:  # noqa: BLE001 - a lost worker fails its item only
                    entries[item.name] = {
                        "name": item.name,
                        "spec": item.spec,
                        "status": "failed",
                        "error": f"{type(error).__name__}: {error}",
                        "files": [],
                        "hash": item.digest,
                    }
                save()
                if bar is not None:
                    bar.set_postfix_str(item.name)
                    bar.update()
        finally:
            if bar is not None:
                bar.close()
            if own:
                pool.shutdown()
    save()
    write_contact_sheet(out, manifest)
    return manifest


def write_contact_sheet(out: Path, manifest: dict) -> Path:
    """Write ``index.html``: a grid of thumbnails with labels, key numbers and file links."""
    from orbviz.export import atomic_paths

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
            f'<a href="{html.escape(f)}">{html.escape(Path(f).suffix[1:] or f)}</a>'
            if not f.endswith(("-model.stl", "-model.3mf"))
            else f'<a href="{html.escape(f)}">model {html.escape(Path(f).suffix[1:])}</a>'
            for f in entry.get("files", [])
        )
        numbers = (
            f"{100 * entry.get('fraction', 0):g}% at |ψ|² = {entry.get('isovalue', 0):.3g} "
            f"bohr⁻³ · {entry.get('faces', 0):,} faces"
        )
        cards.append(
            f'<figure class="card"><img src="{html.escape(entry.get("thumbnail", ""))}" '
            f'alt="{name}" width="320" height="240"><figcaption><b>{name}</b> '
            f'<code>{spec}</code><br><span class="num">{numbers}</span><br>{links}'
            "</figcaption></figure>"
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
face count. Made by orbviz.</p>
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
    with atomic_paths(path) as (temp,):
        temp.write_text(page, encoding="utf-8")
    return path
