"""Print kits: a model split into one-colour parts that print flat and assemble without glue.

Every lobe (each separate piece of a phase) is cut in half by a plane through the model's
vertical axis that holds the rod or spokes running into it, so each half prints on its flat cut
face. The support (plinth, post, rod, bead and spokes) prints as one part on its plinth. Where
the rod or a spoke runs through a lobe, the support carries a pin across it, a rectangular
block at right angles to the cut plane; each half has the matching socket, so a half goes on
only at its place and the right way round, and the lobe can neither slide along the rod nor
turn about it. The lobes are cut from the support widened by the clearance, so every joint
has that gap. With magnets, each half also gets sockets for round magnets facing across the
cut.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

import numpy as np

from orbviz.errors import ModelError
from orbviz.models.codes import engrave_codes
from orbviz.models.features import frame
from orbviz.models.options import ModelOptions
from orbviz.models.printability import overhang_share
from orbviz.models.solids import arrays, pieces, union

if TYPE_CHECKING:
    from orbviz.models.build import PrintModel

__all__ = ["Joint", "Kit", "KitPart", "build_kit"]

SIGN_CODES = {"positive": "+", "negative": "-", "surface": "s"}


@dataclass
class KitPart:
    """One printed part of a kit.

    Attributes
    ----------
    code : str
        Its code, engraved on it and named on the assembly sheet (``3dz2 +1a``).
    color : str
        Its colour part (``support``, ``positive``, ``negative``, ...).
    solid : manifold3d.Manifold
        The part where it sits in the assembled model (mm).
    pose : ndarray
        4 x 4 rigid motion from the assembled place to the print pose (flat face on z = 0).
    partner : str or None
        The code of the other half of the same lobe.
    code_mm : float
        Height of the code cut into its hidden face (0: none fitted).
    """

    code: str
    color: str
    solid: Any
    pose: np.ndarray
    partner: str | None = None
    code_mm: float = 0.0

    @property
    def file(self) -> str:
        """File name of the part: its code made safe (``3dz2_p1a.stl``)."""
        safe = self.code.replace("+", "p").replace("-", "n").replace(" ", "_")
        return "".join(c for c in safe if c.isalnum() or c in "_.") + ".stl"

    def printed(self) -> Any:
        """Return the part in its print pose."""
        return self.solid.transform(self.pose[:3].tolist())

    def flat_area(self) -> float:
        """Area (mm^2) of the part's face lying on the bed in its print pose."""
        v, f = arrays(self.printed())
        cross = np.cross(v[f[:, 1]] - v[f[:, 0]], v[f[:, 2]] - v[f[:, 0]])
        low = np.all(v[f][:, :, 2] < 1e-3, axis=1) & (cross[:, 2] < 0)
        return float(0.5 * np.linalg.norm(cross[low], axis=1).sum())


@dataclass(frozen=True)
class Joint:
    """A pin (on the support) or a magnet pair (in two halves), in the assembled model.

    ``centre`` and ``axis`` place it; ``size`` is (across the rod, along the rod, the least
    reach from the rod's axis to either side) for
    a pin, (diameter, thickness, 0) for a magnet; ``parts`` names the parts it joins.
    """

    kind: str
    centre: np.ndarray
    axis: np.ndarray
    along: np.ndarray
    size: tuple[float, float, float]
    parts: tuple[str, ...]


@dataclass
class Kit:
    """A kit: its parts, its joints and the rule they follow."""

    name: str
    parts: list[KitPart]
    joints: list[Joint]
    clearance: float
    model: PrintModel
    notes: list[str] = field(default_factory=list)

    def part(self, code: str) -> KitPart:
        """Return the part with this code."""
        return next(p for p in self.parts if p.code == code)


