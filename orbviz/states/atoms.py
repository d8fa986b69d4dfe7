"""Ground-state configurations and Slater's-rules effective charges, elements 1-54 (H to Xe).

A spec with an element prefix, ``Na:3s``, names the screened hydrogen-like orbital: the same
shape as hydrogen's, with the nuclear charge replaced by Slater's effective charge for that
electron.

Configurations follow the aufbau (Madelung, n + l) order: 1s 2s 2p 3s 3p 4s 3d 4p 5s 4d 5p. The
exceptions among elements 1-54 are taken from the ground-state configurations of the NIST Atomic
Spectra Database (from memory): Cr 3d5 4s1, Cu 3d10 4s1, Nb 4d4 5s1, Mo 4d5 5s1, Ru 4d7 5s1,
Rh 4d8 5s1, Pd 4d10 and Ag 4d10 5s1.

Slater's rules (J. C. Slater, Phys. Rev. 36, 57 (1930)) group the subshells as (1s) (2s,2p)
(3s,3p) (3d) (4s,4p) (4d) (5s,5p). For an electron in a group:
- the other electrons of its group screen 0.35 each (0.30 within 1s);
- for an s or p electron, those with principal number n - 1 screen 0.85 each, and those
  further in 1.00 each;
- for a d electron, every electron in the groups before its own screens 1.00;
- the electrons in groups after it do not screen.
"""

from __future__ import annotations

from orbviz.errors import SpecError

__all__ = [
    "SLATER_N",
    "SYMBOLS",
    "configuration",
    "configuration_text",
    "element",
    "screened_charge",
    "slater_charge",
    "slater_energy",
    "slater_group_size",
]

SYMBOLS = (
    "H He Li Be B C N O F Ne Na Mg Al Si P S Cl Ar K Ca Sc Ti V Cr Mn Fe Co Ni Cu Zn Ga Ge As "
    "Se Br Kr Rb Sr Y Zr Nb Mo Tc Ru Rh Pd Ag Cd In Sn Sb Te I Xe"
).split()
_ORDER = [(1, 0), (2, 0), (2, 1), (3, 0), (3, 1), (4, 0), (3, 2), (4, 1), (5, 0), (4, 2), (5, 1)]
_EXCEPTIONS = {  # Z: changes to the aufbau filling, {(n, l): electrons}
    24: {(3, 2): 5, (4, 0): 1},
    29: {(3, 2): 10, (4, 0): 1},
    41: {(4, 2): 4, (5, 0): 1},
    42: {(4, 2): 5, (5, 0): 1},
    44: {(4, 2): 7, (5, 0): 1},
    45: {(4, 2): 8, (5, 0): 1},
    46: {(4, 2): 10, (5, 0): 0},
    47: {(4, 2): 10, (5, 0): 1},
}
_LETTER = "spdf"


def element(symbol: str) -> int:
    """Atomic number of an element symbol (case-insensitive), 1-54."""
    lookup = {s.lower(): z for z, s in enumerate(SYMBOLS, start=1)}
    z = lookup.get(symbol.strip().lower())
    if z is None:
        raise SpecError(f"unknown element {symbol!r}; elements H to Xe (1-54) are known")
    return z


def configuration(Z: int) -> dict[tuple[int, int], int]:
    """Ground-state occupation {(n, l): electrons} of the neutral atom with atomic number Z."""
    if not 1 <= Z <= len(SYMBOLS):
        raise SpecError(f"configurations are known for Z = 1..{len(SYMBOLS)}, got {Z}")
    left, filled = Z, {}
    for n, l in _ORDER:
        take = min(left, 2 * (2 * l + 1))
        if take:
            filled[(n, l)] = take
        left -= take
    filled.update(_EXCEPTIONS.get(Z, {}))
    return {k: v for k, v in sorted(filled.items()) if v}


def configuration_text(Z: int) -> str:
    """E.g. ``1s2 2s2 2p6 3s1``."""
    return " ".join(f"{n}{_LETTER[l]}{k}" for (n, l), k in configuration(Z).items())


def _group(n: int, l: int) -> tuple[int, int]:
    """Slater's group: s and p of one shell together, d and f apart; sortable in his order."""
    return (n, 0) if l <= 1 else (n, l)


def _order(group: tuple[int, int]) -> tuple[int, int]:
    n, l = group
    return (n, 0) if l == 0 else (n, l)  # (3,0) sp < (3,2) d < (4,0) sp < (4,2) d ...


# Slater's effective principal quantum numbers n* (J. C. Slater, Phys. Rev. 36, 57 (1930))
SLATER_N = {1: 1.0, 2: 2.0, 3: 3.0, 4: 3.7, 5: 4.0, 6: 4.2}


def slater_energy(n: int, charge: float, mass_ratio: float = 1.0) -> float:
    """Slater's orbital energy -Z_eff^2 / (2 n*^2) in hartree (n* = 3.7, 4.0, 4.2 for n = 4-6)."""
    return -(charge**2) * mass_ratio / (2.0 * SLATER_N[n] ** 2)


def slater_group_size(n: int, l: int) -> int:
    """States of one Slater group, which share Z_eff and n*: 1s 1, ns+np 4, nd 5, nf 7."""
    if n == 1:
        return 1
    return 4 if l <= 1 else 2 * l + 1


def slater_charge(Z: int, n: int, l: int) -> float:
    """Effective nuclear charge Z - S felt by an (n, l) electron of the neutral atom Z.

    Raises
    ------
    SpecError
        If the ground configuration has no (n, l) electron.
    """
    config = configuration(Z)
    if (n, l) not in config:
        raise SpecError(
            f"{SYMBOLS[Z - 1]} has no {n}{_LETTER[l] if l < 4 else l} electron in its ground "
            f"configuration ({configuration_text(Z)})"
        )
    own = _group(n, l)
    screening = 0.0
    for (m, k), count in config.items():
        group = _group(m, k)
        if group == own:
            screening += (count - 1 if (m, k) == (n, l) else count) * (0.30 if n == 1 else 0.35)
            continue
        if _order(group) > _order(own):
            continue
        if l <= 1:
            screening += count * (0.85 if m == n - 1 else 1.00 if m < n - 1 else 0.0)
        else:
            screening += count * 1.00
    return round(Z - screening, 10)  # the rules work in steps of 0.05: no float noise


def screened_charge(
    symbol: str, shells: list[tuple[int, int]], spec: str
) -> tuple[str, float, str]:
    """Slater's charge shared by the named (n, l) electrons of an element.

    Returns
    -------
    (str, float, str)
        The element's symbol, the effective charge, and a note for the user.

    Raises
    ------
    SpecError
        If the element is unknown, has no such electron, or the electrons named belong to
        Slater groups with different charges.
    """
    nucleus = element(symbol)
    name = SYMBOLS[nucleus - 1]
    charges = {(n, l): slater_charge(nucleus, n, l) for n, l in shells}
    if len(set(charges.values())) != 1:
        listed = ", ".join(f"{n}{_LETTER[l]}: {c:.2f}" for (n, l), c in charges.items())
        raise SpecError(
            f"{spec!r} mixes electrons with different Slater charges ({listed}); "
            "name states of one Slater group"
        )
    charge = next(iter(charges.values()))
    note = (
        f"screened hydrogen-like orbital of {name} (Z = {nucleus}, "
        f"{configuration_text(nucleus)}): Slater's Z_eff = {charge:.2f}; its energy "
        f"-Z_eff^2/2n*^2 (n* = {SLATER_N[shells[0][0]]:g}) is a rough estimate"
    )
    return name, charge, note
