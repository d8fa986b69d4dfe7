"""The public functions: from spec text (or a state) to numbers, meshes, figures and models.

Each takes the physics options (``Z``, ``real``, ``reduced_mass``, ``nuclear_mass``,
``potential``, ``fraction``) and the job's own options as keywords, checked by the same rules as
the command line and scene files; an unknown or bad keyword is refused naming it.

>>> import orbviz
>>> orbviz.mesh("3dz2").export("3dz2.glb")                       # doctest: +SKIP
>>> orbviz.model("2pz", size_mm=60).export("2pz.3mf")            # doctest: +SKIP
>>> orbviz.summarise("2pz", Z=2)["energy_hartree"]               # doctest: +SKIP
-0.5
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any, TypeVar

from orbviz._options import build, rules
from orbviz.errors import OptionError
from orbviz.states.make import make_state, make_states
from orbviz.states.physics import Physics
from orbviz.states.state import State

__all__ = ["animate", "figure", "mesh", "model", "plot", "state", "summarise"]

T = TypeVar("T")


def _split(given: dict[str, Any], job: type[T] | None) -> tuple[Physics, T | None]:
    physics_keys = set(rules(Physics))
    job_keys = set(rules(job)) if job is not None else set()
    unknown = set(given) - physics_keys - job_keys
    if unknown:
        known = ", ".join(sorted(physics_keys | job_keys))
        raise OptionError(sorted(unknown)[0], f"unknown option (known: {known})")
    physics = build(Physics, {k: v for k, v in given.items() if k in physics_keys})
    options = build(job, {k: v for k, v in given.items() if k in job_keys}) if job else None
    return physics, options


def _state(spec: str | State, physics: Physics, given: dict[str, Any]) -> State:
    if isinstance(spec, str):
        return make_state(spec, physics)
    made_with = [k for k in given if k in rules(Physics) and k != "fraction"]
    if made_with:
        raise OptionError(made_with[0], "applies to spec text; this state was made already")
    return spec


def state(spec: str, /, **physics: Any) -> State:
    """Make the state spec text names (any kind: eigenstate, superposition, bond, ...)."""
    return make_state(spec, _split(physics, None)[0])


def summarise(spec: str | State, /, **options: Any) -> dict[str, Any]:
    """Return the numbers ``orbviz info`` reports (docs/info.md), as a dict."""
    from orbviz.levels.report import summarise as report

    physics, _ = _split(options, None)
    return report(_state(spec, physics, options), fraction=physics.fraction)


def mesh(spec: str | State, /, **options: Any) -> Any:
    """Return the closed, phase-coloured isosurface (``OrbitalMesh``; ``.export`` writes it)."""
    from orbviz.surface.mesh import build_mesh
    from orbviz.surface.options import MeshOptions

    physics, opts = _split(options, MeshOptions)
    return build_mesh(_state(spec, physics, options), opts, fraction=physics.fraction)


def figure(spec: str | State, /, **options: Any) -> Any:
    """Return an off-screen 3D figure (``Figure``: ``.image()``, ``.save(path)``; close it)."""
    from orbviz.figures.figure import figure as compose
    from orbviz.figures.options import FigureOptions

    physics, opts = _split(options, FigureOptions)
    return compose(_state(spec, physics, options), opts, fraction=physics.fraction)


def plot(spec: str | State, /, **options: Any) -> Any:
    """Return a 2D plot (``kind="slice"`` or ``"radial"``): (matplotlib Figure, its data)."""
    from orbviz.figures.options import PlotOptions
    from orbviz.figures.plots import plot as draw

    physics, opts = _split(options, PlotOptions)
    return draw(_state(spec, physics, options), opts, fraction=physics.fraction)


def model(spec: str | State | Sequence[State], /, **options: Any) -> Any:
    """Return a printable model in mm (``PrintModel``; ``.export(path)`` writes .stl or .3mf)."""
    from orbviz.models.build import build_model
    from orbviz.models.options import ModelOptions

    physics, opts = _split(options, ModelOptions)
    if isinstance(spec, str):
        states = make_states(spec, physics)
        target: State | Sequence[State] = states if len(states) > 1 else states[0]
    elif isinstance(spec, (list, tuple)):
        target = list(spec)
    else:
        target = _state(spec, physics, options)  # type: ignore[arg-type]
    return build_model(target, opts, fraction=physics.fraction)


def animate(spec: str | State, /, **options: Any) -> Any:
    """Return the frames of a superposition in motion (``Animation``)."""
    from orbviz.figures.animation import animate as play
    from orbviz.figures.options import AnimationOptions

    physics, opts = _split(options, AnimationOptions)
    return play(_state(spec, physics, options), opts, fraction=physics.fraction, keep_bodies=True)
