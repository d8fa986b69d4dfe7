"""The :class:`Orbital`: one hydrogen-like eigenstate or a normalised superposition of them."""

from __future__ import annotations

import cmath
import math
import re
from collections.abc import Iterable
from dataclasses import dataclass, field, replace

import numpy as np
import numpy.typing as npt

from orbviz._defaults import DEFAULTS
from orbviz.errors import ParameterError, SpecError
from orbviz.states.angular import label_of, solid_harmonic_real
from orbviz.states.radial import (
    check_charge,
    check_quantum_numbers,
    energy_hartree,
    radial_extent,
    radial_function,
    radial_function_reduced,
    radial_node_radii,
)
from orbviz.states.spec import Atom, parse_spec

__all__ = ["Orbital", "proton_mass_ratio"]

_SQRT_HALF = math.sqrt(0.5)
_ELEMENT_PREFIX = re.compile(r"\s*([A-Za-z]{1,2})\s*:(.*)$", re.S)
_BARE_SHELL = re.compile(r"(?<![\d,.])(\d+)([pdfPDF])(?![a-zA-Z0-9(])")
_M0_LABEL = {"p": "z", "d": "z2", "f": "z3"}


def proton_mass_ratio() -> float:
    """Reduced mass over electron mass for hydrogen, 1 / (1 + m_e/m_p), from CODATA (scipy)."""
    from scipy.constants import physical_constants

    return 1.0 / (1.0 + 1.0 / physical_constants["proton-electron mass ratio"][0])


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


