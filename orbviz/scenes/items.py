"""One item of a scene, with every option resolved and checked, and the files it makes."""

from __future__ import annotations

import dataclasses
import hashlib
import json
import re
from dataclasses import dataclass, field
from typing import Any

from orbviz import __version__
from orbviz.figures.options import AnimationOptions, FigureOptions, PlotOptions
from orbviz.models.engraving import SampleOptions
from orbviz.models.options import ModelOptions
from orbviz.pages.options import PageOptions
from orbviz.states.physics import Physics
from orbviz.surface.options import MeshOptions

__all__ = [
    "ANIMATION_OUTPUTS",
    "FIGURE_OUTPUTS",
    "MESH_OUTPUTS",
    "MODEL_OUTPUTS",
    "OUTPUTS",
    "PAGE_OUTPUTS",
    "POINT_OUTPUTS",
    "STYLE_OUTPUTS",
    "PLOT_OUTPUTS",
    "SHEET_OUTPUTS",
    "TITLE_FIELDS",
    "Item",
    "check_title",
    "slug",
]

FIGURE_OUTPUTS = ("png", "tiff", "pdf", "svg")  # the 3D figure
PLOT_OUTPUTS = tuple(
    f"{kind}.{fmt}" for kind in ("slice", "radial", "dots") for fmt in FIGURE_OUTPUTS
)
# the 3D figure drawn as a cloud of dots or a translucent volume instead of the surface
STYLE_OUTPUTS = tuple(f"{style}.{fmt}" for style in ("cloud", "volume") for fmt in FIGURE_OUTPUTS)
POINT_OUTPUTS = ("points.ply", "points.csv", "points.xyz", "points.npy")  # orbviz sample
ANIMATION_OUTPUTS = ("gif", "mp4")
MESH_OUTPUTS = ("glb", "gltf", "obj", "stl", "ply", "3mf")
MODEL_OUTPUTS = ("model.stl", "model.3mf", "kit.zip")  # kit.zip: orbviz model --kit
PAGE_OUTPUTS = ("html",)  # the interactive page
OUTPUTS = (
    *FIGURE_OUTPUTS,
    *MESH_OUTPUTS,
    *MODEL_OUTPUTS,
    *PLOT_OUTPUTS,
    *ANIMATION_OUTPUTS,
    *PAGE_OUTPUTS,
    *STYLE_OUTPUTS,
    *POINT_OUTPUTS,
)
# what a [[sheet]] of several orbitals makes
SHEET_OUTPUTS = (*FIGURE_OUTPUTS, *PLOT_OUTPUTS, *PAGE_OUTPUTS, *STYLE_OUTPUTS)
_COMPANIONS = {"obj": ["mtl"], "gltf": ["bin"]}


TITLE_FIELDS = ("label", "spec", "name", "fraction", "Z")


def check_title(template: str | None) -> None:
    """Refuse a title whose ``{placeholders}`` are not :data:`TITLE_FIELDS` (ValueError)."""
    import string

    if template is None:
        return
    try:
        fields = [f for _, f, spec, conv in string.Formatter().parse(template) if f is not None]
    except ValueError as error:
        raise ValueError(f"{error} in {template!r} (write {{{{ and }}}} for braces)") from None
    unknown = [f for f in fields if f not in TITLE_FIELDS]
    if unknown:
        raise ValueError(
            f"unknown placeholder {{{unknown[0]}}} in {template!r} (known: "
            + ", ".join(f"{{{f}}}" for f in TITLE_FIELDS)
            + ")"
        )


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
    plot : PlotOptions
        The 2D plots' options (the ``plot`` table); the output names the kind.
    animation : AnimationOptions
        The animation's options (the ``animate`` table).
    page : PageOptions
        The interactive page's options (the ``page`` table).
    sample : SampleOptions
        The point cloud's options (the ``sample`` table).
    members : tuple of str
        A ``[[sheet]]``'s specs, in panel order (sets such as ``3d`` allowed); empty for one
        orbital. ``spec`` then joins them with spaces.
    """

    name: str
    spec: str
    physics: Physics
    outputs: tuple[str, ...] = ("png", "glb")
    figure: FigureOptions = field(default_factory=FigureOptions)
    model: ModelOptions = field(default_factory=ModelOptions)
    inputs: tuple[tuple[str, str], ...] = ()
    where: str = ""
    plot: PlotOptions = field(default_factory=PlotOptions)
    animation: AnimationOptions = field(default_factory=AnimationOptions)
    members: tuple[str, ...] = ()
    page: PageOptions = field(default_factory=PageOptions)
    sample: SampleOptions = field(default_factory=SampleOptions)

    def title(self, label: str) -> str | None:
        """Return the title with its placeholders filled in (None: no title is drawn)."""
        template = self.figure.title
        if template is None:
            return None
        values = {
            "label": label,
            "spec": self.spec,
            "name": self.name,
            "fraction": f"{100 * self.physics.fraction:g}%",
            "Z": f"{self.physics.Z:g}" if self.physics.Z is not None else "",
        }
        return template.format(**values)

    @property
    def mesh(self) -> MeshOptions:
        """The mesh options of the item's surface (shared by its figure, meshes and model)."""
        return MeshOptions(grid=self.figure.grid, colors=self.figure.colors)

    def file_of(self, kind: str) -> str:
        """Return the file one output kind writes: ``NAME.png``, ``NAME-slice.pdf``, ...

        A model goes to ``NAME-model.EXT`` and a plot to ``NAME-slice.EXT`` or
        ``NAME-radial.EXT``, or to ``NAME.EXT`` when the name already ends in that word (no
        doubled suffix).
        """
        if kind in MODEL_OUTPUTS or kind in PLOT_OUTPUTS or kind in STYLE_OUTPUTS + POINT_OUTPUTS:
            word, fmt = kind.split(".")
            stem = self.name if self.name.endswith(f"-{word}") else f"{self.name}-{word}"
            return f"{stem}.{fmt}"
        return f"{self.name}.{kind}"

    def files(self) -> list[str]:
        """Every file the item writes, relative to the output folder (thumbnail included)."""
        out = []
        for kind in self.outputs:
            out.append(self.file_of(kind))
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
            "plot": dataclasses.asdict(self.plot)
            if any(o in PLOT_OUTPUTS for o in self.outputs)
            else None,
            "animation": dataclasses.asdict(self.animation)
            if any(o in ANIMATION_OUTPUTS for o in self.outputs)
            else None,
            "page": dataclasses.asdict(self.page)
            if any(o in PAGE_OUTPUTS for o in self.outputs)
            else None,
            "sample": dataclasses.asdict(self.sample)
            if any(o in POINT_OUTPUTS for o in self.outputs)
            else None,
            "members": list(self.members),
            "inputs": [list(i) for i in self.inputs],
            "version": __version__,
        }
        text = json.dumps(settings, sort_keys=True, default=str)
        return hashlib.sha256(text.encode()).hexdigest()[:16]
