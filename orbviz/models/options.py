"""The model job's options: size, rod, feature, stand, cut, split, marks, label, kit, colours."""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from orbviz._defaults import DEFAULTS, LIMITS
from orbviz._options import Convert, boolean, choice, number, option, size_pair, text
from orbviz.surface.colors import ColorPair
from orbviz.surface.options import colors_option, grid_option

__all__ = ["ModelOptions"]


def _label() -> Convert:
    """Read a stand label: text of up to 40 characters, or none (no label at all)."""
    read = text(40)

    def label(raw: Any) -> str | None:
        if raw is None:
            return None
        if isinstance(raw, str) and raw.strip().lower() == "none":
            return ""
        from orbviz.models.features import check_text

        text = read(raw).strip()
        return check_text(text) if text else ""  # an empty label is no label

    return label


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
    marks : {None, "embossed", "engraved"}
        A "+" on every positive lobe and a "-" on every negative one.
    label : str or None, default: None (the orbital's label and fraction)
        Text on the stand's front; ``""`` (``none``) for none.
    kit : bool, default: False
        Split into parts that print in one filament each and assemble (implies the stand).
    clearance_mm : float, default: 0.2
        Gap between a kit's joined parts (common FDM practice, no source).
    magnets : (float, float) or None
        Diameter and thickness of round magnets that hold each kit lobe's halves together.
    bed_mm : (float, float), default: (220, 220)
        The printer's bed, for laying out a kit's plates.
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
    marks: str | None = option(
        None,
        "a + on positive lobes and a - on negative ones, raised (embossed) or cut (engraved)",
        choice("embossed", "engraved", allow_none=True),
        metavar="{embossed,engraved}",
        const="embossed",
    )
    label: str | None = option(
        None,
        "text on the stand's front, or none (default: the orbital's label and fraction)",
        _label(),
        metavar="TEXT",
    )
    kit: bool = option(
        False, "a kit of one-colour parts to assemble (-o FOLDER or .zip)", boolean()
    )
    clearance_mm: float = option(
        0.2,
        "gap between a kit's joined parts, 0.05 to 1 (0.2 is common FDM practice)",
        number(0.05, 1.0, unit="mm"),
        unit="mm",
        key="clearance",
        metavar="MM",
    )
    magnets: tuple[float, float] | None = option(
        None,
        "round magnets DxT mm holding each kit lobe's halves (2x1 to 20x10)",
        size_pair((2.0, 1.0), (20.0, 10.0), allow_none=True),
        metavar="DxTmm",
    )
    bed_mm: tuple[float, float] = option(
        (220.0, 220.0),
        "the printer's bed for a kit's plates, 50x50 to 1000x1000",
        size_pair((50.0, 50.0), (1000.0, 1000.0), example="220x220mm"),
        key="bed",
        metavar="WxDmm",
    )

    @property
    def rod(self) -> float:
        """The rod diameter in mm: as given, or 4% of the size."""
        return DEFAULTS.rod_share * self.size_mm if self.rod_mm is None else self.rod_mm

    def relations(self) -> list[tuple[str, str]]:
        """Cross-option problems: the rod against the size and feature, kit-only options."""
        if self.kit and (self.cut is not None or self.split):
            name = "cut" if self.cut is not None else "split"
            return [(name, f"a kit is made of halves and parts already: leave out {{{name}}}")]
        if self.label and not (self.stand or self.kit):
            return [("label", "a label goes on the stand: add {stand} (a kit has one)")]
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
