"""All-or-nothing writes of a file and its companions (``.mtl``, ``.bin``, split parts, frames).

Every target is checked before any work (:func:`check_targets`). The new contents go to
temporary files beside their targets; only when all are complete are they put in place, the old
files first kept aside (a second hard link) and restored if any step fails, so a failed or
interrupted run leaves the old set exactly as it was and nothing new behind. Each rename is
atomic, so even a process killed mid-way (SIGKILL) leaves every target whole, old or new. A
folder target (animation frames) is written as a whole new folder and swapped in, so it is
replaced, not topped up.

Temporary names carry the writer's process id, ``.NAME.PID.RANDOM.part``; those of a process that
is gone (a killed run) are removed on the next write to the same path.
"""

from __future__ import annotations

import contextlib
import glob
import os
import shutil
import tempfile
from collections.abc import Iterator, Sequence
from pathlib import Path

from orbviz import _interrupt
from orbviz.errors import OutputError

__all__ = ["atomic_folder", "atomic_paths", "check_targets"]


def _alive(pid: int) -> bool:
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except PermissionError:
        return True
    return True


def _stem(target: Path) -> str:
    """Return the target's name as its temporaries begin it, cut to 120 bytes.

    So ``.STEM.PID.RANDOM.part`` stays within the 255 bytes a file name may have.
    """
    return target.name.encode()[:120].decode(errors="ignore")


def _clean_stale(target: Path) -> None:
    """Remove temporaries of ``target`` left by processes that no longer run."""
    stem = _stem(target)
    with contextlib.suppress(OSError):
        for leftover in target.parent.glob(f".{glob.escape(stem)}.*.part*"):
            pid = leftover.name[len(stem) + 2 :].split(".", 1)[0]
            if pid.isdigit() and int(pid) != os.getpid() and not _alive(int(pid)):
                if leftover.is_dir():
                    shutil.rmtree(leftover, ignore_errors=True)
                else:
                    leftover.unlink(missing_ok=True)


def _foreign(folder: Path, allowed: Sequence[str]) -> list[str]:
    """Return the names in an existing folder that a run replacing it would not write."""
    import fnmatch

    try:
        names = sorted(entry.name for entry in folder.iterdir())
    except OSError:
        return []
    return [n for n in names if not any(fnmatch.fnmatch(n, pattern) for pattern in allowed)]


def check_targets(
    targets: Sequence[Path],
    *,
    folders: bool = False,
    clobber: bool = True,
    allowed: Sequence[str] | None = None,
) -> None:
    """Refuse, before any work, targets that cannot be written.

    Parameters
    ----------
    targets : sequence of Path
        Files (or, with ``folders``, folders) that will be written.
    folders : bool, default: False
        The targets are folders to be replaced as a whole.
    clobber : bool, default: True
        Existing targets may be replaced (as a whole set); with False they are refused.
    allowed : sequence of str, optional
        For folders: the names (glob patterns) a run writes in one. An existing folder that
        holds anything else is refused, so that a run never replaces a folder of other files
        (nor the working folder or the root).

    Raises
    ------
    OutputError
        If a target's folder is missing or not writable, or a target is of the wrong kind
        (a folder where a file should go, or the reverse).
    """
    for target in targets:
        folder = target.parent
        if not folder.is_dir():
            raise OutputError(
                f"cannot write {str(target)!r}: folder {str(folder)!r} does not exist"
            )
        if not os.access(folder, os.W_OK | os.X_OK):
            raise OutputError(
                f"cannot write {str(target)!r}: folder {str(folder)!r} is not writable"
            )
        if not folders and target.is_dir():
            raise OutputError(f"cannot write {str(target)!r}: it is a folder")
        if folders and target.exists() and not target.is_dir():
            raise OutputError(f"cannot write {str(target)!r}: it exists and is not a folder")
        whole = folders and target.resolve() in (Path.cwd().resolve(), Path(target.anchor or "/"))
        if whole or (folders and target.name == ".."):
            raise OutputError(
                f"cannot write {str(target)!r}: the folder is replaced as a whole, so name a "
                "folder of its own (not the working folder, '..' or the root)"
            )
        if folders and allowed is not None and target.is_dir():
            other = _foreign(target, allowed)
            if other:
                shown = ", ".join(repr(n) for n in other[:3]) + (", ..." if len(other) > 3 else "")
                raise OutputError(
                    f"cannot write {str(target)!r}: it holds {shown}, which this run does not "
                    "write, and the folder is replaced as a whole; name a new folder"
                )
        if not clobber and (target.exists() or target.is_symlink()):
            raise OutputError(
                f"cannot write {str(target)!r}: it exists, and no-clobber keeps existing files"
            )


