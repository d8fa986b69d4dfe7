"""A kit's assembly sheet: an exploded view with the part codes, colours and order of assembly.

The view is drawn off-screen with VTK (:class:`orbviz.figures.stage.Stage`); matplotlib sets
it beside the list of steps and writes the sheet as PNG and PDF.
"""

from __future__ import annotations

import io
from typing import TYPE_CHECKING

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
    pinned = {j.parts[1] for j in kit.joints if j.kind == "pin"}
    for part in sorted(halves, key=lambda p: float(_centre(p)[2])):
        other = part.partner or ""
        glue = " with its magnets facing across" if magnets else ""
        onto = "the pins" if part.code in pinned else "the rod"
        lines.append(f"Press {part.code} onto {onto}, then {other} against it{glue}.")
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
    return 0.3 * lobe + 0.22 * size * apart


def _camera(kit: Kit) -> np.ndarray:
    """Return the direction the view looks from: across the halves' parting, from above.

    The halves part along their cut normals; seen along those they would hide each other, so
    the view looks from 55 degrees round from the most common one, 25 degrees up.
    """
    normals = [p.pose[:3, :3].T @ np.array([0.0, 0.0, 1.0]) for p in kit.parts[1:]]
    flat = [np.array([n[0], n[1], 0.0]) for n in normals if np.hypot(n[0], n[1]) > 0.5]
    if flat:
        main = np.sum([n if n @ flat[0] >= 0 else -n for n in flat], axis=0)
        angle = np.arctan2(main[1], main[0]) + np.radians(55)
    else:
        angle = np.radians(-60)
    up = np.radians(25)
    return np.array([np.cos(angle) * np.cos(up), np.sin(angle) * np.cos(up), np.sin(up)])


def _view(kit: Kit, width: int, height: int) -> np.ndarray:
    """Render the exploded kit off-screen and return the image."""
    from orbviz.figures import actors
    from orbviz.figures.camera import lights
    from orbviz.figures.stage import Stage
    from orbviz.surface.convert import vtk_polydata

    stage = Stage((width, height))
    try:
        for part in kit.parts:
            v, f = arrays(part.solid)
            v = v + _exploded(part, kit)
            rgba = kit.model.colors.get(part.color, (190, 190, 190, 255))
            colour = tuple(np.array(rgba[:3]) / 255)
            shape = actors.surface(vtk_polydata(v, f), color=colour, ambient=0.18, diffuse=0.85)
            stage.add(part.code, shape)  # the figures' material, under their soft lights
            code = actors.label(
                part.code,
                0.5 * (v.min(axis=0) + v.max(axis=0)),
                font_size=18,
                color=(0.0, 0.0, 0.0),
                box=(0.85, 0.85, 0.85),
            )
            stage.add(f"{part.code}-label", code)
        toward = _camera(kit)
        right = np.cross([0.0, 0.0, 1.0], toward)
        right /= np.linalg.norm(right)
        up = np.cross(toward, right)
        camera = stage.renderer.GetActiveCamera()
        camera.ParallelProjectionOff()
        camera.SetFocalPoint(0.0, 0.0, 0.0)
        camera.SetPosition(*toward)
        camera.SetViewUp(0.0, 0.0, 1.0)
        stage.renderer.ResetCamera()
        stage.light(lights("soft", toward, right, up))
        return stage.snapshot((1.0, 1.0, 1.0))
    finally:
        stage.close()


def exploded_png(kit: Kit, size: tuple[int, int]) -> bytes:
    """Return the exploded view alone as a PNG of ``size`` pixels (a contact-sheet thumbnail)."""
    from PIL import Image

    image = Image.fromarray(_view(kit, 2 * size[0], 2 * size[1]))
    buffer = io.BytesIO()
    image.resize(size, Image.Resampling.LANCZOS).save(buffer, format="PNG")
    return buffer.getvalue()


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
    lines += ["Parts (code, colour, code cut into the hidden face):"]
    for part in kit.parts:
        rgb = "#{:02X}{:02X}{:02X}".format(*kit.model.colors.get(part.color, (190,) * 3)[:3])
        cut = f"{part.code_mm:.1f} mm" if part.code_mm else "-"
        lines.append(f"  {part.code:<14} {part.color:<9} {rgb}  {cut}")
    lines += ["", "Assembly:"]
    lines += [f"  {k}. {step}" for k, step in enumerate(steps(kit), start=1)]
    magnets = any(j.kind == "magnet" for j in kit.joints)
    lines += ["", "Small parts" + (" and magnets" if magnets else "") + ": keep away from"]
    lines += ["young children; see the safety notes in the docs."]
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
