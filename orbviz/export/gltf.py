"""glTF 2.0, binary (``.glb``) or JSON with a ``STEM.bin`` buffer (``.gltf``).

One mesh per body, each with its own material: a real state's phases get a PBR base colour each,
a complex state's surface carries COLOR_0 vertex colours. The vertex data stay in the physics
frame (z is the quantisation axis). One root node, ``orbviz-z-up``, rotates by -90 degrees about
x, so that viewers, which are +Y up, show z up. glTF units are metres: the numbers are the chosen
length unit (bohr by default), and an ``extras`` entry on the root says which.
"""

from __future__ import annotations

import json
import math
from pathlib import Path

from orbviz.export._atomic import atomic_paths
from orbviz.export._scene import body_mesh

_Z_UP = [-math.sqrt(0.5), 0.0, 0.0, math.sqrt(0.5)]  # quaternion (x, y, z, w): -90 deg about x


def _scene(bodies, scale: float):
    import trimesh

    scene = trimesh.Scene()
    for body in bodies:
        scene.add_geometry(
            body_mesh(body, scale, material=True), geom_name=body.name, node_name=body.name
        )
    return scene


def _postprocess(units: str):
    def edit(tree: dict) -> None:
        roots = tree["scenes"][tree.get("scene", 0)]["nodes"]
        tree["nodes"].append(
            {
                "name": "orbviz-z-up",
                "rotation": _Z_UP,
                "children": list(roots),
                "extras": {"length_unit": units, "frame": "nucleus at origin, z quantisation axis"},
            }
        )
        tree["scenes"][tree.get("scene", 0)]["nodes"] = [len(tree["nodes"]) - 1]
        tree.setdefault("asset", {})["generator"] = "orbviz"

    return edit


def write(bodies, path: Path, *, scale: float, units: str) -> list[Path]:
    """Write GLB, or glTF plus its buffer file."""
    from trimesh.exchange.gltf import export_glb, export_gltf

    scene = _scene(bodies, scale)
    if path.suffix.lower() == ".glb":
        data = export_glb(scene, include_normals=True, tree_postprocessor=_postprocess(units))
        with atomic_paths(path) as (temp,):
            temp.write_bytes(data)
        return [path]
    bin_path = path.with_suffix(".bin")
    files = export_gltf(
        scene, include_normals=True, merge_buffers=True, tree_postprocessor=_postprocess(units)
    )
    json_name = next(name for name in files if name.endswith(".gltf"))
    buffers = [name for name in files if name != json_name]
    if len(buffers) != 1:
        raise RuntimeError(f"expected one glTF buffer, trimesh gave {buffers}")
    tree = json.loads(files[json_name])
    tree["buffers"][0]["uri"] = bin_path.name  # named after the .gltf, so exports never collide
    with atomic_paths(path, bin_path) as (temp_json, temp_bin):
        temp_json.write_text(json.dumps(tree, indent=1))
        temp_bin.write_bytes(files[buffers[0]])
    return [path, bin_path]
