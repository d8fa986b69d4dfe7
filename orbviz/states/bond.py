"""Two-centre combinations for teaching: psi = N [phi_a(r - R_a) +- phi_b(r - R_b)].

``bond(1s,1s,R=2.0,+)`` puts hydrogen-like orbitals on two nuclei at z = -R/2 and z = +R/2
(bohr) and adds (+) or subtracts (-) them: the bonding and antibonding LCAO shapes of sigma and
pi combinations. These are unoptimised trial functions for showing shapes, not a molecular
calculation; no energy is reported. The overlap S = <phi_a|phi_b> is computed by Gauss
quadrature in prolate spheroidal coordinates, and normalises psi: N = 1 / sqrt(2 (1 +- S)).
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, field

import numpy as np
import numpy.typing as npt

from orbviz.errors import SpecError

__all__ = ["Bond", "overlap", "parse_bond"]

_BOND = re.compile(
    r"\s*bond\s*\(\s*([^,()]+?)\s*,\s*([^,()]+?)\s*,\s*R\s*=\s*([0-9.eE+-]+)\s*,\s*([+-])\s*\)\s*$",
    re.I,
)


def _centred(spec: str, Z: float):
    from orbviz.states.orbital import Orbital

    orbital = Orbital.from_spec(spec, Z=Z)
    if orbital.eigenstate is None or not orbital.is_real:
        raise SpecError(f"bond(...) takes real orbital labels such as 1s or 2pz, got {spec!r}")
    return orbital


def overlap(a, b, R: float, points: int = 64) -> float:
    """S = integral of phi_a(r - R_a) phi_b(r - R_b) dV, nuclei at z = -R/2 and +R/2.

    Prolate spheroidal coordinates: mu in [1, inf) by Gauss-Laguerre, nu in [-1, 1] by
    Gauss-Legendre, the azimuth by the trapezoid rule; dV = (R/2)^3 (mu^2 - nu^2).
    """
    half = R / 2
    x, wx = np.polynomial.laguerre.laggauss(points)
    rate = 2.0  # mu - 1 = x / (rate * half): the product decays about as exp(-R mu)
    mu = 1.0 + x / (rate * half)
    wmu = wx * np.exp(x) / (rate * half)
    nu, wnu = np.polynomial.legendre.leggauss(points)
    az = np.arange(2 * points) * math.pi / points
    M, N, A = np.meshgrid(mu, nu, az, indexing="ij")
    rho = half * np.sqrt((M**2 - 1) * (1 - N**2))
    X, Y, Zc = rho * np.cos(A), rho * np.sin(A), half * M * N
    w = wmu[:, None, None] * wnu[None, :, None] * (math.pi / points) * half**3 * (M**2 - N**2)
    pa = a.psi(X, Y, Zc + half, dtype=np.float64)
    pb = b.psi(X, Y, Zc - half, dtype=np.float64)
    return float(np.sum(pa * pb * w))


@dataclass(frozen=True)
class Bond:
    """A two-centre combination; offers the parts of the Orbital interface the pipeline uses.

    Attributes
    ----------
    a, b : Orbital
        The orbitals on the nuclei at z = -R/2 (a) and z = +R/2 (b).
    R : float
        Internuclear distance, bohr.
    sign : float
        +1 bonding, -1 antibonding.
    spec : str
        The text it came from.
    S : float
        Overlap of a and b.
    """

    a: object
    b: object
    R: float
    sign: float
    spec: str
    S: float
    notes: tuple = field(default=())
    general = True  # sampled as a whole, not shell by shell
    potential = None
    element = None
    eigenstate = None
    is_real = True

    @property
    def norm(self) -> float:
        """N = 1 / sqrt(2 (1 + sign S)) (both orbitals are normalised)."""
        return 1.0 / math.sqrt(2.0 * (1.0 + self.sign * self.S))

    @property
    def label(self) -> str:
        """The spec text."""
        return self.spec

    @property
    def Z(self) -> float:  # noqa: N802 - the physics name
        """The orbitals' nuclear charge."""
        return self.a.Z

    def psi(self, x: npt.ArrayLike, y: npt.ArrayLike, z: npt.ArrayLike, *, dtype=None):
        """Evaluate psi at Cartesian points (bohr); the nuclei's midpoint is the origin."""
        z = np.asarray(z)
        half = self.R / 2
        pa = self.a.psi(x, y, z + half, dtype=dtype)
        pb = self.b.psi(x, y, z - half, dtype=dtype)
        return self.norm * (pa + self.sign * pb)

    def density(self, x, y, z):
        """|psi|^2."""
        value = self.psi(x, y, z)
        return value * value

    def extent(self) -> float:
        """Return a radius from the midpoint beyond which the density is negligible."""
        ((n, l),) = self.a.shells
        ((m, k),) = self.b.shells
        return self.R / 2 + max(self.a.radial_extent(n, l), self.b.radial_extent(m, k))

    def radial_extent(self, n, l, tail=1e-13):  # noqa: D102 - box sizing through the grid
        return self.extent()


def parse_bond(spec: str, *, Z: float | None = None) -> Bond | None:
    """``bond(A,B,R=2.0,+)`` -> Bond; None if the text is not a bond."""
    match = _BOND.fullmatch(spec) if isinstance(spec, str) else None
    if match is None:
        return None
    try:
        R = float(match.group(3))
    except ValueError:
        raise SpecError(f"bond distance must be a number of bohr, got {match.group(3)!r}") from None
    if not (math.isfinite(R) and R > 0):
        raise SpecError(f"bond distance R must be > 0 bohr, got {R}")
    charge = 1.0 if Z is None else Z
    a, b = _centred(match.group(1), charge), _centred(match.group(2), charge)
    sign = 1.0 if match.group(4) == "+" else -1.0
    S = overlap(a, b, R)
    if 1.0 + sign * S < 1e-8:
        raise SpecError(f"{spec!r} vanishes: the two orbitals cancel (overlap {S:.6g})")
    note = (
        "an unoptimised LCAO combination for showing shapes, not a molecular calculation; "
        f"overlap S = {S:.6f}"
    )
    return Bond(a, b, R, sign, spec.strip(), S, (note,))
