"""Progress bars for long work, shown on a terminal only.

tqdm with ``disable=None`` draws nothing when stderr is not a terminal, so logs and redirected
output never fill with carriage-return frames.
"""

from __future__ import annotations

from collections.abc import Iterable, Iterator
from typing import TypeVar

__all__ = ["progress"]

T = TypeVar("T")


def progress(items: Iterable[T], *, total: int, desc: str, unit: str = "step") -> Iterator[T]:
    """Iterate over ``items`` with a progress bar on a terminal (nothing elsewhere)."""
    from tqdm import tqdm

    yield from tqdm(items, total=total, desc=desc, unit=unit, disable=None, leave=False)
