"""A kit's assembly sheet: an exploded view with the part codes, colours and order of assembly.

The view is drawn off-screen with PyVista; matplotlib sets it beside the list of steps and
writes the sheet as PNG and PDF.
"""

from __future__ import annotations

import io
from typing import TYPE_CHECKING, Any

import numpy as np

from orbviz.models.solids import arrays

if TYPE_CHECKING:
    from orbviz.models.kit import Kit, KitPart

__all__ = ["assembly_sheet", "steps"]


def _centre(part: KitPart) -> np.ndarray:
    v, _ = arrays(part.solid)
    return 0.5 * (v.min(axis=0) + v.max(axis=0))


def steps(kit: Kit) -> list[str]:
    """Return the order of assembly, one line a step: the support, then lobes bottom to top."""
    support = kit.parts[0]
    lines = [f"Stand {support.code} on its plinth."]
    halves = [p for p in kit.parts[1:] if p.code.endswith("a")]
    magnets = any(j.kind == "magnet" for j in kit.joints)
    for part in sorted(halves, key=lambda p: float(_centre(p)[2])):
        other = part.partner or ""
        glue = " with its magnets facing across" if magnets else ""
        lines.append(f"Press {part.code} onto the pins, then {other} against it{glue}.")
    return lines


def _exploded(part: KitPart, kit: Kit) -> np.ndarray:
    """Return how far the exploded view moves a part: lobes outwards, halves apart."""
    if part.partner is None:
        return np.zeros(3)
    box = np.asarray(kit.model.solid.bounding_box())
    size = float((box[3:] - box[:3]).max())
    centre = _centre(part)
    partner = _centre(kit.part(part.partner))
    lobe = 0.5 * (centre + partner)
    apart = centre - partner
    apart = apart / max(np.linalg.norm(apart), 1e-9)
    return 0.25 * lobe + 0.12 * size * apart


def _view(kit: Kit, width: int, height: int) -> np.ndarray:
    """Render the exploded kit off-screen and return the image."""
    import pyvista as pv

    plotter: Any = pv.Plotter(off_screen=True, window_size=[width, height])
    plotter.set_background("white")
    points, names = [], []
    for part in kit.parts:
        v, f = arrays(part.solid)
        v = v + _exploded(part, kit)
        faces = np.hstack([np.full((len(f), 1), 3), f]).ravel()
        rgba = kit.model.colors.get(part.color, (190, 190, 190, 255))
        plotter.add_mesh(
            pv.PolyData(v, faces), color=np.array(rgba[:3]) / 255, smooth_shading=False
        )
        points.append(0.5 * (v.min(axis=0) + v.max(axis=0)))
        names.append(part.code)
    plotter.add_point_labels(
        np.array(points), names, font_size=18, point_size=1, shape_opacity=0.8, always_visible=True
    )
    plotter.view_xz()
    plotter.camera.elevation = 20
    plotter.camera.azimuth = 30
    plotter.reset_camera()
    image = plotter.screenshot(return_img=True)
    plotter.close()
    return np.asarray(image)


def assembly_sheet(kit: Kit) -> dict[str, bytes]:
    """Return the assembly sheet as ``{"png": bytes, "pdf": bytes}``.

    The sheet shows the exploded view with the part codes, a table of every part with its
    colour and bed, and the numbered steps.
    """
    from matplotlib.figure import Figure

    image = _view(kit, 1200, 1200)
    figure = Figure(figsize=(11.69, 8.27))  # A4 landscape
    axes = figure.add_axes((0.0, 0.0, 0.55, 1.0))
    axes.imshow(image)
    axes.set_axis_off()
    text = figure.add_axes((0.56, 0.04, 0.42, 0.92))
    text.set_axis_off()
    lines = [f"Kit {kit.name}: {len(kit.parts)} parts, clearance {kit.clearance:g} mm", ""]
    lines += ["Parts (code, colour):"]
    for part in kit.parts:
        lines.append(f"  {part.code:<14} {part.color}")
    lines += ["", "Assembly:"]
    lines += [f"  {k}. {step}" for k, step in enumerate(steps(kit), start=1)]
    lines += ["", "Small parts and magnets: keep away from young children."]
    text.text(
        0.0,
        1.0,
        "\n".join(lines),
        va="top",
        ha="left",
        family="DejaVu Sans Mono",
        fontsize=8,
        wrap=True,
    )
    out = {}
    for kind in ("png", "pdf"):
        buffer = io.BytesIO()
        figure.savefig(buffer, format=kind, dpi=150)
        out[kind] = buffer.getvalue()
    return out