def _cut_normal(piece: Any, touch: Any, reach: float) -> np.ndarray | None:
    """Return the normal of the plane through the nucleus that halves this lobe best.

    The plane must hold the rod and spokes running into the lobe (everything of the widened
    support it meets lies within ``reach`` of it). Tried: the vertical planes through the
    lobe's point nearest the nucleus (where a spoke enters) and through its middle, and the
    horizontal plane; of those that hold the support, the one that splits the volume most
    evenly. None if no plane holds it.
    """
    v, _ = arrays(piece)
    extent = float(np.ptp(v, axis=0).max())
    met = arrays(touch)[0] if not touch.is_empty() else np.zeros((0, 3))
    met = met[np.linalg.norm(met, axis=1) > 2 * reach]  # by the nucleus every spoke meets
    normals = []
    points = [v[np.argmin(np.linalg.norm(v, axis=1))], v.mean(axis=0)]
    if len(met):  # where a spoke runs into the lobe
        points.insert(0, met[np.argmax(np.linalg.norm(met, axis=1))])
    for point in points:
        flat = np.array([point[0], point[1], 0.0])
        if np.linalg.norm(flat) > 0.05 * extent:
            d = flat / np.linalg.norm(flat)
            normals.append(np.array([-d[1], d[0], 0.0]))
    normals += [np.array([0.0, 0.0, 1.0]), np.array([0.0, 1.0, 0.0])]
    best, score = None, np.inf
    for normal in normals:
        if len(met) and np.abs(met @ normal).max() > reach:
            continue
        upper, lower = piece.split_by_plane(tuple(normal), 0.0)
        share = abs(upper.volume() - lower.volume()) / max(piece.volume(), 1e-9)
        if share < score - 1e-3:
            best, score = normal, share
    return best


def _box(centre: np.ndarray, axes: np.ndarray, low: np.ndarray, high: np.ndarray) -> Any:
    """Make a box spanning [low, high] along the columns of ``axes`` from ``centre``."""
    import manifold3d

    cube = manifold3d.Manifold.cube(tuple(high - low)).translate(tuple(low))
    return cube.transform(np.column_stack([axes, centre]).tolist())


def _pins(piece: Any, sleeve: Any, normal: np.ndarray, rod: float, opts: ModelOptions) -> list:
    """Return (centre, along, reach below, reach above) of each pin the lobe can hold.

    One pin for each run of the rod or a spoke through the lobe, where the lobe is thick
    enough across the cut to hold it.
    """
    found = []
    for run in sleeve.decompose():
        v, _ = arrays(run)
        if len(v) < 4:
            continue
        centre = 0.5 * (v.min(axis=0) + v.max(axis=0))
        _, _, vt = np.linalg.svd(v - v.mean(axis=0), full_matrices=False)
        along = vt[0] - (vt[0] @ normal) * normal
        if np.linalg.norm(along) < 1e-6 or np.ptp(v @ vt[0]) < 1.6 * rod + 0.5:
            continue
        along /= np.linalg.norm(along)
        reach = []
        for sign in (1.0, -1.0):
            hits = piece.ray_cast(tuple(centre), tuple(centre + sign * 1e3 * normal))
            outer = [h.distance * 1e3 for h in hits if h.distance * 1e3 > 0.5 * rod + 0.2]
            depth = (outer[-1] if outer else 0.0) - opts.min_feature_mm - opts.clearance_mm
            reach.append(min(depth, 0.5 * rod + 2.0 * rod))
        if min(reach) >= 0.5 * rod + 1.0:
            found.append((centre, along, reach[1], reach[0]))
    return found


def _magnets(piece: Any, normal: np.ndarray, opts: ModelOptions, avoid: list) -> list:
    """Return up to two spots on a lobe's cut plane with room for a magnet on either side."""
    assert opts.magnets is not None
    diameter, thickness = opts.magnets
    wall, gap = opts.min_feature_mm, opts.clearance_mm
    rotation = frame(normal)
    section = piece.transform(np.column_stack([rotation.T, np.zeros(3)]).tolist()).slice(0.0)
    inner = section.offset(-(0.5 * diameter + gap + wall))
    spots: list[np.ndarray] = []
    polygons = inner.to_polygons()
    candidates = [np.asarray(p) for poly in polygons for p in poly]
    candidates += [np.mean(poly, axis=0) for poly in polygons]
    for point in sorted(candidates, key=lambda p: -float(np.linalg.norm(p))):  # outermost first
        spot = rotation @ np.array([point[0], point[1], 0.0])
        if any(np.linalg.norm(spot - other) < diameter + wall for other in spots + avoid):
            continue
        need = thickness + gap + wall
        both = [
            piece.ray_cast(tuple(spot + 1e-3 * s * normal), tuple(spot + s * need * normal))
            for s in (1.0, -1.0)
        ]
        if not any(both):  # solid to the socket's depth and a wall beyond, on both sides
            spots.append(spot)
        if len(spots) == 2:
            break
    return spots