def _temporary(target: Path, *, folder: bool = False) -> Path:
    prefix = f".{_stem(target)}.{os.getpid()}."
    if folder:
        return Path(tempfile.mkdtemp(prefix=prefix, suffix=".part", dir=target.parent))
    handle, name = tempfile.mkstemp(prefix=prefix, suffix=".part", dir=target.parent)
    os.close(handle)
    return Path(name)


def _discard(path: Path) -> None:
    with contextlib.suppress(OSError):
        if path.is_dir() and not path.is_symlink():
            shutil.rmtree(path)
        else:
            path.unlink(missing_ok=True)


def _set_aside(target: Path) -> Path:
    """Keep the old version of ``target`` under a temporary name, for a restore.

    A file stays in place (a second hard link keeps its old version), so that a process killed
    at any instant leaves the target whole, old or new. A folder is moved aside.
    """
    aside = _temporary(target)
    aside.unlink()
    try:
        os.link(target, aside, follow_symlinks=False)
    except OSError:  # a folder, or a file system without hard links
        os.replace(target, aside)
    return aside


def _commit(temps: Sequence[Path], targets: Sequence[Path]) -> None:
    """Put every temporary in place; on any failure put every old target back."""
    _interrupt.check()  # an interrupt swallowed on the way here still stops the write
    moved: list[tuple[Path, Path]] = []  # (target, where its old version waits)
    placed: list[Path] = []
    try:
        for target in targets:
            if target.exists() or target.is_symlink():
                moved.append((target, _set_aside(target)))
        for temp, target in zip(temps, targets, strict=True):
            os.replace(temp, target)
            placed.append(target)
        _interrupt.placed()  # from here on an interrupt no longer undoes a one-write run
    except BaseException:
        old = dict(moved)
        for target in placed:
            if target not in old or (target.is_dir() and not target.is_symlink()):
                _discard(target)
        for target, aside in moved:
            with contextlib.suppress(OSError):
                os.replace(aside, target)
        raise
    for _, aside in moved:
        _discard(aside)


@contextlib.contextmanager
def atomic_paths(*targets: Path) -> Iterator[list[Path]]:
    """Yield temporary paths beside ``targets``; put them all in place only on success.

    On any error or interrupt inside the block, or while putting the files in place, every
    temporary is removed and every target is left as it was.
    """
    targets_ = [Path(t) for t in targets]
    check_targets(targets_)
    temps: list[Path] = []
    try:
        for target in targets_:
            _clean_stale(target)
            temps.append(_temporary(target))
        yield temps
        for temp in temps:
            os.chmod(temp, 0o644)
        _commit(temps, targets_)
    except OSError as error:  # a full disk, a file too large, a name the system refuses
        raise _output_error(error, targets_) from None
    finally:
        for temp in temps:
            _discard(temp)


def _output_error(error: OSError, targets: Sequence[Path]) -> OutputError:
    """Return a one-line refusal naming the file a system error stopped."""
    name = str(targets[0]) if len(targets) == 1 else ", ".join(str(t) for t in targets)
    return OutputError(f"cannot write {name!r}: {error.strerror or error}")


@contextlib.contextmanager
def atomic_folder(target: Path) -> Iterator[Path]:
    """Yield an empty temporary folder beside ``target``; swap it in as ``target`` on success.

    An existing folder at ``target`` is replaced as a whole (files it held that the new run
    does not write are gone), and restored if anything fails.
    """
    target = Path(target)
    check_targets([target], folders=True)
    _clean_stale(target)
    try:
        temp = _temporary(target, folder=True)
    except OSError as error:
        raise _output_error(error, [target]) from None
    try:
        yield temp
        os.chmod(temp, 0o755)
        _commit([temp], [target])
    except OSError as error:
        raise _output_error(error, [target]) from None
    finally:
        _discard(temp)
