"""Run a scene: every item in a worker, a manifest kept up to date, a contact sheet at the end.

The runner is built on :class:`concurrent.futures.Executor`. By default it is a local pool of
spawned worker processes, sized by cores and by memory. Any executor whose futures work with
:func:`concurrent.futures.as_completed` can be passed in, for instance a Dask cluster's
``Client.get_executor()``. Items are plain data, and :func:`run_item` is a top-level function,
so both pickle.

Each item's files are written together, all or none. Before any worker starts, the manifest
lists every item to do as ``pending`` with the files it may write, so at any instant, even after
a SIGKILL, every file in the folder is listed; an item is ``done`` only once its files are whole
in place, with their checksums. The batch holds the folder's lock while it runs; its own workers
ignore Ctrl-C (the batch stops them), die with it (``PR_SET_PDEATHSIG`` on Linux, and a watchdog
besides) and never write after it is gone.
"""

from __future__ import annotations

import concurrent.futures as cf
import contextlib
import os
import sys
import threading
import time
from collections.abc import Callable
from pathlib import Path
from typing import Any

from orbviz.errors import OrbvizError, OutputError
from orbviz.scenes.items import Item
from orbviz.scenes.manifest import folder_lock, previous, unchanged, write_manifest
from orbviz.scenes.outputs import THUMBNAIL, item_files
from orbviz.scenes.scene_page import write_scene_page
from orbviz.scenes.sheet import write_contact_sheet

__all__ = ["THUMBNAIL", "plan_jobs", "run_item", "run_scene"]

_WORKER_BASE_BYTES = 600 * 2**20  # a worker's imports and render window, measured ~450-550 MB
_parent: int | None = None  # the batch process a worker serves (None outside a batch pool)


def _die_with_parent(parent: int) -> None:
    """Worker initializer: end this worker the moment the batch process ends, however it ends."""
    import signal

    global _parent
    _parent = parent
    signal.signal(signal.SIGINT, signal.SIG_IGN)  # Ctrl-C reaches the batch, which stops us
    if sys.platform.startswith("linux"):
        import ctypes

        ctypes.CDLL(None, use_errno=True).prctl(1, int(signal.SIGKILL))  # PR_SET_PDEATHSIG
    if os.getppid() != parent:  # the parent was gone before the signal was armed
        os._exit(1)

    def watch() -> None:
        while os.getppid() == parent:
            time.sleep(0.5)
        os._exit(1)

    threading.Thread(target=watch, name="orbviz-parent-watch", daemon=True).start()


def _orphaned() -> bool:
    return _parent is not None and os.getppid() != _parent


def _trim_heap() -> None:
    """Free the item's garbage now and give the freed heap back to the system.

    Matplotlib figures (the annotations) form reference cycles that hold their image buffers
    until the cycle collector's rare full pass, so a worker's memory climbs between passes; and
    without glibc's ``malloc_trim`` a worker keeps the high-water mark of its largest item for
    its whole life, free inside the process but still counted as resident.
    """
    import gc

    gc.collect()
    if sys.platform.startswith("linux"):
        import ctypes

        with contextlib.suppress(OSError, AttributeError):  # a C library without malloc_trim
            ctypes.CDLL(None).malloc_trim(0)


def _rss_mb() -> float | None:
    """Return the process's resident memory now, in MB (from /proc on Linux; else None)."""
    try:
        for line in Path("/proc/self/status").read_text(encoding="ascii").splitlines():
            if line.startswith("VmRSS:"):
                return round(int(line.split()[1]) / 1024, 1)
    except (OSError, ValueError):
        pass
    return None


