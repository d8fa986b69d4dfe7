"""Shared test helpers: independent reference implementations built from scipy only."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.special import eval_genlaguerre, gammaln, sph_harm_y


def reference_radial(n: int, l: int, r: np.ndarray, Z: float = 1.0) -> np.ndarray:
    """R_nl from scipy.special.eval_genlaguerre (integer degree) and the textbook normalisation."""
    rho = 2.0 * Z * np.asarray(r, dtype=float) / n
    log_norm = 0.5 * (
        3 * math.log(2 * Z / n) + gammaln(n - l) - math.log(2 * n) - gammaln(n + l + 1)
    )
    return np.exp(log_norm - rho / 2) * rho**l * eval_genlaguerre(n - l - 1, 2 * l + 1, rho)


def reference_real_harmonic(l: int, m: int, polar, azimuth) -> np.ndarray:
    """Real harmonics from scipy's complex ones with the chemistry sign convention.

    Source: ../shared/REFERENCES.md (m > 0: sqrt2 (-1)^m Re Y_l^m; m < 0: sqrt2 (-1)^m Im Y_l^|m|).
    """
    if m == 0:
        return np.real(sph_harm_y(l, 0, polar, azimuth))
    y = sph_harm_y(l, abs(m), polar, azimuth)
    part = np.real(y) if m > 0 else np.imag(y)
    return math.sqrt(2) * (-1) ** abs(m) * part


@pytest.fixture
def rng() -> np.random.Generator:
    return np.random.default_rng(20261202)
