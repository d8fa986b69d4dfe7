"""The real scalar field that is contoured, as one fused numexpr expression.

Which field depends on the state (see ../docs/meshes.md):

* ``signed``: a real orbital or real superposition, psi itself, contoured at +-sqrt(level);
* ``envelope``: a complex eigenstate psi = g e^{i m azimuth}: the real envelope g, contoured at
  +-sqrt(level), so that the nodal cones separate lobes as they should;
* ``modulus``: any other complex state: |psi|, contoured at +sqrt(level).

The expression is built from exact polynomial coefficients: solid harmonics r^l S_lm expanded in
monomials of x, y, z (the same normalised recurrence as :mod:`orbviz.states.angular`), Laguerre
polynomials by Horner's rule, so no trigonometry and no division appear. numexpr evaluates it in
float64 blocks that stay in cache and stores float32 when asked.
"""

from __future__ import annotations

import math
import re
from collections import defaultdict
from dataclasses import dataclass, field

import numpy as np
import numpy.typing as npt

from orbviz.errors import ParameterError
from orbviz.states.angular import mirror_parity
from orbviz.states.orbital import Orbital
from orbviz.states.radial import _log_norm

__all__ = ["Field", "field_of", "field_parity"]

Poly = dict[tuple[int, int, int], float]
_MAX_HORNER_DEGREE = 14  # beyond this the monomial Laguerre form loses digits in float64


def _mul(a: Poly, b: Poly) -> Poly:
    out: Poly = defaultdict(float)
    for ka, va in a.items():
        for kb, vb in b.items():
            out[(ka[0] + kb[0], ka[1] + kb[1], ka[2] + kb[2])] += va * vb
    return dict(out)


def _add(a: Poly, b: Poly, scale: float = 1.0) -> Poly:
    out: Poly = defaultdict(float, a)
    for k, v in b.items():
        out[k] += scale * v
    return dict(out)


def _theta_poly(l: int, m: int) -> Poly:
    """S_l^m(z, r^2) of the angular recurrence as a polynomial in x, y, z."""
    c = math.sqrt((2 * m + 1) / (4 * math.pi))
    for k in range(1, m + 1):
        c *= math.sqrt((2 * k - 1) / (2 * k))
    if m % 2:
        c = -c
    prev: Poly = {(0, 0, 0): c}
    if l == m:
        return prev
    z: Poly = {(0, 0, 1): 1.0}
    r2: Poly = {(2, 0, 0): 1.0, (0, 2, 0): 1.0, (0, 0, 2): 1.0}
    cur = {k: v * math.sqrt(2 * m + 3) for k, v in _mul(z, prev).items()}
    for ll in range(m + 2, l + 1):
        a = math.sqrt((4 * ll * ll - 1) / (ll * ll - m * m))
        b = math.sqrt(((ll - 1) ** 2 - m * m) / (4 * (ll - 1) ** 2 - 1))
        nxt = _add(_mul(z, cur), _mul(r2, prev), -b)
        prev, cur = cur, {k: a * v for k, v in nxt.items()}
    return cur


def _xy_power(m: int) -> tuple[Poly, Poly]:
    re: Poly = {(0, 0, 0): 1.0}
    im: Poly = {}
    x: Poly = {(1, 0, 0): 1.0}
    y: Poly = {(0, 1, 0): 1.0}
    for _ in range(m):
        re, im = _add(_mul(re, x), _mul(im, y), -1.0), _add(_mul(im, x), _mul(re, y))
    return re, im


def _real_solid_poly(l: int, m: int) -> Poly:
    """r^l S_lm (chemistry signs) as a polynomial; matches :func:`solid_harmonic_real`."""
    theta = _theta_poly(l, abs(m))
    if m == 0:
        return theta
    re, im = _xy_power(abs(m))
    factor = math.sqrt(2.0) * (-1) ** abs(m)
    return {k: factor * v for k, v in _mul(theta, re if m > 0 else im).items()}


def _poly_expr(poly: Poly) -> str:
    terms = []
    for (a, b, c), v in sorted(poly.items()):
        if abs(v) < 1e-300:
            continue
        factors = [repr(float(v))]
        factors += [
            f"{name}**{p}" if p > 1 else name for name, p in (("x", a), ("y", b), ("z", c)) if p
        ]
        terms.append("*".join(factors))
    return "(" + " + ".join(terms) + ")" if terms else "0.0"


