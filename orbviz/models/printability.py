"""Printability checks of a model: closed, one piece, thick enough, supported, no trapped voids.

Thresholds are common FDM practice (no source): features under ~1.2 mm for a 0.4 mm nozzle,
overhangs steeper than 45 degrees need supports.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np

from orbviz.models.options import ModelOptions
from orbviz.models.solids import arrays
from orbviz.surface.mesh import OrbitalMesh

if TYPE_CHECKING:
    from orbviz.models.build import PrintModel

__all__ = ["Check", "overhang_share", "printability"]


@dataclass(frozen=True)
class Check:
    """One printability finding: ``level`` is ``error`` (refused), ``warning`` or ``note``."""

    level: str
    message: str


def _thin_share(mesh: OrbitalMesh, mm_per_bohr: float, min_feature: float) -> dict[str, float]:
    """Share of each phase's volume thinner than min_feature (morphological opening on the grid).

    A region survives erosion then dilation by a ball of radius min_feature/2 only where it is at
    least min_feature across; what the opening removes is thinner than that.
    """
    from scipy import ndimage

    grid = mesh.grid
    radius_vox = 0.5 * min_feature / (grid.spacing * mm_per_bohr)
    if radius_vox < 0.5:  # finer than a sample: the grid cannot hold anything thinner
        return {}
    threshold = math.sqrt(mesh.isovalue.level)
    out = {}
    sides = (
        [("positive", 1.0), ("negative", -1.0)]
        if grid.field.kind == "signed"
        else [("surface", 0.0)]
    )
    for name, sign in sides:
        mask = (sign * grid.values >= threshold) if sign else (np.abs(grid.values) >= threshold)
        if not mask.any():
            continue
        eroded = ndimage.distance_transform_edt(mask) > radius_vox
        opened = ndimage.distance_transform_edt(~eroded) <= radius_vox
        out[name] = float(np.count_nonzero(mask & ~opened) / np.count_nonzero(mask))
    return out


def overhang_share(solid: Any) -> float:
    """Share of surface area facing down more steeply than 45 degrees, off the bed.

    Faces lying on the solid's lowest level (its face on the bed) are not overhangs.
    """
    v, f = arrays(solid)
    cross = np.cross(v[f[:, 1]] - v[f[:, 0]], v[f[:, 2]] - v[f[:, 0]])
    area = np.linalg.norm(cross, axis=1)
    nz = cross[:, 2] / np.maximum(area, 1e-30)
    on_bed = np.all(v[f][:, :, 2] < v[:, 2].min() + 1e-3, axis=1)
    down = (nz < -math.cos(math.radians(45))) & ~on_bed
    return float(area[down].sum() / area.sum())


def _body_checks(model: PrintModel) -> list[Check]:
    facts = model.facts()
    checks = []
    if not facts.watertight:
        checks.append(Check("error", "the united model is not a closed, outward body"))
    if facts.solids != 1:
        checks.append(
            Check(
                "error",
                f"the model falls into {facts.solids} separate pieces; use a thicker rod or a "
                "finer grid",
            )
        )
    if facts.cavities:
        checks.append(
            Check(
                "warning",
                f"the model holds {facts.cavities} closed internal void(s) between nested "
                "shells: a resin print traps liquid resin there; cut it in half to open them",
            )
        )
    return checks


def printability(
    model: PrintModel, meshes: list[OrbitalMesh], options: ModelOptions
) -> list[Check]:
    """Every finding about a model: errors refuse it, warnings and notes go to the user."""
    checks = _body_checks(model)
    min_feature = options.min_feature_mm
    if model.rod_mm < min_feature:
        checks.append(Check("error", f"the rod is {model.rod_mm:.2g} mm, under {min_feature:g} mm"))
    thin = {}
    for mesh in meshes:
        thin.update(_thin_share(mesh, model.mm_per_bohr, min_feature))
    for name, share in thin.items():
        if share > 0.02:
            checks.append(
                Check(
                    "warning",
                    f"{100 * share:.0f}% of the {name} part is thinner than {min_feature:g} mm: "
                    "make the model larger",
                )
            )
    checks += [Check("note", text) for text in model.notes]
    if not (options.stand or options.kit) and options.cut is None:
        checks.append(
            Check(
                "note",
                "no flat base: print with supports, add a stand, or cut it in half and print it "
                "on the cut face",
            )
        )
    overhang = 0.0 if options.kit else overhang_share(model.solid)  # a kit's halves lie flat
    if overhang > 0.05:
        checks.append(
            Check(
                "note",
                f"{100 * overhang:.0f}% of the surface faces down more steeply than 45 degrees: "
                "it needs supports",
            )
        )
    return checks
