"""Spec text and physics options into a state of the right kind, or the members of a set.

A set is named without picking a member: a hybrid set (``2sp3``: its four hybrids) or a
subshell (``3d``: the five real 3d orbitals; ``C:2p``: carbon's three 2p orbitals).
"""

from __future__ import annotations

import re
from typing import TYPE_CHECKING

from orbviz.errors import SpecError
from orbviz.states.bond import Bond
from orbviz.states.hybrids import hybrid_set
from orbviz.states.orbital import Orbital
from orbviz.states.potentials import Potential, parse_potential
from orbviz.states.spec import is_bond, parse_bond, split_element
from orbviz.states.state import State

if TYPE_CHECKING:
    from orbviz.states.physics import Physics

__all__ = ["make_state", "make_states", "oriented_set", "set_members"]

_SUBSHELL = re.compile(r"\s*(?:([A-Za-z]{1,2})\s*:\s*)?(\d+)\s*([pdf])\s*$", re.I)
# the real orbitals of a subshell, in the order textbooks draw them
_MEMBERS = {
    "p": ["px", "py", "pz"],
    "d": ["dxy", "dxz", "dyz", "dx2-y2", "dz2"],
    "f": ["fz3", "fxz2", "fyz2", "fxyz", "fz(x2-y2)", "fx(x2-3y2)", "fy(3x2-y2)"],
}


def _potential(physics: Physics, spec: str) -> Potential | None:
    if physics.potential is None:
        return None
    if split_element(spec)[0] is not None:
        raise SpecError(f"{spec!r}: an element prefix and a potential cannot be combined")
    return parse_potential(physics.potential, Z=1.0 if physics.Z is None else physics.Z)


def set_members(spec: str) -> list[str] | None:
    """Return the member specs of a set (``2sp3``, ``3d``, ``C:2p``), or None for one state."""
    if not isinstance(spec, str):
        return None
    hybrids = hybrid_set(spec)
    if hybrids is not None:
        return hybrids
    match = _SUBSHELL.fullmatch(spec)
    if match is None:
        return None
    element, n, letter = match.group(1), match.group(2), match.group(3).lower()
    prefix = f"{element}:" if element else ""
    return [f"{prefix}{n}{label}" for label in _MEMBERS[letter]]


def oriented_set(spec: str) -> bool:
    """Tell whether spec text names a set whose members differ by orientation (all sets do)."""
    return set_members(spec) is not None


def make_state(spec: str, physics: Physics, /) -> State:
    """Make the one state ``spec`` names.

    Parameters
    ----------
    spec : str
        Spec text (:mod:`orbviz.states.spec`), a ``bond(...)`` among them.
    physics : Physics
        Charge, real forms, nuclear mass and potential.

    Raises
    ------
    SpecError
        For text outside the grammar, or a set (``2sp3``), which names several states.
    """
    if not isinstance(spec, str):
        raise SpecError(f"an orbital spec must be text, got {type(spec).__name__}")
    members = set_members(spec)
    if members is not None:
        raise SpecError(
            f"{spec.strip()!r} names the set of {len(members)} orbitals {members[0]} to "
            f"{members[-1]}; name one of them (render, plot and info take the whole set)"
        )
    ratio = physics.mass_ratio(spec)
    potential = _potential(physics, spec)
    if not is_bond(spec):
        return Orbital.from_spec(
            spec,
            Z=None if potential is not None else physics.Z,
            real=physics.real,
            mass_ratio=ratio,
            potential=potential,
        )
    if physics.real:
        raise SpecError("real forms apply to n,l,m states; bond(...) takes real labels already")
    parts = parse_bond(spec)
    orbitals = [
        Orbital.from_spec(
            text,
            Z=None if potential is not None else physics.Z,
            mass_ratio=ratio,
            potential=potential,
        )
        for text in (parts.first, parts.second)
    ]
    return Bond.combine(orbitals[0], orbitals[1], parts.distance, parts.sign, spec)


def make_states(spec: str, physics: Physics, /) -> list[State]:
    """Return the states of a set (``2sp3``: its four hybrids), or the one ``spec`` names."""
    members = set_members(spec) if isinstance(spec, str) else None
    return [make_state(s, physics) for s in members or [spec]]