def _pose(solid: Any, rotation: np.ndarray) -> np.ndarray:
    """Return the 4 x 4 motion that turns ``solid`` by ``rotation`` and sets it on z = 0."""
    turned = solid.transform(np.column_stack([rotation, np.zeros(3)]).tolist())
    pose = np.eye(4)
    pose[:3, :3] = rotation
    pose[2, 3] = -float(turned.bounding_box()[2])
    return pose


def _halves(
    name: str,
    index: int,
    piece: Any,
    others: Any,
    model: PrintModel,
    opts: ModelOptions,
    prefix: str,
    codes: bool,
) -> tuple[list[KitPart], list[Joint], list[Any]]:
    """Cut one lobe into two halves with pin sockets (and magnet sockets).

    Returns the halves, their joints and the pins for the support.
    """
    rod = model.rod_mm
    reach = 2.5 * 0.5 * rod + opts.clearance_mm + 0.05  # the bead's radius, the widest
    normal = _cut_normal(piece, model.grown ^ piece, reach)
    if normal is None:
        raise ModelError(
            f"cannot make a kit: a rod crosses {name} lobe {index} out of the plane that halves "
            "it; print the one-piece model"
        )
    code = f"{prefix} {SIGN_CODES.get(name, name)}{index}"
    pins, cuts, joints = [], [], []
    import manifold3d

    # where the rod or a spoke runs through the lobe, away from the bead (where they all meet)
    bead = manifold3d.Manifold.sphere(2.5 * 0.5 * rod + opts.clearance_mm + rod, 48)
    sleeve = (model.sleeve ^ piece) - bead
    for centre, along, below, above in _pins(piece, sleeve, normal, rod, opts):
        across = np.cross(normal, along)
        axes = np.column_stack([across, along, normal])
        half = np.array([0.4 * rod, 0.8 * rod, 0.0])  # narrower than the rod: no tangent faces
        grow = np.full(3, opts.clearance_mm)
        cut = _box(centre, axes, -half - grow - [0, 0, below], half + grow + [0, 0, above])
        if not (cut ^ others).is_empty():
            continue  # the pin would reach another lobe
        pins.append(_box(centre, axes, -half - [0, 0, below], half + [0, 0, above]))
        cuts.append(cut)
        size = (0.8 * rod, 1.6 * rod, min(below, above))
        joints.append(Joint("pin", centre, normal, along, size, (f"{prefix} S", code + "a")))
    carved = piece - union(cuts) if cuts else piece
    upper, lower = carved.split_by_plane(tuple(normal), 0.0)
    if upper.is_empty() or lower.is_empty():
        raise ModelError(f"cannot make a kit: {name} lobe {index} does not cross its cut plane")
    if opts.magnets is not None:
        diameter, thickness = opts.magnets
        spots = _magnets(carved, normal, opts, [j.centre for j in joints])
        sockets = []
        for spot in spots:
            depth = thickness + opts.clearance_mm
            for sign in (1.0, -1.0):
                sockets.append(
                    _socket(spot, sign * normal, 0.5 * diameter + opts.clearance_mm, depth)
                )
            joints.append(
                Joint(
                    "magnet",
                    spot,
                    normal,
                    frame(normal)[:, 0],
                    (diameter, thickness, 0.0),
                    (code + "a", code + "b"),
                )
            )
        if sockets:
            upper, lower = upper - union(sockets), lower - union(sockets)
    letters = 0.0
    if codes:
        spots = [j.centre for j in joints]
        upper, lower, letters = engrave_codes(upper, lower, carved, normal, code, spots)
    flip = np.diag([1.0, -1.0, -1.0])
    turn = frame(normal).T  # the normal onto +z: the upper half's cut face looks down
    parts = [
        KitPart(code + "a", name, upper, _pose(upper, turn), code + "b", letters),
        KitPart(code + "b", name, lower, _pose(lower, flip @ turn), code + "a", letters),
    ]
    return parts, joints, pins


