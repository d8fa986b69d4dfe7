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
    PAGE_OUTPUTS,
    PLOT_OUTPUTS,
    POINT_OUTPUTS,
    STYLE_OUTPUTS,
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
    files, numbers = _sheet_files(item, out) if item.members else _orbital_files(item, out)
    order = {name: k for k, name in enumerate(item.files())}  # the order of the outputs
    ranked = sorted(files, key=lambda p: order.get(str(p.relative_to(out)), len(order)))
    return {p: files[p] for p in ranked}, numbers


def _wanted(item: Item, kinds: tuple[str, ...]) -> list[str]:
    return [k for k in item.outputs if k in kinds]


class _Plots:
    """The slice and radial plots an item asks for, and its thumbnail when it makes only plots."""

    def __init__(
        self,
        item: Item,
        states: list[State],
        radial: tuple[list[State], list[str]] | None = None,
    ) -> None:
        self.item, self.states, self.radial = item, states, radial
        self.kinds = _wanted(item, PLOT_OUTPUTS)

    def _make(self, which: str, **size: Any) -> tuple[Any, str]:
        from orbviz.figures.plots import describe_plot, plot

        options = dataclasses.replace(self.item.plot, kind=which, **size)
        chosen, labels = self.radial if which == "radial" and self.radial else (self.states, None)
        one: Any = chosen if len(chosen) > 1 else chosen[0]
        fig, data = plot(
            one,
            options,
            fraction=self.item.physics.fraction,
            colors=self.item.figure.colors,
            labels=labels,
        )
        return fig, describe_plot(data, options.units)

    def files(self, out: Path) -> dict[Path, bytes]:
        """Return every plot file, encoded with its resolution, title and alt text."""
        from orbviz.figures.paint import encode_figure

        files = {}
        for kind in self.kinds:
            which, fmt = kind.split(".")
            fig, alt = self._make(which)
            files[out / self.item.file_of(kind)] = encode_figure(
                fig, f".{fmt}", dpi=fig.dpi, title=self.item.plot.title or "", alt_text=alt
            )
        return files

    def thumbnail(self) -> tuple[bytes, str]:
        """Return the first plot redrawn at thumbnail size, and its alt text.

        The text keeps its point sizes at 150 dpi, so it reads at 320 pixels.
        """
        from orbviz.figures.paint import encode_figure

        width_mm = THUMBNAIL[0] / 150 * 25.4
        fig, alt = self._make(self.kinds[0].split(".")[0], width=width_mm, height=None, dpi=150)
        return encode_figure(fig, ".png", dpi=150, alt_text=alt), alt


def _three_d(item: Item) -> bool:
    """Tell whether the item makes anything from the surface (figure, meshes, model)."""
    made = FIGURE_OUTPUTS + MESH_OUTPUTS + MODEL_OUTPUTS + PAGE_OUTPUTS + STYLE_OUTPUTS
    return bool(_wanted(item, made + POINT_OUTPUTS))


def _styles(
    item: Item, states: list[State], looks: Any, out: Path, mesh: Any = None
) -> dict[Path, bytes]:
    """Return the item's cloud and volume figures (one panel, or a sheet of several states).

    ``mesh``, the item's surface when it has one, frames the figure without building it again.
    """
    from orbviz.figures.figure import figure, sheet
    from orbviz.states.make import oriented_set

    files = {}
    oriented = any(oriented_set(spec) for spec in item.members)
    for kind in _wanted(item, STYLE_OUTPUTS):
        style, fmt = kind.split(".")
        shown = dataclasses.replace(looks, style=style)
        fraction = item.physics.fraction
        made = (
            figure(states[0], shown, fraction=fraction, mesh=mesh)
            if len(states) == 1 and not item.members
            else sheet(states, shown, fraction=fraction, oriented=oriented)
        )
        with made as fig:
            files[out / item.file_of(kind)] = fig.encode(f".{fmt}")
    return files


def _points(item: Item, state: State, out: Path) -> dict[Path, bytes]:
    """Return the item's point clouds (orbviz sample), one draw for every format asked."""
    kinds = _wanted(item, POINT_OUTPUTS)
    if not kinds:
        return {}
    from orbviz.export.points import encode_points
    from orbviz.levels.sampling import sample
    from orbviz.models.engraving import prepare

    drawn = sample(state, item.sample.points, seed=item.sample.seed)
    points, units, _ = prepare(drawn, state, item.sample)
    files: dict[Path, bytes] = {}
    for kind in kinds:
        files.update(encode_points(points, out / item.file_of(kind), units))
    return files


