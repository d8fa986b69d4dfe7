"""Interrupts that cannot be lost: Ctrl-C and SIGTERM are remembered as well as raised.

A library imported lazily may catch ``BaseException`` around its own imports and so swallow the
``KeyboardInterrupt`` Ctrl-C raises. The handler here records the signal before raising, and
:func:`check` raises again at the points that matter (before any file is put in place), so an
interrupted run never writes its outputs.

A command that writes its outputs once (every command but ``batch``) says so with
:func:`one_write`. When its files are in place the run is finished: an interrupt after that is
recorded but not raised, so exit status 130 always means that nothing new was written.
"""

from __future__ import annotations

import os
import signal
import threading
from types import FrameType
from typing import Any

__all__ = ["Interrupted", "check", "install", "one_write", "pending", "placed", "restore"]

_pending = threading.Event()  # an interrupt arrived
_finished = threading.Event()  # the run's outputs are in place: it can no longer be interrupted
_one_write = threading.Event()  # the run writes once: its first files in place finish it


class Interrupted(KeyboardInterrupt):
    """The KeyboardInterrupt raised for SIGINT and SIGTERM.

    Every ``except KeyboardInterrupt`` catches it. It is a subclass because CPython (3.11)
    remembers a plain KeyboardInterrupt that passed through ``exec`` of a string, as dataclasses
    do while a module is imported, and then ends a ``python -m`` run by SIGINT at exit, although
    the program handled the interrupt and chose its exit status.
    """


def _importing(frame: FrameType | None) -> bool:
    """Tell whether the interrupted code is inside an import (a module still initialising)."""
    while frame is not None:
        if frame.f_code.co_filename.startswith("<frozen importlib._bootstrap"):
            return True
        frame = frame.f_back
    return False


def _handler(signum: int, frame: FrameType | None) -> None:
    _pending.set()
    if _finished.is_set():
        return
    if _importing(frame):
        # An exception raised while a compiled extension (VTK) initialises can leave it half
        # made and crash the interpreter (a segmentation fault instead of exit 130). Let the
        # import finish: the signal comes again in 50 ms and is raised then.
        retry = threading.Timer(0.05, os.kill, (os.getpid(), signum))
        retry.daemon = True
        retry.start()
        return
    raise Interrupted


def install() -> dict[int, Any]:
    """Handle SIGINT and SIGTERM by recording them and raising KeyboardInterrupt (main thread).

    Returns the handlers it replaced, for :func:`restore`.
    """
    if threading.current_thread() is not threading.main_thread():
        return {}
    for flag in (_pending, _finished, _one_write):
        flag.clear()
    return {sig: signal.signal(sig, _handler) for sig in (signal.SIGINT, signal.SIGTERM)}


def restore(previous: dict[int, Any]) -> None:
    """Put back the handlers :func:`install` replaced, and forget this run's state."""
    for sig, handler in previous.items():
        signal.signal(sig, handler)
    for flag in (_pending, _finished, _one_write):
        flag.clear()


def one_write() -> None:
    """Declare that this run writes its outputs in one go: once they are in place, it is done."""
    _one_write.set()


def placed() -> None:
    """Note that a set of files is in place (called by the writer while it can still undo it)."""
    if _one_write.is_set():
        _finished.set()


def pending() -> bool:
    """Tell whether an interrupt arrived since :func:`install` that still stops the run."""
    return _pending.is_set() and not _finished.is_set()


def check() -> None:
    """Raise KeyboardInterrupt if an interrupt arrived, even if someone swallowed it."""
    if pending():
        raise Interrupted