@dataclass(frozen=True)
class Orbital:
    """A normalised hydrogen-like state: psi = sum_k b_k R_{n_k l_k}(r) S_{l_k m_k}(direction).

    Build one with :meth:`from_spec` or :meth:`from_atoms`; the coefficients are held in the
    orthonormal basis of real orbitals, so norms and overlaps are exact.

    Attributes
    ----------
    basis : tuple of ((n, l, m_real), complex)
        Normalised coefficients on real orbitals, sorted by (n, l, m).
    Z : float
        Nuclear charge.
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
    potential : orbviz.states.potentials.Potential or None
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
    potential: object = None
    solutions: dict = field(default_factory=dict, compare=False, repr=False)

    # ----------------------------------------------------------------- construction
    @classmethod
    def from_spec(
        cls,
        spec: str,
        /,
        *,
        Z: float | None = None,
        real: bool = False,
        mass_ratio: float = 1.0,
        potential=None,
    ) -> Orbital:
        """Parse spec text (see :mod:`orbviz.states.spec`) into a normalised orbital.

        Parameters
        ----------
        spec : str
            E.g. ``"3dz2"``, ``"4,2,-1"``, ``"0.5*2s + 0.866*2pz"``.
        Z : float, optional
            Nuclear charge, > 0 (default 1). Not with an element prefix, which sets it.
        real : bool, default: False
            Read ``n,l,m`` states as real combinations rather than Lz eigenstates.
        mass_ratio : float, default: 1.0
            Reduced mass over electron mass; see :func:`proton_mass_ratio`.
        potential : orbviz.states.potentials.Potential, optional
            Solve the radial functions numerically in this potential instead of -Z/r.
        """
        if isinstance(spec, str) and spec.lstrip().lower().startswith("bond"):
            from orbviz.states.bond import parse_bond

            bond = parse_bond(spec, Z=Z)
            if bond is None:
                raise SpecError(f"bond needs the form bond(1s,1s,R=2.0,+), got {spec!r}")
            return bond
        prefix = _ELEMENT_PREFIX.match(spec) if isinstance(spec, str) else None
        shorthand = []
        if prefix:  # with an element, a bare shell (C:2p, Fe:3d) means its m = 0 member
            text = _BARE_SHELL.sub(
                lambda m: (
                    shorthand.append(m.group(0)) or m.group(0) + _M0_LABEL[m.group(2).lower()]
                ),
                prefix.group(2),
            )
            atoms = parse_spec(text)
        else:
            atoms = parse_spec(spec)
        if real:
            atoms = [Atom(a.n, a.l, a.m, "real", a.coefficient) for a in atoms]
        if prefix is None:
            orbital = cls.from_atoms(
                atoms, Z=1.0 if Z is None else Z, mass_ratio=mass_ratio, spec=spec.strip()
            )
            return orbital if potential is None else orbital.in_potential(potential)
        if potential is not None:
            raise SpecError(f"{spec!r}: an element prefix and a potential cannot be combined")
        orbital = cls._screened(prefix.group(1), atoms, Z, mass_ratio, spec.strip())
        if shorthand:
            note = (
                f"{', '.join(shorthand)} taken as the m = 0 real orbital; name a component "
                "(e.g. 2px, 3dxy) for another"
            )
            orbital = replace(orbital, notes=(*orbital.notes, note))
        return orbital

    @classmethod
    def _screened(cls, symbol: str, atoms, Z, mass_ratio: float, spec: str) -> Orbital:
        """Build a hydrogen-like orbital with Slater's effective charge (orbviz.states.atoms)."""
        from orbviz.states.atoms import SYMBOLS, configuration_text, element, slater_charge

        if Z is not None:
            raise SpecError(f"{spec!r}: the element prefix sets the charge; leave out Z")
        nucleus = element(symbol)
        name = SYMBOLS[nucleus - 1]
        for a in atoms:
            check_quantum_numbers(a.n, a.l, a.m)
        charges = {(a.n, a.l): slater_charge(nucleus, a.n, a.l) for a in atoms}
        if len(set(charges.values())) != 1:
            listed = ", ".join(f"{n}{'spdf'[l]}: {c:.2f}" for (n, l), c in charges.items())
            raise SpecError(
                f"{spec!r} mixes electrons with different Slater charges ({listed}); "
                "name states of one Slater group"
            )
        charge = next(iter(charges.values()))
        orbital = cls.from_atoms(atoms, Z=charge, mass_ratio=mass_ratio, spec=spec)
        note = (
            f"screened hydrogen-like orbital of {name} (Z = {nucleus}, "
            f"{configuration_text(nucleus)}): Slater's Z_eff = {charge:.2f}; its energy "
            "-Z_eff^2/2n^2 is a rough estimate"
        )
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
        norm = math.sqrt(sum(abs(v) ** 2 for v in merged.values()))
        scale = max(abs(v) for v in merged.values())
        if norm == 0 or norm < 1e-12 * max(abs(a.coefficient) for a in atoms):
            raise SpecError(f"the superposition {spec!r} is zero: its terms cancel")
        keep = {
            k: v / norm
            for k, v in sorted(merged.items())
            if abs(v) > DEFAULTS.coefficient_tolerance * scale
        }
        notes = []
        if abs(norm - 1.0) > 1e-9:
            notes.append(f"weights normalised: their norm was {norm:.6g}")
        values = np.array(list(keep.values()))
        if np.any(np.abs(values.imag) > 1e-12):
            big = values[np.argmax(np.abs(values))]
            turn = cmath.exp(-1j * cmath.phase(big))
            if np.all(np.abs((values * turn).imag) < 1e-12):
                keep = {k: complex((v * turn).real) for k, v in keep.items()}
                notes.append(f"global phase {cmath.phase(big):+.6g} rad removed: the state is real")
        basis = tuple((k, complex(v)) for k, v in keep.items())
        return cls(basis, Z, float(mass_ratio), spec, atoms, norm, tuple(notes))

    # ----------------------------------------------------------------- properties
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
    def eigenstate(self) -> Atom | None:
        """The single state this orbital is (form and m as written), or None for a superposition."""
        distinct = {(a.n, a.l, a.m, a.form) for a in self.atoms}
        if len(distinct) != 1:
            return None
        return self.atoms[0]

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
        for (n, l, m), c in self.basis:
            part = solid_harmonic_real(l, m, x, y, z)
            term = part * (c if not self.is_real else c.real)
            out[(n, l)] = out[(n, l)] + term if (n, l) in out else term
        return out

    def psi(
        self, x: npt.ArrayLike, y: npt.ArrayLike, z: npt.ArrayLike, *, dtype: npt.DTypeLike = None
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
        total = None
        for (n, l), angular in self.shell_angular(x, y, z).items():
            if self.potential is not None:  # R / r^l from the numerical solution
                with np.errstate(divide="ignore", invalid="ignore"):
                    radial = (self.radial(n, l, r) / np.where(r > 0, r, 1.0) ** l).astype(work)
            else:
                radial = radial_function_reduced(n, l, r, Z=self.length_charge, dtype=work)
            term = radial * angular
            total = term if total is None else total + term
        return total

    def density(self, x: npt.ArrayLike, y: npt.ArrayLike, z: npt.ArrayLike) -> np.ndarray:
        """Probability density |psi|^2 (bohr^-3) at Cartesian points."""
        value = self.psi(x, y, z)
        return value * value if self.is_real else (value.real**2 + value.imag**2)

    def radial_distribution(self, r: npt.ArrayLike) -> np.ndarray:
        """Radial probability density r^2 times the integral of |psi|^2 over directions (1/bohr).

        The real angular basis is orthonormal, so this is r^2 sum_(l,m) |sum_n b_nlm R_nl(r)|^2.
        """
        r = np.asarray(r, dtype=np.float64)
        groups: dict[tuple[int, int], np.ndarray] = {}
        for (n, l, m), c in self.basis:
            groups[(l, m)] = groups.get((l, m), 0) + c * self.radial(n, l, r)
        return r * r * sum(np.abs(g) ** 2 for g in groups.values())

    def in_potential(self, potential) -> Orbital:
        """Return the same state with radial functions solved numerically in ``potential``."""
        from orbviz.states.numerical import solve_radial

        solutions = {(n, l): solve_radial(potential, n, l) for n, l in self.shells}
        note = f"radial functions solved numerically in {potential.describe()}"
        return replace(self, potential=potential, solutions=solutions, notes=(*self.notes, note))

    def radial(self, n: int, l: int, r: npt.ArrayLike) -> np.ndarray:
        """R_nl(r): closed form at this orbital's charge and mass ratio, or the numerical one."""
        if self.potential is not None:
            return self.solutions[(n, l)].radial(np.asarray(r, dtype=np.float64))
        return radial_function(n, l, r, Z=self.length_charge)

    def radial_extent(self, n: int, l: int, tail: float = 1e-13) -> float:
        """Return a radius (bohr) beyond which less than ``tail`` of the shell's probability is."""
        if self.potential is None:
            return radial_extent(n, l, Z=self.length_charge, tail=tail)
        s = self.solutions[(n, l)]
        h = math.log(s.r[1] / s.r[0])
        outside = np.cumsum((s.R**2 * s.r**3 * h)[::-1])[::-1]
        beyond = np.flatnonzero(outside < tail)
        return float(s.r[beyond[0]]) if beyond.size else float(s.r[-1])

    def shell_energy(self, n: int, l: int) -> float:
        """Energy of the (n, l) shell in hartree."""
        if self.potential is not None:
            return self.solutions[(n, l)].energy
        return energy_hartree(n, Z=self.Z, mass_ratio=self.mass_ratio)

    def node_radii(self, n: int, l: int) -> np.ndarray:
        """Radial node radii (bohr): closed form, or sign changes of the numerical R."""
        if self.potential is None:
            return radial_node_radii(n, l, Z=self.length_charge)
        s = self.solutions[(n, l)]
        big = np.abs(s.R) > 1e-10 * np.abs(s.R).max()
        r, v = s.r[big], s.R[big]
        i = np.flatnonzero(np.sign(v[1:]) != np.sign(v[:-1]))
        return r[i] - v[i] * (r[i + 1] - r[i]) / (v[i + 1] - v[i])  # linear root
