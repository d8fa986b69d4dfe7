"""Every error orbviz raises on purpose.

Each subclasses a builtin, so callers can catch ``ValueError`` or ``OSError`` as they would for
any library; the command line prints the message on one line with exit status 2.
"""

from __future__ import annotations

__all__ = [
    "ModelError",
    "NoBoundState",
    "NoSurfaceError",
    "OptionError",
    "OrbvizError",
    "OutputError",
    "ParameterError",
    "QuantumNumberError",
    "SceneError",
    "SpecError",
    "StationaryError",
    "Unsupported",
    "UsageError",
]


class OrbvizError(Exception):
    """Base of every error orbviz raises on purpose; the CLI prints its message on one line."""


class SpecError(OrbvizError, ValueError):
    """An orbital spec text that does not follow the grammar."""


class QuantumNumberError(OrbvizError, ValueError):
    """Quantum numbers outside ``n >= 1``, ``0 <= l < n``, ``|m| <= l`` or the supported range."""


class ParameterError(OrbvizError, ValueError):
    """A numeric option out of range or not finite (Z, fraction, grid size, ...)."""


class OptionError(ParameterError):
    """One option of an options model that fails its rule.

    Attributes
    ----------
    key : str
        The option's name as the caller knows it (``--scale``, ``render.scale``, ``scale``).
    rule : str
        What is wrong, without the key.
    """

    def __init__(self, key: str, rule: str) -> None:
        self.key, self.rule = key, rule
        super().__init__(f"{key}: {rule}")


class UsageError(OrbvizError, ValueError):
    """A command line that cannot be read."""


class Unsupported(OrbvizError, ValueError):
    """A kind of state asked for something it does not have (a bond's radial distribution)."""


class StationaryError(Unsupported):
    """The state's density does not move: every component has the same energy."""


class NoBoundState(OrbvizError, ValueError):
    """The potential has no bound state with the asked n and l."""


class NoSurfaceError(OrbvizError, ValueError):
    """The level lies outside the sampled field: there is nothing to contour."""


class ModelError(OrbvizError, ValueError):
    """A model that would not print: the reason and the fix are in the message."""


class SceneError(OrbvizError, ValueError):
    """A scene file that cannot be used; the message names the file, the item and the key."""


class OutputError(OrbvizError, OSError):
    """An output path that cannot be written (unknown suffix, missing folder, no permission)."""
