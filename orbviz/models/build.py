"""Printable teaching models: the isosurface bodies scaled to millimetres and made one solid.

The phases are joined by a rod, a bead and spokes (:mod:`orbviz.models.solids`), united by
robust mesh booleans (manifold3d). For a multi-material printer the same solid is split into
disjoint colour parts: the support (rod, bead, spokes, stand) and each phase less the support.
Printability is checked before anything is written (:mod:`orbviz.models.printability`).
"""

from __future__ import annotations

import os
from collections.abc import Sequence
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np

from orbviz._defaults import DEFAULTS
from orbviz._options import checked
from orbviz._progress import progress
from orbviz.errors import ModelError, OutputError
from orbviz.levels.grid import box_half_width
from orbviz.levels.isovalue import enclosing_isovalue
from orbviz.models.features import Mark, add_marks
from orbviz.models.options import ModelOptions
from orbviz.models.printability import Check, printability
from orbviz.models.solids import arrays, support, to_manifold, union
from orbviz.models.stand import stand
from orbviz.states.state import State
from orbviz.surface.checks import MeshFacts, mesh_facts
from orbviz.surface.colors import RGBA, SET_PALETTE
from orbviz.surface.contour import Body
from orbviz.surface.mesh import OrbitalMesh, build_mesh
from orbviz.surface.options import MeshOptions

__all__ = ["SUPPORT_RGBA", "PrintModel", "build_model", "model_targets"]

SUPPORT_RGBA: RGBA = (190, 190, 190, 255)  # neutral grey: print it in either material
# what a kit's folder holds (orbviz.models.kit_files): an old kit may be replaced, nothing else
KIT_NAMES = ("kit.json", "parts", "plate-*.stl", "assembly.png", "assembly.pdf")