def _socket(spot: np.ndarray, direction: np.ndarray, radius: float, depth: float) -> Any:
    """Make a round socket from ``spot`` into the solid along ``direction``."""
    from orbviz.models.solids import cylinder

    return cylinder(spot - 0.01 * direction, spot + depth * direction, radius)


def _shortfalls(
    parts: list[KitPart],
    joints: list[Joint],
    found: dict[str, list],
    opts: ModelOptions,
    least: float,
) -> list[str]:
    """Return notes on what the kit could not give: pins, magnets, whole phases."""
    notes = []
    firsts = [p.code for p in parts if p.code.endswith("a")]
    pinned = {j.parts[1] for j in joints if j.kind == "pin"}
    bare = [c for c in firsts if c not in pinned]
    if bare:
        notes.append(
            f"{len(bare)} lobe(s) ({', '.join(bare)}) have no room for a pin: they sit on the rod "
            "or spoke by friction alone; a larger size or a thinner rod gives room"
        )
    if opts.magnets is not None:
        held = {j.parts[0] for j in joints if j.kind == "magnet"}
        without = [c for c in firsts if c not in held]
        if without:
            d, t = opts.magnets
            notes.append(
                f"{len(without)} lobe(s) ({', '.join(without)}) have no room for {d:g} x {t:g} mm "
                "magnets: smaller magnets or a larger size"
            )
    for name, bits in found.items():
        if not any(p.volume() >= least for p in bits):
            notes.append(
                f"the {name} phase is left out of the kit: nothing of it is larger than "
                f"{least:.3g} mm^3 outside the rod and bead; a larger size or a thinner rod"
            )
    return notes


def build_kit(model: PrintModel, opts: ModelOptions, prefix: str, *, codes: bool = True) -> Kit:
    """Split a model built with ``kit`` into printable, keyed parts.

    Parameters
    ----------
    model : PrintModel
        A model built with ``ModelOptions(kit=True)`` (it carries the widened support).
    opts : ModelOptions
        Its options: clearance, magnets, thinnest feature.
    prefix : str
        The start of every part code (the orbital's label).
    codes : bool, default: True
        Cut each half's code into its hidden cut face.
    """
    if model.grown is None or model.sleeve is None:
        raise ModelError("internal: the model was not built as a kit")
    parts: list[KitPart] = []
    joints: list[Joint] = []
    pins: list[Any] = []
    notes: list[str] = []
    found = {n: pieces(model.parts[n] - model.grown) for n in model.parts if n != "support"}
    largest = max((p.volume() for bits in found.values() for p in bits), default=0.0)
    least = max(0.01 * largest, (2 * opts.min_feature_mm) ** 3)
    for name, bits in found.items():
        specks = [p for p in bits if p.volume() < least]
        if specks:
            notes.append(
                f"{len(specks)} speck(s) of the {name} phase under {least:.3g} mm^3 (by the "
                "nucleus, where the surface pinches) are left out of the kit"
            )
        lobes = sorted(
            (p for p in bits if p.volume() >= least),
            key=lambda p: tuple(-np.round(np.asarray(p.bounding_box()[3:]), 3)[::-1]),
        )
        for index, piece in enumerate(lobes, start=1):
            others = union([p for bits2 in found.values() for p in bits2 if p is not piece])
            halves, joined, pinned = _halves(name, index, piece, others, model, opts, prefix, codes)
            parts += halves
            joints += joined
            pins += pinned
    notes += _shortfalls(parts, joints, found, opts, least)
    steep = [(p.code, overhang_share(p.printed())) for p in parts]
    steep = [(c, share) for c, share in steep if share > 0.05]
    if steep:
        listed = ", ".join(f"{c} {100 * share:.0f}%" for c, share in steep)
        notes.append(f"parts with surface facing down more steeply than 45 degrees: {listed}")
    missing = sum(1 for p in parts if p.code_mm == 0.0)
    if missing and codes:
        notes.append(f"{missing} half(s) have no room for their code on the cut face")
    support = union([model.parts["support"], *pins])
    base = KitPart(f"{prefix} S", "support", support, _pose(support, np.eye(3)))
    return Kit(prefix, [base, *parts], joints, opts.clearance_mm, model, notes)
