"""orbviz's written-out constants against CODATA as shipped in scipy.constants."""

from __future__ import annotations

import pytest
from scipy.constants import physical_constants

from orbviz import codata


@pytest.mark.parametrize(
    ("name", "key"),
    [
        ("HARTREE_EV", "Hartree energy in eV"),
        ("BOHR_RADIUS_M", "Bohr radius"),
        ("ATOMIC_TIME_S", "atomic unit of time"),
        ("PROTON_ELECTRON_MASS_RATIO", "proton-electron mass ratio"),
        ("ELECTRON_MASS_U", "electron mass in u"),
    ],
)
def test_constant_is_codata(name, key):
    # CODATA recommended values through scipy.constants.physical_constants (docs/references.md)
    assert getattr(codata, name) == physical_constants[key][0]
