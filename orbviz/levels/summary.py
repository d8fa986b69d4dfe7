"""The physical numbers reported for an orbital: energy, degeneracy, nodes, radii, isovalue."""

from __future__ import annotations

import math
from typing import Any

import numpy as np

from orbviz._defaults import DEFAULTS
from orbviz.levels.isovalue import enclosing_isovalue
from orbviz.states.orbital import Orbital
from orbviz.states.radial import (
    expectation_r,
    most_probable_radius,
)

__all__ = [
    "format_summary",
    "hartree_in_ev",
    "mean_radius",
    "most_probable_radius_of",
    "radial_matrix_element",
    "summarise",
]


def hartree_in_ev() -> float:
    """Return the hartree in electronvolts (CODATA, via scipy.constants)."""
    from scipy.constants import physical_constants

    return physical_constants["Hartree energy in eV"][0]


def radial_matrix_element(n1: int, n2: int, l: int, power: int, *, Z: float = 1.0) -> float:
    """Integral of R_{n1 l} R_{n2 l} r^(2 + power) dr, exact by Gauss-Laguerre quadrature.

    The integrand is a polynomial of degree n1 + n2 + power times exp(-Zr(1/n1 + 1/n2)), so
    ceil((n1 + n2 + power + 1) / 2) + 1 Gauss-Laguerre nodes integrate it exactly.
    """
    from numpy.polynomial.laguerre import laggauss

    from orbviz.states.radial import radial_function

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
            if (l1, m1) == (l2, m2):
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
    lo, hi = 0.0, max(orbital.radial_extent(n, l) for n, l in orbital.shells)
    for _ in range(6):
        r = np.linspace(lo, hi, 4001)
        i = int(np.argmax(orbital.radial_distribution(r)))
        step = r[1] - r[0]
        lo, hi = max(r[i] - step, 0.0), r[i] + step
    return 0.5 * (lo + hi)


def _degeneracy(orbital: Orbital) -> int | None:
    """n^2 for a hydrogen-like level; 2l + 1 (the central-potential minimum) otherwise."""
    if not orbital.is_energy_eigenstate:
        return None
    if orbital.potential is None:
        return orbital.shells[0][0] ** 2
    return 2 * orbital.shells[0][1] + 1


def summarise(orbital: Orbital, /, *, fraction: float = DEFAULTS.fraction) -> dict[str, Any]:
    """Everything ``orbviz info`` reports, as plain JSON-ready values.

    Parameters
    ----------
    orbital : Orbital
        The state.
    fraction : float, default: 0.9
        Probability the isosurface should enclose.

    Returns
    -------
    dict
        Keys ``n, l, m`` (null for a superposition; for a real orbital m is the index of the real
        combination), ``Z``, ``form``, ``energy_hartree``, ``energy_ev``, ``degeneracy``,
        ``radial_nodes``, ``angular_nodes``, ``radial_node_radii_bohr``, ``mean_radius_bohr``,
        ``most_probable_radius_bohr``, ``fraction``, ``isovalue`` (bohr^-3),
        ``enclosed_fraction``, and ``spec``, ``label``, ``mass_ratio``, ``reduced_mass``,
        ``surface_max_radius_bohr``, ``isovalue_method``, ``notes``.
    """
    if getattr(orbital, "general", False):
        return _bond_summary(orbital, fraction)
    state = orbital.eigenstate
    single_shell = len(orbital.shells) == 1
    n_l = orbital.shells[0] if single_shell else None
    iso = enclosing_isovalue(orbital, fraction=fraction)
    energy = orbital.energy_hartree
    if state is not None:
        form = state.form
    else:
        form = "real" if orbital.is_real else "complex"
    return {
        "spec": orbital.spec,
        "label": orbital.label,
        "n": state.n if state else None,
        "l": state.l if state else None,
        "m": state.m if state else None,
        "Z": orbital.Z,
        "element": orbital.element,
        "form": form,
        "reduced_mass": orbital.mass_ratio != 1.0,
        "mass_ratio": orbital.mass_ratio,
        "energy_hartree": energy,
        "energy_ev": energy * hartree_in_ev(),
        "degeneracy": _degeneracy(orbital),
        "potential": orbital.potential.describe() if orbital.potential is not None else None,
        "radial_nodes": n_l[0] - n_l[1] - 1 if n_l else None,
        "angular_nodes": _angular_nodes(state),
        "radial_node_radii_bohr": orbital.node_radii(*n_l).tolist() if n_l else None,
        "mean_radius_bohr": mean_radius(orbital),
        "most_probable_radius_bohr": most_probable_radius_of(orbital),
        "fraction": iso.fraction,
        "isovalue": iso.level,
        "enclosed_fraction": iso.enclosed_fraction,
        "isovalue_method": iso.method,
        "surface_max_radius_bohr": iso.max_radius,
        "notes": list(orbital.notes),
    }


