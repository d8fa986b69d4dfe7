"""An interactive page: its data (surfaces per level as GLB, numbers, nodes, alt text) and HTML.

Each panel's surface is built at every level the page offers, decimated to the page's face
budget and written as GLB (positions in the figure's length unit; the viewer computes the
normals). The page inlines its script (three.js and our viewer, :file:`viewer.js`), its style
and its data: it loads nothing, from the network or from disk, and works from ``file://``.
"""

from __future__ import annotations

import base64
import dataclasses
import html
import json
from collections.abc import Sequence
from importlib.resources import files
from pathlib import Path
from typing import Any

import numpy as np

from orbviz._defaults import BOHR_IN_ANGSTROM
from orbviz.errors import OptionError, OrbvizError, ParameterError
from orbviz.figures.options import FigureOptions
from orbviz.states.state import State
from orbviz.surface.mesh import OrbitalMesh, build_mesh
from orbviz.surface.options import MeshOptions

from .options import MAX_LEVELS, PageOptions, arrangement_of

__all__ = ["ignored_options", "page_data", "page_html"]

_UNIT_LABEL = {"angstrom": "Å", "bohr": "bohr"}
_FACES_PER_LEVEL_MAX = 60_000  # a page's weight: every level of every panel is inlined


def _levels(options: PageOptions, fraction: float) -> list[float]:
    """Return the page's fractions, the figure's own among them, in increasing order."""
    levels = sorted({*options.levels, round(fraction, 6)})
    if len(levels) > MAX_LEVELS:
        raise OptionError(
            "levels",
            f"{len(levels)} levels with the fraction {fraction:g} added; at most {MAX_LEVELS}",
        )
    return levels


def _glb(mesh: OrbitalMesh, scale: float, units: str) -> str:
    from orbviz.export.gltf import encode

    bodies = [dataclasses.replace(b, normals=np.empty((0, 3))) for b in mesh.bodies]
    data = encode(bodies, Path("page.glb"), scale=scale, units=units)[Path("page.glb")]
    return base64.b64encode(data).decode("ascii")


def _cloud(state: State, count: int, scale: float, colors: Any) -> dict[str, str] | None:
    """Return exact samples of |psi|^2 for the page's dots: positions and linear colours."""
    if count == 0:
        return None
    from orbviz.figures.cloud import cloud_points
    from orbviz.surface.colors import linear_bytes, point_colors

    points = cloud_points(state, count)
    rgba = point_colors(points.phase, points.real, colors)
    xyz = (points.positions * np.float32(scale)).astype("<f4")
    return {
        "positions": base64.b64encode(xyz.tobytes()).decode("ascii"),
        "colors": base64.b64encode(linear_bytes(rgba)[:, :3].tobytes()).decode("ascii"),
    }


def _numbers(state: State, mesh: OrbitalMesh, facts: dict[str, Any]) -> str:
    parts = [state.label]
    if facts.get("element"):
        parts.append(f"{facts['element']}: Z_eff = {facts['Z']:.4g} (Slater)")
    elif facts.get("Z") not in (None, 1, 1.0):
        parts.append(f"Z = {facts['Z']:g}")
    if facts.get("potential"):
        parts.append(f"potential {facts['potential']}")
    if facts.get("energy_hartree") is not None:
        parts.append(f"E = {facts['energy_hartree']:.6g} hartree ({facts['energy_ev']:.5g} eV)")
    if facts.get("radial_nodes") is not None:
        parts.append(
            f"{facts['radial_nodes']} radial, {facts['angular_nodes']} angular node"
            f"{'s' * (facts['angular_nodes'] != 1)}"
        )
    parts.append(
        f"{100 * mesh.isovalue.fraction:g}% inside |ψ|² = {mesh.isovalue.level:.2e} bohr⁻³"
    )
    return " · ".join(parts)


