"""Spherical harmonics (Condon-Shortley phase), their real combinations, and chemistry labels.

The harmonics are evaluated without trigonometry, as solid harmonics r^l Y_lm(x, y, z): a
polynomial in z and r^2 (a stable normalised recurrence) times (x + iy)^|m|. Dividing by r^l gives
Y_lm on directions; multiplying by R_nl / r^l gives psi with no division at all.
"""

from __future__ import annotations

import math

import numpy as np
import numpy.typing as npt

from orbviz.errors import SpecError

__all__ = [
    "LABELS",
    "complex_harmonic",
    "label_of",
    "lm_of_label",
    "mirror_parity",
    "polar_polynomial",
    "polar_start",
    "real_harmonic",
    "solid_harmonic_complex",
    "solid_harmonic_real",
]

# Real-orbital labels (common practice): l = 0..3, with m the index of the real combination
# (m > 0 cosine type, m < 0 sine type). Longest first so a parser can match greedily.
LABELS: dict[str, tuple[int, int]] = {
    "s": (0, 0),
    "px": (1, 1),
    "py": (1, -1),
    "pz": (1, 0),
    "dz2": (2, 0),
    "dxz": (2, 1),
    "dyz": (2, -1),
    "dx2-y2": (2, 2),
    "dxy": (2, -2),
    "fz3": (3, 0),
    "fxz2": (3, 1),
    "fyz2": (3, -1),
    "fz(x2-y2)": (3, 2),
    "fxyz": (3, -2),
    "fx(x2-3y2)": (3, 3),
    "fy(3x2-y2)": (3, -3),
}
_LABEL_OF = {lm: name for name, lm in LABELS.items()}
_LETTERS = "spdfghiklmnoqrtuvwxyz"  # spectroscopic letters (common practice; j is skipped)


def lm_of_label(label: str) -> tuple[int, int]:
    """(l, m_real) of an angular label such as ``"dx2-y2"`` (case-insensitive)."""
    key = label.strip().lower()
    if key not in LABELS:
        raise SpecError(f"unknown orbital label {label!r}; known: {', '.join(LABELS)}")
    return LABELS[key]


def label_of(n: int, l: int, m: int, *, real: bool = True) -> str:
    """Chemistry label for a state, e.g. ``3dxy``; ``n,l,m`` text where no label exists."""
    if real and (l, m) in _LABEL_OF:
        return f"{n}{_LABEL_OF[(l, m)]}"
    if l < len(_LETTERS):
        return f"{n}{_LETTERS[l]}(m={m:+d}{'' if not real else ', real'})"
    return f"{n},{l},{m}"


def polar_start(m: int) -> float:
    """S_m^m = (-1)^m sqrt((2m+1)/4pi prod_{k<=m} (2k-1)/(2k)), the recurrence's first term."""
    c = math.sqrt((2 * m + 1) / (4 * math.pi))
    for k in range(1, m + 1):
        c *= math.sqrt((2 * k - 1) / (2 * k))
    return -c if m % 2 else c


def polar_polynomial(l: int, m: int, z: np.ndarray, r2: np.ndarray | float) -> np.ndarray:
    """S_l^m(z, r^2) with r^l Y_l^m = S_l^m (x + iy)^m, for 0 <= m <= l.

    The normalised associated-Legendre recurrence in l at fixed m (stable to high degree):
    S_m^m = (-1)^m sqrt((2m+1)/4pi prod_{k<=m} (2k-1)/(2k)), S_{m+1}^m = sqrt(2m+3) z S_m^m,
    S_l^m = a (z S_{l-1}^m - b r^2 S_{l-2}^m), a = sqrt((4l^2-1)/(l^2-m^2)),
    b = sqrt(((l-1)^2-m^2)/(4(l-1)^2-1)).
    """
    c = polar_start(m)
    dtype = z.dtype
    prev = np.full_like(z, c)
    if l == m:
        return prev
    cur = z * dtype.type(math.sqrt(2 * m + 3) * c)
    for ll in range(m + 2, l + 1):
        a = math.sqrt((4 * ll * ll - 1) / (ll * ll - m * m))
        b = math.sqrt(((ll - 1) ** 2 - m * m) / (4 * (ll - 1) ** 2 - 1))
        prev, cur = cur, (z * cur - dtype.type(b) * r2 * prev) * dtype.type(a)
    return cur


