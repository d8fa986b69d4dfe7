"""Point clouds at a physical size: scaled to a length or into a block, thinned to a spacing.

A laser engraver marks dots inside a glass or acrylic block; it cannot place two dots closer
than its spot. :func:`prepare` takes sampled points (bohr) and returns them in millimetres:
scaled so the cloud's longest side is ``size``, or so it fits inside ``block`` less ``margin``
on every side, centred; thinned so that no two points are closer than ``min_spacing``; and,
with ``inside``, only the points inside the surface that encloses that fraction.

The rare far samples of a density's tail would set the scale and shrink the shape, so the scale
is taken from the points inside the 99.9% radial quantile about the centre, and the points
beyond it are left out (a note says how many).
"""

from __future__ import annotations

import dataclasses
import math
import re
from dataclasses import dataclass
from typing import Any

import numpy as np

from orbviz._defaults import LIMITS
from orbviz._options import choice, integer, number, option
from orbviz.errors import OptionError
from orbviz.levels.sampling import MAX_POINTS, Points
from orbviz.states.state import State

__all__ = ["SampleOptions", "block_size", "prepare"]

_TRIM = 0.999  # the radial quantile that sets the scale (see the module docstring)


def block_size(raw: Any) -> tuple[float, float, float] | None:
    """Read a block ``50x50x80mm`` (mm, cm or in; each side 5 to 1000 mm) -> (x, y, z) in mm."""
    rule = "expected WxDxH with a unit, like 50x50x80mm, each side 5 to 1000 mm"
    if raw is None or (isinstance(raw, str) and raw.strip().lower() == "none"):
        return None
    if isinstance(raw, (tuple, list)) and len(raw) == 3:
        sides = [float(v) for v in raw if isinstance(v, (int, float)) and not isinstance(v, bool)]
    else:
        match = re.fullmatch(
            r"\s*([\d.]+)\s*x\s*([\d.]+)\s*x\s*([\d.]+)\s*(mm|cm|in)\s*", str(raw), re.I
        )
        if match is None:
            raise ValueError(f"{rule}, got {raw!r}")
        per_mm = {"mm": 1.0, "cm": 10.0, "in": 25.4}[match.group(4).lower()]
        try:
            sides = [float(match.group(k)) * per_mm for k in (1, 2, 3)]
        except ValueError:
            raise ValueError(f"{rule}, got {raw!r}") from None
    if len(sides) != 3 or not all(math.isfinite(s) and 5.0 <= s <= 1000.0 for s in sides):
        raise ValueError(f"{rule}, got {raw!r}")
    return sides[0], sides[1], sides[2]


def _mm(low: float, high: float, allow_none: bool = True) -> Any:
    return number(low, high, allow_none=allow_none, unit="mm")


@dataclass(frozen=True)
class SampleOptions:
    """What ``orbviz sample`` draws and how the points are placed.

    Attributes
    ----------
    points : int, default: 100000
        Number of points drawn, 1 to 10^7.
    seed : int or None, default: None
        Seed for the generator (the same seed, the same points).
    size : float or None, default: None
        Longest side of the cloud in mm (5 to 1000); None keeps bohr (or ``units``).
    block : (float, float, float) or None, default: None
        A block in mm (x, y, z) the cloud must fit inside, less ``margin``; exclusive with
        ``size``.
    margin : float, default: 3
        Clear border inside the block, mm (common practice, no source).
    min_spacing : float or None, default: None
        Thin the points so that no two are closer than this, mm (an engraver's spot; about
        0.1 mm is common practice, no source). Needs ``size`` or ``block``.
    inside : float or None, default: None
        Keep only the points inside the surface that encloses this fraction.
    units : {"bohr", "angstrom"}, default: "bohr"
        Unit of the written positions when no physical size is given.
    """

    points: int = option(
        100_000, f"points to draw, 1 to {MAX_POINTS:.0e}", integer(1, MAX_POINTS), metavar="N"
    )
    seed: int | None = option(
        None, "seed of the random generator", integer(0, 2**63 - 1, allow_none=True), metavar="S"
    )
    size: float | None = option(
        None, "longest side of the cloud, 5 to 1000 mm", _mm(5.0, 1000.0), unit="mm", metavar="MM"
    )
    block: tuple[float, float, float] | None = option(
        None, "fit inside a block, like 50x50x80mm", block_size, metavar="WxDxH"
    )
    margin: float = option(
        3.0, "clear border inside the block, 0 to 100 mm", number(0.0, 100.0), unit="mm"
    )
    min_spacing: float | None = option(
        None, "no two points closer than this, 0.01 to 10 mm", _mm(0.01, 10.0), unit="mm"
    )
    inside: float | None = option(
        None,
        "keep only points inside the surface enclosing this fraction",
        number(LIMITS.fraction_min, LIMITS.fraction_max, allow_none=True),
        metavar="F",
    )
    units: str = option(
        "bohr",
        "unit of the positions without a physical size",
        choice("bohr", "angstrom"),
        metavar="{bohr,angstrom}",
    )

    def relations(self) -> list[tuple[str, str]]:
        """Cross-option problems: size and block together, a spacing with no physical size."""
        if self.size is not None and self.block is not None:
            return [("block", "give --size or --block, not both")]
        if self.min_spacing is not None and self.size is None and self.block is None:
            return [("min_spacing", "needs a physical size: give --size or --block")]
        if self.block is not None and 2 * self.margin >= min(self.block):
            return [("margin", f"{self.margin:g} mm on each side leaves no room in the block")]
        return []


