"""Static bodies as glTF 2.0, written directly: no trimesh import.

The same document the trimesh route writes (see :mod:`orbviz.export.gltf`): one mesh and node
per body, a matte PBR material per body (its phase colour, or white under COLOR_0 vertex
colours; the rules of :mod:`orbviz.surface.convert`), positions, normals and triangle indices
in one buffer, and the root node that turns z up. The document is a plain JSON tree and the
binary container is the GLB layout of the glTF 2.0 specification (section 4.4: a 12-byte
header, then a JSON and a BIN chunk, each 4-byte aligned); the Khronos validator checks every
file the tests write. Importing trimesh took ~0.6 s and a glTF data-model library ~0.07 s of
``orbviz mesh``'s start-up, where this takes none.
"""

from __future__ import annotations

import json
import struct
from collections.abc import Sequence
from pathlib import Path
from typing import Any

import numpy as np

from orbviz.errors import OutputError
from orbviz.surface.colors import linear_bytes
from orbviz.surface.contour import Body
from orbviz.surface.convert import ROUGHNESS

__all__ = ["encode_meshes"]

_FLOAT, _UINT, _UBYTE = 5126, 5125, 5121  # componentType codes (glTF 2.0, section 3.6.2.2)
_ARRAY, _ELEMENTS = 34962, 34963  # bufferView targets
_GLB_MAGIC, _JSON_CHUNK, _BIN_CHUNK = 0x46546C67, 0x4E4F534A, 0x004E4942  # "glTF", "JSON", "BIN"


class _Document:
    """A glTF tree and its one binary buffer of 4-byte aligned views."""

    def __init__(self) -> None:
        self.tree: dict[str, Any] = {
            "asset": {"version": "2.0", "generator": "orbviz"},
            "scene": 0,
            "scenes": [],
            "nodes": [],
            "meshes": [],
            "materials": [],
            "accessors": [],
            "bufferViews": [],
        }
        self.parts: list[bytes] = []
        self.length = 0

    def add(self, data: np.ndarray, kind: str, component: int, target: int, **extra: Any) -> int:
        """Append ``data`` as a bufferView and an accessor; return the accessor's index."""
        raw = np.ascontiguousarray(data).tobytes()
        self.parts.append(raw + b"\0" * (-len(raw) % 4))
        views = self.tree["bufferViews"]
        views.append({"buffer": 0, "byteOffset": self.length, "byteLength": len(raw)})
        views[-1]["target"] = target
        self.length += len(self.parts[-1])
        accessor: dict[str, Any] = {"bufferView": len(views) - 1, "componentType": component}
        accessor.update(count=len(data), type=kind, **extra)
        self.tree["accessors"].append(accessor)
        return len(self.tree["accessors"]) - 1

    def append(self, key: str, item: dict[str, Any]) -> int:
        """Append an item to a top-level list; return its index."""
        self.tree[key].append(item)
        return len(self.tree[key]) - 1


def _body(doc: _Document, body: Body, scale: float) -> int:
    """Add one body's mesh, material and node; return the node's index."""
    positions = (body.vertices * scale).astype(np.float32)
    bounds = {"min": positions.min(axis=0).tolist(), "max": positions.max(axis=0).tolist()}
    attributes = {"POSITION": doc.add(positions, "VEC3", _FLOAT, _ARRAY, **bounds)}
    if len(body.normals):
        attributes["NORMAL"] = doc.add(body.normals.astype(np.float32), "VEC3", _FLOAT, _ARRAY)
    colors = linear_bytes(body.colors) if len(body.colors) else body.colors
    uniform = len(colors) and bool(np.all(colors == colors[0]))
    base = colors[0] if uniform else np.full(4, 255, np.uint8)
    if not uniform and len(colors):
        attributes["COLOR_0"] = doc.add(colors, "VEC4", _UBYTE, _ARRAY, normalized=True)
    indices = doc.add(body.faces.astype(np.uint32).reshape(-1), "SCALAR", _UINT, _ELEMENTS)
    material = {
        "name": body.name,
        "pbrMetallicRoughness": {
            "baseColorFactor": [float(v) / 255.0 for v in base],
            "metallicFactor": 0.0,
            "roughnessFactor": ROUGHNESS,
        },
        "doubleSided": False,
    }
    primitive = {"attributes": attributes, "indices": indices, "mode": 4}
    primitive["material"] = doc.append("materials", material)
    mesh = doc.append("meshes", {"name": body.name, "primitives": [primitive]})
    return doc.append("nodes", {"name": body.name, "mesh": mesh})


def _glb(tree: dict[str, Any], blob: bytes) -> bytes:
    """Pack a tree and its buffer into the GLB container (glTF 2.0, section 4.4)."""
    text = json.dumps(tree, separators=(",", ":")).encode()
    text += b" " * (-len(text) % 4)  # the JSON chunk is padded with spaces, the BIN with zeros
    blob += b"\0" * (-len(blob) % 4)
    total = 12 + 8 + len(text) + 8 + len(blob)
    return b"".join(
        [
            struct.pack("<III", _GLB_MAGIC, 2, total),
            struct.pack("<II", len(text), _JSON_CHUNK),
            text,
            struct.pack("<II", len(blob), _BIN_CHUNK),
            blob,
        ]
    )


def encode_meshes(
    bodies: Sequence[Body], path: Path, *, scale: float, root: dict[str, Any]
) -> dict[Path, bytes]:
    """Return the bodies as GLB, or as glTF JSON plus its ``STEM.bin`` buffer.

    Parameters
    ----------
    bodies : sequence of Body
        The surfaces, vertices in bohr.
    path : Path
        The output; its suffix (.glb or .gltf) chooses the form.
    scale : float
        Length unit per bohr.
    root : dict
        Name, rotation and extras of the root node that holds every body's node.
    """
    bodies = [body for body in bodies if len(body.faces)]  # as the trimesh route skips them
    if not bodies:
        raise OutputError(f"cannot write {str(path)!r}: there is no surface to write")
    doc = _Document()
    children = [_body(doc, body, scale) for body in bodies]
    top = doc.append("nodes", {**root, "children": children})
    doc.append("scenes", {"nodes": [top]})
    blob = b"".join(doc.parts)
    if path.suffix.lower() == ".glb":
        doc.tree["buffers"] = [{"byteLength": len(blob)}]
        return {path: _glb(doc.tree, blob)}
    bin_path = path.with_suffix(".bin")  # named after the .gltf, so exports never collide
    doc.tree["buffers"] = [{"byteLength": len(blob), "uri": bin_path.name}]
    return {path: json.dumps(doc.tree, indent=1).encode(), bin_path: blob}
