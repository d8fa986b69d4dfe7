"""A batch folder's manifest and lock.

``DIR/manifest.json`` lists each item with its files, their sizes and SHA-256 digests, so a
rerun can tell a finished file from a truncated or changed one. ``DIR/.orbviz-batch.lock``
holds an exclusive lock (``flock``) for as long as a batch writes into the folder; the kernel
releases it when that process ends, however it ends, so a second batch is refused while the
first runs and a killed run's lock is taken over at once.
"""

from __future__ import annotations

import contextlib
import hashlib
import json
import os
from collections.abc import Iterator
from pathlib import Path
from typing import Any

from orbviz.errors import OutputError

__all__ = [
    "LOCK",
    "MANIFEST",
    "checksums",
    "folder_lock",
    "previous",
    "unchanged",
    "write_manifest",
]

MANIFEST = "manifest.json"
LOCK = ".orbviz-batch.lock"


def checksums(out: Path, files: list[str]) -> dict[str, dict[str, Any]]:
    """Size and SHA-256 of each file (relative to ``out``)."""
    sums = {}
    for name in files:
        data = (out / name).read_bytes()
        sums[name] = {"bytes": len(data), "sha256": hashlib.sha256(data).hexdigest()}
    return sums


def _intact(out: Path, name: str, expected: dict[str, Any]) -> bool:
    path = out / name
    try:
        if (
            not path.is_file()
            or path.stat().st_size != expected.get("bytes")
            or not expected["bytes"]
        ):
            return False
        return hashlib.sha256(path.read_bytes()).hexdigest() == expected.get("sha256")
    except (OSError, KeyError, TypeError):
        return False


def unchanged(entry: dict[str, Any] | None, digest: str, out: Path) -> bool:
    """Tell whether a manifest entry is done with this digest and all its files are intact."""
    if (
        entry is None
        or entry.get("status") not in ("done", "skipped")
        or entry.get("hash") != digest
    ):
        return False
    sums = entry.get("checksums")
    if not isinstance(sums, dict):
        return False
    names = [*entry.get("files", []), entry.get("thumbnail", "")]
    return all(isinstance(n, str) and n in sums and _intact(out, n, sums[n]) for n in names)


def previous(out: Path) -> dict[str, dict[str, Any]]:
    """Return the entries of an earlier run's manifest, by item name (empty if unreadable)."""
    try:
        data = json.loads((out / MANIFEST).read_text(encoding="utf-8"))
        return {entry["name"]: entry for entry in data.get("items", []) if isinstance(entry, dict)}
    except (OSError, ValueError, KeyError, TypeError, AttributeError):
        return {}


def write_manifest(out: Path, manifest: dict[str, Any]) -> None:
    """Rewrite the manifest, all or nothing."""
    from orbviz.export import write_files

    write_files({out / MANIFEST: (json.dumps(manifest, indent=2) + "\n").encode()})


@contextlib.contextmanager
def folder_lock(out: Path) -> Iterator[None]:
    """Hold the folder's batch lock; refuse with one line if another batch holds it."""
    import fcntl

    path = out / LOCK
    handle = os.open(path, os.O_RDWR | os.O_CREAT, 0o644)
    try:
        try:
            fcntl.flock(handle, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except BlockingIOError:
            owner = os.pread(handle, 32, 0).decode(errors="replace").strip() or "unknown"
            raise OutputError(
                f"another orbviz batch (pid {owner}) is writing into {str(out)!r}; wait for it "
                "or choose another folder"
            ) from None
        os.ftruncate(handle, 0)
        os.pwrite(handle, f"{os.getpid()}\n".encode(), 0)
        yield
    finally:
        os.close(handle)  # closing releases the lock
