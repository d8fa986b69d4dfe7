"""Spec text and physics options into a state of the right kind, or the members of a set."""

from __future__ import annotations

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

__all__ = ["make_state", "make_states", "set_members"]


def _potential(physics: Physics, spec: str) -> Potential | None:
    if physics.potential is None:
        return None
    if split_element(spec)[0] is not None:
        raise SpecError(f"{spec!r}: an element prefix and a potential cannot be combined")
    return parse_potential(physics.potential, Z=1.0 if physics.Z is None else physics.Z)


def set_members(spec: str) -> list[str] | None:
    """Return the member specs of a set named without an index (``2sp3``), or None."""
    return hybrid_set(spec)


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
            f"{spec.strip()!r} names the set of {len(members)} hybrids {members[0]} to "
            f"{members[-1]}; name one of them, or use render or model, which draw the whole set"
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
