"""Printable teaching models: the isosurface bodies scaled to millimetres and made one solid.

The phases are joined by a rod along the quantisation axis and a bead at the nucleus. A piece that
the rod does not reach (the dz2 ring, the lobes of dxy or of the f orbitals) gets a spoke from the
nucleus through its nearest point, and one from the mirror image of that point where the piece
is there too. Everything is united by robust mesh booleans (manifold3d). For a multi-material
printer the same solid is split into disjoint colour parts: the support (rod, bead, spokes,
stand) and each phase less the support. Printability is checked before anything is written.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from orbviz._defaults import DEFAULTS
from orbviz.errors import OrbvizError, ParameterError
from orbviz.states.orbital import Orbital
from orbviz.surface.checks import mesh_facts
from orbviz.surface.colors import DEFAULT_PAIR
from orbviz.surface.contour import Body
from orbviz.surface.mesh import OrbitalMesh, build_mesh

__all__ = ["Check", "ModelError", "PrintModel", "build_model"]

SUPPORT_RGBA = (190, 190, 190, 255)  # neutral grey: print it in either material
ROD_SHARE = 0.04  # default rod diameter as a share of --size (1.2 mm at 30 mm)


class ModelError(OrbvizError, ValueError):
    """A model that would not print: the reason and the fix are in the message."""


@dataclass(frozen=True)
class Check:
    """One printability finding: ``level`` is ``error`` (refused), ``warning`` or ``note``."""

    level: str
    message: str


@dataclass
class PrintModel:
    """A printable solid and its colour parts, in millimetres.

    Attributes
    ----------
    solid : manifold3d.Manifold
        The whole model as one body.
    parts : dict of str to manifold3d.Manifold
        Disjoint colour parts (``support``, ``positive``, ``negative`` or ``surface``).
    colors : dict of str to RGBA tuple
        The colour of each part.
    mm_per_bohr : float
        The scale of the model.
    rod_mm : float
        Rod (and spoke) diameter in the finished model.
    checks : list of Check
        Printability findings.
    """

    solid: object
    parts: dict
    colors: dict
    mm_per_bohr: float
    rod_mm: float
    checks: list[Check] = field(default_factory=list)

    def bodies(self, which: str = "solid") -> list[Body]:
        """Return the solid, or the parts, as bodies for the writers."""
        items = {"solid": self.solid} if which == "solid" else self.parts
        out = []
        for name, manifold in items.items():
            vertices, faces = _arrays(manifold)
            rgba = SUPPORT_RGBA if name in ("solid", "support") else self.colors[name]
            colors = np.tile(np.array(rgba, dtype=np.uint8), (len(vertices), 1))
            out.append(
                Body(
                    name,
                    vertices,
                    faces,
                    np.zeros_like(vertices, np.float32),
                    np.zeros(len(vertices), np.float32),
                    colors,
                )
            )
        return out

    def facts(self):
        """Volume, closedness and pieces of the solid (orbviz.surface.checks)."""
        return mesh_facts(*_arrays(self.solid))


def _manifold(vertices: np.ndarray, faces: np.ndarray):
    import manifold3d

    mesh = manifold3d.Mesh(
        vert_properties=np.ascontiguousarray(vertices, dtype=np.float32),
        tri_verts=np.ascontiguousarray(faces, dtype=np.uint32),
    )
    solid = manifold3d.Manifold(mesh)
    if solid.status() != manifold3d.Error.NoError:
        raise ModelError(
            f"a surface is not a closed manifold ({solid.status()}); try another --grid"
        )
    return solid


def _arrays(solid) -> tuple[np.ndarray, np.ndarray]:
    mesh = solid.to_mesh()
    return np.asarray(mesh.vert_properties, dtype=np.float64)[:, :3], np.asarray(
        mesh.tri_verts, dtype=np.int64
    )


def _cylinder(a: np.ndarray, b: np.ndarray, radius: float):
    """Make a cylinder from point a to point b (mm)."""
    import manifold3d

    axis = b - a
    length = float(np.linalg.norm(axis))
    rod = manifold3d.Manifold.cylinder(length, radius, radius, circular_segments=32)
    polar = math.degrees(math.acos(max(-1.0, min(1.0, axis[2] / length))))
    azimuth = math.degrees(math.atan2(axis[1], axis[0]))
    return rod.rotate((0.0, polar, 0.0)).rotate((0.0, 0.0, azimuth)).translate(tuple(a))


def _union(items):
    import manifold3d

    items = [m for m in items if m is not None and not m.is_empty()]
    return manifold3d.Manifold.batch_boolean(items, manifold3d.OpType.Add)


def _support(pieces, radius: float):
    """Rod along z through every piece the axis crosses, bead, and spokes to the other pieces."""
    import manifold3d

    bead = manifold3d.Manifold.sphere(2.5 * radius, circular_segments=48)
    near_axis = []
    for piece in pieces:
        v, _ = _arrays(piece)
        close = v[(v[:, 0] ** 2 + v[:, 1] ** 2) < (1.5 * radius) ** 2]
        if close.size:
            near_axis.append(close[:, 2])
    parts = [bead]
    if near_axis:
        z = np.concatenate(near_axis)
        lo, hi = min(z.min() + radius, -radius), max(z.max() - radius, radius)
        parts.append(_cylinder(np.array([0, 0, lo]), np.array([0, 0, hi]), radius))
    support = _union(parts)
    for piece in pieces:
        if not (piece ^ support).is_empty():
            continue
        v, _ = _arrays(piece)
        nearest = v[np.argmin(np.linalg.norm(v, axis=1))]
        depth = min(3.0 * 2 * radius, 0.5 * float(np.ptp(v, axis=0).max()))
        for target in (nearest, nearest * np.array([-1.0, -1.0, 1.0])):
            if np.min(np.linalg.norm(v - target, axis=1)) > 2 * radius:
                continue  # the mirrored point is not on this piece
            direction = target / max(np.linalg.norm(target), 1e-9)
            support = support + _cylinder(np.zeros(3), target + depth * direction, radius)
    return support


def _thin_share(mesh: OrbitalMesh, mm_per_bohr: float, min_feature: float) -> dict[str, float]:
    """Share of each phase's volume thinner than min_feature (morphological opening on the grid).

    A region survives erosion then dilation by a ball of radius min_feature/2 only where it is at
    least min_feature across; what the opening removes is thinner than that.
    """
    from scipy import ndimage

    grid = mesh.grid
    radius_vox = 0.5 * min_feature / (grid.spacing * mm_per_bohr)
    if radius_vox < 0.5:  # finer than a sample: the grid cannot hold anything thinner
        return {}
    threshold = math.sqrt(mesh.isovalue.level)
    out = {}
    sides = (
        [("positive", 1.0), ("negative", -1.0)]
        if grid.field.kind == "signed"
        else [("surface", 0.0)]
    )
    for name, sign in sides:
        mask = (sign * grid.values >= threshold) if sign else (np.abs(grid.values) >= threshold)
        if not mask.any():
            continue
        eroded = ndimage.distance_transform_edt(mask) > radius_vox
        opened = ndimage.distance_transform_edt(~eroded) <= radius_vox
        out[name] = float(np.count_nonzero(mask & ~opened) / np.count_nonzero(mask))
    return out


def _overhang_share(solid) -> float:
    """Share of surface area facing down more steeply than 45 degrees."""
    v, f = _arrays(solid)
    cross = np.cross(v[f[:, 1]] - v[f[:, 0]], v[f[:, 2]] - v[f[:, 0]])
    area = np.linalg.norm(cross, axis=1)
    nz = cross[:, 2] / np.maximum(area, 1e-30)
    return float(area[nz < -math.cos(math.radians(45))].sum() / area.sum())


def build_model(
    orbital: Orbital,
    /,
    *,
    size: float,
    rod: float | None = None,
    min_feature: float = 1.2,
    stand: bool = False,
    cut: str | None = None,
    fraction: float = DEFAULTS.fraction,
    grid: int = DEFAULTS.grid,
    colors=DEFAULT_PAIR,
    mesh: OrbitalMesh | None = None,
) -> PrintModel:
    """Build a printable one-piece model whose longest side is ``size`` millimetres.

    Parameters
    ----------
    orbital : Orbital
        The state.
    size : float
        Longest side of the bounding box, mm.
    rod : float, optional
        Rod and spoke diameter in mm (default 4% of ``size``).
    min_feature : float, default: 1.2
        Thinnest printable feature, mm (common FDM practice for a 0.4 mm nozzle).
    stand : bool, default: False
        Add a round base plate under the model, joined by the rod.
    cut : {None, "half", "quarter"}
        Remove x > 0 (half) or x > 0, y > 0 (quarter) to show nested shells.
    fraction, grid, colors
        As for :func:`orbviz.surface.mesh.build_mesh`.
    mesh : OrbitalMesh, optional
        This orbital's mesh, if already built with these settings (a batch item's figure and
        model share one); it is read, not changed.

    Returns
    -------
    PrintModel

    Raises
    ------
    ModelError
        If the rod would be thinner than ``min_feature``, or the parts would not join.
    """
    for name, value in (("--size", size), ("--min-feature", min_feature)):
        if not (math.isfinite(value) and value > 0):
            raise ParameterError(f"{name} must be a positive length in mm, got {value}")
    if rod is not None and not (math.isfinite(rod) and rod > 0):
        raise ParameterError(f"--rod must be a positive length in mm, got {rod}")
    if cut not in (None, "half", "quarter"):
        raise ParameterError(f"--cut must be half or quarter, got {cut!r}")
    rod_mm = ROD_SHARE * size if rod is None else float(rod)
    if rod_mm < min_feature:
        need = math.ceil(min_feature / ROD_SHARE) if rod is None else None
        fix = (
            f"use --size >= {need} or --rod {min_feature:g}"
            if need
            else f"use --rod {min_feature:g}"
        )
        raise ModelError(f"rod {rod_mm:.2g} mm < {min_feature:g} mm at --size {size:g}: {fix}")
    members = orbital if isinstance(orbital, (list, tuple)) else None
    if mesh is None:
        mesh = (
            _set_mesh(members, fraction, grid)
            if members
            else build_mesh(orbital, fraction=fraction, grid=grid, colors=colors)
        )
    vertices = np.vstack([b.vertices for b in mesh.bodies])
    scale = size / float(np.ptp(vertices, axis=0).max())  # provisional mm per bohr
    for _ in range(2):  # the stand changes the bounding box: rescale once more
        model = _assemble(mesh, scale, rod_mm, stand, cut, size)
        lo, hi = (np.array(b) for b in _bbox(model["solid"]))
        longest = float((hi - lo).max())
        scale *= size / longest
    factor = size / longest
    solid = model["solid"].scale((factor,) * 3)
    parts = {k: v.scale((factor,) * 3) for k, v in model["parts"].items() if not v.is_empty()}
    colours = {
        "positive": colors[0],
        "negative": colors[1],
        "surface": SUPPORT_RGBA,
        "support": SUPPORT_RGBA,
    }
    if members:
        from orbviz.figures.render import SET_PALETTE

        for k in range(len(members)):
            colours[f"lobe-{k + 1}"] = (*SET_PALETTE[k % len(SET_PALETTE)], 255)
    result = PrintModel(solid, parts, colours, scale * factor, rod_mm * factor)
    result.checks = _checks(result, mesh, min_feature, stand, cut, size)
    errors = [c.message for c in result.checks if c.level == "error"]
    if errors:
        raise ModelError("; ".join(errors))
    return result


def _set_mesh(orbitals, fraction: float, grid: int) -> OrbitalMesh:
    """Mesh a whole set (e.g. the sp3 hybrids): each member's large lobe as one body.

    The members share one box; each keeps only its positive body (its large lobe). The small
    lobes would overlap the others' and are left out of a printed set.
    """
    from orbviz.levels.grid import box_half_width
    from orbviz.levels.isovalue import enclosing_isovalue

    isos = [enclosing_isovalue(o, fraction=fraction) for o in orbitals]
    width = max(box_half_width(o, i, grid) for o, i in zip(orbitals, isos, strict=True))
    bodies = []
    for k, (o, i) in enumerate(zip(orbitals, isos, strict=True)):
        mesh = build_mesh(o, fraction=fraction, grid=grid, half_width=width, level=i)
        (lobe,) = [b for b in mesh.bodies if b.name == "positive"]
        bodies.append(
            Body(f"lobe-{k + 1}", lobe.vertices, lobe.faces, lobe.normals, lobe.phase, lobe.colors)
        )
    return OrbitalMesh(bodies, isos[0], None)


def _bbox(solid):
    box = solid.bounding_box()
    return box[:3], box[3:]


def _cut_box(cut: str):
    """Make a box covering the removed region: x > 0 (half) or x > 0, y > 0 (quarter)."""
    import manifold3d

    big = 1e4
    box = manifold3d.Manifold.cube((big, big if cut == "quarter" else 2 * big, 2 * big))
    return box.translate((0.0, 0.0 if cut == "quarter" else -big, -big))


def _assemble(mesh: OrbitalMesh, scale: float, rod_mm: float, stand: bool, cut, size: float):
    import manifold3d

    radius = 0.5 * rod_mm
    bodies = {b.name: _manifold(b.vertices * scale, b.faces) for b in mesh.bodies}
    box = _cut_box(cut) if cut is not None else None
    if box is not None:  # cut first, so that the support joins the pieces that remain
        bodies = {k: v - box for k, v in bodies.items()}
    pieces = [p for body in bodies.values() for p in body.decompose()]
    support = _support(pieces, radius)
    if stand:
        lo, _ = _bbox(_union([*bodies.values(), support]))
        thickness = max(2.0, 1.5 * rod_mm)
        plate_z = lo[2] - 0.5 * rod_mm
        plate = manifold3d.Manifold.cylinder(
            thickness, 0.3 * size, 0.3 * size, circular_segments=96
        ).translate((0.0, 0.0, plate_z - thickness))
        post = _cylinder(np.array([0.0, 0.0, plate_z - 0.5 * thickness]), np.zeros(3), radius)
        support = support + plate + post
    if box is not None:
        support = support - box
    solid = _union([*bodies.values(), support])
    parts = {"support": support}
    taken = support
    for name, body in bodies.items():  # disjoint parts: each less everything taken before it
        parts[name] = body - taken
        taken = taken + body
    return {"solid": solid, "parts": parts}


def _checks(
    model: PrintModel, mesh: OrbitalMesh, min_feature: float, stand: bool, cut, size: float
) -> list[Check]:
    checks = []
    facts = model.facts()
    if not facts.watertight:
        checks.append(Check("error", "the united model is not a closed, outward body"))
    if facts.solids != 1:
        checks.append(
            Check(
                "error",
                f"the model falls into {facts.solids} separate pieces; increase --rod or --grid",
            )
        )
    if facts.cavities:
        checks.append(
            Check(
                "warning",
                f"the model holds {facts.cavities} closed internal "
                "void(s) between nested shells: a resin print traps "
                "liquid resin there; use --cut half to open them",
            )
        )
    if model.rod_mm < min_feature:
        need = math.ceil(size * min_feature / model.rod_mm)
        checks.append(
            Check(
                "error",
                f"rod {model.rod_mm:.2g} mm < {min_feature:g} mm at --size "
                f"{size:g}: use --size >= {need} or --rod {min_feature:g}",
            )
        )
    thin = _thin_share(mesh, model.mm_per_bohr, min_feature) if mesh.grid is not None else {}
    for name, share in thin.items():
        if share > 0.02:
            checks.append(
                Check(
                    "warning",
                    f"{100 * share:.0f}% of the {name} part is thinner "
                    f"than {min_feature:g} mm: use a larger --size",
                )
            )
    if not stand and cut is None:
        checks.append(
            Check(
                "note",
                "no flat base: print with supports, add --stand, or use "
                "--cut half and print it on the cut face",
            )
        )
    overhang = _overhang_share(model.solid)
    if overhang > 0.05:
        checks.append(
            Check(
                "note",
                f"{100 * overhang:.0f}% of the surface faces down more "
                "steeply than 45 degrees: it needs supports",
            )
        )
    return checks
