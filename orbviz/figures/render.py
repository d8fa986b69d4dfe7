"""Publication figures rendered off-screen with PyVista (VTK); the only module that imports it.

A figure is an orthographic view of the phase-coloured bodies. The camera looks at the
nucleus, framed so that the orbital fills about 80% of the image (or a fixed extent, so that
figures of different orbitals share a scale). Lighting is three-point, shading smooth from the
bodies' gradient normals, and anti-aliasing multisampled. Transparent images are made by
difference matting (the scene on black and on white), so edges carry true partial alpha with no
halo of either background. The scale bar, title and phase wheel are drawn on the finished image
with Pillow, in DejaVu Sans (shipped with matplotlib).
"""

from __future__ import annotations

import math
import os
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from orbviz._defaults import DEFAULTS
from orbviz.errors import ParameterError
from orbviz.states.orbital import Orbital
from orbviz.surface.colors import DEFAULT_PAIR, phase_colors
from orbviz.surface.mesh import OrbitalMesh, build_mesh

__all__ = ["Figure", "FigureOptions", "figure", "parse_view", "render_png", "set_figure"]

VIEWS = {"iso": (35.0, 25.0), "x": (0.0, 0.0), "y": (90.0, 0.0), "z": (0.0, 90.0)}
LIGHTING = ("soft", "studio", "flat")
_BOHR_IN_ANGSTROM = 0.529177210544  # CODATA 2022; checked against scipy.constants in the tests


def _offscreen() -> None:
    """Use EGL off-screen rendering (no X server probe, no warning), before VTK makes a window."""
    os.environ.setdefault("VTK_DEFAULT_OPENGL_WINDOW", "vtkEGLRenderWindow")


def parse_view(text: str) -> tuple[float, float]:
    """``iso``, ``x``, ``y``, ``z`` or ``AZ,EL`` in degrees -> (azimuth, elevation)."""
    key = text.strip().lower()
    if key in VIEWS:
        return VIEWS[key]
    try:
        az, el = (float(v) for v in key.split(","))
    except ValueError:
        raise ParameterError(
            f"--view takes iso, x, y, z or AZ,EL in degrees, got {text!r}"
        ) from None
    if not (math.isfinite(az) and math.isfinite(el) and -90 <= el <= 90):
        raise ParameterError(f"--view elevation must be within -90..90 degrees, got {text!r}")
    return az, el


@dataclass(frozen=True)
class FigureOptions:
    """How a figure looks; every field has a CLI option of the same name.

    Attributes
    ----------
    size : (int, int), default: (1600, 1200)
        Image width and height in pixels, before ``scale``.
    scale : float, default: 1
        Resolution multiplier (2 for print).
    view : (float, float), default: iso
        Camera azimuth from +x towards +y and elevation above the xy plane, degrees.
    transparent : bool, default: False
        Transparent background (PNG alpha).
    background : str, default: "white"
        Background colour (name or #RRGGBB) when not transparent.
    axes : bool, default: True
        Draw an axes triad.
    scale_bar : {"angstrom", "bohr", None}, default: "angstrom"
        Scale bar unit, or none.
    title : str or None
        Text at the top left.
    lighting : {"soft", "studio", "flat"}, default: "soft"
        Lighting preset.
    nodes : bool, default: False
        Draw radial and angular nodal surfaces translucent.
    cut : {None, "half", "quarter"}
        Cut away the half x > 0 or the quarter x > 0, y > 0 (facing the iso camera).
    outer : float or None
        Also draw a translucent surface enclosing this (larger) fraction.
    extent : float or None
        Half-width in bohr of the region shown (and of the sampling box), for comparable sets.
    colors : pair of RGBA
        Phase colours of a real state.
    """

    size: tuple[int, int] = (1600, 1200)
    scale: float = 1.0
    view: tuple[float, float] = VIEWS["iso"]
    transparent: bool = False
    background: str = "white"
    axes: bool = True
    scale_bar: str | None = "angstrom"
    title: str | None = None
    lighting: str = "soft"
    nodes: bool = False
    cut: str | None = None
    outer: float | None = None
    extent: float | None = None
    colors: tuple = DEFAULT_PAIR

    def checked(self) -> FigureOptions:
        """Validate every field; raise ParameterError naming the bad one."""
        w, h = self.size
        if not (16 <= w <= 8192 and 16 <= h <= 8192):
            raise ParameterError(f"--size must be within 16..8192 pixels a side, got {w}x{h}")
        if not (math.isfinite(self.scale) and 0.25 <= self.scale <= 8):
            raise ParameterError(f"--scale must be within 0.25..8, got {self.scale}")
        if w * h * self.scale**2 > 64e6:
            raise ParameterError("image too large: at most 64 megapixels after --scale")
        if self.lighting not in LIGHTING:
            raise ParameterError(
                f"--lighting must be one of {', '.join(LIGHTING)}, got {self.lighting!r}"
            )
        if self.cut not in (None, "half", "quarter"):
            raise ParameterError(f"--cut must be half or quarter, got {self.cut!r}")
        if self.scale_bar not in (None, "angstrom", "bohr"):
            raise ParameterError(
                f"--scale-bar must be angstrom, bohr or none, got {self.scale_bar!r}"
            )
        if self.extent is not None and not (math.isfinite(self.extent) and self.extent > 0):
            raise ParameterError(f"--extent must be a positive length in bohr, got {self.extent}")
        _rgb(self.background)
        return self


