"""Mesh writers, one module per format, chosen by the output file's suffix.

Every writer takes finished bodies and a coordinate scale. Each names its companion files
(``.mtl``, ``.bin``) so that :func:`check_output` can check every file before any work starts,
and each writes through :func:`orbviz.export.atomic.atomic_paths`: all files or none, and a
failed run never changes an existing file.
"""

from __future__ import annotations

import importlib
import os
from collections.abc import Sequence
from pathlib import Path
from types import ModuleType

from orbviz.errors import OutputError
from orbviz.export._units import DISPLAY_SUFFIXES, UNITS, display_scale, unit_scale
from orbviz.export.atomic import atomic_folder, atomic_paths, check_targets
from orbviz.surface.contour import Body

__all__ = [
    "check_display",
    "display_scale",
    "SUFFIXES",
    "UNITS",
    "atomic_folder",
    "atomic_paths",
    "check_output",
    "check_targets",
    "encode_bodies",
    "unit_scale",
    "write_bodies",
    "write_files",
]

# suffix -> module name in this package (imported only when used)
SUFFIXES = {
    ".stl": "stl",
    ".obj": "obj",
    ".glb": "gltf",
    ".gltf": "gltf",
    ".ply": "ply",
    ".3mf": "threemf",
}


def _writer(path: Path) -> ModuleType:
    return importlib.import_module(f"orbviz.export.{SUFFIXES[path.suffix.lower()]}")


def check_output(path: str | os.PathLike[str], suffixes: Sequence[str] | None = None) -> list[Path]:
    """Refuse, before any work, an output with an unknown suffix or any file it cannot write.

    Parameters
    ----------
    path : str or path-like
        The main output file.
    suffixes : sequence of str, optional
        Suffixes allowed (default: every mesh format). Suffixes outside :data:`SUFFIXES` name
        single-file outputs of other kinds (``.png``, ``.json``).

    Returns
    -------
    list of Path
        The main file and its companions, all checked.
    """
    text = os.fspath(path)  # as given: Path("") reads "."
    path = Path(path)
    allowed = list(suffixes if suffixes is not None else SUFFIXES)
    suffix = path.suffix.lower()
    if text and (text.endswith(("/", os.sep)) or (suffix not in allowed and path.is_dir())):
        raise OutputError(
            f"cannot write {text!r}: it is a folder; give a file name ending in a suffix"
        )
    if suffix not in allowed:
        known = ", ".join(sorted(allowed))
        raise OutputError(
            f"cannot write {text!r}: unknown suffix {suffix or '(none)'!r}; use {known}"
        )
    targets = [path]
    if suffix in SUFFIXES:
        targets += _writer(path).companions(path)
    check_targets(targets)
    return targets


def write_bodies(
    bodies: Sequence[Body],
    path: str | os.PathLike[str],
    *,
    units: str | None = None,
    display_size: float | None = None,
) -> list[Path]:
    """Write finished bodies to ``path`` in the format its suffix names.

    Parameters
    ----------
    bodies : sequence of Body
        Closed bodies, coordinates in their own unit (bohr for orbitals, mm for models).
    path : str or path-like
        Output file; companions (``.mtl``, ``.bin``) go beside it, named after it.
    units : {"bohr", "angstrom", "nm", "pm", "mm"}, optional
        Length unit of the written coordinates (default: the bodies' own).
    display_size : float, optional
        glTF only: scale so that the longest side is this many metres (instead of ``units``).

    Returns
    -------
    list of Path
        Every file written.
    """
    path = check_output(path)[0]
    source = bodies[0].unit if bodies else "bohr"
    units = units or source
    scale = unit_scale(units, source)
    if display_size is not None:
        check_display(path, display_size)
        scale, units = display_scale([b.vertices for b in bodies], display_size), "m"
    return write_files(encode_bodies(bodies, path, scale=scale, units=units))


def check_display(path: Path, display_size: float | None) -> None:
    """Refuse a display size for a format whose readers do not take lengths as metres."""
    if display_size is not None and path.suffix.lower() not in DISPLAY_SUFFIXES:
        from orbviz.errors import OptionError

        raise OptionError(
            "display_size",
            "applies to .glb and .gltf (their viewers read metres), not "
            f"{path.suffix or path.name}",
        )


def encode_bodies(
    bodies: Sequence[Body], path: Path, *, scale: float, units: str
) -> dict[Path, bytes]:
    """Return the bytes of every file the format of ``path`` writes, by path."""
    files: dict[Path, bytes] = _writer(path).encode(bodies, path, scale=scale, units=units)
    return files


def write_files(files: dict[Path, bytes]) -> list[Path]:
    """Write several files as one: all of them or, on any failure, none (old files kept)."""
    targets = list(files)
    with atomic_paths(*targets) as temps:
        for temp, target in zip(temps, targets, strict=True):
            temp.write_bytes(files[target])
    return targets
