"""The :class:`Orbital`: one hydrogen-like eigenstate or a normalised superposition of them.

It is the one-centre kind of :class:`orbviz.states.state.State`: eigenstates in real or complex
form, superpositions, hybrids, screened atoms (``Na:3s``) and states whose radial parts are solved
numerically in another central potential.
"""

from __future__ import annotations

import cmath
import math
from collections.abc import Iterable
from dataclasses import dataclass, field, replace
from typing import TYPE_CHECKING, Any

import numpy as np
import numpy.typing as npt

from orbviz._defaults import DEFAULTS, LIMITS
from orbviz.errors import ParameterError, SpecError
from orbviz.states.angular import label_of, solid_harmonic_real
from orbviz.states.atoms import screened_charge
from orbviz.states.radial import (
    check_charge,
    check_quantum_numbers,
    energy_hartree,
    radial_extent,
    radial_function,
    radial_node_radii,
)
from orbviz.states.spec import Atom, is_bond, parse_spec, split_element
from orbviz.states.state import Centre, NodalSurfaces, Properties

if TYPE_CHECKING:
    from orbviz.states.dynamics import Beat
    from orbviz.states.numerical import RadialSolution
    from orbviz.states.potentials import Potential

__all__ = ["Orbital"]

_SQRT_HALF = math.sqrt(0.5)


def _real_basis(atom: Atom) -> dict[tuple[int, int, int], complex]:
    """Expand one atom in the orthonormal real basis (n, l, m_real).

    Y_l^m = (-1)^m (S_m + i S_-m)/sqrt2 for m > 0, Y_l^-m = (S_m - i S_-m)/sqrt2, Y_l^0 = S_0,
    which inverts the definition of the real harmonics in :mod:`orbviz.states.angular`.
    """
    n, l, m, c = atom.n, atom.l, atom.m, atom.coefficient
    if atom.form == "real" or m == 0:
        return {(n, l, m): c}
    k = abs(m)
    if m > 0:
        s = (-1) ** k * _SQRT_HALF
        return {(n, l, k): c * s, (n, l, -k): c * s * 1j}
    return {(n, l, k): c * _SQRT_HALF, (n, l, -k): -1j * c * _SQRT_HALF}


def _normalised(
    merged: dict[tuple[int, int, int], complex], spec: str
) -> tuple[dict[tuple[int, int, int], complex], float, list[str]]:
    """Scale coefficients to unit norm (by the largest first, so no weight can overflow)."""
    if not all(cmath.isfinite(v) for v in merged.values()):
        raise SpecError(
            f"the weights of {spec!r} overflow when added (beyond 1.8e308); they are "
            "normalised anyway, so give smaller ones"
        )
    scale = max(max(abs(v.real), abs(v.imag)) for v in merged.values())  # abs() may overflow
    if scale == 0:
        raise SpecError(f"the superposition {spec!r} is zero: its weights are zero or cancel")
    scaled = {k: v / scale for k, v in merged.items()}
    norm = math.sqrt(sum(abs(v) ** 2 for v in scaled.values()))
    keep = {
        k: v / norm for k, v in sorted(scaled.items()) if abs(v) > DEFAULTS.coefficient_tolerance
    }
    notes = []
    given = norm * scale
    if abs(given - 1.0) > 1e-9:
        notes.append(f"weights normalised: their norm was {given:.6g}")
    return keep, given, notes