def _xy_power(m: int, x: np.ndarray, y: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Real and imaginary parts of (x + iy)^m by repeated complex multiplication (no trig)."""
    re = np.ones_like(x)
    im = np.zeros_like(x)
    for _ in range(m):
        re, im = re * x - im * y, im * x + re * y
    return re, im


def _as_float(*arrays: npt.ArrayLike) -> tuple[np.ndarray, ...]:
    out = np.broadcast_arrays(*(np.asarray(a) for a in arrays))
    dtype = np.result_type(*out, np.float32)
    return tuple(a.astype(dtype, copy=False) for a in out)


def solid_harmonic_real(
    l: int, m: int, x: npt.ArrayLike, y: npt.ArrayLike, z: npt.ArrayLike
) -> np.ndarray:
    """Real solid harmonic r^l S_lm(x, y, z) with the chemistry signs.

    Parameters
    ----------
    l, m : int
        Degree and real index, ``|m| <= l`` (m > 0 cosine type, m < 0 sine type).
    x, y, z : array_like
        Cartesian coordinates (bohr, or unit-vector components for a harmonic on directions).

    Returns
    -------
    ndarray
        Real values in the input precision (float32 stays float32).

    Notes
    -----
    S_l0 = Y_l0; S_lm = sqrt(2) (-1)^m Re Y_l^m for m > 0; S_lm = sqrt(2) (-1)^m Im Y_l^|m| for
    m < 0. With the Condon-Shortley phase this gives px ~ +x, py ~ +y, dxy ~ +xy,
    dx2-y2 ~ +(x^2 - y^2), dz2 ~ 3z^2 - r^2.
    """
    x, y, z = _as_float(x, y, z)
    r2 = x * x + y * y + z * z
    mm = abs(m)
    poly = polar_polynomial(l, mm, z, r2)
    if m == 0:
        return poly
    re, im = _xy_power(mm, x, y)
    factor = z.dtype.type(math.sqrt(2.0) * (-1) ** mm)
    return factor * poly * (re if m > 0 else im)


def solid_harmonic_complex(
    l: int, m: int, x: npt.ArrayLike, y: npt.ArrayLike, z: npt.ArrayLike
) -> np.ndarray:
    """Complex solid harmonic r^l Y_l^m(x, y, z), Condon-Shortley phase.

    Y_l^{-m} = (-1)^m conj(Y_l^m). Returns complex64 for float32 input, complex128 otherwise.
    """
    x, y, z = _as_float(x, y, z)
    r2 = x * x + y * y + z * z
    mm = abs(m)
    poly = polar_polynomial(l, mm, z, r2)
    re, im = _xy_power(mm, x, y)
    if m < 0:
        im = -im
        if mm % 2:
            poly = -poly
    return poly * (re + 1j * im)


def _directions(polar: npt.ArrayLike, azimuth: npt.ArrayLike) -> tuple[np.ndarray, ...]:
    polar, azimuth = np.broadcast_arrays(
        np.asarray(polar, dtype=np.float64), np.asarray(azimuth, dtype=np.float64)
    )
    s = np.sin(polar)
    return s * np.cos(azimuth), s * np.sin(azimuth), np.cos(polar)


def complex_harmonic(l: int, m: int, polar: npt.ArrayLike, azimuth: npt.ArrayLike) -> np.ndarray:
    """Complex spherical harmonic Y_l^m(polar, azimuth) with the Condon-Shortley phase.

    Parameters
    ----------
    l, m : int
        Degree and order, ``|m| <= l``.
    polar : array_like
        Polar angle from +z, radians.
    azimuth : array_like
        Azimuth from +x towards +y, radians.

    Returns
    -------
    ndarray
        complex128 values.

    References
    ----------
    NIST DLMF section 14.30.
    """
    return solid_harmonic_complex(l, m, *_directions(polar, azimuth))


def real_harmonic(l: int, m: int, polar: npt.ArrayLike, azimuth: npt.ArrayLike) -> np.ndarray:
    """Real spherical harmonic with the chemistry signs; see :func:`solid_harmonic_real`."""
    return solid_harmonic_real(l, m, *_directions(polar, azimuth))


def mirror_parity(l: int, m: int) -> tuple[int, int, int]:
    """Parity of the real solid harmonic S_lm (chemistry forms) under x, y and z mirrors.

    S_lm is Re (x + iy)^m P(z, r^2) for m > 0, Im (x + iy)^|m| P for m < 0 and P for m = 0, with
    P of parity (-1)^(l - |m|) in z.
    """
    pz = (-1) ** (l - abs(m))
    if m > 0:
        return (-1) ** m, 1, pz
    if m < 0:
        return (-1) ** (abs(m) + 1), -1, pz
    return 1, 1, pz