def _combination_parity(terms) -> tuple[int, int, int]:
    """Parity on each axis of sum c R_nl S_lm over ((n, l, m), c), c real.

    +1 or -1 where every term with c != 0 agrees, 0 where they disagree; an empty sum is even.
    """
    out = []
    for axis in range(3):
        seen = {mirror_parity(l, m)[axis] for (_, l, m), c in terms if c != 0}
        out.append(seen.pop() if len(seen) == 1 else (0 if seen else 1))
    return out[0], out[1], out[2]


def _kind(orbital) -> str:
    """Which field is contoured (see the module docstring)."""
    if getattr(orbital, "general", False) or orbital.is_real:
        return "signed"
    state = orbital.eigenstate
    if state is not None and state.form == "complex" and len(orbital.shells) == 1:
        return "envelope"
    return "modulus"


def field_parity(orbital) -> tuple[int, int, int]:
    """Mirror parity of an orbital's contoured field on x, y, z: +1 even, -1 odd, 0 neither.

    Found from the basis alone, without building the field. Signed: the common parity of the
    terms. Envelope: even in x and y, (-1)^(l - |m|) in z. Modulus |a + ib|: even where a and b
    each have a parity. Two centres: the parts' shared x and y parity; on z, p * sign when both
    centres carry the same orbital of z parity p, since psi(-z) = N [p phi(z - h) + sign p
    phi(z + h)]. Wherever it is nonzero, |psi|^2 is even.
    """
    if getattr(orbital, "general", False):
        a, b = orbital.a, orbital.b
        px, py, _ = _combination_parity(list(a.basis) + list(b.basis))
        same = a.spec == b.spec and a.length_charge == b.length_charge
        pz = _combination_parity(list(a.basis))[2] * int(orbital.sign) if same else 0
        return px, py, pz
    kind = _kind(orbital)
    if kind == "signed":
        return _combination_parity([(k, c.real) for k, c in orbital.basis])
    if kind == "envelope":
        state = orbital.eigenstate
        return 1, 1, mirror_parity(state.l, state.m)[2]
    re_p = _combination_parity([(k, c.real) for k, c in orbital.basis])
    im_p = _combination_parity([(k, c.imag) for k, c in orbital.basis])
    px, py, pz = (int(bool(a and b)) for a, b in zip(re_p, im_p, strict=True))
    return px, py, pz


def _radial_expr(n: int, l: int, Z: float) -> str:
    """R_nl / r^l as text: N (2Z/n)^l exp(-Zr/n) L_{n-l-1}^{2l+1}(2Zr/n), Horner form."""
    k, alpha = n - l - 1, 2 * l + 1
    scale = math.exp(_log_norm(n, l, Z) + l * math.log(2.0 * Z / n))
    q = 2.0 * Z / n
    # L_k^alpha(rho) = sum_i (-1)^i C(k + alpha, k - i) rho^i / i!
    coeffs = [
        (-1) ** i * math.comb(k + alpha, k - i) / math.factorial(i) * q**i for i in range(k + 1)
    ]
    horner = repr(coeffs[-1])
    for c in reversed(coeffs[:-1]):
        horner = f"({horner}*R + {c!r})"
    text = f"{scale!r}*exp({-0.5 * q!r}*R)*{horner}"
    return text.replace("R", "sqrt(x**2 + y**2 + z**2)")


