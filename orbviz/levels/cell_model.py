"""The mass above a level in the cells of a ray: exact along the ray, linear across it.

A radial cell of a ray spans samples j and j + 1 of F = |psi|^2 on the square-root map r = r_max
u^2; F along it is the cubic through samples j - 1 .. j + 2. Across the ray's cell of directions F
is taken to vary linearly, with half-ranges a and b (interpolated linearly along the cell). The
mass above a level c is then the integral over the radial cell of u^5 E[F 1(F >= c)] for
F = f(s) + U1 + U2, U1 and U2 uniform on [-a, a] and [-b, b] (:func:`cell_mass`, a closed form),
by 3-point Gauss on three pieces split where the cubic crosses the level.
"""

from __future__ import annotations

import numpy as np

from orbviz._defaults import DEFAULTS

__all__ = ["cell_mass", "mass_above"]

# the cubic through samples at s = -1, 0, 1, 2 (coefficients of 1, s, s^2, s^3) and 3-point Gauss
_CUBIC = np.linalg.inv(np.vander(np.array([-1.0, 0.0, 1.0, 2.0]), 4, increasing=True))
_GAUSS_S, _GAUSS_W = np.polynomial.legendre.leggauss(3)
_GAUSS_S, _GAUSS_W = 0.5 * (_GAUSS_S + 1.0), 0.5 * _GAUSS_W


def cell_mass(f: np.ndarray, a: np.ndarray, b: np.ndarray, level: float) -> np.ndarray:
    """Mean of F 1(F >= level) for F = f + U1 + U2, U1 ~ U(-a, a), U2 ~ U(-b, b).

    With d = f - level, Y = d + U1 + U2: E[F 1(Y >= 0)] = level P(Y >= 0) + E[max(Y, 0)], and
    both are second differences over the corners of the square of the antiderivatives
    max(x, 0)^2 / 2 and max(x, 0)^3 / 6, divided by 4ab: with x+ = max(x, 0), each corner adds
    +-x+^2 (level / 2 + x+ / 6). A cell wholly above the level gives f and one wholly below 0,
    exactly; half-ranges are kept above 1e-4 f, so that the differences lose at most ~1e-8 of f
    to rounding in float64 (a spread that small moves P by ~1e-8 f^2 F'' / F'^2, far below the
    quadrature's error).
    """
    import numexpr

    least = 1e-4 * np.abs(f) + 1e-300
    names = {"d": f - level, "a": np.maximum(a, least), "b": np.maximum(b, least)}
    return numexpr.evaluate(_CELL_MASS, local_dict={**names, "half": 0.5 * level})


def _integrand(names: dict[str, object]) -> np.ndarray:
    """Return scale u^5 E[F 1(F >= level)] at s = ``at`` of each cell (fused passes)."""
    import numexpr

    f = numexpr.evaluate("c0 + at * (c1 + at * (c2 + at * c3))", local_dict=names)
    least = numexpr.evaluate("1e-4 * abs(f) + 1e-300", local_dict={"f": f})
    spread = {"x": names["a0"], "dx": names["da"], "at": names["at"], "least": least}
    a = numexpr.evaluate(_FLOORED, local_dict=spread)
    spread.update(x=names["b0"], dx=names["db"])
    b = numexpr.evaluate(_FLOORED, local_dict=spread)
    local = {"d": f - names["level"], "a": a, "b": b}  # type: ignore[operator]
    local.update({k: names[k] for k in ("half", "u0", "at", "h", "scale")})  # type: ignore[misc]
    return numexpr.evaluate(f"scale * (u0 + at * h) ** 5 * {_CELL_MASS}", local_dict=local)


def _corner(sign: str, x: str) -> str:
    positive = f"where({x} > 0, {x}, 0.0)"
    return f" {sign} {positive} ** 2 * (half + {positive} / 6.0)"


