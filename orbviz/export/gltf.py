"""glTF 2.0, binary (``.glb``) or JSON with a ``STEM.bin`` buffer (``.gltf``).

One mesh per body, each with its own explicit, non-metallic material: a real state's phases get a
PBR base colour each, a complex state's surface carries COLOR_0 vertex colours under a white
material. Colours are stored as linear light, as glTF 2.0 reads them (section 3.9.2), so a
viewer shows the sRGB colours of the figures. The vertex data stay in the physics frame (z is
the quantisation axis). One root node,
``orbviz-z-up``, rotates by -90 degrees about x, so that viewers, which are +Y up, show z up.
glTF units are metres: the numbers are the chosen length unit (bohr by default), and an
``extras`` entry on the root says which.
"""

from __future__ import annotations

import json
import math
from collections.abc import Callable, Sequence
from pathlib import Path
from typing import Any

from orbviz.errors import OutputError
from orbviz.surface.contour import Body

__all__ = ["companions", "encode", "encode_scene", "z_up_root"]

_Z_UP = [-math.sqrt(0.5), 0.0, 0.0, math.sqrt(0.5)]  # quaternion (x, y, z, w): -90 deg about x


def _root(units: str) -> dict[str, Any]:
    """Return the root node that turns z up, with the length unit noted."""
    return {
        "name": "orbviz-z-up",
        "rotation": list(_Z_UP),
        "extras": {"length_unit": units, "frame": "nucleus at origin, z quantisation axis"},
    }


def z_up_root(units: str) -> Callable[[dict[str, Any]], None]:
    """Return a tree edit hanging the scene under one root node that turns z up (unit noted)."""

    def edit(tree: dict[str, Any]) -> None:
        roots = tree["scenes"][tree.get("scene", 0)]["nodes"]
        tree["nodes"].append({**_root(units), "children": list(roots)})
        tree["scenes"][tree.get("scene", 0)]["nodes"] = [len(tree["nodes"]) - 1]
        tree.setdefault("asset", {})["generator"] = "orbviz"

    return edit


def companions(path: Path) -> list[Path]:
    """Return the buffer file ``STEM.bin`` of a ``.gltf``."""
    return [path.with_suffix(".bin")] if path.suffix.lower() == ".gltf" else []


def encode_scene(
    scene: Any,
    path: Path,
    *,
    tree_edit: Callable[[dict[str, Any]], None],
    buffer_edit: Callable[[dict[str, Any], dict[str, Any]], None] | None = None,
) -> dict[Path, bytes]:
    """Return a trimesh scene as GLB, or as glTF JSON plus its ``STEM.bin`` buffer."""
    from trimesh.exchange.gltf import export_glb, export_gltf

    if path.suffix.lower() == ".glb":
        data = export_glb(
            scene,
            include_normals=True,
            tree_postprocessor=tree_edit,
            buffer_postprocessor=buffer_edit,
        )
        return {path: data}
    if buffer_edit is not None:
        raise OutputError(f"cannot write {str(path)!r}: an animated glTF is written as .glb")
    bin_path = path.with_suffix(".bin")
    files = export_gltf(
        scene, include_normals=True, merge_buffers=True, tree_postprocessor=tree_edit
    )
    json_name = next(name for name in files if name.endswith(".gltf"))
    (buffer,) = [name for name in files if name != json_name]  # merge_buffers: exactly one
    tree = json.loads(files[json_name])
    tree["buffers"][0]["uri"] = bin_path.name  # named after the .gltf, so exports never collide
    return {path: json.dumps(tree, indent=1).encode(), bin_path: files[buffer]}


def encode(bodies: Sequence[Body], path: Path, *, scale: float, units: str) -> dict[Path, bytes]:
    """GLB, or glTF plus its buffer file (static bodies: written without trimesh)."""
    from orbviz.export.gltf_bodies import encode_meshes

    return encode_meshes(bodies, path, scale=scale, root=_root(units))