@dataclass(frozen=True)
class Field:
    """A real scalar field of an orbital, evaluated by one numexpr expression.

    Attributes
    ----------
    kind : {"signed", "envelope", "modulus"}
        Which field (see the module docstring).
    expression : str
        numexpr text in x, y, z (bohr).
    orbital : Orbital
        The state it belongs to.
    tables : dict
        For numerically solved radial functions: variable name -> (r, R / r^l) on a fine
        uniform grid, interpolated linearly; the grid is then evaluated slab by slab along z.
    parity : (3,) tuple of int
        How the field behaves under x -> -x, y -> -y, z -> -z: +1 even, -1 odd, 0 neither. A
        sampler may evaluate one side of a mirror plane and copy the other.
    """

    kind: str
    expression: str
    orbital: Orbital
    tables: dict = field(default_factory=dict, compare=False, repr=False)
    parity: tuple[int, int, int] = (0, 0, 0)

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
        import numexpr

        x, y, z = np.asarray(x), np.asarray(y), np.asarray(z)
        if not self.tables:
            names = {"x": x, "y": y, "z": z}
            return numexpr.evaluate(self.expression, local_dict=names, out=out, casting="unsafe")
        shape = np.broadcast_shapes(x.shape, y.shape, z.shape)
        if out is None:
            out = np.empty(shape)
        if len(shape) == 3 and z.shape[:2] == (1, 1) and x.shape[2] == y.shape[2] == 1:
            for k in range(shape[2]):  # one z slab at a time keeps the tables' work bounded
                self._tabulated(x[:, :, 0], y[:, :, 0], z[:, :, k], out[:, :, k])
            return out
        self._tabulated(x, y, z, out)
        return out

    def _tabulated(self, x, y, z, out) -> None:
        import numexpr

        r = np.sqrt(x * x + y * y + z * z)
        names = {"x": x, "y": y, "z": z}
        for name, (grid, values) in self.tables.items():
            names[name] = np.interp(r, grid, values)
        numexpr.evaluate(self.expression, local_dict=names, out=out, casting="unsafe")

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


def field_of(orbital: Orbital, /) -> Field:
    """Build the contoured field of an orbital (see the module docstring)."""
    if getattr(orbital, "general", False):  # two centres: shift each field along z
        half = orbital.R / 2
        parts = []
        for part, shift, weight in ((orbital.a, half, 1.0), (orbital.b, -half, orbital.sign)):
            own = field_of(part)
            if own.tables:
                raise ParameterError(
                    f"bond(...) surfaces need orbitals with at most {_MAX_HORNER_DEGREE} radial "
                    "nodes"
                )
            text = re.sub(r"\bz\b", f"(z + {shift!r})", own.expression)
            parts.append(f"{weight * orbital.norm!r}*({text})")
        return Field("signed", " + ".join(parts), orbital, parity=field_parity(orbital))
    Z = orbital.length_charge
    state = orbital.eigenstate
    tables: dict[str, tuple[np.ndarray, np.ndarray]] = {}

    def radial(n: int, l: int) -> str:
        if orbital.potential is None and n - l - 1 <= _MAX_HORNER_DEGREE:
            return _radial_expr(n, l, Z)
        # numerically solved, or too many nodes for the monomial form: tabulate the function
        # (hydrogen-like R by its stable recurrence) finely and interpolate
        name = f"R{len(tables)}"
        r = np.linspace(0.0, orbital.radial_extent(n, l, 1e-14), 40001)
        values = orbital.radial(n, l, r)
        values[1:] /= r[1:] ** l
        values[0] = values[1] if l else values[0]
        tables[name] = (r, values)
        return name

    kind = _kind(orbital)
    if kind == "signed":
        shells: dict[tuple[int, int], Poly] = {}
        for (n, l, m), c in orbital.basis:
            shells[(n, l)] = _add(shells.get((n, l), {}), _real_solid_poly(l, m), c.real)
        text = " + ".join(f"{radial(n, l)}*{_poly_expr(p)}" for (n, l), p in shells.items())
        return Field("signed", text, orbital, tables, field_parity(orbital))
    if kind == "envelope":
        n, l, m = state.n, state.l, state.m
        theta = _poly_expr(_theta_poly(l, abs(m)))
        rho = f"(x**2 + y**2)**{abs(m) / 2!r}"
        expression = f"{radial(n, l)}*{theta}*{rho}"
        return Field("envelope", expression, orbital, tables, field_parity(orbital))
    real_part: dict[tuple[int, int], Poly] = {}
    imag_part: dict[tuple[int, int], Poly] = {}
    for (n, l, m), c in orbital.basis:
        poly = _real_solid_poly(l, m)
        real_part[(n, l)] = _add(real_part.get((n, l), {}), poly, c.real)
        imag_part[(n, l)] = _add(imag_part.get((n, l), {}), poly, c.imag)
    real_text = " + ".join(f"{radial(n, l)}*{_poly_expr(p)}" for (n, l), p in real_part.items())
    imag_text = " + ".join(f"{radial(n, l)}*{_poly_expr(p)}" for (n, l), p in imag_part.items())
    text = f"sqrt(({real_text})**2 + ({imag_text})**2)"
    return Field("modulus", text, orbital, tables, field_parity(orbital))
