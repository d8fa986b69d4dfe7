"""Alt text made from the physics: what the surface is, its lobes, its nodes and its size.

Nothing here is a template per label. The lobes are the surface's own solid pieces: each is
told by its volume centroid and shape where it lies (along an axis, between two, around the
nucleus as a shell, or as a ring about an axis); the nodal surfaces come from the state
(:meth:`orbviz.states.state.State.nodal_surfaces`); the size from the vertices.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

from orbviz._defaults import BOHR_IN_ANGSTROM
from orbviz.states.state import NodalSurfaces, State
from orbviz.surface.colors import ColorPair
from orbviz.surface.contour import Body

if TYPE_CHECKING:
    from orbviz.figures.figure import Figure, Panel

__all__ = [
    "Lobe",
    "colour_names",
    "describe_figure",
    "describe_panel",
    "describe_panels",
    "lobes",
    "nodal_text",
]

_AXES = {
    "+x": (1, 0, 0),
    "-x": (-1, 0, 0),
    "+y": (0, 1, 0),
    "-y": (0, -1, 0),
    "+z": (0, 0, 1),
    "-z": (0, 0, -1),
}
_TOLERANCE = math.radians(9.0)  # a lobe within this of a named direction points along it
_WORDS = ["no", "one", "two", "three", "four", "five", "six", "seven", "eight", "nine", "ten"]


@dataclass(frozen=True)
class Lobe:
    """One solid piece of a body.

    Attributes
    ----------
    phase : str
        The body it belongs to: ``positive``, ``negative`` or ``surface``.
    kind : {"lobe", "ring", "sphere", "shell"}
        An off-centre lobe; a ring about an axis; a body around the nucleus; a shell with a
        hollow inside.
    direction : (3,) ndarray
        Unit vector towards the lobe's centroid (a ring's or shell's axis for those).
    where : str
        The direction in words (``along +z``, ``between +x and +y``, ``around the z axis``).
    """

    phase: str
    kind: str
    direction: np.ndarray
    where: str


def _count(k: int) -> str:
    return _WORDS[k] if k < len(_WORDS) else str(k)


def _components(faces: np.ndarray, n: int) -> np.ndarray:
    """Label each face by its connected piece (through shared vertices)."""
    from orbviz.surface.checks import components

    return components(n, faces.ravel(), np.roll(faces, -1, axis=1).ravel())[faces[:, 0]]


def _solid_angle(a: np.ndarray, b: np.ndarray, c: np.ndarray) -> float:
    """Return the solid angle triangles subtend at the origin: 4 pi inside, 0 outside.

    The formula of Van Oosterom & Strackee, IEEE Trans. Biomed. Eng. 30 (1983) 125.
    """
    la, lb, lc = (np.linalg.norm(v, axis=1) for v in (a, b, c))
    numerator = np.einsum("ij,ij->i", a, np.cross(b, c))
    denominator = la * lb * lc + np.einsum("ij,ij->i", a, b) * lc
    denominator += np.einsum("ij,ij->i", a, c) * lb + np.einsum("ij,ij->i", b, c) * la
    return float(2.0 * np.arctan2(numerator, denominator).sum())


def _name(direction: np.ndarray) -> str:
    """Name a direction: an axis, between two axes, towards an octant, or by its angles."""
    best = min(_AXES, key=lambda k: np.arccos(np.clip(direction @ _AXES[k], -1, 1)))
    if np.arccos(np.clip(direction @ _AXES[best], -1, 1)) < _TOLERANCE:
        return f"along {best}"
    signs = ["+" if v >= 0 else "-" for v in direction]
    for skip in range(3):  # between two axes, in a coordinate plane
        pair = [k for k in range(3) if k != skip]
        ideal = np.zeros(3)
        ideal[pair] = np.sign(direction[pair]) / math.sqrt(2)
        if np.arccos(np.clip(direction @ ideal, -1, 1)) < _TOLERANCE:
            return f"between {signs[pair[0]]}{'xyz'[pair[0]]} and {signs[pair[1]]}{'xyz'[pair[1]]}"
    if np.arccos(np.clip(np.abs(direction).sum() / math.sqrt(3), -1, 1)) < _TOLERANCE:
        return f"towards the ({', '.join(s + a for s, a in zip(signs, 'xyz', strict=True))}) octant"
    polar = math.degrees(math.acos(np.clip(direction[2], -1, 1)))
    azimuth = math.degrees(math.atan2(direction[1], direction[0])) % 360
    return f"at {polar:.0f} degrees from +z, azimuth {azimuth:.0f} degrees"


def _axis_name(axis: np.ndarray) -> str:
    k = int(np.argmax(np.abs(axis)))
    if abs(axis[k]) > math.cos(_TOLERANCE):
        return f"the {'xyz'[k]} axis"
    return "an axis " + _name(axis if axis[np.argmax(np.abs(axis))] > 0 else -axis)[6:]


def _inside(a: np.ndarray, b: np.ndarray, c: np.ndarray, point: np.ndarray) -> bool:
    """Tell whether a closed piece encloses a point (its solid angle there is 4 pi, not 0)."""
    return abs(_solid_angle(a - point, b - point, c - point)) > 2 * math.pi


def lobes(body: Body) -> list[Lobe]:
    """Return the solid pieces of a body, each named by where it lies.

    A piece whose volume centroid lies inside it is a lobe (or, if it holds the nucleus too, a
    body around the nucleus, or a shell when a hollow lies within it); one whose centroid lies
    outside it, in its hole, is a ring about its axis of least spread.
    """
    v, f = body.vertices, body.faces
    labels = _components(f, len(v))
    a, b, c = v[f[:, 0]], v[f[:, 1]], v[f[:, 2]]
    tet = np.einsum("ij,ij->i", a, np.cross(b, c)) / 6.0  # signed tetrahedra from the origin
    pieces = []
    for piece in np.unique(labels):
        mask = labels == piece
        reach = float(np.linalg.norm(v[np.unique(f[mask])], axis=1).max())
        pieces.append((mask, float(tet[mask].sum()), reach))
    hollows = sorted(r for _, volume, r in pieces if volume < 0)  # inward pieces: hollows
    solids = sorted((p for p in pieces if p[1] > 0), key=lambda p: p[2])
    out, smaller = [], 0.0
    for mask, volume, reach in solids:
        pa, pb, pc = a[mask], b[mask], c[mask]
        centroid = ((pa + pb + pc) / 4.0 * tet[mask, None]).sum(axis=0) / volume
        points = np.concatenate([pa, pb, pc])
        axis = np.linalg.eigh(np.cov(points.T))[1][:, 0]  # the direction of least spread
        if _inside(pa, pb, pc, np.zeros(3)):
            hollow = any(smaller < r < reach for r in hollows)
            out.append(Lobe(body.name, "shell" if hollow else "sphere", axis, "around the nucleus"))
        elif not _inside(pa, pb, pc, centroid):
            side = ""
            if np.linalg.norm(centroid) > 0.15 * reach:
                side = " " + _name(centroid / np.linalg.norm(centroid)).replace("along", "on the")
                side += " side" if side.startswith(" on the") else ""
            out.append(Lobe(body.name, "ring", axis, f"around {_axis_name(axis)}{side}"))
        else:
            unit = centroid / np.linalg.norm(centroid)
            out.append(Lobe(body.name, "lobe", unit, _name(unit)))
        smaller = reach
    return out


def _plane_name(normal: Sequence[float]) -> str:
    n = np.asarray(normal, dtype=float)
    k = int(np.argmax(np.abs(n)))
    if abs(n[k]) > 0.999:
        return f"the {'xyz'.replace('xyz'[k], '')} plane"
    if abs(n[2]) < 1e-9:  # a plane through the z axis: name the line it cuts in the xy plane
        along = np.array([-n[1], n[0]])
        along /= np.abs(along).max()
        if np.allclose(np.abs(along), 1.0, atol=1e-6):
            return "the plane x = y" if along[0] * along[1] > 0 else "the plane x = -y"
    return "a plane through the nucleus"


def _length(value: float, units: str) -> str:
    return f"{value * BOHR_IN_ANGSTROM:.3g} Å" if units == "angstrom" else f"{value:.3g} bohr"


def _and(items: Sequence[str]) -> str:
    return items[0] if len(items) == 1 else ", ".join(items[:-1]) + " and " + items[-1]


def nodal_text(nodes: NodalSurfaces, units: str, *, z_line: bool = False) -> str:
    """Return the nodal surfaces in words: planes, cones and spheres (with radii)."""
    parts = [_plane_name(n) for n in nodes.planes]
    cones = [t for t in nodes.cones if abs(t - math.pi / 2) > 1e-3]
    if any(abs(t - math.pi / 2) <= 1e-3 for t in nodes.cones):
        parts.append("the xy plane")
    if cones:
        angles = _and([f"{math.degrees(t):.1f}" for t in cones])
        parts.append(
            f"{_count(len(cones))} cone{'s' * (len(cones) > 1)} about the z axis at {angles} "
            "degrees from +z"
        )
    if nodes.spheres:
        radii = _and([_length(r, units) for r in nodes.spheres])
        parts.append(
            f"{_count(len(nodes.spheres))} sphere{'s' * (len(nodes.spheres) > 1)} at r = {radii}"
        )
    if z_line:
        parts.append("the z axis (a nodal line)")
    return f"Nodal surfaces: {_and(parts)}" if parts else "No nodal surfaces"


def _phase_words(state: State, colors: Sequence[str]) -> dict[str, str]:
    if not state.is_real:
        return {"surface": "One surface coloured by the phase of psi"}
    return {
        "positive": f"The psi > 0 part ({colors[0]})",
        "negative": f"The psi < 0 part ({colors[1]})",
        "surface": "",
    }


def _what(state: State) -> str:
    props = state.properties()
    if props.n is not None:
        form = "real" if props.form == "real" else "complex"
        return f"{state.label} ({form}, n = {props.n}, l = {props.l}, m = {props.m})"
    if "bond_distance_bohr" in props.extra:
        return f"{state.label}, a two-centre combination with nuclei on the z axis"
    return f"{state.label} (a superposition)"


def describe_panel(panel: Panel, units: str, colors: Sequence[str]) -> str:
    """One panel in words: the state, the fraction, its lobes by phase, its nodes and its size."""
    state, mesh = panel.state, panel.mesh
    found = [lobe for body in mesh.bodies for lobe in lobes(body)]
    words = _phase_words(state, colors)
    sentences = [
        f"{_what(state)}: the surface that encloses {100 * mesh.isovalue.fraction:g}% of the "
        "probability"
    ]
    for phase in ("positive", "negative", "surface"):
        mine = [x for x in found if x.phase == phase]
        if not mine:
            continue
        kinds = {"lobe": "lobe", "ring": "ring", "sphere": "body", "shell": "shell"}
        groups: dict[str, list[str]] = {}
        for x in mine:
            groups.setdefault(kinds[x.kind], []).append(x.where)
        text = "; ".join(
            f"{_count(len(w))} {k}{'s' * (len(w) > 1)}, {_and(sorted(w))}"
            for k, w in groups.items()
        )
        sentences.append(f"{words[phase]}: {text}" if words[phase] else text.capitalize())
    eig = state.eigenstate
    z_line = eig is not None and eig.form == "complex" and eig.m != 0
    nodes = state.nodal_surfaces()
    both = {"positive", "negative"} <= {x.phase for x in found}
    if both and not (nodes.spheres or nodes.planes or nodes.cones):
        # a superposition's nodal surface is in general curved (a hybrid's is one sheet
        # between its large and small lobe): there is no plane, cone or sphere to name
        sentences.append("The two phases meet at a curved nodal surface")
    else:
        sentences.append(nodal_text(nodes, units, z_line=z_line))
    reach = max(float(np.linalg.norm(b.vertices, axis=1).max()) for b in mesh.bodies)
    sentences.append(f"It reaches {_length(reach, units)} from the centre")
    return ". ".join(sentences) + "."


def colour_names(pair: ColorPair) -> list[str]:
    """Return the phase colours in words: the default pair by name, others as #RRGGBB."""
    from orbviz.surface.colors import DEFAULT_PAIR

    if pair == DEFAULT_PAIR:
        return ["dark blue", "yellow"]
    return ["#{:02X}{:02X}{:02X}".format(*c[:3]) for c in pair]


