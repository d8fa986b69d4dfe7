"""Mirror parities and axes of symmetry of a state, found from its centres alone.

Every state is a sum of one-centre expansions on the z axis (:class:`orbviz.states.state.Centre`),
each a sum of real orbitals R_nl S_lm whose parities under x, y and z mirrors are known
(:func:`orbviz.states.angular.mirror_parity`). From those this module finds how psi behaves
under each mirror, and whether |psi|^2 has an axis of rotational symmetry.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence

import numpy as np

from orbviz.states.angular import mirror_parity
from orbviz.states.state import Centre

__all__ = ["combination_parity", "psi_parity", "symmetry_frame"]

Terms = Iterable[tuple[tuple[int, int, int], float]]


def combination_parity(terms: Terms) -> tuple[int, int, int]:
    """Parity on each axis of sum c R_nl S_lm over ((n, l, m), c), c real.

    +1 or -1 where every term with c != 0 agrees, 0 where they disagree; an empty sum is even.
    """
    terms = list(terms)
    out = []
    for axis in range(3):
        seen = {mirror_parity(l, m)[axis] for (_, l, m), c in terms if c != 0}
        out.append(seen.pop() if len(seen) == 1 else (0 if seen else 1))
    return out[0], out[1], out[2]


def _part(centre: Centre, imaginary: bool) -> list[tuple[tuple[int, int, int], float]]:
    return [(k, c.imag if imaginary else c.real) for k, c in centre.orbital.basis]


def _same_orbital(a: Centre, b: Centre) -> bool:
    return a.orbital.basis == b.orbital.basis and a.orbital.length_charge == b.orbital.length_charge


def psi_parity(centres: Sequence[Centre], *, imaginary: bool = False) -> tuple[int, int, int]:
    """Parity of the real (or imaginary) part of psi under x, y and z mirrors: +1, -1 or 0.

    Every centre lies on the z axis, so the x and y mirrors map each centre to itself: the
    parity is the common one of all terms. The z mirror maps a centre at z0 to -z0; psi has
    z parity p if every centre has a partner at -z0 carrying the same orbital, of own z parity
    q, with weight p q times its own.
    """
    terms = [(k, c * w.weight) for w in centres for k, c in _part(w, imaginary)]
    px, py, own_z = combination_parity(terms)
    if all(c.z == 0.0 for c in centres):
        return px, py, own_z
    pz = None
    for centre in centres:
        q = combination_parity(_part(centre, imaginary))[2]
        partners = [o for o in centres if o.z == -centre.z and _same_orbital(o, centre)]
        if q == 0 or not partners:
            return px, py, 0
        ratio = partners[0].weight / centre.weight if centre.weight else 0.0
        p = round(ratio * q)
        if abs(ratio * q - p) > 1e-12 or p not in (1, -1) or (pz is not None and p != pz):
            return px, py, 0
        pz = p
    return px, py, pz if pz is not None else 1


def symmetry_frame(centres: Sequence[Centre], *, is_real: bool) -> np.ndarray | None:
    """Return an orthonormal frame (columns e1, e2, axis) with |psi|^2 symmetric about its axis.

    None if there is no such axis to be found this way. Every term m = 0 on centres along z
    (about z), or, for one real centre at the origin, s and p terms whose p parts all point one
    way, as a hybrid's do: psi = sum R_ns(r) a_n + R_np(r) b_n (u . r_hat) about u.
    """
    if all(m == 0 for c in centres for (_, _, m), _ in c.orbital.basis):
        return np.eye(3)
    if len(centres) != 1 or centres[0].z != 0.0 or not is_real:
        return None
    orbital = centres[0].orbital
    if any(l > 1 for _, l in orbital.shells):
        return None
    axes = np.eye(3)
    vectors = [  # per p shell: (S at x_hat, y_hat, z_hat), the direction of its p part
        orbital.shell_angular(*axes)[(n, l)] for (n, l) in orbital.shells if l == 1
    ]
    vectors = [v for v in vectors if np.linalg.norm(v) > 0]
    if not vectors:
        return np.eye(3)
    u = vectors[0] / np.linalg.norm(vectors[0])
    if any(np.linalg.norm(np.cross(u, v)) > 1e-12 * np.linalg.norm(v) for v in vectors[1:]):
        return None
    helper = np.eye(3)[int(np.argmin(np.abs(u)))]
    e1 = np.cross(helper, u)
    e1 /= np.linalg.norm(e1)
    return np.column_stack([e1, np.cross(u, e1), u])
