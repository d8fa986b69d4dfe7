"""orbviz: hydrogen-like orbitals as isosurfaces that enclose a stated probability.

The package is the pipeline, one subpackage per stage, data flowing one way:

- ``orbviz.states``: radial and angular functions, the spec grammar, every kind of state behind
  one interface (:class:`orbviz.states.state.State`), potentials and the radial solver, time
  evolution, physical properties, the physics options
- ``orbviz.levels``: the signed field sampled on a grid, the isovalue that encloses a probability
  and its quadratures, the report ``orbviz info`` prints
- ``orbviz.surface``: closed, phase-coloured bodies contoured from the field, their checks, the
  mesh options
- ``orbviz.export``: one writer per file format, all-or-nothing writes, length units
- ``orbviz.figures``: off-screen 3D figures, 2D plots and animations (VTK and matplotlib)
- ``orbviz.models``: printable solids in millimetres and their printability checks
- ``orbviz.pages``: self-contained interactive pages (one offline HTML file) and notebook display
- ``orbviz.scenes``: scene files, the batch runner, its manifest and the contact sheet
- ``orbviz.cli``: the command line

The names below are the public API, loaded on first use so that ``import orbviz`` stays light.
Units are atomic (bohr, hartree) throughout; printable models are in millimetres.
"""

from __future__ import annotations

import importlib
from typing import Any

__version__ = "0.1.0"

_LAZY = {
    "state": "orbviz.api",
    "summarise": "orbviz.api",
    "mesh": "orbviz.api",
    "figure": "orbviz.api",
    "plot": "orbviz.api",
    "model": "orbviz.api",
    "animate": "orbviz.api",
    "show": "orbviz.pages.notebook",
    "Shown": "orbviz.pages.notebook",
    "Orbital": "orbviz.states.orbital",
    "Bond": "orbviz.states.bond",
    "State": "orbviz.states.state",
    "Physics": "orbviz.states.physics",
    "Isovalue": "orbviz.levels.isovalue",
    "enclosing_isovalue": "orbviz.levels.isovalue",
    "enclosed_probability": "orbviz.levels.isovalue",
    "OrbitalMesh": "orbviz.surface.mesh",
    "MeshOptions": "orbviz.surface.options",
    "Figure": "orbviz.figures.figure",
    "FigureOptions": "orbviz.figures.options",
    "PlotOptions": "orbviz.figures.options",
    "AnimationOptions": "orbviz.figures.options",
    "PrintModel": "orbviz.models.build",
    "ModelOptions": "orbviz.models.options",
    "load_scene": "orbviz.scenes.load",
    "run_scene": "orbviz.scenes.runner",
    "OrbvizError": "orbviz.errors",
    "SpecError": "orbviz.errors",
    "QuantumNumberError": "orbviz.errors",
    "ParameterError": "orbviz.errors",
    "OptionError": "orbviz.errors",
    "OutputError": "orbviz.errors",
    "SceneError": "orbviz.errors",
    "ModelError": "orbviz.errors",
    "Unsupported": "orbviz.errors",
}

__all__ = sorted([*_LAZY, "__version__"])


def __getattr__(name: str) -> Any:
    if name in _LAZY:
        value = getattr(importlib.import_module(_LAZY[name]), name)
        globals()[name] = value
        return value
    raise AttributeError(f"module 'orbviz' has no attribute {name!r}")


def __dir__() -> list[str]:
    return __all__
