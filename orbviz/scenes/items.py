"""One item of a scene, with every option resolved and checked, and the files it makes."""

from __future__ import annotations

import dataclasses
import hashlib
import json
import re
from dataclasses import dataclass, field
from typing import Any

from orbviz import __version__
from orbviz.figures.options import FigureOptions
from orbviz.models.options import ModelOptions
from orbviz.states.physics import Physics
from orbviz.surface.options import MeshOptions

__all__ = ["MESH_OUTPUTS", "MODEL_OUTPUTS", "OUTPUTS", "Item", "slug"]

MESH_OUTPUTS = ("glb", "gltf", "obj", "stl", "ply", "3mf")
MODEL_OUTPUTS = ("model.stl", "model.3mf")
OUTPUTS = ("png", *MESH_OUTPUTS, *MODEL_OUTPUTS)
_COMPANIONS = {"obj": ["mtl"], "gltf": ["bin"]}


def slug(spec: str, Z: float | None) -> str:
    """Return a safe file stem from spec text (and a charge other than 1)."""
    stem = re.sub(r"[^A-Za-z0-9.-]+", "_", spec.replace("*", "x")).strip("._-") or "orbital"
    if Z not in (None, 1.0):
        stem += f"-Z{Z:g}"
    return stem[:100]


@dataclass(frozen=True)
class Item:
    """One entry of a scene, every option resolved and checked at load.

    Attributes
    ----------
    name : str
        Output file stem, safe to use inside the output folder.
    spec : str
        Spec text.
    physics : Physics
        Charge, forms, nuclear mass, potential and the enclosed fraction.
    outputs : tuple of str
        What to make (:data:`OUTPUTS`).
    figure : FigureOptions
        The figure's looks (the ``render`` table, with the item's grid and colours).
    model : ModelOptions
        The printable model's options (the ``model`` table).
    inputs : tuple of (str, str)
        Files the item reads (potential tables) and the SHA-256 of their contents.
    where : str
        The file and item, for messages (``lab.toml: orbital 3 ('2pz')``).
    """

    name: str
    spec: str
    physics: Physics
    outputs: tuple[str, ...] = ("png", "glb")
    figure: FigureOptions = field(default_factory=FigureOptions)
    model: ModelOptions = field(default_factory=ModelOptions)
    inputs: tuple[tuple[str, str], ...] = ()
    where: str = ""

    @property
    def mesh(self) -> MeshOptions:
        """The mesh options of the item's surface (shared by its figure, meshes and model)."""
        return MeshOptions(grid=self.figure.grid, colors=self.figure.colors)

    def files(self) -> list[str]:
        """Every file the item writes, relative to the output folder (thumbnail included)."""
        out = []
        for kind in self.outputs:
            if kind in MODEL_OUTPUTS:
                out.append(f"{self.name}-model.{kind.split('.')[1]}")
            else:
                out.append(f"{self.name}.{kind}")
                out += [f"{self.name}.{c}" for c in _COMPANIONS.get(kind, [])]
        return [*out, f"thumbs/{self.name}.png"]

    @property
    def digest(self) -> str:
        """Content hash of everything that decides the outputs (and the orbviz version)."""
        settings: dict[str, Any] = {
            "spec": self.spec,
            "physics": dataclasses.asdict(self.physics),
            "outputs": list(self.outputs),
            "figure": dataclasses.asdict(self.figure),
            "model": dataclasses.asdict(self.model)
            if any(o in MODEL_OUTPUTS for o in self.outputs)
            else None,
            "inputs": [list(i) for i in self.inputs],
            "version": __version__,
        }
        text = json.dumps(settings, sort_keys=True, default=str)
        return hashlib.sha256(text.encode()).hexdigest()[:16]
