"""Physical numbers of a one-centre state: energy, degeneracy, nodes, radii, nodal surfaces."""

from __future__ import annotations

import math
from typing import TYPE_CHECKING

import numpy as np

from orbviz.states.angular import real_harmonic
from orbviz.states.radial import expectation_r, most_probable_radius, radial_function
from orbviz.states.state import NodalSurfaces, Properties

if TYPE_CHECKING:
    from orbviz.states.orbital import Orbital
    from orbviz.states.spec import Atom

__all__ = [
    "mean_radius",
    "most_probable_radius_of",
    "orbital_nodes",
    "orbital_properties",
    "radial_matrix_element",
]


def radial_matrix_element(n1: int, n2: int, l: int, power: int, *, Z: float = 1.0) -> float:
    """Integral of R_{n1 l} R_{n2 l} r^(2 + power) dr, exact by Gauss-Laguerre quadrature.

    The integrand is a polynomial of degree n1 + n2 + power times exp(-Zr(1/n1 + 1/n2)), so
    ceil((n1 + n2 + power + 1) / 2) + 1 Gauss-Laguerre nodes integrate it exactly.
    """
    from numpy.polynomial.laguerre import laggauss

    rate = Z * (1.0 / n1 + 1.0 / n2)
    nodes, weights = laggauss(max(2, (n1 + n2 + power + 2) // 2 + 1))
    r = nodes / rate
    f = radial_function(n1, l, r, Z=Z) * radial_function(n2, l, r, Z=Z) * r ** (2 + power)
    return float(np.sum(weights * np.exp(nodes) * f) / rate)


def _numeric_element(orbital: Orbital, n1: int, n2: int, l: int, power: int) -> float:
    """Integral of R1 R2 r^(2 + power) dr for numerically solved radial functions."""
    s = orbital.solutions[(n1, l)]
    h = math.log(s.r[1] / s.r[0])
    return float(h * np.sum(s.R * orbital.radial(n2, l, s.r) * s.r ** (3 + power)))


def mean_radius(orbital: Orbital) -> float:
    """<r>, with cross terms between shells of equal (l, m) (angular parts are orthonormal)."""
    Z = orbital.length_charge
    total = 0.0
    for (n1, l1, m1), c1 in orbital.basis:
        for (n2, l2, m2), c2 in orbital.basis:
            if (l1, m1) != (l2, m2):
                continue
            if orbital.potential is not None:
                element = _numeric_element(orbital, n1, n2, l1, 1)
            elif n1 == n2:
                element = expectation_r(n1, l1, 1, Z=Z)
            else:
                element = radial_matrix_element(n1, n2, l1, 1, Z=Z)
            total += (c1.conjugate() * c2).real * element
    return total


def most_probable_radius_of(orbital: Orbital) -> float:
    """Global maximum of r^2 sum_(l,m) |sum_n b_nlm R_nl(r)|^2, refined by successive zooms."""
    if len(orbital.shells) == 1 and orbital.potential is None:
        ((n, l),) = orbital.shells
        return most_probable_radius(n, l, Z=orbital.length_charge)
    lo, hi = 0.0, orbital.extent()
    for _ in range(6):
        r = np.linspace(lo, hi, 4001)
        i = int(np.argmax(orbital.radial_distribution(r)))
        step = r[1] - r[0]
        lo, hi = max(r[i] - step, 0.0), r[i] + step
    return 0.5 * (lo + hi)


def _degeneracy(orbital: Orbital) -> int | None:
    """Return the size of the state's energy level (None for a mixture of levels).

    n^2 for a hydrogen-like level; a screened atom's Slater group (1s 1, ns+np 4, nd 5, nf 7:
    they share Z_eff and n*); under a potential, the sum of 2l' + 1 over every shell whose
    level the solver finds within its error estimates of this one
    (:func:`orbviz.states.numerical.level_members`).
    """
    if not orbital.is_energy_eigenstate:
        return None
    if orbital.element is not None:
        from orbviz.states.atoms import slater_group_size

        return slater_group_size(*orbital.shells[0])
    if orbital.potential is None:
        return orbital.shells[0][0] ** 2
    from orbviz.states.numerical import level_members

    members = level_members(orbital.potential, orbital.solutions[orbital.shells[0]])
    return sum(2 * l + 1 for _, l in members)


def _angular_nodes(state: Atom | None) -> int | None:
    """Angular nodal surfaces of an eigenstate: l for a real form, l - |m| cones for a complex one.

    A complex eigenstate psi ~ P_l^|m|(cos polar) e^{i m azimuth} vanishes only where the
    associated Legendre function does (l - |m| cones, the xy plane among them) and, for m != 0,
    on the z axis, a line rather than a surface; a real form adds |m| planes through z.
    """
    if state is None:
        return None
    return state.l if state.form == "real" else state.l - abs(state.m)


def orbital_properties(orbital: Orbital) -> Properties:
    """Return the physical numbers of a one-centre state."""
    state = orbital.eigenstate
    one_shell = orbital.shells[0] if len(orbital.shells) == 1 else None
    form = state.form if state is not None else ("real" if orbital.is_real else "complex")
    return Properties(
        form=form,
        n=state.n if state else None,
        l=state.l if state else None,
        m=state.m if state else None,
        energy_hartree=orbital.energy_hartree,
        degeneracy=_degeneracy(orbital),
        radial_nodes=one_shell[0] - one_shell[1] - 1 if one_shell else None,
        angular_nodes=_angular_nodes(state),
        radial_node_radii=tuple(orbital.node_radii(*one_shell).tolist()) if one_shell else None,
        mean_radius=mean_radius(orbital),
        most_probable_radius=most_probable_radius_of(orbital),
        extra=_solver_numbers(orbital),
    )


def _solver_numbers(orbital: Orbital) -> dict[str, float]:
    """Return the numerical solver's error estimate of the energy (states under a potential)."""
    if orbital.potential is None:
        return {}
    error = max(orbital.shell_error(n, l) for n, l in orbital.shells)
    return {"energy_error_hartree": error}


def _polar_roots(l: int, m: int) -> list[float]:
    """Polar angles of the l - |m| nodal cones of S_lm (pi/2 is the xy plane)."""
    mm = abs(m)
    polar = np.linspace(1e-6, math.pi - 1e-6, 20001)
    az0 = 0.0 if m >= 0 else math.pi / (2 * max(mm, 1))
    mk = mm if m >= 0 else m
    values = real_harmonic(l, mk, polar, np.full_like(polar, az0))
    flips = np.flatnonzero(np.sign(values[1:]) != np.sign(values[:-1]))
    if not len(flips):
        return []
    # each sign change brackets one simple root: bisect all of them at once, 40 halvings of a
    # 1.6e-4 bracket leave 1.4e-16
    low, high = polar[flips], polar[flips + 1]
    sign_low = np.sign(values[flips])
    for _ in range(40):
        mid = 0.5 * (low + high)
        same = np.sign(real_harmonic(l, mk, mid, np.full_like(mid, az0))) == sign_low
        low, high = np.where(same, mid, low), np.where(same, high, mid)
    return [float(t) for t in 0.5 * (low + high)]


def orbital_nodes(orbital: Orbital) -> NodalSurfaces:
    """Radial node spheres (one shell) and an eigenstate's nodal planes and cones."""
    spheres: tuple[float, ...] = ()
    if len(orbital.shells) == 1:
        spheres = tuple(orbital.node_radii(*orbital.shells[0]).tolist())
    state = orbital.eigenstate
    if state is None:
        return NodalSurfaces(spheres)
    planes = []
    mm = abs(state.m)
    if state.form == "real" and mm:  # |m| planes through z where cos or sin(m az) = 0
        offset = math.pi / (2 * mm) if state.m > 0 else 0.0
        for k in range(mm):
            az = offset + k * math.pi / mm
            planes.append((-math.sin(az), math.cos(az), 0.0))
    cones = _polar_roots(state.l, state.m)
    return NodalSurfaces(spheres, tuple(planes), tuple(cones))