def run_item(item: Item, out_dir: str) -> dict[str, Any]:
    """Make every output of one item in ``out_dir``, all files or none; never raises for a bad item.

    Returns
    -------
    dict
        The manifest entry: ``name``, ``spec``, ``status`` (``done`` or ``failed``), ``files``
        (relative to ``out_dir``), ``thumbnail``, ``checksums`` (size and SHA-256 of each),
        ``hash``, ``seconds``, ``rss_mb`` (the worker's resident memory after the item, in MB,
        where the system tells it), and the isovalue and mesh statistics, or ``error``.
    """
    import hashlib

    from orbviz.export import write_files

    start = time.perf_counter()
    out = Path(out_dir)
    entry: dict[str, Any] = {"name": item.name, "spec": item.spec, "hash": item.digest}
    try:
        files, numbers = item_files(item, out)
        if _orphaned():  # the batch is gone: write nothing it would not list
            os._exit(1)
        (out / "thumbs").mkdir(parents=True, exist_ok=True)
        write_files(files)
        names = [str(p.relative_to(out)) for p in files]
        thumb = f"thumbs/{item.name}.png"
        entry.update(
            status="done",
            files=[n for n in names if n != thumb],
            thumbnail=thumb,
            checksums={
                str(p.relative_to(out)): {"bytes": len(d), "sha256": hashlib.sha256(d).hexdigest()}
                for p, d in files.items()
            },
            **numbers,
        )
    except OrbvizError as error:
        entry.update(status="failed", error=str(error), files=[])
    except MemoryError:
        entry.update(status="failed", error="out of memory: use a smaller grid or image", files=[])
    except Exception as error:  # noqa: BLE001 - one bad item must not stop the set
        entry.update(status="failed", error=f"{type(error).__name__}: {error}", files=[])
    entry["seconds"] = round(time.perf_counter() - start, 3)
    _trim_heap()
    entry["rss_mb"] = _rss_mb()
    return entry


def _item_bytes(item: Item) -> int:
    """Peak memory estimate of one item in a worker (imports, field, surface, images)."""
    from orbviz.levels.grid import estimate_bytes

    w, h = item.figure.pixels
    return _WORKER_BASE_BYTES + estimate_bytes(item.figure.grid) + 40 * w * h


