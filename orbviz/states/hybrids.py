"""Named hybrid orbitals as superpositions of real orbitals of one shell, in standard orientations.

``2sp3[1]`` is the first sp3 hybrid built from 2s and 2p (any n; the d hybrids need n >= 3).
Coefficients are the textbook ones (e.g. F. A. Cotton, *Chemical Applications of Group
Theory*, 3rd ed., 1990, ch. 8, from memory; the tests check orthonormality and the bond angles):

- sp: two hybrids along +z and -z.
- sp2: three in the xy plane, the first along +x, then at 120 degrees.
- sp3: four tetrahedral hybrids along (1,1,1), (1,-1,-1), (-1,1,-1), (-1,-1,1).
- sp3d: trigonal bipyramid, three equatorial sp2 hybrids in the xy plane and two axial ones,
  (pz +- dz2)/sqrt2.
- sp3d2: octahedral, along +z, -z, +x, -x, +y, -y.

Phase: the hydrogen-like R_nl are positive near the nucleus, and their outermost lobe has sign
(-1)^(n-l-1). So ns, np and nd alternate in sign out where the isosurface lies, and a hybrid
made of them as they stand would point its large lobe the wrong way. Each orbital is therefore
taken with its outer lobe positive, times (-1)^(n-l-1). Then every hybrid's large, positive
lobe points along its named direction, as textbooks draw them with nodeless s functions.
"""

from __future__ import annotations

import math
import re

__all__ = ["HYBRIDS", "hybrid_set", "hybrid_terms"]

_SET = re.compile(r"\s*(\d+)\s*(sp3d2|sp3d|sp3|sp2|sp)\s*$", re.I)

_R2, _R3, _R6 = math.sqrt(2.0), math.sqrt(3.0), math.sqrt(6.0)
_SP2 = [
    {"s": 1 / _R3, "px": _R2 / _R3},
    {"s": 1 / _R3, "px": -1 / _R6, "py": 1 / _R2},
    {"s": 1 / _R3, "px": -1 / _R6, "py": -1 / _R2},
]
HYBRIDS: dict[str, list[dict[str, float]]] = {
    "sp": [{"s": 1 / _R2, "pz": 1 / _R2}, {"s": 1 / _R2, "pz": -1 / _R2}],
    "sp2": _SP2,
    "sp3": [
        {"s": 0.5, "px": 0.5, "py": 0.5, "pz": 0.5},
        {"s": 0.5, "px": 0.5, "py": -0.5, "pz": -0.5},
        {"s": 0.5, "px": -0.5, "py": 0.5, "pz": -0.5},
        {"s": 0.5, "px": -0.5, "py": -0.5, "pz": 0.5},
    ],
    "sp3d": [*_SP2, {"pz": 1 / _R2, "dz2": 1 / _R2}, {"pz": -1 / _R2, "dz2": 1 / _R2}],
    "sp3d2": [
        {"s": 1 / _R6, "pz": 1 / _R2, "dz2": 1 / _R3},
        {"s": 1 / _R6, "pz": -1 / _R2, "dz2": 1 / _R3},
        {"s": 1 / _R6, "px": 1 / _R2, "dz2": -1 / (2 * _R3), "dx2-y2": 0.5},
        {"s": 1 / _R6, "px": -1 / _R2, "dz2": -1 / (2 * _R3), "dx2-y2": 0.5},
        {"s": 1 / _R6, "py": 1 / _R2, "dz2": -1 / (2 * _R3), "dx2-y2": -0.5},
        {"s": 1 / _R6, "py": -1 / _R2, "dz2": -1 / (2 * _R3), "dx2-y2": -0.5},
    ],
}


def hybrid_terms(n: int, name: str, index: int) -> list[tuple[int, int, float]]:
    """Return the (l, m, coefficient) real-orbital terms of hybrid ``name[index]`` in shell n.

    ``index`` counts from 1. Each orbital is taken with its outer lobe positive, the sign
    (-1)^(n - l - 1), so the large lobe points along the named direction.
    """
    from orbviz.errors import SpecError

    members = HYBRIDS[name]
    if not 1 <= index <= len(members):
        raise SpecError(f"{name} has hybrids [1] to [{len(members)}], got [{index}]")
    if "d" in name and n < 3:
        raise SpecError(f"{n}{name}[{index}] needs d orbitals of the same shell: use n >= 3")
    from orbviz.states.angular import LABELS

    out = []
    for label, coef in members[index - 1].items():
        l, m = LABELS[label]
        out.append((l, m, coef * (-1) ** (n - l - 1)))  # outer lobe positive
    return out


def hybrid_set(spec: str) -> list[str] | None:
    """``"2sp3"`` -> the member specs ``["2sp3[1]", ..., "2sp3[4]"]``; None if not a set name."""
    match = _SET.fullmatch(spec) if isinstance(spec, str) else None
    if match is None:
        return None
    n, name = int(match.group(1)), match.group(2).lower()
    return [f"{n}{name}[{k}]" for k in range(1, len(HYBRIDS[name]) + 1)]
