"""3MF: all bodies as one mesh object, each triangle coloured by its body (lib3mf).

One object keeps the bodies in place relative to each other: a slicer drops separate objects
(and, from its command line, the components of one object) onto the bed one by one. Each
body's triangles carry its colour from a base material group (named after the body) and form a
named triangle set, so a reader can still tell the parts apart.

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


def _rgba(body: Body) -> tuple[int, int, int, int]:
    """Return the body's colour: its vertex colour if uniform, else neutral grey."""
    uniform = len(body.colors) and bool(np.all(body.colors == body.colors[0]))
    r, g, b, a = (int(v) for v in body.colors[0]) if uniform else (200, 200, 200, 255)
    return r, g, b, a


def encode(bodies: Sequence[Body], path: Path, *, scale: float, units: str) -> dict[Path, bytes]:
    """Return a 3MF package: one mesh object of all bodies, each triangle with its colour."""
    import lib3mf

    wrapper = lib3mf.get_wrapper()
    model = wrapper.CreateModel()
    model.SetUnit(lib3mf.ModelUnit.MilliMeter)
    model.GetMetaDataGroup().AddMetaData("orbviz", "length_unit", units, "string", True)
    materials = model.AddBaseMaterialGroup()
    group = materials.GetResourceID()
    vertices = np.concatenate([np.asarray(b.vertices, np.float64) * scale for b in bodies])
    offsets = np.cumsum([0] + [len(b.vertices) for b in bodies])
    faces = np.concatenate([b.faces + offsets[i] for i, b in enumerate(bodies)])
    mesh = model.AddMeshObject()
    mesh.SetName(path.stem)
    positions = [lib3mf.Position((float(x), float(y), float(z))) for x, y, z in vertices]
    triangles = [lib3mf.Triangle((int(i), int(j), int(k))) for i, j, k in faces]
    mesh.SetGeometry(positions, triangles)
    properties, first, indices = [], 0, []
    for body in bodies:
        index = materials.AddMaterial(body.name, wrapper.RGBAToColor(*_rgba(body)))
        indices.append(index)
        prop = lib3mf.TriangleProperties(group, (index, index, index))
        properties += [prop] * len(body.faces)
        part = mesh.AddTriangleSet(body.name, body.name)
        part.SetTriangleList(list(range(first, first + len(body.faces))))
        first += len(body.faces)
    if indices:
        mesh.SetObjectLevelProperty(group, indices[0])
        mesh.SetAllTriangleProperties(properties)
    model.AddBuildItem(mesh, wrapper.GetIdentityTransform())
    return {path: bytes(model.QueryWriter("3mf").WriteToBuffer())}
