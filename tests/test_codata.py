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
    # CODATA recommended values through scipy.constants.physical_constants (docs/references.md):
    # equal to CODATA 2022; a later adjustment moves a value by a few of its standard
    # uncertainties at most, which this allows (3 sigma), so a scipy update does not fail here
    value, _, sigma = physical_constants[key]
    assert abs(getattr(codata, name) - value) <= 3 * sigma