def prepare(points: Points, state: State, options: SampleOptions) -> tuple[Points, str, list[str]]:
    """Return the points placed as the options ask, their length unit, and notes.

    Raises
    ------
    OptionError
        When thinning to ``min_spacing`` would keep too few points to show a shape.
    """
    notes: list[str] = []
    keep = np.ones(len(points), dtype=bool)
    if options.inside is not None:
        from orbviz.levels.isovalue import enclosing_isovalue

        level = enclosing_isovalue(state, fraction=options.inside).level
        p = points.positions.astype(np.float64)
        keep &= state.density(p[:, 0], p[:, 1], p[:, 2]) >= level
    physical = options.size is not None or options.block is not None
    if not physical:
        from orbviz._defaults import BOHR_IN_ANGSTROM

        scale = BOHR_IN_ANGSTROM if options.units == "angstrom" else 1.0
        kept = _subset(points, keep)
        return (
            dataclasses.replace(kept, positions=kept.positions * np.float32(scale)),
            options.units,
            notes,
        )
    reach = state.radial_quantile(_TRIM)
    far = np.linalg.norm(points.positions, axis=1) > reach
    if options.inside is None and far.any():
        notes.append(
            f"{int((far & keep).sum()):,} of {len(points):,} points beyond the {100 * _TRIM:g}% "
            "radius left out, so that rare far samples do not set the scale"
        )
    keep &= ~far
    kept = _subset(points, keep)
    xyz = kept.positions.astype(np.float64)
    low, high = xyz.min(axis=0), xyz.max(axis=0)
    centre, sides = (low + high) / 2, np.maximum(high - low, 1e-12)
    if options.size is not None:
        scale = options.size / sides.max()
    else:
        assert options.block is not None
        room = np.asarray(options.block) - 2 * options.margin
        scale = float((room / sides).min())
    mm = (xyz - centre) * scale
    if options.block is not None:  # centred in the block, corner at the origin
        mm += np.asarray(options.block) / 2
    kept = dataclasses.replace(kept, positions=mm.astype(np.float32))
    if options.min_spacing is not None:
        kept = _thin(kept, options.min_spacing, notes)
    return kept, "mm", notes


def _subset(points: Points, keep: np.ndarray) -> Points:
    return dataclasses.replace(points, positions=points.positions[keep], phase=points.phase[keep])


def _thin(points: Points, spacing: float, notes: list[str]) -> Points:
    """Keep points so that no two lie closer than ``spacing`` (greedy, in sampling order).

    Points sharing a cell of side spacing / sqrt(3) are closer than the spacing, so the first
    of each cell is kept first; the few close pairs left are then resolved by a k-d tree, each
    pair (i, j), i < j, dropping j while both are kept.
    """
    from scipy.spatial import cKDTree

    xyz = points.positions.astype(np.float64)
    cell = np.floor(xyz / (spacing / math.sqrt(3))).astype(np.int64)
    _, first = np.unique(cell, axis=0, return_index=True)
    order = np.sort(first)
    candidate = xyz[order]
    pairs = cKDTree(candidate).query_pairs(spacing * (1 - 1e-9), output_type="ndarray")
    keep = np.ones(len(candidate), dtype=bool)
    for i, j in pairs[np.lexsort((pairs[:, 1], pairs[:, 0]))]:
        if keep[i] and keep[j]:
            keep[j] = False
    chosen = order[keep]
    if len(chosen) < 100:
        raise OptionError(
            "min_spacing",
            f"{spacing:g} mm leaves {len(chosen)} of {len(points):,} points; at least 100 show "
            "a shape: use a smaller spacing or a larger size",
        )
    notes.append(f"{len(chosen):,} of {len(points):,} points kept at {spacing:g} mm spacing")
    mask = np.zeros(len(points), dtype=bool)
    mask[chosen] = True
    return _subset(points, mask)
