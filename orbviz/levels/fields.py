"""The real scalar field that is contoured, evaluated fast and in bounded memory.

Which field depends on the state (see ../docs/meshes.md):

* ``signed``: a real state, psi itself, contoured at +-sqrt(level);
* ``envelope``: a complex eigenstate psi = g e^{i m azimuth}: the real envelope g, contoured at
  +-sqrt(level), so that the nodal cones separate lobes as they should;
* ``modulus``: any other complex state: |psi|, contoured at +sqrt(level).

The field is built from the state's centres (:class:`orbviz.states.state.Centre`), so every kind
of state is handled alike. Where the polynomial forms are small enough
(:mod:`orbviz.levels.polynomials`), one fused numexpr expression evaluates it in float64 blocks
that stay in cache and stores float32. Beyond that (high l, or many terms) the state's own stable
recurrences evaluate it, slab by slab, so memory stays bounded at any l.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from typing import Any

import numpy as np
import numpy.typing as npt

from orbviz.levels.polynomials import Poly, add, polar_poly, poly_text, radial_text, real_solid_poly
from orbviz.states.angular import mirror_parity, polar_polynomial
from orbviz.states.state import Centre, State
from orbviz.states.symmetry import psi_parity

__all__ = ["Field", "field_kind", "field_of", "field_parity"]

_MAX_HORNER_DEGREE = 14  # beyond this the monomial Laguerre form loses digits in float64
_MAX_MONOMIALS = 120  # numexpr compiled up to ~150 monomials here; larger ones go direct
_BLOCK = 1 << 20  # points per block of a direct or tabulated evaluation

Table = tuple[np.ndarray, np.ndarray, float]  # radii, R / r^l there, the centre's z


class _TooLarge(Exception):
    """The expression would exceed what numexpr compiles; evaluate directly instead."""


def field_kind(state: State) -> str:
    """Which field is contoured (see the module docstring)."""
    if state.is_real:
        return "signed"
    eig = state.eigenstate
    if eig is not None and eig.form == "complex" and len(state.shells) == 1:
        return "envelope"
    return "modulus"


def field_parity(state: State, kind: str | None = None) -> tuple[int, int, int]:
    """Mirror parity of a state's contoured field on x, y, z: +1 even, -1 odd, 0 neither.

    Signed: psi's own parity. Envelope: even in x and y, (-1)^(l - |m|) in z. Modulus
    |a + ib|: even where a and b each have a parity. Wherever it is nonzero, |psi|^2 is even.
    """
    kind = kind or field_kind(state)
    if kind == "signed":
        return psi_parity(state.centres)
    if kind == "envelope":
        eig = state.eigenstate
        assert eig is not None  # field_kind only says envelope for an eigenstate
        return 1, 1, mirror_parity(eig.l, eig.m)[2]
    real = psi_parity(state.centres)
    imag = psi_parity(state.centres, imaginary=True)
    px, py, pz = (int(bool(a and b)) for a, b in zip(real, imag, strict=True))
    return px, py, pz


class _Builder:
    """numexpr text of a state's field, with the radial tables it needs."""

    def __init__(self) -> None:
        self.tables: dict[str, Table] = {}
        self.monomials = 0

    def radial(self, centre: Centre, n: int, l: int) -> str:
        orbital = centre.orbital
        if orbital.potential is None and n - l - 1 <= _MAX_HORNER_DEGREE:
            return radial_text(n, l, orbital.length_charge)
        # numerically solved, or too many nodes for the monomial form: tabulate the function
        # (hydrogen-like R by its stable recurrence) finely and interpolate
        name = f"R{len(self.tables)}"
        r = np.linspace(0.0, orbital.radial_extent(n, l, 1e-14), 40001)
        values = orbital.radial(n, l, r)
        values[1:] /= r[1:] ** l
        values[0] = values[1] if l else values[0]
        self.tables[name] = (r, values, centre.z)
        return name

    def poly(self, poly: Poly) -> str:
        self.monomials += len(poly)
        if self.monomials > _MAX_MONOMIALS:
            raise _TooLarge
        return poly_text(poly)

    def centre_text(self, centre: Centre, imaginary: bool) -> str | None:
        shells: dict[tuple[int, int], Poly] = {}
        for (n, l, m), c in centre.orbital.basis:
            part = (c.imag if imaginary else c.real) * centre.weight
            if part != 0.0:
                shells[(n, l)] = add(shells.get((n, l), {}), real_solid_poly(l, m), part)
        if not shells:
            return None
        text = " + ".join(
            f"{self.radial(centre, n, l)}*{self.poly(p)}" for (n, l), p in shells.items()
        )
        if centre.z == 0.0:
            return text
        return re.sub(r"\bz\b", f"(z - {centre.z!r})", text)

    def part(self, state: State, imaginary: bool) -> str:
        texts = [self.centre_text(c, imaginary) for c in state.centres]
        return " + ".join(t for t in texts if t) or "0.0*x"

    def build(self, state: State, kind: str) -> str:
        if kind == "signed":
            return self.part(state, imaginary=False)
        if kind == "modulus":
            return f"sqrt(({self.part(state, False)})**2 + ({self.part(state, True)})**2)"
        eig = state.eigenstate
        assert eig is not None
        (centre,) = state.centres
        theta = self.poly(polar_poly(eig.l, abs(eig.m)))
        rho = f"(x**2 + y**2)**{abs(eig.m) / 2!r}"
        return f"{self.radial(centre, eig.n, eig.l)}*{theta}*{rho}"


