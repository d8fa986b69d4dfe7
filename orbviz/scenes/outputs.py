"""What one scene item makes: every file's bytes, its thumbnail, and its manifest numbers.

An ``[[orbital]]`` item makes its 3D figure (PNG, TIFF, PDF, SVG), meshes, printable models,
slice and radial plots and animations from one state and one surface; a ``[[sheet]]`` makes one
figure and plots of several states. Nothing is written here: the runner writes the files of an
item together, all or none.
"""

from __future__ import annotations

import dataclasses
from pathlib import Path
from typing import Any

from orbviz.scenes.items import (
    ANIMATION_OUTPUTS,
    FIGURE_OUTPUTS,
    MESH_OUTPUTS,
    MODEL_OUTPUTS,
    PLOT_OUTPUTS,
    Item,
)
from orbviz.states.state import State

__all__ = ["THUMBNAIL", "item_files"]

THUMBNAIL = (320, 240)  # pixels of a thumbnail's page; text keeps its point sizes at 150 dpi


def item_files(item: Item, out: Path) -> tuple[dict[Path, bytes], dict[str, Any]]:
    """Return every file of one item, as bytes by path, and the numbers for its manifest entry.

    The thumbnail is ``out/thumbs/NAME.png``; the numbers include ``alt_text``, the figure's
    description.
    """
    if item.members:
        return _sheet_files(item, out)
    return _orbital_files(item, out)


def _wanted(item: Item, kinds: tuple[str, ...]) -> list[str]:
    return [k for k in item.outputs if k in kinds]


def _plots(
    item: Item,
    states: list[State],
    out: Path,
    radial: tuple[list[State], list[str]] | None = None,
) -> dict[Path, bytes]:
    """Return the slice and radial plots asked for (``radial``: its own states and labels)."""
    from orbviz.figures.page import encode_figure
    from orbviz.figures.plots import describe_plot, plot

    files = {}
    for kind in _wanted(item, PLOT_OUTPUTS):
        which, fmt = kind.split(".")
        options = dataclasses.replace(item.plot, kind=which)
        chosen, labels = radial if which == "radial" and radial else (states, None)
        one: Any = chosen if len(chosen) > 1 else chosen[0]
        fig, data = plot(
            one, options, fraction=item.physics.fraction, colors=item.figure.colors, labels=labels
        )
        alt = describe_plot(data, options.units)
        files[out / item.file_of(kind)] = encode_figure(
            fig, f".{fmt}", dpi=fig.dpi, title=options.title or "", alt_text=alt
        )
    return files


def _orbital_files(item: Item, out: Path) -> tuple[dict[Path, bytes], dict[str, Any]]:
    from orbviz.export import encode_bodies
    from orbviz.figures.figure import Panel, figure
    from orbviz.models.build import build_model
    from orbviz.surface.mesh import build_mesh

    state = item.physics.state(item.spec)
    fraction = item.physics.fraction
    mesh = build_mesh(state, item.mesh, fraction=fraction, half_width=item.figure.extent)
    files: dict[Path, bytes] = {}
    for kind in _wanted(item, MESH_OUTPUTS):
        files.update(encode_bodies(mesh.bodies, out / item.file_of(kind), scale=1.0, units="bohr"))
    model = None
    if _wanted(item, MODEL_OUTPUTS):
        # the figure's mesh serves the model too, unless a fixed extent changed its box
        shared = mesh if item.figure.extent is None else None
        model = build_model(state, item.model, fraction=fraction, mesh=shared)
        for kind in _wanted(item, MODEL_OUTPUTS):
            files.update(model.files(out / item.file_of(kind)))
    figures = _wanted(item, FIGURE_OUTPUTS)
    looks = dataclasses.replace(item.figure, title=item.title(state.label))
    if not figures:
        looks = dataclasses.replace(looks, size=THUMBNAIL, scale=1.0, width=None)
    with figure(state, looks, fraction=fraction, mesh=mesh) as fig:
        for kind in figures:
            files[out / item.file_of(kind)] = fig.encode(f".{kind}")
        alt = fig.alt_text
        if model is not None and not figures:  # a model's thumbnail shows the model
            shown = dataclasses.replace(mesh, bodies=model.preview_bodies())
            fig.replace_panel(0, Panel(state, shown))
            fig.options = dataclasses.replace(fig.options, scale_bar=False)
            alt = f"Printable model ({item.model.size_mm:g} mm) of: {alt}"
        files[out / "thumbs" / f"{item.name}.png"] = fig.thumbnail(THUMBNAIL)
    files.update(_plots(item, [state], out))
    files.update(_movies(item, state, out))
    report = mesh.report()
    numbers = {
        "isovalue": report["isovalue"],
        "fraction": report["fraction"],
        "enclosed_fraction": report["isovalue_enclosed_fraction"],
        "faces": report["faces"],
        "vertices": report["vertices"],
        "watertight": report["watertight"],
        "volume_bohr3": sum(b["volume_bohr3"] for b in report["bodies"]),
        "alt_text": alt,
    }
    return files, numbers


def _movies(item: Item, state: State, out: Path) -> dict[Path, bytes]:
    kinds = _wanted(item, ANIMATION_OUTPUTS)
    if not kinds:
        return {}
    from orbviz.figures.animation import animate
    from orbviz.figures.animation_files import encode_movie

    movie = animate(state, item.animation, fraction=item.physics.fraction)
    return {out / item.file_of(kind): encode_movie(movie, f".{kind}") for kind in kinds}


def _sheet_files(item: Item, out: Path) -> tuple[dict[Path, bytes], dict[str, Any]]:
    from orbviz.figures.figure import sheet
    from orbviz.states.make import oriented_set, set_members

    physics = item.physics
    specs = [s for spec in item.members for s in set_members(spec) or [spec]]
    states = [physics.state(s) for s in specs]
    figures = _wanted(item, FIGURE_OUTPUTS)
    looks = dataclasses.replace(item.figure, title=item.title(item.spec))
    if not figures:
        looks = dataclasses.replace(looks, size=THUMBNAIL, scale=1.0, width=None)
    oriented = any(oriented_set(spec) for spec in item.members)
    files: dict[Path, bytes] = {}
    with sheet(states, looks, fraction=physics.fraction, oriented=oriented) as fig:
        for kind in figures:
            files[out / item.file_of(kind)] = fig.encode(f".{kind}")
        alt = fig.alt_text
        cols = fig.layout[0]
        panel = (max(64, THUMBNAIL[0] // cols), max(48, THUMBNAIL[1] // cols))
        files[out / "thumbs" / f"{item.name}.png"] = fig.thumbnail(panel, dpi=120)
    # radial plots: a subshell's members share one radial distribution, drawn once by its name
    firsts = [physics.state((set_members(spec) or [spec])[0]) for spec in item.members]
    files.update(_plots(item, states, out, radial=(firsts, list(item.members))))
    return files, {"panels": len(states), "fraction": physics.fraction, "alt_text": alt}