def _page(item: Item, states: list[State], title: str | None, out: Path) -> dict[Path, bytes]:
    """Return the item's interactive page, if it asks for one."""
    if not _wanted(item, PAGE_OUTPUTS):
        return {}
    from orbviz.pages.build import page_data, page_html
    from orbviz.states.make import oriented_set

    fraction = item.physics.fraction
    oriented = any(oriented_set(spec) for spec in item.members)
    data = page_data(
        states,
        item.figure,
        item.page,
        fraction=fraction,
        title=title or item.name,
        oriented=oriented,
    )
    return {out / item.file_of("html"): page_html(data)}


def _orbital_files(item: Item, out: Path) -> tuple[dict[Path, bytes], dict[str, Any]]:
    state = item.physics.state(item.spec)
    plots = _Plots(item, [state])
    files = plots.files(out)
    thumb = out / "thumbs" / f"{item.name}.png"
    if _three_d(item):
        surface, numbers = _surface_files(item, state, out)
        files.update(surface)
        files.update(_movies(item, state, out)[0])
        return files, numbers
    numbers = _level_numbers(item, state)
    if plots.kinds:  # only plots (and perhaps a movie): the thumbnail is the first plot
        files[thumb], numbers["alt_text"] = plots.thumbnail()
        files.update(_movies(item, state, out)[0])
    else:  # only a movie: its first frame
        movie, files[thumb], numbers["alt_text"] = _movies(item, state, out)
        files.update(movie)
    return files, numbers


def _level_numbers(item: Item, state: State) -> dict[str, Any]:
    from orbviz.levels.isovalue import enclosing_isovalue

    iso = enclosing_isovalue(state, fraction=item.physics.fraction)
    return {"isovalue": iso.level, "fraction": iso.fraction}


def _kit(item: Item, state: State, mesh: Any) -> tuple[Any, bytes]:
    """Return an item's print kit and its .zip (the item's model options, as a kit)."""
    from orbviz.models.build import build_model
    from orbviz.models.kit import build_kit
    from orbviz.models.kit_files import kit_files, kit_zip

    options = dataclasses.replace(item.model, kit=True, split=False, cut=None)
    built = build_model(state, options, fraction=item.physics.fraction, mesh=mesh)
    kit = build_kit(built, options, state.label)
    return kit, kit_zip(kit_files(kit, options.bed_mm), f"{item.name}-kit")


def _surface_files(item: Item, state: State, out: Path) -> tuple[dict[Path, bytes], dict[str, Any]]:
    """Return the figures, meshes and models of one state's surface, and the thumbnail.

    The thumbnail shows the model when the item makes one, else the figure.
    """
    from orbviz.export import encode_bodies
    from orbviz.figures.figure import Panel, figure
    from orbviz.levels.isovalue import check_isovalue
    from orbviz.models.build import build_model
    from orbviz.surface.mesh import build_mesh

    fraction = item.physics.fraction
    mesh = build_mesh(state, item.mesh, fraction=fraction, half_width=item.figure.extent)
    files: dict[Path, bytes] = {}
    for kind in _wanted(item, MESH_OUTPUTS):
        files.update(encode_bodies(mesh.bodies, out / item.file_of(kind), scale=1.0, units="bohr"))
    model = kit = None
    # the figure's mesh serves the model too, unless a fixed extent changed its box
    shared = mesh if item.figure.extent is None else None
    if [k for k in _wanted(item, MODEL_OUTPUTS) if k != "kit.zip"]:
        model = build_model(state, item.model, fraction=fraction, mesh=shared)
        for kind in _wanted(item, MODEL_OUTPUTS):
            if kind != "kit.zip":
                files.update(model.files(out / item.file_of(kind)))
    if "kit.zip" in item.outputs:
        kit, data = _kit(item, state, shared)
        files[out / item.file_of("kit.zip")] = data
    figures = _wanted(item, FIGURE_OUTPUTS)
    looks = dataclasses.replace(item.figure, title=item.title(state.label))
    files.update(_page(item, [state], looks.title, out))
    files.update(_styles(item, [state], looks, out, mesh))
    files.update(_points(item, state, out))
    if not figures:
        looks = dataclasses.replace(looks, size=THUMBNAIL, scale=1.0, width=None)
    with figure(state, looks, fraction=fraction, mesh=mesh) as fig:
        for kind in figures:
            files[out / item.file_of(kind)] = fig.encode(f".{kind}")
        alt = fig.alt_text
        if model is not None:  # a model's thumbnail shows the model, stand and all
            shown = dataclasses.replace(mesh, bodies=model.preview_bodies())
            fig.replace_panel(0, Panel(state, shown))
            fig.options = dataclasses.replace(fig.options, scale_bar=False)
            if not figures:
                alt = f"Printable model ({item.model.size_mm:g} mm) of: {alt}"
        files[out / "thumbs" / f"{item.name}.png"] = fig.thumbnail(THUMBNAIL)
    if kit is not None and not figures:  # a kit's thumbnail is its exploded view
        from orbviz.models.assembly import exploded_png

        files[out / "thumbs" / f"{item.name}.png"] = exploded_png(kit, THUMBNAIL)
        alt = f"Print kit of {len(kit.parts)} parts ({item.model.size_mm:g} mm) of: {alt}"
    # the level's check and the bodies' facts; not the report's grid sums (0.1 s an item)
    iso = mesh.isovalue = check_isovalue(mesh.grid.field.state, mesh.isovalue)
    bodies = mesh.body_facts()
    numbers = {
        "isovalue": iso.level,
        "fraction": iso.fraction,
        "enclosed_fraction": iso.enclosed_fraction,
        "faces": sum(b["faces"] for b in bodies),
        "vertices": sum(b["vertices"] for b in bodies),
        "watertight": all(b["watertight"] for b in bodies),
        "volume_bohr3": sum(b["volume_bohr3"] for b in bodies),
        "alt_text": alt,
    }
    return files, numbers