@dataclass
class Figure:
    """A composed figure: the PyVista plotter, and what went into it.

    Attributes
    ----------
    plotter : pyvista.Plotter
        The off-screen scene, for further changes before :meth:`image`.
    mesh : OrbitalMesh
        The bodies shown.
    options : FigureOptions
        How it was set up.
    overlays : dict
        Overlay actor names by kind: ``radial_nodes``, ``angular_nodes``, ``outer``, ``caps``.
    half_height : float
        Half the height of the view in bohr (orthographic).
    """

    plotter: object
    mesh: OrbitalMesh
    options: FigureOptions
    overlays: dict[str, list[str]] = field(default_factory=dict)
    half_height: float = 1.0

    def image(self) -> np.ndarray:
        """Render to an (H, W, 4) uint8 RGBA array with the 2D annotations drawn on."""
        p = self.plotter
        if self.options.transparent:
            p.set_background("black")
            p.render()
            black = p.screenshot(return_img=True).astype(np.float64) / 255.0
            p.set_background("white")
            p.render()
            white = p.screenshot(return_img=True).astype(np.float64) / 255.0
            # difference matting: on black C = a F, on white C = a F + (1 - a)
            alpha = np.clip(1.0 - (white - black).mean(axis=2), 0.0, 1.0)
            colour = np.where(
                alpha[..., None] > 1e-6, black / np.maximum(alpha[..., None], 1e-6), 0
            )
            rgba = np.dstack([np.clip(colour, 0, 1), alpha])
            img = np.round(255 * rgba).astype(np.uint8)
        else:
            p.set_background(self.options.background)
            p.render()
            rgb = p.screenshot(return_img=True)
            img = np.dstack([rgb, np.full(rgb.shape[:2], 255, np.uint8)])
        return _annotate(img, self)


def _rgb(colour: str) -> tuple[float, float, float]:
    from pyvista.plotting.colors import Color

    try:
        return Color(colour).float_rgb
    except ValueError:
        raise ParameterError(f"unknown colour {colour!r}; use a name or #RRGGBB") from None