@dataclass(frozen=True)
class Field:
    """A real scalar field of a state (see the module docstring).

    Attributes
    ----------
    kind : {"signed", "envelope", "modulus"}
        Which field.
    state : State
        The state it belongs to.
    expression : str or None
        numexpr text in x, y, z (bohr); None where the field is evaluated directly.
    tables : dict
        Radial functions interpolated from fine tables: name -> (r, R / r^l, centre z).
    parity : (3,) tuple of int
        How the field behaves under x -> -x, y -> -y, z -> -z: +1 even, -1 odd, 0 neither. A
        sampler may evaluate one side of a mirror plane and copy the other.
    """

    kind: str
    state: State
    expression: str | None = None
    tables: dict[str, Table] = field(default_factory=dict, compare=False, repr=False)
    parity: tuple[int, int, int] = (0, 0, 0)

    def __repr__(self) -> str:
        how = "numexpr" if self.expression is not None else "direct"
        return f"Field({self.kind}, {self.state.label!r}, {how}, parity={self.parity})"

    @property
    def two_sided(self) -> bool:
        """True if the field is contoured at both +sqrt(level) and -sqrt(level)."""
        return self.kind != "modulus"

    def __call__(
        self,
        x: npt.ArrayLike,
        y: npt.ArrayLike,
        z: npt.ArrayLike,
        *,
        out: np.ndarray | None = None,
    ) -> np.ndarray:
        """Evaluate at broadcastable coordinates (bohr); into ``out`` (e.g. float32) if given."""
        x, y, z = np.asarray(x), np.asarray(y), np.asarray(z)
        if self.expression is not None and not self.tables:
            import numexpr

            names = {"x": x, "y": y, "z": z}
            return numexpr.evaluate(self.expression, local_dict=names, out=out, casting="unsafe")
        shape = np.broadcast_shapes(x.shape, y.shape, z.shape)
        if out is None:
            out = np.empty(shape)
        if len(shape) == 3 and z.shape[:2] == (1, 1) and x.shape[2] == y.shape[2] == 1:
            for k in range(shape[2]):  # one z slab at a time keeps the work bounded
                self._block(x[:, :, 0], y[:, :, 0], z[:, :, k], out[:, :, k])
            return out
        flat = [np.broadcast_to(a, shape).reshape(-1) for a in (x, y, z)]
        target = out.reshape(-1)
        for start in range(0, target.size, _BLOCK):
            part = slice(start, start + _BLOCK)
            self._block(flat[0][part], flat[1][part], flat[2][part], target[part])
        if not np.shares_memory(target, out):
            out[...] = target.reshape(shape)
        return out

    def _block(self, x: np.ndarray, y: np.ndarray, z: np.ndarray, out: np.ndarray) -> None:
        x, y, z = np.broadcast_arrays(x, y, z)
        if self.expression is None:
            out[...] = self._direct(x, y, z)
            return
        import numexpr

        names: dict[str, Any] = {"x": x, "y": y, "z": z}
        distances: dict[float, np.ndarray] = {}
        for name, (grid, values, zc) in self.tables.items():
            if zc not in distances:
                distances[zc] = np.sqrt(x * x + y * y + (z - zc) ** 2)
            names[name] = np.interp(distances[zc], grid, values)
        numexpr.evaluate(self.expression, local_dict=names, out=out, casting="unsafe")

    def _direct(self, x: np.ndarray, y: np.ndarray, z: np.ndarray) -> np.ndarray:
        """Return the field from the state's stable recurrences (float64)."""
        if self.kind == "signed":
            return np.real(self.state.psi(x, y, z, dtype=np.float64))
        if self.kind == "modulus":
            return np.abs(self.state.psi(x, y, z, dtype=np.float64))
        eig = self.state.eigenstate
        assert eig is not None
        (centre,) = self.state.centres
        x, y, z = (a.astype(np.float64, copy=False) for a in (x, y, z))
        rho2 = x * x + y * y
        r = np.sqrt(rho2 + z * z)
        safe = np.where(r > 0, r, 1.0)  # on unit vectors: no r^l to overflow at high l
        mm = abs(eig.m)
        angular = polar_polynomial(eig.l, mm, z / safe, 1.0) * (np.sqrt(rho2) / safe) ** mm
        return centre.orbital.radial(eig.n, eig.l, r) * angular

    def value_and_gradient(
        self, points: np.ndarray, step: float = 1e-4
    ) -> tuple[np.ndarray, np.ndarray]:
        """Evaluate the field and its central-difference gradient at (V, 3) points (step: bohr).

        All seven stencil points go through one evaluation, on contiguous coordinates.

        Returns
        -------
        value : (V,) ndarray of float64
        gradient : (V, 3) ndarray of float64
        """
        points = np.asarray(points, dtype=np.float64)
        n = len(points)
        stencil = np.empty((3, 7, n))
        stencil[:] = points.T[:, None, :]
        for axis in range(3):
            stencil[axis, 1 + 2 * axis] += step
            stencil[axis, 2 + 2 * axis] -= step
        values = self(*stencil.reshape(3, 7 * n)).reshape(7, n)
        grad = np.empty((n, 3))
        for axis in range(3):
            grad[:, axis] = (values[1 + 2 * axis] - values[2 + 2 * axis]) / (2 * step)
        return values[0], grad


def field_of(state: State, /) -> Field:
    """Build the contoured field of a state (see the module docstring)."""
    kind = field_kind(state)
    builder = _Builder()
    try:
        expression: str | None = builder.build(state, kind)
        tables = builder.tables
    except _TooLarge:
        expression, tables = None, {}
    return Field(kind, state, expression, tables, field_parity(state, kind))
