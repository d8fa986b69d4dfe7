"""Two-centre combinations for teaching: psi = N [phi_a(r - R_a) +- phi_b(r - R_b)].

``bond(1s,1s,R=2.0,+)`` puts hydrogen-like orbitals on two nuclei at z = -R/2 and z = +R/2
(bohr) and adds (+) or subtracts (-) them: the bonding and antibonding LCAO shapes of sigma and
pi combinations. These are unoptimised trial functions for showing shapes, not a molecular
calculation; no energy is reported. The overlap S = <phi_a|phi_b> is computed by Gauss
quadrature in prolate spheroidal coordinates, and normalises psi: N = 1 / sqrt(2 (1 +- S)).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, NoReturn

import numpy as np
import numpy.typing as npt

from orbviz._defaults import LIMITS
from orbviz.errors import SpecError, Unsupported
from orbviz.states.state import Centre, NodalSurfaces, Properties
from orbviz.states.symmetry import psi_parity

if TYPE_CHECKING:
    from orbviz.states.dynamics import Beat
    from orbviz.states.orbital import Orbital
    from orbviz.states.spec import Atom

__all__ = ["Bond", "overlap"]


def overlap(a: Orbital, b: Orbital, R: float, points: int = 64) -> float:
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
    """A two-centre combination; a :class:`orbviz.states.state.State`.

    Attributes
    ----------
    a, b : Orbital
        Real one-centre orbitals on the nuclei at z = -R/2 (a) and z = +R/2 (b).
    R : float
        Internuclear distance, bohr.
    sign : float
        +1 bonding, -1 antibonding.
    spec : str
        The text it came from.
    S : float
        Overlap of a and b.
    notes : tuple of str
        Remarks for the user.
    """

    a: Orbital
    b: Orbital
    R: float
    sign: float
    spec: str
    S: float
    notes: tuple[str, ...] = field(default=())

    @classmethod
    def combine(cls, a: Orbital, b: Orbital, R: float, sign: float, spec: str) -> Bond:
        """Check the parts and the distance, compute the overlap, and build the combination."""
        for part in (a, b):
            if part.eigenstate is None or not part.is_real:
                raise SpecError(
                    f"bond(...) takes real orbital labels such as 1s or 2pz, got {part.spec!r}"
                )
        low, high = LIMITS.bond_distance_min, LIMITS.bond_distance_max
        if not (math.isfinite(R) and low <= R <= high):
            raise SpecError(
                f"bond distance R must be from {low:g} to {high:g} bohr (the supported range), "
                f"got R={R:g}"
            )
        S = overlap(a, b, R)
        if 1.0 + sign * S < 1e-8:
            raise SpecError(f"{spec!r} vanishes: the two orbitals cancel (overlap {S:.6g})")
        note = (
            "an unoptimised LCAO combination for showing shapes, not a molecular calculation; "
            f"overlap S = {S:.6f}"
        )
        return cls(a, b, R, sign, spec.strip(), S, (note, *a.notes, *b.notes))

    def __repr__(self) -> str:
        return f"Bond({self.spec!r}, R={self.R:g} bohr, S={self.S:.6f})"

    # ----------------------------------------------------------------- what it is

    def _repr_html_(self) -> str:
        """Show the state in a notebook as an interactive page (see :func:`orbviz.show`)."""
        from orbviz.pages.notebook import show

        return show(self)._repr_html_()

    def _repr_png_(self) -> bytes:
        """Show the state in a notebook as a still figure."""
        from orbviz.pages.notebook import show

        return show(self)._repr_png_()

    @property
    def norm(self) -> float:
        """N = 1 / sqrt(2 (1 + sign S)) (both orbitals are normalised)."""
        return 1.0 / math.sqrt(2.0 * (1.0 + self.sign * self.S))

    @property
    def label(self) -> str:
        """The spec text."""
        return self.spec

    @property
    def kind(self) -> str:
        """In words."""
        return "two-centre combination"

    @property
    def is_real(self) -> bool:
        """Always: the parts are real orbitals."""
        return True

    @property
    def eigenstate(self) -> Atom | None:
        """None: a combination of two centres is no single state."""
        return None

    @property
    def shells(self) -> list[tuple[int, int]]:
        """None about the origin: the nuclei sit off it."""
        return []

    @property
    def centres(self) -> tuple[Centre, ...]:
        """A at z = -R/2 with weight N, b at z = +R/2 with weight sign N."""
        half = self.R / 2
        return (Centre(-half, self.norm, self.a), Centre(half, self.sign * self.norm, self.b))

    @property
    def Z(self) -> float:  # noqa: N802 - the physics name
        """The orbitals' nuclear charge."""
        return self.a.Z

    # ----------------------------------------------------------------- evaluation
    def psi(
        self,
        x: npt.ArrayLike,
        y: npt.ArrayLike,
        z: npt.ArrayLike,
        *,
        dtype: npt.DTypeLike | None = None,
    ) -> np.ndarray:
        """Evaluate psi at Cartesian points (bohr); the nuclei's midpoint is the origin."""
        z = np.asarray(z)
        half = self.R / 2
        pa = self.a.psi(x, y, z + half, dtype=dtype)
        pb = self.b.psi(x, y, z - half, dtype=dtype)
        return self.norm * (pa + self.sign * pb)

    def density(self, x: npt.ArrayLike, y: npt.ArrayLike, z: npt.ArrayLike) -> np.ndarray:
        """|psi|^2."""
        value = self.psi(x, y, z)
        return value * value

    def extent(self, tail: float = 1e-13) -> float:
        """Radius from the midpoint beyond which the density is negligible."""
        return self.R / 2 + max(self.a.extent(tail), self.b.extent(tail))

    def radial_quantile(self, q: float) -> float:
        """Radius about the midpoint of a sphere holding at least ``q``: each part's, off centre.

        Each orbital holds q within its own quantile radius, and that ball lies inside the ball
        of radius R/2 + that radius about the midpoint.
        """
        return self.R / 2 + max(self.a.radial_quantile(q), self.b.radial_quantile(q))

    # ----------------------------------------------------------------- physics
    def properties(self) -> Properties:
        """No energy (an unoptimised LCAO has none): distance, overlap and normalisation."""
        return Properties(
            form="real",
            extra={"bond_distance_bohr": self.R, "overlap": self.S, "normalisation": self.norm},
        )

    def nodal_surfaces(self) -> NodalSurfaces:
        """Return the mirror planes across which psi changes sign (the antibonding z = 0 plane)."""
        normals = ((1.0, 0.0, 0.0), (0.0, 1.0, 0.0), (0.0, 0.0, 1.0))
        parity = psi_parity(self.centres)
        return NodalSurfaces(planes=tuple(n for n, p in zip(normals, parity, strict=True) if p < 0))

    def radial_distribution(self, r: npt.ArrayLike) -> NoReturn:
        """Unsupported: the density is not centred on one nucleus."""
        raise Unsupported(
            "a bond has no single radial distribution: plot --kind slice works, --kind radial "
            "does not"
        )

    def evolve(self, t: float) -> NoReturn:
        """Unsupported: an unoptimised LCAO has no energies to evolve with."""
        raise Unsupported(
            "a bond has no energies, so it does not move in time: animate takes superpositions "
            "of one-centre states such as '1s + 2pz'"
        )

    def beat(self) -> Beat:
        """Unsupported, as :meth:`evolve`."""
        self.evolve(0.0)