def _angular_nodes(state) -> int | None:
    """Angular nodal surfaces of an eigenstate: l for a real form, l - |m| cones for a complex one.

    A complex eigenstate psi ~ P_l^|m|(cos polar) e^{i m azimuth} vanishes only where the
    associated Legendre function does (l - |m| cones, the xy plane among them) and, for m != 0,
    on the z axis, a line rather than a surface; a real form adds |m| planes through z.
    """
    if state is None:
        return None
    return state.l if state.form == "real" else state.l - abs(state.m)


def _bond_summary(bond, fraction: float) -> dict[str, Any]:
    """Summarise a two-centre combination: no energy (an unoptimised LCAO has none)."""
    iso = enclosing_isovalue(bond, fraction=fraction)
    keys = [
        "n",
        "l",
        "m",
        "energy_hartree",
        "energy_ev",
        "degeneracy",
        "radial_nodes",
        "angular_nodes",
        "radial_node_radii_bohr",
        "mean_radius_bohr",
        "most_probable_radius_bohr",
        "element",
        "potential",
    ]
    return {
        **dict.fromkeys(keys),
        "spec": bond.spec,
        "label": bond.label,
        "Z": bond.Z,
        "form": "real",
        "bond_distance_bohr": bond.R,
        "overlap": bond.S,
        "normalisation": bond.norm,
        "reduced_mass": False,
        "mass_ratio": 1.0,
        "fraction": iso.fraction,
        "isovalue": iso.level,
        "enclosed_fraction": iso.enclosed_fraction,
        "isovalue_method": iso.method,
        "surface_max_radius_bohr": iso.max_radius,
        "notes": list(bond.notes),
    }


def format_summary(info: dict[str, Any]) -> str:
    """Readable multi-line text for a :func:`summarise` result."""
    if "overlap" in info:
        return "\n".join(
            [
                f"combination   {info['spec']}: nuclei at z = -+"
                f"{info['bond_distance_bohr'] / 2:g} bohr",
                f"overlap       S = {info['overlap']:.8f}; "
                f"normalisation N = {info['normalisation']:.8f}",
                f"isovalue      |psi|^2 = {info['isovalue']:.6e} bohr^-3 encloses "
                f"{100 * info['enclosed_fraction']:.4f}% (asked {100 * info['fraction']:g}%)",
                *(f"note          {note}" for note in info["notes"]),
            ]
        )
    lines = [f"orbital       {info['label']}   (spec {info['spec']!r})"]
    if info["n"] is not None:
        kind = "real combination" if info["form"] == "real" else "complex, eigenstate of Lz"
        lines.append(f"state         n={info['n']} l={info['l']} m={info['m']}  ({kind})")
    else:
        lines.append(f"state         superposition ({info['form']} valued)")
    mass = (
        f"reduced mass on, mu/m_e = {info['mass_ratio']:.10f}"
        if info["reduced_mass"]
        else "reduced mass off (infinite nuclear mass)"
    )
    lines.append(f"nucleus       Z = {info['Z']:g}; {mass}")
    energy = f"{info['energy_hartree']:.10g} hartree = {info['energy_ev']:.8g} eV"
    if info["degeneracy"] is None:
        energy += "  (expectation value)"
    else:
        energy += f"  (degeneracy {info['degeneracy']}, spin not counted)"
    lines.append(f"energy        {energy}")
    if info["radial_nodes"] is not None:
        nodes = f"{info['radial_nodes']} radial"
        if info["angular_nodes"] is not None:
            nodes += f", {info['angular_nodes']} angular"
            if info["form"] == "complex" and info["m"]:
                nodes += " (and the z axis, a nodal line)"
        if info["radial_node_radii_bohr"]:
            radii = ", ".join(f"{r:.6g}" for r in info["radial_node_radii_bohr"])
            nodes += f"; radial nodes at r = {radii} bohr"
        lines.append(f"nodes         {nodes}")
    lines.append(
        f"radius        <r> = {info['mean_radius_bohr']:.8g} bohr; most probable "
        f"{info['most_probable_radius_bohr']:.8g} bohr"
    )
    lines.append(
        f"isovalue      |psi|^2 = {info['isovalue']:.6e} bohr^-3 encloses "
        f"{100 * info['enclosed_fraction']:.4f}% (asked {100 * info['fraction']:g}%); "
        f"surface reaches r = {info['surface_max_radius_bohr']:.4g} bohr"
    )
    for note in info["notes"]:
        lines.append(f"note          {note}")
    return "\n".join(lines)