def _panel(
    state: State,
    figure: FigureOptions,
    options: PageOptions,
    levels: list[float],
    shown: int,
) -> dict[str, Any]:
    """One orbital's entry: a GLB and a line of numbers per level, its nodes and alt text."""
    from orbviz.figures.alt import colour_names, describe_panel
    from orbviz.figures.figure import Panel
    from orbviz.levels.report import summarise

    scale = BOHR_IN_ANGSTROM if figure.units == "angstrom" else 1.0
    opts = MeshOptions(grid=figure.grid, faces=options.faces, colors=figure.colors)
    meshes = []
    for f in levels:
        try:
            meshes.append(build_mesh(state, opts, fraction=f))
        except OrbvizError as error:  # say which level could not be made
            raise ParameterError(f"the {100 * f:g}% level: {error}") from None
    facts = summarise(state, fraction=levels[shown])
    nodes = state.nodal_surfaces()
    reach = max(float(np.abs(b.vertices).max()) for m in meshes for b in m.bodies)
    names = colour_names(figure.colors)
    alts = [describe_panel(Panel(state, m), units=figure.units, colors=names) for m in meshes]
    return {
        "label": state.label,
        "complex": not state.is_real,
        "reach": reach * scale,
        "alt": alts[shown],
        "levels": [
            {
                "fraction": f,
                "glb": _glb(m, scale, figure.units),
                "numbers": _numbers(state, m, facts),
                "alt": a,
            }
            for f, m, a in zip(levels, meshes, alts, strict=True)
        ],
        "nodes": {
            "spheres": [r * scale for r in nodes.spheres],
            "planes": [list(n) for n in nodes.planes],
            "cones": list(nodes.cones),
        },
        "cloud": _cloud(state, options.dots, scale, figure.colors),
        "notes": [n for m in meshes for n in m.notes],
        "_shown": Panel(state, meshes[shown]),  # for the view; not written to the page
    }


def page_data(
    states: Sequence[State],
    figure: FigureOptions,
    options: PageOptions,
    *,
    fraction: float,
    title: str | None = None,
    oriented: bool = False,
) -> dict[str, Any]:
    """Return everything a page shows, as JSON-ready values.

    Parameters
    ----------
    states : sequence of State
        The orbitals, one panel each.
    figure : FigureOptions
        How they look: grid, colours, units, view, title.
    options : PageOptions
        The levels offered, the face budget and the arrangement.
    fraction : float
        The level shown first (added to the levels if missing).
    title : str, optional
        The page's title (default: the figure's title, else the orbitals' labels).
    oriented : bool, default: False
        The states are a set that differs by orientation (2p, 3d, a hybrid set): the page
        opens with its axes shown and the set's view, as a figure does.

    Notes
    -----
    Of the figure options, the page takes grid, colours, units, view, title, axis lines,
    nodes, cut, key, scale bar and background (the last five as the page's opening state);
    the others belong to still images (:func:`ignored_options` names them).
    """
    from orbviz.figures.camera import default_view

    arrangement = arrangement_of(len(states), options)
    levels = _levels(options, fraction)
    shown = levels.index(round(fraction, 6))
    panels = [_panel(s, figure, options, levels, shown) for s in states]
    view = figure.view or default_view([p.pop("_shown") for p in panels], oriented)
    for p in panels:
        p.pop("_shown", None)
    return {
        "title": title or figure.title or ", ".join(p["label"] for p in panels),
        "levels": levels,
        "level": shown,
        "arrangement": arrangement,
        "view": list(view),
        "unit_label": _UNIT_LABEL[figure.units],
        "colors": ["#{:02X}{:02X}{:02X}".format(*c[:3]) for c in figure.colors],
        "wheel": _wheel() if any(p["complex"] for p in panels) else None,
        "start": {
            "axes": figure.axis_lines if figure.axis_lines is not None else oriented,
            "nodes": figure.nodes,
            "cut": figure.cut or "none",
            "key": figure.key,
            "scale_bar": figure.scale_bar,
            "background": _hex(figure.background),
        },
        "panels": panels,
    }