def model_targets(path: str | os.PathLike[str], options: ModelOptions) -> list[Path]:
    """Every file a model written to ``path`` makes: checked before any work.

    A ``.3mf`` is one file; an ``.stl`` is the solid, or with ``split`` one file per colour
    part (``STEM-support.stl`` and one per phase; the phases are known only once meshed, so
    all three possible names are checked).
    """
    from orbviz.export import check_output

    path = Path(path)
    if options.kit:
        from orbviz.export import check_targets

        if path.suffix and path.suffix.lower() != ".zip":
            raise OutputError(f"cannot write {str(path)!r}: a kit is written to a folder or a .zip")
        check_targets([path], folders=not path.suffix, allowed=KIT_NAMES)
        return [path]
    if options.split and path.suffix.lower() != ".stl":
        raise OutputError(f"cannot write {str(path)!r}: split parts are written as .stl files")
    (target,) = check_output(path, [".stl", ".3mf"])
    if not options.split:
        return [target]
    from orbviz.export import check_targets

    names = ("support", "positive", "negative", "surface")
    parts = [target.with_name(f"{target.stem}-{n}.stl") for n in names]
    check_targets(parts)
    return parts


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
    split : bool
        Written as one STL per colour part.
    label : str
        The text on the stand ("" for none).
    grown : manifold3d.Manifold or None
        For a kit: the support widened by the clearance, to be cut from the lobes.
    sleeve : manifold3d.Manifold or None
        For a kit: the support widened 0.4 mm more; what it meets in a lobe marks where the
        rod or a spoke runs through it.
    marks : list of Mark
        The phase marks on the lobes.
    notes : list of str
        What the builder left out and why (reported with the checks).
    """

    solid: Any
    parts: dict[str, Any]
    colors: dict[str, RGBA]
    mm_per_bohr: float
    rod_mm: float
    checks: list[Check] = field(default_factory=list)
    split: bool = False
    label: str = ""
    grown: Any = None
    sleeve: Any = None
    marks: list[Mark] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)

    def __repr__(self) -> str:
        lo, hi = (np.array(b) for b in _bbox(self.solid))
        size = ", ".join(f"{v:.1f}" for v in hi - lo)
        return f"PrintModel({size} mm, parts {sorted(self.parts)}, rod {self.rod_mm:.2g} mm)"

    def bodies(self, which: str = "solid") -> list[Body]:
        """Return the solid, or the colour parts, as bodies in mm for the writers."""
        items = {"solid": self.solid} if which == "solid" else self.parts
        out = []
        for name, manifold in items.items():
            vertices, faces = arrays(manifold)
            rgba = SUPPORT_RGBA if name in ("solid", "support") else self.colors[name]
            colors = np.tile(np.array(rgba, dtype=np.uint8), (len(vertices), 1))
            zeros = np.zeros_like(vertices, np.float32)
            out.append(Body(name, vertices, faces, zeros, zeros[:, 0].copy(), colors, unit="mm"))
        return out

    def preview_bodies(self) -> list[Body]:
        """Return the colour parts in bohr (the model's scale undone), with vertex normals.

        For drawing the model beside, or in place of, the orbital it was made from.
        """
        import trimesh

        out = []
        for body in self.bodies("parts"):
            vertices = body.vertices / self.mm_per_bohr
            mesh = trimesh.Trimesh(vertices, body.faces, process=False)
            normals = np.asarray(mesh.vertex_normals, np.float32)
            out.append(
                Body(body.name, vertices, body.faces, normals, body.phase, body.colors, unit="bohr")
            )
        return out

    def facts(self) -> MeshFacts:
        """Volume, closedness and pieces of the solid (orbviz.surface.checks)."""
        return mesh_facts(*arrays(self.solid))

    def files(self, path: str | os.PathLike[str]) -> dict[Path, bytes]:
        """Return the bytes of each file the model writes to ``path`` (.stl, split .stl, .3mf)."""
        from orbviz.export import encode_bodies

        path = Path(path)
        if path.suffix.lower() == ".3mf":
            return encode_bodies(self.bodies("parts"), path, scale=1.0, units="mm")
        if not self.split:
            return encode_bodies(self.bodies("solid"), path, scale=1.0, units="mm")
        files: dict[Path, bytes] = {}
        for body in self.bodies("parts"):
            part = path.with_name(f"{path.stem}-{body.name}.stl")
            files.update(encode_bodies([body], part, scale=1.0, units="mm"))
        return files

    def export(self, path: str | os.PathLike[str]) -> list[Path]:
        """Write the model (.stl, or .3mf with colour parts) in mm, all files or none."""
        from orbviz.export import check_output, write_files

        check_output(path, [".stl", ".3mf"])
        return write_files(self.files(path))


def default_label(state: State | Sequence[State], fraction: float) -> str:
    """Return the stand's default text: the orbital's label and the enclosed fraction."""
    if isinstance(state, (list, tuple)):
        return f"{state[0].label.split('[')[0]} · {100 * fraction:.3g}%"
    one: State = state  # type: ignore[assignment]  # not a sequence: one state
    return f"{one.label} · {100 * fraction:.3g}%"


def _bbox(solid: Any) -> tuple[Any, Any]:
    box = solid.bounding_box()
    return box[:3], box[3:]


def _cut_box(cut: str) -> Any:
    """Make a box covering the removed region: x > 0 (half) or x > 0, y > 0 (quarter)."""
    import manifold3d

    big = 1e4
    box = manifold3d.Manifold.cube((big, big if cut == "quarter" else 2 * big, 2 * big))
    return box.translate((0.0, 0.0 if cut == "quarter" else -big, -big))


def _assemble(
    bodies: list[Body], scale: float, options: ModelOptions, rod_mm: float, label: str
) -> tuple[Any, dict[str, Any], Any]:
    """Return the solid, its disjoint colour parts and a kit's widened supports (scaled).

    The lengths are at ``scale`` mm per bohr; the widened supports (by the clearance, and by
    0.4 mm more) are None unless the options ask for a kit.
    """
    solids = {b.name: to_manifold(b.vertices * scale, b.faces) for b in bodies}
    box = _cut_box(options.cut) if options.cut is not None else None
    if box is not None:  # cut first, so that the support joins the pieces that remain
        solids = {k: v - box for k, v in solids.items()}
    pieces = [p for solid in solids.values() for p in solid.decompose()]
    held, grown = support(pieces, 0.5 * rod_mm, deep=options.kit), None
    if options.stand or options.kit:
        lowest = float(_bbox(union([*solids.values(), held]))[0][2])
        base = stand(lowest, rod_mm, options.size_mm, label)
        if options.kit:  # the support widened by the clearance, and by 0.4 mm more
            grown = tuple(
                support(pieces, 0.5 * rod_mm, g, deep=True)
                + stand(lowest, rod_mm, options.size_mm, "", g)
                for g in (options.clearance_mm, options.clearance_mm + 0.4)
            )
        held = held + base
    if box is not None:
        held = held - box
    parts = {"support": held}
    taken = held
    for name, solid in solids.items():  # disjoint parts: each less everything taken before it
        parts[name] = solid - taken
        taken = taken + solid
    return union([*solids.values(), held]), parts, grown


def _set_bodies(
    states: Sequence[State], options: ModelOptions, fraction: float
) -> tuple[list[Body], list[OrbitalMesh]]:
    """Each member's large lobe as one body (``lobe-K``), all in one box.

    The small lobes would overlap the others' and are left out of a printed set.
    """
    isos = [enclosing_isovalue(s, fraction=fraction, check=False) for s in states]
    width = max(box_half_width(s, i, options.grid) for s, i in zip(states, isos, strict=True))
    meshes, bodies = [], []
    for k, (s, i) in enumerate(zip(states, isos, strict=True)):
        mesh = build_mesh(
            s, MeshOptions(grid=options.grid), fraction=fraction, half_width=width, level=i
        )
        (lobe,) = [b for b in mesh.bodies if b.name == "positive"]
        bodies.append(
            Body(f"lobe-{k + 1}", lobe.vertices, lobe.faces, lobe.normals, lobe.phase, lobe.colors)
        )
        meshes.append(mesh)
    return bodies, meshes


def _mark(model: PrintModel, opts: ModelOptions) -> None:
    """Add the phase marks to a model's parts and solid (in place), noting lobes left bare."""
    assert opts.marks is not None
    model.parts, model.marks, skipped, glyphs = add_marks(
        model.parts, opts.marks, opts.min_feature_mm
    )
    if glyphs:
        change = union(glyphs)
        model.solid = model.solid - change if opts.marks == "engraved" else model.solid + change
    if skipped:
        model.notes.append(
            f"{skipped} lobe(s) carry no mark: hidden inside another or too small for "
            f"{opts.min_feature_mm:g} mm strokes"
        )


def build_model(
    state: State | Sequence[State],
    /,
    options: ModelOptions | None = None,
    *,
    fraction: float = DEFAULTS.fraction,
    mesh: OrbitalMesh | None = None,
) -> PrintModel:
    """Build a printable model whose longest side is ``options.size_mm`` millimetres.

    Parameters
    ----------
    state : State or sequence of State
        Any kind of state, or the members of a set (each member's large lobe is printed).
    options : ModelOptions, optional
        Size, rod, thinnest feature, stand, cut, grid and colours (checked by their rules).
    fraction : float, default: 0.9
        Probability inside the surface.
    mesh : OrbitalMesh, optional
        This state's mesh, if already built with this fraction, grid and colours (a batch
        item's figure and model share one); it is read, not changed.

    Raises
    ------
    ModelError
        If the parts would not join into one printable body.
    """
    opts = checked(options or ModelOptions())
    if isinstance(state, (list, tuple)):
        if opts.kit:
            raise ModelError(
                f"a kit is made from one orbital, and a set of {len(state)} overlaps: make a "
                "kit of each member on its own, or print the set as one model"
            )
        bodies, meshes = _set_bodies(state, opts, fraction)
    else:
        one: State = state  # type: ignore[assignment]  # not a sequence: one state
        mesh = mesh or build_mesh(
            one, MeshOptions(grid=opts.grid, colors=opts.colors), fraction=fraction
        )
        bodies, meshes = mesh.bodies, [mesh]
    size = opts.size_mm
    scale = size / float(np.ptp(np.vstack([b.vertices for b in bodies]), axis=0).max())
    label = default_label(state, fraction) if opts.label is None else opts.label
    label = label if (opts.stand or opts.kit) else ""
    passes = progress(range(2), total=2, desc="orbviz model", unit="pass")
    for _ in passes:  # the stand changes the bounding box: rescale once more
        solid, parts, grown = _assemble(bodies, scale, opts, opts.rod, label)
        lo, hi = (np.array(b) for b in _bbox(solid))
        longest = float((hi - lo).max())
        scale *= size / longest
    factor = size / longest
    colours: dict[str, RGBA] = {"positive": opts.colors[0], "negative": opts.colors[1]}
    colours.update({"surface": SUPPORT_RGBA, "support": SUPPORT_RGBA})
    for k in range(len(bodies)):
        colours[f"lobe-{k + 1}"] = (*SET_PALETTE[k % len(SET_PALETTE)], 255)
    result = PrintModel(
        solid.scale((factor,) * 3),
        {k: v.scale((factor,) * 3) for k, v in parts.items() if not v.is_empty()},
        colours,
        scale,  # the last pass's scale times factor: the finished model's mm per bohr
        opts.rod * factor,
        split=opts.split,
        label=label,
        grown=None if grown is None else grown[0].scale((factor,) * 3),
        sleeve=None if grown is None else grown[1].scale((factor,) * 3),
    )
    if opts.marks is not None:
        _mark(result, opts)
    result.checks = printability(result, meshes, opts)
    errors = [c.message for c in result.checks if c.level == "error"]
    if errors:
        raise ModelError("; ".join(errors))
    return result
