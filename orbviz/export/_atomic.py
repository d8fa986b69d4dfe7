"""Write several files as one: temporaries in the target folder, renamed only on success."""

from __future__ import annotations

import contextlib
import os
import tempfile
from collections.abc import Iterator
from pathlib import Path

__all__ = ["atomic_paths"]


@contextlib.contextmanager
def atomic_paths(*targets: Path) -> Iterator[list[Path]]:
    """Yield temporary paths beside ``targets``; rename them all into place on success.

    On any error inside the block, every temporary is removed and no target is touched.
    """
    temps: list[Path] = []
    try:
        for target in targets:
            handle, name = tempfile.mkstemp(
                prefix=f".{target.name}.", suffix=".part", dir=target.parent
            )
            os.close(handle)
            temps.append(Path(name))
        yield temps
        for temp, target in zip(temps, targets, strict=True):
            os.chmod(temp, 0o644)
            os.replace(temp, target)
    except BaseException:
        for temp in temps:
            with contextlib.suppress(OSError):
                temp.unlink()
        raise