@dataclass(frozen=True)
class Orbital:
    """A normalised one-centre state: psi = sum_k b_k R_{n_k l_k}(r) S_{l_k m_k}(direction).

    Build one with :meth:`from_spec` or :meth:`from_atoms`; the coefficients are held in the
    orthonormal basis of real orbitals, so norms and overlaps are exact.

    Attributes
    ----------
    basis : tuple of ((n, l, m_real), complex)
        Normalised coefficients on real orbitals, sorted by (n, l, m).
    Z : float
        Nuclear charge (Slater's effective charge for a screened orbital).
    mass_ratio : float
        Reduced mass over electron mass (1.0: infinite nuclear mass, no correction).
    spec : str
        The text the orbital was made from.
    atoms : tuple of Atom
        The states as written (for labels and quantum numbers).
    given_norm : float
        Norm of the weights as written, before normalisation.
    notes : tuple of str
        Remarks for the user (normalisation applied, global phase removed).
    element : str or None
        For a screened orbital (``Na:3s``), the element whose Slater charge is ``Z``.
    potential : Potential or None
        A central potential other than -Z/r; its radial functions are solved numerically
        (:mod:`orbviz.states.numerical`), one solution per (n, l), kept in ``solutions``.

    Notes
    -----
    Phase convention: Condon-Shortley for the complex harmonics; real orbitals with the chemistry
    signs (px ~ +x, dxy ~ +xy). Units: bohr, hartree.
    """

    basis: tuple[tuple[tuple[int, int, int], complex], ...]
    Z: float = 1.0
    mass_ratio: float = 1.0
    spec: str = ""
    atoms: tuple[Atom, ...] = ()
    given_norm: float = 1.0
    notes: tuple[str, ...] = field(default=())
    element: str | None = None
    potential: Potential | None = None
    solutions: dict[tuple[int, int], RadialSolution] = field(
        default_factory=dict, compare=False, repr=False
    )

    def __repr__(self) -> str:
        extra = f", element={self.element!r}" if self.element else ""
        extra += f", potential={self.potential.describe()!r}" if self.potential else ""
        return f"Orbital({self.spec!r}, Z={self.Z:g}, terms={len(self.basis)}{extra})"

    # ----------------------------------------------------------------- construction

    def _repr_html_(self) -> str:
        """Show the state in a notebook as an interactive page (see :func:`orbviz.show`)."""
        from orbviz.pages.notebook import show

        return show(self)._repr_html_()

    def _repr_png_(self) -> bytes:
        """Show the state in a notebook as a still figure."""
        from orbviz.pages.notebook import show

        return show(self)._repr_png_()

    @classmethod
    def from_spec(
        cls,
        spec: str,
        /,
        *,
        Z: float | None = None,
        real: bool = False,
        mass_ratio: float = 1.0,
        potential: Potential | None = None,
    ) -> Orbital:
        """Parse one-centre spec text (see :mod:`orbviz.states.spec`) into a normalised orbital.

        Parameters
        ----------
        spec : str
            E.g. ``"3dz2"``, ``"4,2,-1"``, ``"0.5*2s + 0.866*2pz"``, ``"Na:3s"``.
        Z : float, optional
            Nuclear charge (default 1). Not with an element prefix, which sets it.
        real : bool, default: False
            Read ``n,l,m`` states as real combinations rather than Lz eigenstates.
        mass_ratio : float, default: 1.0
            Reduced mass over electron mass.
        potential : Potential, optional
            Solve the radial functions numerically in this potential instead of -Z/r.

        Raises
        ------
        SpecError
            For text outside the grammar, or a two-centre ``bond(...)``, which is not one
            orbital (``orbviz.state`` builds every kind).
        """
        if is_bond(spec):
            raise SpecError(
                f"{spec!r} is a two-centre combination, not a one-centre Orbital: "
                "use orbviz.state(...) for every kind of state"
            )
        symbol, body = split_element(spec)
        atoms = parse_spec(body)
        if real:
            atoms = [Atom(a.n, a.l, a.m, "real", a.coefficient) for a in atoms]
        text = spec.strip()
        if symbol is None:
            orbital = cls.from_atoms(
                atoms, Z=1.0 if Z is None else Z, mass_ratio=mass_ratio, spec=text
            )
            return orbital if potential is None else orbital.in_potential(potential)
        if potential is not None:
            raise SpecError(f"{text!r}: an element prefix and a potential cannot be combined")
        if Z is not None:
            raise SpecError(f"{text!r}: the element prefix sets the charge; leave out Z")
        for a in atoms:
            check_quantum_numbers(a.n, a.l, a.m)
        name, charge, note = screened_charge(symbol, [(a.n, a.l) for a in atoms], text)
        orbital = cls.from_atoms(atoms, Z=charge, mass_ratio=mass_ratio, spec=text)
        return replace(orbital, element=name, notes=(note, *orbital.notes))

    @classmethod
    def from_atoms(
        cls, atoms: Iterable[Atom], /, *, Z: float = 1.0, mass_ratio: float = 1.0, spec: str = ""
    ) -> Orbital:
        """Normalise weighted states into an orbital; see :meth:`from_spec`."""
        Z = check_charge(Z)
        if not (math.isfinite(mass_ratio) and 0 < mass_ratio <= 1):
            raise ParameterError(f"mass ratio must be in (0, 1], got {mass_ratio}")
        atoms = tuple(atoms)
        if not atoms:
            raise SpecError("an orbital needs at least one state")
        merged: dict[tuple[int, int, int], complex] = {}
        for atom in atoms:
            check_quantum_numbers(atom.n, atom.l, atom.m)
            for key, value in _real_basis(atom).items():
                merged[key] = merged.get(key, 0j) + value
        if len(merged) > LIMITS.terms_max:
            raise SpecError(
                f"{spec!r} has {len(merged)} distinct states; at most {LIMITS.terms_max} are "
                "supported in one superposition"
            )
        keep, given, notes = _normalised(merged, spec)
        values = np.array(list(keep.values()))
        if np.any(np.abs(values.imag) > 1e-12):
            big = values[np.argmax(np.abs(values))]
            turn = cmath.exp(-1j * cmath.phase(big))
            if np.all(np.abs((values * turn).imag) < 1e-12):
                keep = {k: complex((v * turn).real) for k, v in keep.items()}
                notes.append(f"global phase {cmath.phase(big):+.6g} rad removed: the state is real")
        basis = tuple((k, complex(v)) for k, v in keep.items())
        return cls(basis, Z, float(mass_ratio), spec, atoms, given, tuple(notes))

    def in_potential(self, potential: Potential) -> Orbital:
        """Return the same state with radial functions solved numerically in ``potential``."""
        from orbviz.states.numerical import solve_radial

        solutions = {(n, l): solve_radial(potential, n, l) for n, l in self.shells}
        note = f"radial functions solved numerically in {potential.describe()}"
        return replace(self, potential=potential, solutions=solutions, notes=(*self.notes, note))

    # ----------------------------------------------------------------- what it is
    @property
    def length_charge(self) -> float:
        """Charge that sets the length scale: Z times the mass ratio (a_mu = a0 / mass_ratio)."""
        return self.Z * self.mass_ratio

    @property
    def is_real(self) -> bool:
        """True if psi is real valued (after removing any global phase)."""
        return all(abs(c.imag) == 0.0 for _, c in self.basis)

    @property
    def shells(self) -> list[tuple[int, int]]:
        """Sorted distinct (n, l) present."""
        return sorted({(n, l) for (n, l, _), _ in self.basis})

    @property
    def centres(self) -> tuple[Centre, ...]:
        """One centre, at the origin."""
        return (Centre(0.0, 1.0, self),)

    @property
    def eigenstate(self) -> Atom | None:
        """The single state this orbital is (form and m as written), or None for a superposition."""
        distinct = {(a.n, a.l, a.m, a.form) for a in self.atoms}
        if len(distinct) != 1:
            return None
        return self.atoms[0]

    @property
    def kind(self) -> str:
        """In words: eigenstate, superposition, screened orbital or numerical solution."""
        what = "eigenstate" if self.eigenstate is not None else "superposition"
        if self.element:
            return f"screened {what} of {self.element}"
        if self.potential is not None:
            return f"{what} in {self.potential.describe()}"
        return what

    @property
    def label(self) -> str:
        """A short readable name: the chemistry label of an eigenstate, else the spec text."""
        state = self.eigenstate
        if state is None:
            return self.spec
        label = label_of(state.n, state.l, state.m, real=state.form == "real")
        return f"{self.element}:{label}" if self.element else label

    @property
    def energy_hartree(self) -> float:
        """Energy, or its expectation value for a superposition of different n (hartree)."""
        return sum(abs(c) ** 2 * self.shell_energy(n, l) for (n, l, _), c in self.basis)

    @property
    def is_energy_eigenstate(self) -> bool:
        """True if every component has the same energy (degenerate states only)."""
        if self.potential is not None:
            return len(self.shells) == 1
        return len({n for (n, _, _), _ in self.basis}) == 1

    # ----------------------------------------------------------------- evaluation
    def shell_angular(
        self, x: npt.ArrayLike, y: npt.ArrayLike, z: npt.ArrayLike
    ) -> dict[tuple[int, int], np.ndarray]:
        """Per shell (n, l): sum_m b_m S_lm at the points (solid harmonics, r^l included)."""
        out: dict[tuple[int, int], np.ndarray] = {}
        real = self.is_real
        for (n, l, m), c in self.basis:
            part = solid_harmonic_real(l, m, x, y, z)
            term = part * (c.real if real else c)
            out[(n, l)] = out[(n, l)] + term if (n, l) in out else term
        return out

    def psi(
        self,
        x: npt.ArrayLike,
        y: npt.ArrayLike,
        z: npt.ArrayLike,
        *,
        dtype: npt.DTypeLike | None = None,
    ) -> np.ndarray:
        """Wavefunction at Cartesian points (bohr).

        Parameters
        ----------
        x, y, z : array_like
            Coordinates in bohr, broadcast together; the nucleus is at the origin.
        dtype : dtype, optional
            float32 or float64 working precision; by default that of the inputs (at least
            float32).

        Returns
        -------
        ndarray
            psi in bohr^(-3/2): real for a real orbital, complex otherwise.
        """
        arrays = np.broadcast_arrays(np.asarray(x), np.asarray(y), np.asarray(z))
        work = np.dtype(dtype) if dtype is not None else np.result_type(*arrays, np.float32)
        x, y, z = (a.astype(work, copy=False) for a in arrays)
        r = np.sqrt(x * x + y * y + z * z)
        # R(r) times the harmonic on unit vectors: no r^l, which overflows at high l and large r
        safe = np.where(r > 0, r, work.type(1))
        directions = (x / safe, y / safe, z / safe)
        total: np.ndarray | None = None
        for (n, l), angular in self.shell_angular(*directions).items():
            term = self.radial(n, l, r).astype(work, copy=False) * angular
            total = term if total is None else total + term
        assert total is not None  # an orbital has at least one term
        return total

    def density(self, x: npt.ArrayLike, y: npt.ArrayLike, z: npt.ArrayLike) -> np.ndarray:
        """Probability density |psi|^2 (bohr^-3) at Cartesian points."""
        value = self.psi(x, y, z)
        return value * value if self.is_real else (value.real**2 + value.imag**2)

    def radial(self, n: int, l: int, r: npt.ArrayLike) -> np.ndarray:
        """R_nl(r): closed form at this orbital's charge and mass ratio, or the numerical one."""
        if self.potential is not None:
            return self.solutions[(n, l)].radial(np.asarray(r, dtype=np.float64))
        return radial_function(n, l, r, Z=self.length_charge)

    def radial_distribution(self, r: npt.ArrayLike) -> np.ndarray:
        """Radial probability density r^2 times the integral of |psi|^2 over directions (1/bohr).

        The real angular basis is orthonormal, so this is r^2 sum_(l,m) |sum_n b_nlm R_nl(r)|^2.
        """
        r = np.asarray(r, dtype=np.float64)
        groups: dict[tuple[int, int], Any] = {}
        for (n, l, m), c in self.basis:
            groups[(l, m)] = groups.get((l, m), 0) + c * self.radial(n, l, r)
        return r * r * sum(np.abs(g) ** 2 for g in groups.values())

    # ----------------------------------------------------------------- extent
    def radial_extent(self, n: int, l: int, tail: float = 1e-13) -> float:
        """Return a radius (bohr) beyond which less than ``tail`` of the shell's probability is."""
        if self.potential is None:
            return radial_extent(n, l, Z=self.length_charge, tail=tail)
        s = self.solutions[(n, l)]
        h = math.log(s.r[1] / s.r[0])
        outside = np.cumsum((s.R**2 * s.r**3 * h)[::-1])[::-1]
        beyond = np.flatnonzero(outside < tail)
        return float(s.r[beyond[0]]) if beyond.size else float(s.r[-1])

    def extent(self, tail: float = 1e-13) -> float:
        """Radius beyond which less than ``tail`` of every shell's probability lies (bohr)."""
        return max(self.radial_extent(n, l, tail) for n, l in self.shells)

    def radial_quantile(self, q: float) -> float:
        """Radius (bohr) inside which the fraction ``q`` of the probability lies."""
        r_max = self.extent()
        u = np.linspace(0.0, 1.0, 20001)
        r = r_max * u * u
        p = self.radial_distribution(r) * 2.0 * r_max * u
        cumulative = np.concatenate([[0.0], np.cumsum(0.5 * (p[1:] + p[:-1]) * np.diff(u))])
        return float(np.interp(q * cumulative[-1], cumulative, r))

    # ----------------------------------------------------------------- physics
    def shell_energy(self, n: int, l: int) -> float:
        """Energy of the (n, l) shell in hartree (Slater's -Z_eff^2/2n*^2 for a screened atom)."""
        if self.potential is not None:
            return self.solutions[(n, l)].energy
        if self.element is not None:  # a screened atom: Slater's rule, with his n*
            from orbviz.states.atoms import slater_energy

            return slater_energy(n, self.Z, self.mass_ratio)
        return energy_hartree(n, Z=self.Z, mass_ratio=self.mass_ratio)

    def shell_error(self, n: int, l: int) -> float:
        """Estimated error of the shell's energy, hartree (0 for a closed form)."""
        return self.solutions[(n, l)].error if self.potential is not None else 0.0

    def node_radii(self, n: int, l: int) -> np.ndarray:
        """Radial node radii (bohr): closed form, or sign changes of the numerical R."""
        if self.potential is None:
            return radial_node_radii(n, l, Z=self.length_charge)
        return self.solutions[(n, l)].node_radii()

    def properties(self) -> Properties:
        """Energy, degeneracy, nodes and radii (see :mod:`orbviz.states.properties`)."""
        from orbviz.states.properties import orbital_properties

        return orbital_properties(self)

    def nodal_surfaces(self) -> NodalSurfaces:
        """Radial node spheres (one shell) and an eigenstate's angular nodal planes and cones."""
        from orbviz.states.properties import orbital_nodes

        return orbital_nodes(self)

    def evolve(self, t: float) -> Orbital:
        """Return the state at time t (atomic units): each component turned by exp(-i E t)."""
        from orbviz.states.dynamics import evolve

        return evolve(self, t)

    def beat(self) -> Beat:
        """Return the period of the moving density (:func:`orbviz.states.dynamics.beat_period`)."""
        from orbviz.states.dynamics import beat_period

        return beat_period(self)
