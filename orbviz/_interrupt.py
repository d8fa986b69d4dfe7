"""Interrupts that cannot be lost: Ctrl-C and SIGTERM are remembered as well as raised.

A library imported lazily may catch ``BaseException`` around its own imports and so swallow the
``KeyboardInterrupt`` Ctrl-C raises. The handler here records the signal before raising, and
:func:`check` raises again at the points that matter (before any file is put in place), so an
interrupted run never writes its outputs.
"""

from __future__ import annotations

import signal
import threading
from types import FrameType
from typing import Any

__all__ = ["check", "install", "pending", "restore"]

_pending = threading.Event()


def _handler(signum: int, frame: FrameType | None) -> None:
    _pending.set()
    raise KeyboardInterrupt


def install() -> dict[int, Any]:
    """Handle SIGINT and SIGTERM by recording them and raising KeyboardInterrupt (main thread).

    Returns the handlers it replaced, for :func:`restore`.
    """
    if threading.current_thread() is not threading.main_thread():
        return {}
    _pending.clear()
    return {sig: signal.signal(sig, _handler) for sig in (signal.SIGINT, signal.SIGTERM)}


def restore(previous: dict[int, Any]) -> None:
    """Put back the handlers :func:`install` replaced."""
    for sig, handler in previous.items():
        signal.signal(sig, handler)


def pending() -> bool:
    """Tell whether an interrupt arrived since :func:`install`."""
    return _pending.is_set()


def check() -> None:
    """Raise KeyboardInterrupt if an interrupt arrived, even if someone swallowed it."""
    if _pending.is_set():
        raise KeyboardInterrupt
