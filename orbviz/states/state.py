"""The one interface every kind of state offers downstream: :class:`State`.

Every kind (a hydrogen-like eigenstate or superposition, a hybrid, a screened atom's orbital, a
numerically solved radial part, a two-centre combination) answers the same questions. Where a
kind has no answer (a bond has no single radial distribution, no energies to evolve), the method
raises :class:`orbviz.errors.Unsupported` with one line that says what works instead. Code
downstream never asks which kind it holds.

A state is a weighted sum of one-centre expansions placed on the z axis (:class:`Centre`): one at
the origin for an orbital, two for a bond. The level, field and sampling stages work from that.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any, Protocol

import numpy as np
import numpy.typing as npt

if TYPE_CHECKING:
    from orbviz.states.dynamics import Beat
    from orbviz.states.orbital import Orbital
    from orbviz.states.spec import Atom

__all__ = ["Centre", "NodalSurfaces", "Properties", "State"]


@dataclass(frozen=True)
class Centre:
    """One centre of a state: a one-centre orbital at (0, 0, z), with a real weight.

    Attributes
    ----------
    z : float
        Position of the centre on the z axis, bohr.
    weight : float
        Coefficient of the orbital in the state.
    orbital : Orbital
        The one-centre expansion (its own nucleus at its origin).
    """

    z: float
    weight: float
    orbital: Orbital


@dataclass(frozen=True)
class NodalSurfaces:
    """Nodal surfaces a figure can draw, about the origin.

    Attributes
    ----------
    spheres : tuple of float
        Radii of radial nodes, bohr.
    planes : tuple of (3,) tuple
        Unit normals of nodal planes through the origin.
    cones : tuple of float
        Polar angles (radians) of nodal cones about z; pi/2 is the xy plane.
    """

    spheres: tuple[float, ...] = ()
    planes: tuple[tuple[float, float, float], ...] = ()
    cones: tuple[float, ...] = ()


@dataclass(frozen=True)
class Properties:
    """The physical numbers a state reports; None where the kind has no such number.

    Attributes
    ----------
    form : {"real", "complex"}
        Whether psi is real valued.
    n, l, m : int or None
        Quantum numbers of an eigenstate (m the real index for a real form).
    energy_hartree : float or None
        Energy, or its expectation value for a superposition.
    degeneracy : int or None
        States of the energy level, spin not counted (an energy eigenstate only).
    radial_nodes, angular_nodes : int or None
        Counts for an eigenstate.
    radial_node_radii : tuple of float or None
        One-shell states, bohr.
    mean_radius, most_probable_radius : float or None
        <r> and the maximum of the radial distribution, bohr.
    extra : dict
        Kind-specific numbers (a bond's distance, overlap and normalisation).
    """

    form: str
    n: int | None = None
    l: int | None = None
    m: int | None = None
    energy_hartree: float | None = None
    degeneracy: int | None = None
    radial_nodes: int | None = None
    angular_nodes: int | None = None
    radial_node_radii: tuple[float, ...] | None = None
    mean_radius: float | None = None
    most_probable_radius: float | None = None
    extra: dict[str, Any] = field(default_factory=dict)


class State(Protocol):
    """What every kind of state can be asked (units: bohr, hartree)."""

    @property
    def spec(self) -> str:
        """The text the state was made from."""
        ...

    @property
    def label(self) -> str:
        """A short readable name (the chemistry label of an eigenstate, else the spec)."""
        ...

    @property
    def kind(self) -> str:
        """What kind of state this is, in words ("eigenstate", "two-centre combination")."""
        ...

    @property
    def notes(self) -> tuple[str, ...]:
        """Remarks for the user (normalisation applied, screening used)."""
        ...

    @property
    def is_real(self) -> bool:
        """True if psi is real valued."""
        ...

    @property
    def eigenstate(self) -> Atom | None:
        """The single state it is (form and m as written), or None."""
        ...

    @property
    def shells(self) -> list[tuple[int, int]]:
        """Distinct (n, l) about the origin; empty unless one centre sits at the origin."""
        ...

    @property
    def centres(self) -> tuple[Centre, ...]:
        """The one-centre expansions it sums, on the z axis."""
        ...

    def psi(
        self,
        x: npt.ArrayLike,
        y: npt.ArrayLike,
        z: npt.ArrayLike,
        *,
        dtype: npt.DTypeLike | None = None,
    ) -> np.ndarray:
        """Psi at Cartesian points (bohr); float32 stays float32."""
        ...

    def density(self, x: npt.ArrayLike, y: npt.ArrayLike, z: npt.ArrayLike) -> np.ndarray:
        """|psi|^2 (bohr^-3) at Cartesian points."""
        ...

    def extent(self, tail: float = 1e-13) -> float:
        """Radius about the origin beyond which less than ``tail`` of the probability lies."""
        ...

    def radial_quantile(self, q: float) -> float:
        """Radius of a sphere about the origin that holds at least ``q`` of the probability."""
        ...

    def radial_distribution(self, r: npt.ArrayLike) -> np.ndarray:
        """r^2 times the angular integral of |psi|^2 about the origin (1/bohr)."""
        ...

    def properties(self) -> Properties:
        """Return the physical numbers of the state."""
        ...

    def nodal_surfaces(self) -> NodalSurfaces:
        """Nodal surfaces a figure can draw."""
        ...

    def evolve(self, t: float) -> State:
        """Return the state at time t (atomic units)."""
        ...

    def beat(self) -> Beat:
        """Return the period of its moving density."""
        ...
