"""Mesh writers, one module per format, chosen by the output file's suffix.

Every writer takes the finished bodies and a coordinate scale and writes atomically: temporary
files in the target folder, renamed into place only when all of them are complete. A failed run
leaves nothing behind and never replaces an existing file.
"""

from __future__ import annotations

import os
from pathlib import Path

from orbviz.errors import OutputError
from orbviz.export._atomic import atomic_paths
from orbviz.export._units import UNITS, unit_scale

__all__ = ["SUFFIXES", "UNITS", "atomic_paths", "check_output", "unit_scale", "write_bodies"]

# suffix -> module name in this package (imported only when used)
SUFFIXES = {
    ".stl": "stl",
    ".obj": "obj",
    ".glb": "gltf",
    ".gltf": "gltf",
    ".ply": "ply",
    ".3mf": "threemf",
}


def check_output(path: str | os.PathLike, suffixes=SUFFIXES) -> Path:
    """Refuse, before any work, an output with an unknown suffix or an unwritable folder."""
    path = Path(path)
    suffix = path.suffix.lower()
    if suffix not in suffixes:
        known = ", ".join(sorted(suffixes))
        raise OutputError(
            f"cannot write {str(path)!r}: unknown suffix {suffix or '(none)'!r}; use {known}"
        )
    folder = path.parent if str(path.parent) else Path(".")
    if not folder.is_dir():
        raise OutputError(f"cannot write {str(path)!r}: folder {str(folder)!r} does not exist")
    if not os.access(folder, os.W_OK | os.X_OK):
        raise OutputError(f"cannot write {str(path)!r}: folder {str(folder)!r} is not writable")
    if path.is_dir():
        raise OutputError(f"cannot write {str(path)!r}: it is a folder")
    return path


def write_bodies(
    bodies, path: str | os.PathLike, *, units: str = "bohr", colors=None
) -> list[Path]:
    """Write finished bodies to ``path`` in the format its suffix names.

    Parameters
    ----------
    bodies : list of orbviz.surface.contour.Body
        Closed bodies, coordinates in bohr.
    path : path-like
        Output file; companions (``.mtl``, ``.bin``) go beside it, named after it.
    units : {"bohr", "angstrom", "nm", "pm"}, default: "bohr"
        Length unit of the written coordinates.
    colors : pair of RGBA tuples, optional
        Positive and negative colours (the bodies' vertex colours already use them).

    Returns
    -------
    list of Path
        Every file written.
    """
    import importlib

    path = check_output(path)
    module = importlib.import_module(f"orbviz.export.{SUFFIXES[path.suffix.lower()]}")
    return module.write(bodies, path, scale=unit_scale(units), units=units)
