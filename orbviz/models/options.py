"""The model job's options: size, rod, thinnest feature, stand, cut, split, grid and colours."""

from __future__ import annotations

import math
from dataclasses import dataclass

from orbviz._defaults import DEFAULTS, LIMITS
from orbviz._options import boolean, choice, number, option
from orbviz.surface.colors import ColorPair
from orbviz.surface.options import colors_option, grid_option

__all__ = ["ModelOptions"]


@dataclass(frozen=True)
class ModelOptions:
    """A printable model's options (lengths in mm).

    Attributes
    ----------
    size_mm : float, default: 60
        Longest side of the model.
    rod_mm : float or None, default: None (4% of the size)
        Rod and spoke diameter.
    min_feature_mm : float, default: 1.2
        Thinnest printable feature (common FDM practice for a 0.4 mm nozzle, no source).
    stand : bool, default: False
        Add a round base plate under the model.
    cut : {None, "half", "quarter"}
        Remove x > 0 (half) or x > 0, y > 0 (quarter) to show nested shells.
    split : bool, default: False
        Write one STL per colour part.
    grid : int, default: 128
        Samples per axis of the mesh.
    colors : pair of RGBA
        Phase colours of the colour parts.
    """

    size_mm: float = option(
        60.0,
        "longest side of the model, 5 to 500",
        number(LIMITS.model_size_min_mm, LIMITS.model_size_max_mm, unit="mm"),
        unit="mm",
        key="size",
        metavar="MM",
    )
    rod_mm: float | None = option(
        None,
        "rod and spoke diameter, up to a quarter of the size (default: 4% of the size)",
        number(0.1, LIMITS.model_size_max_mm * LIMITS.rod_share_max, allow_none=True, unit="mm"),
        unit="mm",
        key="rod",
        metavar="MM",
    )
    min_feature_mm: float = option(
        DEFAULTS.min_feature_mm,
        "thinnest printable feature, 0.1 to 10 (1.2 is common FDM practice)",
        number(0.1, 10.0, unit="mm"),
        unit="mm",
        key="min_feature",
        metavar="MM",
    )
    stand: bool = option(False, "add a round base plate", boolean())
    cut: str | None = option(
        None,
        "cut away x > 0 (half) or x > 0, y > 0 (quarter)",
        choice("half", "quarter", allow_none=True),
        metavar="{half,quarter}",
    )
    split: bool = option(False, "one STL per colour part (FILE-support.stl, ...)", boolean())
    grid: int = grid_option()
    colors: ColorPair = colors_option()

    @property
    def rod(self) -> float:
        """The rod diameter in mm: as given, or 4% of the size."""
        return DEFAULTS.rod_share * self.size_mm if self.rod_mm is None else self.rod_mm

    def relations(self) -> list[tuple[str, str]]:
        """Cross-option problems: the rod against the size and the thinnest feature."""
        rod, size, least = self.rod, self.size_mm, self.min_feature_mm
        if rod > LIMITS.rod_share_max * size:
            return [
                (
                    "rod_mm",
                    f"a {rod:g} mm rod would hide a {size:g} mm model; at most "
                    f"{LIMITS.rod_share_max * size:.3g} mm ({100 * LIMITS.rod_share_max:g}% of "
                    "{size_mm})",
                )
            ]
        if rod < least:
            need = math.ceil(least / DEFAULTS.rod_share)
            fix = f"use {{size_mm}} >= {need} or " if self.rod_mm is None else "use "
            fix += f"{{rod_mm}} {least:g}"
            return [
                ("rod_mm", f"a {rod:.2g} mm rod is under the {least:g} mm thinnest feature: {fix}")
            ]
        return []