_PAGE_TAKES = {"grid", "colors", "units", "view", "title", "axis_lines", "nodes", "cut"}
_PAGE_TAKES |= {"key", "scale_bar", "background"}


def ignored_options(figure: FigureOptions) -> list[str]:
    """Return the figure options set away from their defaults that a page does not use."""
    default = FigureOptions()
    return [
        f.name
        for f in dataclasses.fields(figure)
        if f.name not in _PAGE_TAKES and getattr(figure, f.name) != getattr(default, f.name)
    ]


def _hex(colour: str) -> str:
    from PIL import ImageColor

    return "#{:02X}{:02X}{:02X}".format(*ImageColor.getrgb(colour)[:3])


def _wheel() -> list[str]:
    """Return 24 stops of the complex-phase colour map, as a CSS conic gradient runs.

    A conic gradient starts at the top and runs clockwise; the wheel has phase 0 at the right
    and the phase growing anticlockwise (as the figures' wheel), so the stops run from
    pi/2 (top) down through 0 (right), -pi/2 (bottom) and pi (left) back to pi/2.
    """
    from orbviz.surface.colors import phase_colors

    angles = np.pi / 2 - np.linspace(0, 2 * np.pi, 25)
    angles = np.angle(np.exp(1j * angles))  # into (-pi, pi]
    return ["#{:02X}{:02X}{:02X}".format(*c[:3]) for c in phase_colors(angles)]


def _viewer_script() -> str:
    return files("orbviz.pages").joinpath("viewer.js").read_text(encoding="utf-8")


def _key(data: dict[str, Any]) -> str:
    pos, neg = data["colors"]
    real = any(not p["complex"] for p in data["panels"])
    parts = []
    if real:
        parts.append(
            f'<span class="swatch" style="background:{pos}"></span> ψ &gt; 0 '
            f'<span class="swatch" style="background:{neg}"></span> ψ &lt; 0'
        )
    if data["wheel"]:
        stops = ", ".join(data["wheel"])
        # conic gradients start at the top and run clockwise: phase 0 at the right (90 deg)
        parts.append(
            f'<span class="wheel" style="background:conic-gradient({stops})" role="img" '
            'aria-label="phase wheel"></span> phase of ψ (0 at right, increasing '
            "anticlockwise)"
        )
    return " · ".join(parts)


def _panel_html(k: int, panel: dict[str, Any], first: str) -> str:
    alt = html.escape(panel["alt"], quote=True)
    return (
        f'<figure class="panel" id="panel-{k}"><figcaption class="label">'
        f"{html.escape(panel['label'])}</figcaption>"
        f'<canvas role="img" tabindex="0" aria-label="{alt}"></canvas>'
        '<div class="scale"><div class="bar"></div><span class="bar-text"></span></div>'
        f'<p class="numbers">{html.escape(first)}</p>'
        f'<p class="alt">{html.escape(panel["alt"])}</p></figure>'
    )


_STYLE = """
body { font-family: system-ui, sans-serif; margin: 0 auto; max-width: 1200px; padding: 12px;
  color: #1a1a1a; background: #fff; }
h1 { font-size: 1.3em; margin: 4px 0 8px; }
.controls { display: flex; flex-wrap: wrap; gap: 8px 16px; align-items: center; margin: 6px 0; }
.controls button { min-width: 44px; min-height: 36px; }
.key { margin: 6px 0; }
.swatch { display: inline-block; width: 1.1em; height: 1.1em; vertical-align: -0.2em;
  border: 1px solid #444; }
.wheel { display: inline-block; width: 1.4em; height: 1.4em; border-radius: 50%;
  vertical-align: -0.35em; }
.panel { margin: 0; position: relative; border: 1px solid #ddd; border-radius: 6px;
  padding: 4px; }
.panel canvas { display: block; width: 100%; aspect-ratio: 4 / 3; max-height: 70vh;
  touch-action: none; }
@media (max-width: 640px) {
  .controls input[type=radio], .controls input[type=checkbox] { width: 22px; height: 22px; } }
.label { font-weight: 600; }
.scale { position: absolute; right: 12px; top: 36px; text-align: center; font-size: 0.85em; }
.bar { height: 4px; background: #141414; margin: 0 auto 2px; }
.numbers { font-size: 0.9em; margin: 4px 2px; }
.alt { font-size: 0.85em; color: #444; margin: 4px 2px; }
#status { color: #a33; }
"""


