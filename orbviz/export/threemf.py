"""3MF with one mesh object per body and its colour as a base material (lib3mf).

trimesh writes 3MF without colours, so this uses lib3mf, the 3MF Consortium's reference library.
3MF has no atomic length unit. The model declares millimetres, so one written unit (a bohr by
default) prints as 1 mm, and the metadata entry ``orbviz:length_unit`` records the true unit.
Printable models at a physical size come from ``orbviz model``.
"""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path

import numpy as np

from orbviz.surface.contour import Body


def companions(path: Path) -> list[Path]:
    """No companion files."""
    return []


def encode(bodies: Sequence[Body], path: Path, *, scale: float, units: str) -> dict[Path, bytes]:
    """Return a 3MF package of all bodies, each a mesh object with its base material."""
    import lib3mf

    wrapper = lib3mf.get_wrapper()
    model = wrapper.CreateModel()
    model.SetUnit(lib3mf.ModelUnit.MilliMeter)
    model.GetMetaDataGroup().AddMetaData("orbviz", "length_unit", units, "string", True)
    materials = model.AddBaseMaterialGroup()
    for body in bodies:
        uniform = len(body.colors) and bool(np.all(body.colors == body.colors[0]))
        r, g, b, a = (int(v) for v in body.colors[0]) if uniform else (200, 200, 200, 255)
        index = materials.AddMaterial(body.name, wrapper.RGBAToColor(r, g, b, a))
        mesh = model.AddMeshObject()
        mesh.SetName(body.name)
        vertices = np.asarray(body.vertices * scale, dtype=np.float64)
        positions = [lib3mf.Position((float(x), float(y), float(z))) for x, y, z in vertices]
        triangles = [lib3mf.Triangle((int(i), int(j), int(k))) for i, j, k in body.faces]
        mesh.SetGeometry(positions, triangles)
        mesh.SetObjectLevelProperty(materials.GetResourceID(), index)
        model.AddBuildItem(mesh, wrapper.GetIdentityTransform())
    return {path: bytes(model.QueryWriter("3mf").WriteToBuffer())}
