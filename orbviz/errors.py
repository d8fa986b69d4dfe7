"""Domain errors. Each subclasses a builtin so callers can catch ``ValueError`` and friends."""

from __future__ import annotations

__all__ = ["OrbvizError", "SpecError", "QuantumNumberError", "ParameterError", "OutputError"]


class OrbvizError(Exception):
    """Base of every error orbviz raises on purpose; the CLI prints its message on one line."""


class SpecError(OrbvizError, ValueError):
    """An orbital spec text that does not follow the grammar."""


class QuantumNumberError(OrbvizError, ValueError):
    """Quantum numbers outside ``n >= 1``, ``0 <= l < n``, ``|m| <= l``."""


class ParameterError(OrbvizError, ValueError):
    """A numeric option out of range or not finite (Z, fraction, grid size, ...)."""


class OutputError(OrbvizError, OSError):
    """An output path that cannot be written (unknown suffix, missing folder, no permission)."""