def _dynamic_style(data: dict[str, Any]) -> str:
    """Return the style rules that depend on the page: columns, background, scale bar."""
    columns = 1 if data["arrangement"] == "chooser" else min(len(data["panels"]), 2)
    rules = [
        f"#orbviz {{ display: grid; grid-template-columns: repeat({columns}, 1fr); gap: 10px; }}",
        f".panel canvas {{ background: {data['start']['background']}; }}",
        "@media (max-width: 640px) { #orbviz { grid-template-columns: 1fr; } }",
    ]
    if not data["start"]["scale_bar"]:
        rules.append(".scale { display: none; }")
    return "\n".join(rules) + "\n"


def page_html(data: dict[str, Any]) -> bytes:
    """Return the page: one HTML file holding its script, style and data."""
    title = html.escape(data["title"])
    levels = "".join(
        f'<label><input type="radio" name="level" value="{k}"{" checked" * (k == data["level"])}>'
        f" {100 * f:g}%</label>"
        for k, f in enumerate(data["levels"])
    )
    chooser = ""
    if data["arrangement"] == "chooser":
        choices = "".join(
            f'<option value="{k}">{html.escape(p["label"])}</option>'
            for k, p in enumerate(data["panels"])
        )
        chooser = f'<label>Orbital <select id="chooser">{choices}</select></label>'
    panels = "".join(
        _panel_html(k, p, p["levels"][data["level"]]["numbers"])
        for k, p in enumerate(data["panels"])
    )
    # a JSON text inside <script> must not close it: escape "<" (and "&" for old parsers)
    payload = (
        json.dumps(data, separators=(",", ":")).replace("<", "\\u003c").replace("&", "\\u0026")
    )
    script = _viewer_script().replace("</script", "<\\/script")
    start = data["start"]
    has_dots = any(p.get("cloud") for p in data["panels"])
    nodes = " checked" * bool(start["nodes"])
    axes = " checked" * bool(start["axes"])
    cuts = "".join(
        f'<option value="{c}"{" selected" * (c == start["cut"])}>{c}</option>'
        for c in ("none", "half", "quarter")
    )
    page = f"""<!doctype html>
<html lang="en"><head><meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="generator" content="orbviz">
<title>{title}</title>
<style>
{_STYLE}{_dynamic_style(data)}</style></head>
<body>
<h1>{title}</h1>
<div class="controls" role="group" aria-label="view controls">
<span>Enclosed probability: {levels}</span>
<label><input type="checkbox" id="nodes"{nodes}> nodal surfaces</label>
<label><input type="checkbox" id="axes"{axes}> axes</label>
<label{" hidden" * (not has_dots)}><input type="checkbox" id="dots"> dots</label>
<label>Cutaway <select id="cut">{cuts}</select></label>
{chooser}
<span><button data-view="reset">reset</button> <button data-view="x">x</button>
<button data-view="y">y</button> <button data-view="z">z</button></span>
</div>
<p class="key"{" hidden" * (not start["key"])}>{_key(data)}</p>
<div id="orbviz" data-ready="no">{panels}</div>
<p id="status" role="status"></p>
<p class="help">Drag or swipe to turn, pinch or scroll to zoom, right-drag or two fingers to
pan. Keys: arrows turn, + and − zoom, x y z i views, r reset, 1–{len(data["levels"])} levels,
n nodal surfaces, a axes, d dots, c cutaway (none, half, quarter). Made by orbviz.</p>
<script type="application/json" id="orbviz-data">{payload}</script>
<script>{script}</script>
</body></html>
"""
    return page.encode("utf-8")
