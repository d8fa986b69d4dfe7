"""What ``orbviz info`` reports: the state's physical numbers and its enclosing isovalue.

The numbers come from :meth:`orbviz.states.state.State.properties` (physics) and
:func:`orbviz.levels.isovalue.enclosing_isovalue`; this module only gathers and formats them.
Every kind of state gives the same keys, ``null`` where it has no such number.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from orbviz._defaults import BOHR_IN_ANGSTROM, DEFAULTS, DISPLAY_UNITS
from orbviz._options import choice, option
from orbviz.codata import HARTREE_EV
from orbviz.levels.isovalue import enclosing_isovalue
from orbviz.states.state import State

__all__ = ["ReportOptions", "format_summary", "format_table", "hartree_in_ev", "summarise"]


@dataclass(frozen=True)
class ReportOptions:
    """How ``orbviz info`` shows its numbers (its JSON stays in atomic units, bohr and hartree).

    Attributes
    ----------
    units : {"angstrom", "bohr"}, default: "angstrom"
        Unit of the radii in the text (the isovalue is given per bohr^3, and per Å^3 beside it).
    """

    units: str = option(
        DEFAULTS.display_units,
        "length unit of the radii in the text (--json stays in bohr)",
        choice(*DISPLAY_UNITS),
        metavar="{angstrom,bohr}",
    )


def _length(bohr: float, units: str, digits: int) -> str:
    if units == "angstrom":
        return f"{bohr * BOHR_IN_ANGSTROM:.{digits}g} Å"
    return f"{bohr:.{digits}g} bohr"


def hartree_in_ev() -> float:
    """Return the hartree in electronvolts (CODATA 2022, :mod:`orbviz.codata`)."""
    return HARTREE_EV


def summarise(state: State, /, *, fraction: float = DEFAULTS.fraction) -> dict[str, Any]:
    """Everything ``orbviz info`` reports, as plain JSON-ready values.

    Parameters
    ----------
    state : State
        Any kind of state.
    fraction : float, default: 0.9
        Probability the isosurface should enclose.

    Returns
    -------
    dict
        The keys of docs/info.md: ``spec``, ``label``, ``kind``, ``n``, ``l``, ``m``, ``Z``,
        ``element``, ``form``, ``reduced_mass``, ``mass_ratio``, ``energy_hartree``,
        ``energy_ev``, ``degeneracy``, ``potential``, ``radial_nodes``, ``angular_nodes``,
        ``radial_node_radii_bohr``, ``mean_radius_bohr``, ``most_probable_radius_bohr``,
        ``fraction``, ``isovalue``, ``enclosed_fraction``, ``isovalue_method``,
        ``surface_max_radius_bohr``, ``notes``; a bond adds ``bond_distance_bohr``,
        ``overlap`` and ``normalisation``. Numbers a kind does not have are None.
    """
    props = state.properties()
    iso = enclosing_isovalue(state, fraction=fraction)
    first = state.centres[0].orbital  # every centre shares the charge and mass ratio
    energy = props.energy_hartree
    potential = first.potential.describe() if first.potential is not None else None
    return {
        "spec": state.spec,
        "label": state.label,
        "kind": state.kind,
        "n": props.n,
        "l": props.l,
        "m": props.m,
        "Z": first.Z,
        "element": first.element,
        "form": props.form,
        "reduced_mass": first.mass_ratio != 1.0,
        "mass_ratio": first.mass_ratio,
        "energy_hartree": energy,
        "energy_ev": None if energy is None else energy * hartree_in_ev(),
        "degeneracy": props.degeneracy,
        "potential": potential,
        "radial_nodes": props.radial_nodes,
        "angular_nodes": props.angular_nodes,
        "radial_node_radii_bohr": (
            None if props.radial_node_radii is None else list(props.radial_node_radii)
        ),
        "mean_radius_bohr": props.mean_radius,
        "most_probable_radius_bohr": props.most_probable_radius,
        **props.extra,
        "fraction": iso.fraction,
        "isovalue": iso.level,
        "enclosed_fraction": iso.enclosed_fraction,
        "isovalue_method": iso.method,
        "surface_max_radius_bohr": iso.max_radius,
        "notes": list(state.notes),
    }


def _state_lines(info: dict[str, Any]) -> list[str]:
    lines = [f"orbital       {info['label']}   (spec {info['spec']!r})"]
    if "bond_distance_bohr" in info:
        lines.append(
            f"combination   nuclei at z = -+{info['bond_distance_bohr'] / 2:g} bohr; overlap "
            f"S = {info['overlap']:.8f}; normalisation N = {info['normalisation']:.8f}"
        )
    elif info["n"] is not None:
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
    if info["potential"] is not None:
        lines.append(f"potential     {info['potential']} (radial part solved numerically)")
    return lines


def _energy_lines(info: dict[str, Any]) -> list[str]:
    if info["energy_hartree"] is None:
        return ["energy        none: an unoptimised combination has no energy of its own"]
    energy = f"{info['energy_hartree']:.10g} hartree = {info['energy_ev']:.8g} eV"
    if info["degeneracy"] is None:
        energy += "  (expectation value)"
    else:
        energy += f"  (degeneracy {info['degeneracy']}, spin not counted)"
    lines = [f"energy        {energy}"]
    if info.get("energy_error_hartree") is not None:
        lines.append(
            f"              solver's error estimate {info['energy_error_hartree']:.2g} hartree"
        )
    return lines


def _node_lines(info: dict[str, Any], units: str) -> list[str]:
    if info["radial_nodes"] is None:
        return []
    nodes = f"{info['radial_nodes']} radial"
    if info["angular_nodes"] is not None:
        nodes += f", {info['angular_nodes']} angular"
        if info["form"] == "complex" and info["m"]:
            nodes += " (and the z axis, a nodal line)"
    if info["radial_node_radii_bohr"]:
        radii = ", ".join(_length(r, units, 6) for r in info["radial_node_radii_bohr"])
        nodes += f"; radial nodes at r = {radii}"
    return [f"nodes         {nodes}"]


def format_summary(info: dict[str, Any], units: str = DEFAULTS.display_units) -> str:
    """Readable multi-line text for a :func:`summarise` result, radii in ``units``."""
    lines = _state_lines(info) + _energy_lines(info) + _node_lines(info, units)
    if info["mean_radius_bohr"] is not None:
        lines.append(
            f"radius        <r> = {_length(info['mean_radius_bohr'], units, 6)}; most probable "
            f"{_length(info['most_probable_radius_bohr'], units, 6)}"
        )
    per_angstrom = (
        f" ({info['isovalue'] / BOHR_IN_ANGSTROM**3:.6e} Å^-3)" if units == "angstrom" else ""
    )
    lines.append(
        f"isovalue      |psi|^2 = {info['isovalue']:.6e} bohr^-3{per_angstrom} encloses "
        f"{100 * info['enclosed_fraction']:.4f}% (asked {100 * info['fraction']:g}%); "
        f"surface reaches r = {_length(info['surface_max_radius_bohr'], units, 4)}"
    )
    lines += [f"note          {note}" for note in info["notes"]]
    return "\n".join(lines)


def format_table(infos: list[dict[str, Any]], units: str = DEFAULTS.display_units) -> str:
    """One row per state of a set: label, energy, degeneracy, nodes, <r> and isovalue."""
    scale, unit = (BOHR_IN_ANGSTROM, "Å") if units == "angstrom" else (1.0, "bohr")
    head = (
        f"{'orbital':<14} {'energy/hartree':>15} {'deg':>4} {'nodes r,a':>9} "
        f"{'<r>/' + unit:>10} "
        f"{'isovalue/bohr^-3':>17} {'encloses':>9}"
    )
    rows = [head]
    for info in infos:
        energy = "none" if info["energy_hartree"] is None else f"{info['energy_hartree']:.8g}"
        degeneracy = "-" if info["degeneracy"] is None else str(info["degeneracy"])
        nodes = (
            "-"
            if info["radial_nodes"] is None
            else f"{info['radial_nodes']},{info['angular_nodes']}"
        )
        mean = (
            "-" if info["mean_radius_bohr"] is None else f"{info['mean_radius_bohr'] * scale:.6g}"
        )
        rows.append(
            f"{info['label']:<14} {energy:>15} {degeneracy:>4} {nodes:>9} {mean:>10} "
            f"{info['isovalue']:>17.6e} {100 * info['enclosed_fraction']:>8.4f}%"
        )
    notes = dict.fromkeys(n for info in infos for n in info["notes"])
    rows += [f"note          {n}" for n in notes]
    return "\n".join(rows)