def describe_panels(fig: Figure) -> str:
    """Return every panel of the figure in words (without the title)."""
    colors, units = colour_names(fig.options.colors), fig.options.units
    texts = []
    for panel in fig.panels:
        if panel.members:
            names = ", ".join(m.state.label for m in panel.members)
            texts.append(
                f"The set {names} drawn together, each member's large lobe in its own colour, "
                "its small lobe in grey."
            )
        else:
            prefix = f"Panel {panel.label.split(' ')[0]} " if panel.label.startswith("(") else ""
            texts.append(prefix + _style_words(panel) + describe_panel(panel, units, colors))
    return " ".join(texts)


def _style_words(panel: Panel) -> str:
    """Say what is drawn when it is not the surface: dots, or a translucent density."""
    if panel.cloud is not None:
        return (
            f"{len(panel.cloud):,} dots, positions of the electron drawn at random with "
            "probability |psi|^2, in the phase colours; their shape follows "
        )
    if panel.volume is not None:
        return "A translucent glow of |psi|^2 in the phase colours; its shape follows "
    return ""


def describe_figure(fig: Figure) -> str:
    """Return the whole figure in words: each panel, and the title if there is one."""
    title = f"{fig.options.title}. " if fig.options.title else ""
    return title + describe_panels(fig)