def plan_jobs(items: list[Item], jobs: int | None) -> tuple[int, str | None]:
    """Workers for a local pool: as asked, capped by cores and by available memory.

    Returns the count and a note when it was capped.
    """
    from orbviz.levels.grid import available_bytes

    cores = os.cpu_count() or 1
    asked = jobs or cores
    per_worker = max(_item_bytes(i) for i in items)
    by_memory = max(1, int(0.8 * available_bytes() // per_worker))
    chosen = max(1, min(asked, cores, by_memory, len(items)))
    if jobs is not None and chosen < jobs:
        why = "cores" if chosen == min(cores, len(items)) and cores < by_memory else "memory"
        limit = (
            f"{cores} cores" if why == "cores" else f"about {per_worker / 2**30:.1f} GiB a worker"
        )
        return chosen, f"using {chosen} workers, not {jobs}: {limit}"
    return chosen, None


def _pool(jobs: int) -> cf.Executor:
    import multiprocessing

    return cf.ProcessPoolExecutor(
        max_workers=jobs,
        mp_context=multiprocessing.get_context("spawn"),
        initializer=_die_with_parent,
        initargs=(os.getpid(),),
    )


def _pending(item: Item) -> dict[str, Any]:
    """Return the entry of an item not finished yet, listing every file it may write."""
    thumb = f"thumbs/{item.name}.png"
    return {
        "name": item.name,
        "spec": item.spec,
        "status": "pending",
        "files": [f for f in item.files() if f != thumb],
        "hash": item.digest,
    }


def _failed(item: Item, error: BaseException) -> dict[str, Any]:
    return {
        "name": item.name,
        "spec": item.spec,
        "status": "failed",
        "error": f"{type(error).__name__}: {error}",
        "files": [],
        "hash": item.digest,
    }


def run_scene(
    items: list[Item],
    out_dir: str | os.PathLike[str],
    /,
    *,
    executor: cf.Executor | None = None,
    jobs: int | None = None,
    force: bool = False,
    progress: bool = True,
    title: str = "orbviz scene",
    note: Callable[[str], None] | None = None,
) -> dict[str, Any]:
    """Run every item; keep ``out_dir/manifest.json`` current; write ``out_dir/index.html``.

    Parameters
    ----------
    items : list of Item
        From :func:`orbviz.scenes.load.load_scene` (``.items``).
    out_dir : path-like
        Output folder (created if missing). Another batch writing into it is refused.
    executor : concurrent.futures.Executor, optional
        Where items run; default a process pool of spawned workers, sized by ``jobs``, cores
        and memory. A process pool passed in should spawn its workers too
        (``mp_context=get_context("spawn")``): a forked pool made after VTK or numexpr started
        threads in the parent can hang.
    jobs : int, optional
        Workers of the default pool (default: one per core, fewer if memory is short).
    force : bool, default: False
        Redo items even if unchanged.
    progress : bool, default: True
        Show a progress bar with item names and an ETA on stderr.
    title : str
        Heading of the contact sheet.
    note : callable, optional
        Receives remarks for the user (a capped worker count).

    Returns
    -------
    dict
        The manifest: ``{"title", "items": [entry, ...]}`` in scene order.
    """
    out = Path(out_dir)
    if out.exists() and not out.is_dir():
        raise OutputError(f"cannot write into {str(out)!r}: it exists and is not a folder")
    thumbs = out / "thumbs"
    if thumbs.exists() and not thumbs.is_dir():
        raise OutputError(f"cannot write into {str(thumbs)!r}: it exists and is not a folder")
    try:
        thumbs.mkdir(parents=True, exist_ok=True)
    except OSError as error:
        raise OutputError(f"cannot write into {str(out)!r}: {error.strerror or error}") from None
    with folder_lock(out):
        return _run_locked(items, out, executor, jobs, force, progress, title, note)


def _run_locked(
    items: list[Item],
    out: Path,
    executor: cf.Executor | None,
    jobs: int | None,
    force: bool,
    progress: bool,
    title: str,
    note: Callable[[str], None] | None,
) -> dict[str, Any]:
    before = previous(out)
    entries: dict[str, dict[str, Any]] = {}
    todo = []
    for item in items:
        old = before.get(item.name)
        if not force and unchanged(old, item.digest, out):
            assert old is not None
            entries[item.name] = {**old, "status": "skipped"}
        else:
            todo.append(item)
            # listed before any worker starts, so a batch killed at any instant leaves no
            # unlisted file; a rerun redoes a pending item
            entries[item.name] = _pending(item)
    manifest: dict[str, Any] = {"title": title, "items": []}

    def save() -> None:
        manifest["items"] = [entries[i.name] for i in items if i.name in entries]
        write_manifest(out, manifest)

    save()
    if todo:
        _run_items(todo, out, executor, jobs, progress, entries, save, note)
    save()
    scene_page, left_out = write_scene_page(out, manifest)
    if left_out and note is not None:
        note(
            f"{', '.join(left_out)} offer other levels than the other pages: left out of "
            f"{scene_page}"
        )
    write_contact_sheet(out, manifest, scene_page=scene_page)
    return manifest


def _run_items(
    todo: list[Item],
    out: Path,
    executor: cf.Executor | None,
    jobs: int | None,
    progress: bool,
    entries: dict[str, dict[str, Any]],
    save: Callable[[], None],
    note: Callable[[str], None] | None,
) -> None:
    pool = executor
    if pool is None:
        count, remark = plan_jobs(todo, jobs)
        if remark and note:
            note(remark)
        pool = _pool(count)
    bar = None
    if progress:
        from tqdm import tqdm

        bar = tqdm(
            total=len(todo), unit="item", desc="orbviz batch", dynamic_ncols=True, disable=None
        )
    futures: dict[cf.Future[dict[str, Any]], Item] = {}
    try:
        futures = {pool.submit(run_item, item, str(out)): item for item in todo}
        for future in cf.as_completed(futures):
            item = futures[future]
            try:
                entries[item.name] = future.result()
            except Exception as error:  # noqa: BLE001 - a lost worker fails its item only
                entries[item.name] = _failed(item, error)
            save()
            if bar is not None:
                bar.set_postfix_str(item.name)
                bar.update()
    except BaseException:
        if executor is None:  # interrupted: stop the workers now, not after their items
            for process in list(getattr(pool, "_processes", {}).values()):
                process.terminate()
        raise
    finally:
        if bar is not None:
            bar.close()
        if executor is None:
            pool.shutdown(wait=True, cancel_futures=True)
