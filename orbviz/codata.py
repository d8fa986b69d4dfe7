"""The physical constants orbviz uses: CODATA 2022 recommended values.

Source: E. Tiesinga et al., CODATA recommended values of the fundamental physical constants
(2022 adjustment), as tabulated by NIST and shipped in ``scipy.constants`` (scipy 1.15 and
later). They are written out here because importing ``scipy.constants`` costs about 0.1 s of
every command's start-up; tests/test_codata.py checks each against ``scipy.constants``.
"""

from __future__ import annotations

__all__ = [
    "ATOMIC_TIME_S",
    "BOHR_RADIUS_M",
    "ELECTRON_MASS_U",
    "HARTREE_EV",
    "PROTON_ELECTRON_MASS_RATIO",
]

HARTREE_EV = 27.211386245981  # Hartree energy in eV
BOHR_RADIUS_M = 5.29177210544e-11  # Bohr radius, m
ATOMIC_TIME_S = 2.4188843265864e-17  # atomic unit of time, s
PROTON_ELECTRON_MASS_RATIO = 1836.152673426
ELECTRON_MASS_U = 5.485799090441e-4  # electron mass in daltons