def _movies(item: Item, state: State, out: Path) -> tuple[dict[Path, bytes], bytes, str]:
    """Return the movies asked for, the first frame as a thumbnail, and a description."""
    kinds = _wanted(item, ANIMATION_OUTPUTS)
    if not kinds:
        return {}, b"", ""
    import io

    from PIL import Image

    from orbviz.figures.animation import animate
    from orbviz.figures.animation_files import encode_movie

    movie = animate(state, item.animation, fraction=item.physics.fraction)
    files = {out / item.file_of(kind): encode_movie(movie, f".{kind}") for kind in kinds}
    first = Image.fromarray(movie.images[0][..., :3], "RGB")
    first.thumbnail(THUMBNAIL)
    buffer = io.BytesIO()
    first.save(buffer, format="PNG")
    alt = (
        f"{state.label} in motion: {len(movie.images)} frames over "
        f"{item.animation.periods:g} period(s) of {movie.beat.femtoseconds:.4g} fs, the surface "
        f"at one level that encloses {100 * item.physics.fraction:g}% on average"
    )
    return files, buffer.getvalue(), alt


def _sheet_files(item: Item, out: Path) -> tuple[dict[Path, bytes], dict[str, Any]]:
    from orbviz.figures.figure import sheet
    from orbviz.states.make import oriented_set, set_members

    physics = item.physics
    specs = [s for spec in item.members for s in set_members(spec) or [spec]]
    states = [physics.state(s) for s in specs]
    # radial plots: a subshell's members share one radial distribution, drawn once by its name
    firsts = [physics.state((set_members(spec) or [spec])[0]) for spec in item.members]
    plots = _Plots(item, states, radial=(firsts, list(item.members)))
    files = plots.files(out)
    numbers: dict[str, Any] = {"panels": len(states), "fraction": physics.fraction}
    figures = _wanted(item, FIGURE_OUTPUTS)
    looks = dataclasses.replace(item.figure, title=item.title(item.spec))
    files.update(_page(item, states, looks.title, out))
    files.update(_styles(item, states, looks, out))
    if not figures and plots.kinds:  # plots and no figure: the thumbnail is the first plot
        files[out / "thumbs" / f"{item.name}.png"], numbers["alt_text"] = plots.thumbnail()
        return files, numbers
    oriented = any(oriented_set(spec) for spec in item.members)
    with sheet(states, looks, fraction=physics.fraction, oriented=oriented) as fig:
        for kind in figures:
            files[out / item.file_of(kind)] = fig.encode(f".{kind}")
        numbers["alt_text"] = fig.alt_text
        cols = fig.layout[0]
        panel = (max(64, THUMBNAIL[0] // cols), max(48, THUMBNAIL[1] // cols))
        files[out / "thumbs" / f"{item.name}.png"] = fig.thumbnail(panel, dpi=120)
    return files, numbers