_CORNERS = "".join(
    _corner(sign, x)
    for sign, x in (
        ("+", "d + a + b"),
        ("-", "d + a - b"),
        ("-", "d - a + b"),
        ("+", "d - a - b"),
    )
)
_CELL_MASS = (
    f"where(d >= a + b, d + 2.0 * half, where(d <= -a - b, 0.0, ({_CORNERS}) / (4.0 * a * b)))"
)
_FLOORED = "where(x + at * dx > least, x + at * dx, least)"


def _pieces(
    coef: np.ndarray, spreads: np.ndarray, level: float
) -> list[tuple[np.ndarray, np.ndarray]]:
    """Split each cell (s = 0 .. 1) about where its cubic F crosses the level.

    The cell mass changes from 0 to F over |F - level| < a + b, a band that may be much narrower
    than the cell: [0, s* - w], [s* - w, s* + w] and [s* + w, 1], with s* the crossing (Newton
    on the cubic from the linear guess) and w the band's half-width in s, are each smooth enough
    for 4-point Gauss, where one rule across a sharp band would be first order.
    """
    f0 = coef[0]
    f1 = coef[0] + coef[1] + coef[2] + coef[3]
    with np.errstate(divide="ignore", invalid="ignore"):
        s = np.clip(np.where(f1 != f0, (level - f0) / (f1 - f0), 0.5), 0.0, 1.0)
        for _ in range(4):
            value = coef[0] + s * (coef[1] + s * (coef[2] + s * coef[3])) - level
            slope = coef[1] + s * (2.0 * coef[2] + 3.0 * s * coef[3])
            s = np.clip(s - np.where(slope != 0, value / slope, 0.0), 0.0, 1.0)
        slope = coef[1] + s * (2.0 * coef[2] + 3.0 * s * coef[3])
        band = (spreads[0] + s * spreads[1] + spreads[2] + s * spreads[3]) / np.abs(slope)
    band = np.where(np.isfinite(band), band, 1.0)
    left, right = np.clip(s - band, 0.0, 1.0), np.clip(s + band, 0.0, 1.0)
    return [(np.zeros_like(s), left), (left, right), (right, np.ones_like(s))]


def mass_above(
    f: np.ndarray, a: np.ndarray, b: np.ndarray, u0: np.ndarray, h: float, level: float
) -> np.ndarray:
    """Integral over s = 0 .. 1 of (u0 + s h)^5 E[F 1(F >= level)] in each radial cell.

    Parameters
    ----------
    f : (4, cells) array
        F at the samples j - 1 .. j + 2 about each cell [j, j + 1].
    a, b : (2, cells) arrays
        Angular half-ranges at samples j and j + 1.
    u0 : (cells,) array
        u at sample j.
    h : float
        Step in u.
    level : float
        The density level.

    Returns
    -------
    (cells,) ndarray
        The integrals, float64 (times 2 r_max^3 h and the solid angle: the cell's mass above).
    """
    coef = _CUBIC @ f.astype(np.float64)  # F across each cell, s = 0 .. 1
    a, b = a.astype(np.float64), b.astype(np.float64)
    spreads = np.stack([a[0], a[1] - a[0], b[0], b[1] - b[0]])
    names: dict[str, object] = {f"c{k}": row for k, row in enumerate(coef)}
    names.update(zip(("a0", "da", "b0", "db"), spreads, strict=True))
    names.update(u0=u0, h=h, level=level, half=0.5 * level)
    # the Gauss nodes of the three pieces of each cell, (9, cells) at once, in chunks
    ends = np.array(_pieces(coef, spreads, level))  # (piece, low/high, cells)
    width = ends[:, 1] - ends[:, 0]
    nodes = (ends[:, None, 0] + _GAUSS_S[None, :, None] * width[:, None]).reshape(9, -1)
    scale = (_GAUSS_W[None, :, None] * width[:, None]).reshape(9, -1)
    inside = np.empty(u0.size)
    step = max(1, DEFAULTS.ray_block // 9)
    for first in range(0, u0.size, step):
        chunk = slice(first, first + step)
        local = {k: v[..., chunk] if isinstance(v, np.ndarray) else v for k, v in names.items()}
        local.update(at=nodes[:, chunk], scale=scale[:, chunk])
        inside[chunk] = _integrand(local).sum(axis=0)
    return inside