def _camera_axes(view: tuple[float, float]) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Return unit vectors towards the camera, image right and image up (z up, except along z)."""
    az, el = (math.radians(v) for v in view)
    toward = np.array([math.cos(el) * math.cos(az), math.cos(el) * math.sin(az), math.sin(el)])
    # z up; looking along z, the image up is the azimuth direction turned by 90 degrees
    # (so the top view has x to the right and y up)
    up_hint = (
        np.array([0.0, 0.0, 1.0])
        if abs(math.sin(el)) < 0.999
        else np.array([-math.sin(az), math.cos(az), 0.0])
    )
    right = np.cross(up_hint, toward)
    right /= np.linalg.norm(right)
    up = np.cross(toward, right)
    return toward, right, up


def _lights(plotter, preset: str, toward, right, up) -> None:
    import pyvista

    plotter.remove_all_lights()
    if preset == "flat":
        plotter.add_light(
            pyvista.Light(position=tuple(toward * 100), intensity=1.0, light_type="camera light")
        )
        return
    key, fill, rim = (0.75, 0.35, 0.45) if preset == "soft" else (1.0, 0.25, 0.6)
    for direction, intensity in [
        (toward + 0.8 * up - 0.7 * right, key),  # key: above left
        (toward - 0.2 * up + 0.9 * right, fill),  # fill: right, low
        (-toward + 0.9 * up + 0.3 * right, rim),  # rim: behind, above
    ]:
        light = pyvista.Light(
            position=tuple(direction * 100),
            focal_point=(0, 0, 0),
            intensity=intensity,
            light_type="scene light",
        )
        plotter.add_light(light)


def _polys(mesh: OrbitalMesh):
    polys = mesh.to_pyvista()
    for poly in polys.values():
        poly.point_data.active_normals_name = "Normals"
    return polys


def _cut(poly, cut: str | None):
    if cut is None:
        return poly
    if cut == "half":
        return poly.clip(normal=(1, 0, 0), origin=(0, 0, 0))
    big = 1e6
    return poly.clip_box((0, big, 0, big, -big, big), invert=True)


def _caps(fig: Figure, cut: str) -> None:
    """Phase-coloured cross-sections on the cut planes, so nested shells read as rings."""
    import pyvista

    grid, level = fig.mesh.grid, fig.mesh.isovalue.level
    field_of_points = grid.field
    n = min(grid.points * 2, 600)
    a = np.linspace(-grid.half_width, grid.half_width, n)
    planes = (
        [("x", (0, 1), None)] if cut == "half" else [("x", (0, 1), "y>0"), ("y", (1, 0), "x>0")]
    )
    threshold = math.sqrt(level)
    for axis, _, keep in planes:
        u, v = np.meshgrid(a, a, indexing="ij")
        if axis == "x":
            x, y, z = np.zeros_like(u), u, v
        else:
            x, y, z = u, np.zeros_like(u), v
        sheet = pyvista.StructuredGrid(x, y, z)
        values = np.asarray(field_of_points(x, y, z), dtype=np.float64)
        sheet.point_data["f"] = values.ravel(order="F")
        if keep == "y>0":
            sheet = sheet.clip(normal=(0, -1, 0), origin=(0, 0, 0))
        elif keep == "x>0":
            sheet = sheet.clip(normal=(-1, 0, 0), origin=(0, 0, 0))
        sides = [(1.0, 0), (-1.0, 1)] if grid.field.two_sided else [(1.0, 0)]
        for sign, index in sides:
            sheet.point_data["g"] = sign * sheet.point_data["f"]
            part = sheet.clip_scalar(scalars="g", value=threshold, invert=False)
            if part.n_points == 0:
                continue
            name = f"cap-{axis}-{index}"
            # lighter than the surface, so the cut face reads as a cut
            colour = 0.65 * np.array(fig.options.colors[index][:3]) / 255.0 + 0.35
            if not grid.field.orbital.is_real:
                colour = (0.75, 0.75, 0.75)
            fig.plotter.add_mesh(part, color=colour, name=name, lighting=False)
            fig.overlays.setdefault("caps", []).append(name)


def _node_overlays(fig: Figure, radius: float) -> None:
    """Translucent radial node spheres and angular nodal planes and cones."""
    import pyvista

    orbital = fig.mesh.grid.field.orbital
    if getattr(orbital, "general", False):
        return  # two-centre shapes: no single-centre nodal surfaces to draw
    plotter = fig.plotter
    style = dict(color=(0.45, 0.45, 0.5), opacity=0.22, smooth_shading=True)
    if len(orbital.shells) == 1:
        n, l = orbital.shells[0]
        for k, r0 in enumerate(orbital.node_radii(n, l)):
            name = f"radial-node-{k}"
            plotter.add_mesh(
                pyvista.Sphere(radius=r0, theta_resolution=96, phi_resolution=48),
                name=name,
                **style,
            )
            fig.overlays.setdefault("radial_nodes", []).append(name)
    state = orbital.eigenstate
    if state is None:
        return
    l, m = state.l, state.m
    mm = abs(m)
    if state.form == "real" and mm:  # |m| planes through the z axis where cos or sin(m az) = 0
        offset = math.pi / (2 * mm) if m > 0 else 0.0
        for k in range(mm):
            az = offset + k * math.pi / mm
            normal = (-math.sin(az), math.cos(az), 0.0)
            name = f"angular-plane-{k}"
            plotter.add_mesh(
                pyvista.Disc(center=(0, 0, 0), inner=0, outer=radius, normal=normal, c_res=96),
                name=name,
                **style,
            )
            fig.overlays.setdefault("angular_nodes", []).append(name)
    # l - |m| roots of the polar factor in cos(polar): cones (or the xy plane at 90 degrees)
    from orbviz.states.angular import real_harmonic

    polar = np.linspace(1e-6, math.pi - 1e-6, 20001)
    az0 = 0.0 if m >= 0 else math.pi / (2 * max(mm, 1))
    values = real_harmonic(l, mm if m >= 0 else m, polar, np.full_like(polar, az0))
    flips = np.flatnonzero(np.sign(values[1:]) != np.sign(values[:-1]))
    for k, i in enumerate(flips):
        theta = 0.5 * (polar[i] + polar[i + 1])
        name = f"angular-cone-{k}"
        if abs(theta - math.pi / 2) < 1e-3:
            surface = pyvista.Disc(
                center=(0, 0, 0), inner=0, outer=radius, normal=(0, 0, 1), c_res=96
            )
        else:
            height = radius * math.cos(theta)
            surface = pyvista.Cone(
                center=(0, 0, height / 2),
                direction=(0, 0, -np.sign(height)),
                height=abs(height),
                radius=radius * math.sin(theta),
                resolution=96,
                capping=False,
            )
        plotter.add_mesh(surface, name=name, **style)
        fig.overlays.setdefault("angular_nodes", []).append(name)


def figure(
    orbital: Orbital,
    /,
    *,
    fraction: float = DEFAULTS.fraction,
    grid: int = DEFAULTS.grid,
    options: FigureOptions | None = None,
    mesh: OrbitalMesh | None = None,
) -> Figure:
    """Compose an off-screen 3D figure of an orbital's isosurface.

    Parameters
    ----------
    orbital : Orbital
        The state.
    fraction : float, default: 0.9
        Probability enclosed by the surface.
    grid : int, default: 128
        Samples per axis of the mesh.
    options : FigureOptions, optional
        Looks, overlays and framing.
    mesh : OrbitalMesh, optional
        Bodies already built with the same fraction, grid, colours and extent (saves the work).

    Returns
    -------
    Figure
        ``figure.plotter`` is a ``pyvista.Plotter`` to adjust further; ``figure.image()``
        renders it.
    """
    _offscreen()
    import pyvista

    opts = (options or FigureOptions()).checked()
    if mesh is None:
        mesh = build_mesh(
            orbital, fraction=fraction, grid=grid, colors=opts.colors, half_width=opts.extent
        )
    width, height = (int(round(v * opts.scale)) for v in opts.size)
    plotter = pyvista.Plotter(off_screen=True, window_size=(width, height), lighting="none")
    fig = Figure(plotter, mesh, opts)
    toward, right, up = _camera_axes(opts.view)
    for name, poly in _polys(mesh).items():
        plotter.add_mesh(
            _cut(poly, opts.cut),
            scalars="RGBA",
            rgb=True,
            smooth_shading=True,
            specular=0.25 if opts.lighting != "flat" else 0.0,
            specular_power=30,
            ambient=0.18 if opts.lighting != "flat" else 0.55,
            diffuse=0.85,
            name=name,
        )
    if opts.cut:
        _caps(fig, opts.cut)
    if opts.outer is not None:
        if not opts.outer > fraction:
            raise ParameterError(f"--outer {opts.outer} must exceed --fraction {fraction}")
        outer = build_mesh(
            orbital, fraction=opts.outer, grid=grid, colors=opts.colors, half_width=opts.extent
        )
        for name, poly in _polys(outer).items():
            plotter.add_mesh(
                _cut(poly, opts.cut),
                scalars="RGBA",
                rgb=True,
                opacity=0.18,
                smooth_shading=True,
                specular=0.0,
                name=f"outer-{name}",
            )
            fig.overlays.setdefault("outer", []).append(f"outer-{name}")
    shown = mesh.bodies + (outer.bodies if opts.outer is not None else [])
    vertices = np.vstack([b.vertices for b in shown])
    extent = float(np.abs(vertices).max()) if opts.extent is None else opts.extent
    if opts.nodes:
        _node_overlays(fig, extent)
    # orthographic camera on the nucleus; frame the projected bodies with a margin
    if opts.extent is None:
        half_w = np.abs(vertices @ right).max()
        half_h = np.abs(vertices @ up).max()
        fig.half_height = 1.2 * max(half_h, half_w * height / width)
    else:
        fig.half_height = 1.05 * opts.extent * max(1.0, height / width)
    plotter.enable_parallel_projection()
    plotter.camera.focal_point = (0.0, 0.0, 0.0)
    plotter.camera.position = tuple(toward * 10 * max(extent, 1.0))
    plotter.camera.up = tuple(up)
    plotter.camera.parallel_scale = fig.half_height
    plotter.camera.clipping_range = (1e-3, 40 * max(extent, 1.0))
    _lights(plotter, opts.lighting, toward, right, up)
    plotter.enable_anti_aliasing("msaa", multi_samples=8)
    if opts.axes:
        plotter.add_axes(line_width=3, labels_off=False, color="black", viewport=(0, 0, 0.16, 0.2))
    return fig


def _font(size: int):
    from PIL import ImageFont

    try:
        import matplotlib

        path = Path(matplotlib.__file__).parent / "mpl-data" / "fonts" / "ttf" / "DejaVuSans.ttf"
        return ImageFont.truetype(str(path), size)
    except (ImportError, OSError):
        return ImageFont.load_default(size)


def _nice(length: float) -> float:
    """Return 1, 2 or 5 times a power of ten, not above ``length``."""
    power = 10 ** math.floor(math.log10(length))
    return max(s * power for s in (1, 2, 5) if s * power <= length)


def _annotate(img: np.ndarray, fig: Figure) -> np.ndarray:
    """Draw the scale bar, title and phase wheel on an RGBA image."""
    from PIL import Image, ImageDraw

    opts = fig.options
    h, w = img.shape[:2]
    unit = max(0.35, min(w / 1600.0, h / 1200.0))
    canvas = Image.fromarray(img, "RGBA")
    draw = ImageDraw.Draw(canvas)
    ink = (20, 20, 20, 255)
    if opts.title:
        draw.text(
            (int(40 * unit), int(30 * unit)), opts.title, fill=ink, font=_font(int(44 * unit))
        )
    if opts.scale_bar:
        per_bohr = h / (2.0 * fig.half_height)
        per_unit = per_bohr / _BOHR_IN_ANGSTROM if opts.scale_bar == "angstrom" else per_bohr
        length = _nice(0.22 * w / per_unit)
        bar = length * per_unit
        x0, y0 = w - int(60 * unit) - bar, h - int(70 * unit)
        draw.rectangle([x0, y0, x0 + bar, y0 + int(8 * unit)], fill=ink)
        label = f"{length:g} {'Å' if opts.scale_bar == 'angstrom' else 'bohr'}"
        font = _font(int(34 * unit))
        tw = draw.textlength(label, font=font)
        draw.text((x0 + bar / 2 - tw / 2, y0 - int(46 * unit)), label, fill=ink, font=font)
    if not fig.mesh.grid.field.orbital.is_real:
        _phase_wheel(canvas, draw, unit, ink)
    return np.asarray(canvas)


def _phase_wheel(canvas, draw, unit: float, ink) -> None:
    """Draw a ring in the cyclic phase map at the top right, labelled arg psi."""
    from PIL import Image

    size = int(150 * unit)
    yy, xx = np.mgrid[0:size, 0:size] - (size - 1) / 2.0
    r = np.hypot(xx, yy) / (size / 2.0)
    angle = np.arctan2(-yy, xx)
    rgba = phase_colors(angle.ravel()).reshape(size, size, 4)
    rgba[..., 3] = np.where((r <= 1.0) & (r >= 0.55), 255, 0).astype(np.uint8)
    wheel = Image.fromarray(rgba, "RGBA")
    w, _ = canvas.size
    x0, y0 = w - size - int(50 * unit), int(50 * unit)
    canvas.alpha_composite(wheel, (x0, y0))
    font = _font(int(26 * unit))
    cx, cy = x0 + size / 2, y0 + size / 2
    for text, (dx, dy) in {"0": (1, 0), "π/2": (0, -1), "π": (-1, 0), "−π/2": (0, 1)}.items():
        tw = draw.textlength(text, font=font)
        px = cx + dx * (size / 2 + 8 * unit) - (tw if dx < 0 else 0 if dx > 0 else tw / 2)
        py = (
            cy
            + dy * (size / 2 + 6 * unit)
            - (int(30 * unit) if dy < 0 else 0 if dy > 0 else 14 * unit)
        )
        draw.text((px, py), text, fill=ink, font=font)
    label = "arg ψ"
    tw = draw.textlength(label, font=font)
    draw.text((cx - tw / 2, cy - 14 * unit), label, fill=ink, font=font)


def render_png(fig: Figure, path: str | os.PathLike) -> Path:
    """Render a figure and write it as PNG atomically; returns the path."""
    from PIL import Image

    from orbviz.export import atomic_paths

    path = Path(path)
    img = fig.image()
    with atomic_paths(path) as (temp,):
        Image.fromarray(img, "RGBA").save(temp, format="PNG", optimize=False)
    return path


SET_PALETTE = [  # Okabe & Ito (2008), colour-blind safe, one colour per hybrid of a set
    (0, 114, 178),
    (213, 94, 0),
    (0, 158, 115),
    (204, 121, 167),
    (230, 159, 0),
    (86, 180, 233),
]


def set_figure(
    orbitals: list[Orbital],
    /,
    *,
    fraction: float = DEFAULTS.fraction,
    grid: int = DEFAULTS.grid,
    options: FigureOptions | None = None,
) -> Figure:
    """One figure of a whole set (e.g. the four sp3 hybrids), each in its own colour.

    Each member's positive body (its large lobe) is drawn opaque in a colour of the Okabe-Ito
    palette; the negative bodies (the small lobes) translucent grey. All share one box and one
    framing.
    """
    from orbviz.levels.grid import box_half_width
    from orbviz.levels.isovalue import enclosing_isovalue

    opts = (options or FigureOptions()).checked()
    isos = [enclosing_isovalue(o, fraction=fraction) for o in orbitals]
    width = opts.extent or max(
        box_half_width(o, i, grid) for o, i in zip(orbitals, isos, strict=True)
    )
    meshes = [
        build_mesh(o, fraction=fraction, grid=grid, half_width=width, level=i)
        for o, i in zip(orbitals, isos, strict=True)
    ]
    fig = figure(orbitals[0], fraction=fraction, grid=grid, options=opts, mesh=meshes[0])
    for name in list(_polys(meshes[0])):
        fig.plotter.remove_actor(name)
    for k, mesh in enumerate(meshes):
        for name, poly in _polys(mesh).items():
            style = (
                dict(
                    color=np.array(SET_PALETTE[k % len(SET_PALETTE)]) / 255.0,
                    specular=0.25,
                    specular_power=30,
                    ambient=0.18,
                    diffuse=0.85,
                )
                if name != "negative"
                else dict(color=(0.6, 0.6, 0.6), opacity=0.35)
            )
            fig.plotter.add_mesh(poly, smooth_shading=True, name=f"{k}-{name}", **style)
            fig.overlays.setdefault("members", []).append(f"{k}-{name}")
    vertices = np.vstack([b.vertices for m in meshes for b in m.bodies])
    _, right, up = _camera_axes(opts.view)
    w, h = fig.plotter.window_size
    if opts.extent is None:
        fig.half_height = 1.2 * max(
            np.abs(vertices @ up).max(), np.abs(vertices @ right).max() * h / w
        )
    fig.plotter.camera.parallel_scale = fig.half_height
    return fig
