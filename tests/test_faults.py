"""Faults: interrupts, closed pipes, killed and concurrent batches, resume checks, memory, Dask.

What the tests hold orbviz to comes from outside the code under test:

- POSIX signal semantics: SIGINT and SIGTERM may arrive at any instant; SIGKILL cannot be caught,
  so what a killed batch leaves behind must already be consistent; a process whose parent is
  gone is re-parented, and ``kill(pid, 0)`` tells whether a pid still runs.
- The exit statuses documented in ``orbviz/cli/__init__.py`` (0 done, 2 bad input, 130
  interrupted) and DESIGN.md's file rule: "every command ... replaces the whole set at the end
  (restoring on failure). Interrupts leave nothing new behind."
- docs/scenes.md: the manifest lists each item's files; reruns skip unchanged items; potential
  tables are read beside the scene.
- The issue's requirements, quoted where they apply (a killed batch leaves no live worker and no
  unlisted file; a second batch into a busy folder is refused naming the first one's pid; resume
  checks the files' contents; a worker's memory stays flat over 50 items; any Executor works).
"""

from __future__ import annotations

import dataclasses
import hashlib
import json
import os
import signal
import struct
import subprocess
import sys
import time
from pathlib import Path

import numpy as np
import pytest

from orbviz.scenes.load import parse_scene
from orbviz.scenes.runner import run_scene

ORBVIZ = [sys.executable, "-m", "orbviz"]
BOOKKEEPING = {"manifest.json", "index.html", ".orbviz-batch.lock", "thumbs"}


def _env() -> dict[str, str]:
    env = {k: v for k, v in os.environ.items() if k != "ORBVIZ_DEBUG"}
    return {**env, "MPLBACKEND": "Agg"}


# --- processes, read from /proc (proc(5)) ---------------------------------------------------


def _stat(pid: int) -> tuple[str, int, int, int] | None:
    """(state, ppid, process group, start time) of a process, or None if there is none."""
    try:
        text = Path(f"/proc/{pid}/stat").read_text()
    except OSError:
        return None
    fields = text.rsplit(")", 1)[1].split()
    return fields[0], int(fields[1]), int(fields[2]), int(fields[19])


def _alive(pid: int, start: int) -> bool:
    """The same process (pid and start time) still runs; a zombie has ended (proc(5))."""
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    now = _stat(pid)
    return now is not None and now[3] == start and now[0] not in ("Z", "X")


def _descendants(root: int) -> dict[int, int]:
    """Every process below ``root`` (by parent pid), with its start time."""
    table = {}
    for entry in Path("/proc").iterdir():
        if entry.name.isdigit() and (info := _stat(int(entry.name))) is not None:
            table[int(entry.name)] = info
    found: dict[int, int] = {}
    frontier = [root]
    while frontier:
        parent = frontier.pop()
        for pid, (state, ppid, _, start) in table.items():
            if ppid == parent and pid not in found and state not in ("Z", "X"):
                found[pid] = start
                frontier.append(pid)
    return found


def _group(pgid: int) -> list[int]:
    """Live (not zombie) processes of a process group."""
    members = []
    for entry in Path("/proc").iterdir():
        if entry.name.isdigit() and (info := _stat(int(entry.name))) is not None:
            if info[2] == pgid and info[0] not in ("Z", "X"):
                members.append(int(entry.name))
    return members


# --- files ------------------------------------------------------------------------------------


def _glb_whole(data: bytes) -> bool:
    """A GLB's 12-byte header names its total length (glTF 2.0 specification, section 4.4)."""
    if len(data) < 12:
        return False
    magic, version, length = struct.unpack_from("<4sII", data)
    return magic == b"glTF" and version == 2 and length == len(data)


def _listing(folder: Path) -> list[str]:
    return sorted(str(p.relative_to(folder)) for p in folder.rglob("*"))


def _parts(folder: Path) -> list[Path]:
    return [p for p in folder.rglob("*") if p.name.endswith(".part")]


def _part_pid(path: Path) -> int:
    """The writer's pid in a temporary's name, ``.NAME.PID.RANDOM.part`` (export/atomic.py)."""
    for piece in reversed(path.name[1:].split(".")):
        if piece.isdigit():
            return int(piece)
    raise AssertionError(f"no pid in {path.name}")


def _manifest(out: Path) -> dict:
    return json.loads((out / "manifest.json").read_text())


def _check_folder_consistent(out: Path) -> dict:
    """The issue's rule for a batch folder at any moment: every file is listed, listed files of
    finished items are whole (their recorded SHA-256), and no temporary belongs to a live
    process (so none can still be completed)."""
    manifest = _manifest(out)
    listed = set()
    for entry in manifest["items"]:
        listed.update(entry.get("files", []))
        if entry["status"] == "done":
            for name, expected in entry["checksums"].items():
                data = (out / name).read_bytes()
                assert hashlib.sha256(data).hexdigest() == expected["sha256"], name
    for path in out.iterdir():
        if path.name in BOOKKEEPING or path.name.endswith(".part"):
            continue
        assert path.name in listed, f"{path.name} is in the folder but not in manifest.json"
    for part in _parts(out):
        pid = _part_pid(part)
        assert _stat(pid) is None or _stat(pid)[0] in ("Z", "X"), f"{part} of live pid {pid}"
    return manifest


# --- 1. Ctrl-C and SIGTERM during a mesh write ------------------------------------------------


def _mesh(cwd: Path, program: list[str] = ORBVIZ) -> subprocess.Popen[bytes]:
    return subprocess.Popen(
        [*program, "mesh", "3dz2", "--grid", "384", "-o", "big.glb"],
        cwd=cwd,
        env=_env(),
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
    )


def _interrupted_mesh(folder: Path, delay: float, sig: int) -> tuple[int, str]:
    run = _mesh(folder)
    time.sleep(delay)
    run.send_signal(sig)  # does nothing if the run has already ended (it is polled first)
    _, err = run.communicate(timeout=120)
    return run.returncode, err.decode()


@pytest.mark.slow
def test_interrupt_during_mesh_write_leaves_nothing_new(tmp_path):
    # DESIGN.md: "Interrupts leave nothing new behind"; orbviz/cli: 130 means interrupted.
    # SIGINT and SIGTERM may land anywhere: in the imports, the sampling, the encoding, between
    # the temporary and the rename, or after the file is in place while the process exits.
    reference = tmp_path / "reference"
    reference.mkdir()
    start = time.monotonic()
    run = _mesh(reference)
    _, err = run.communicate(timeout=300)
    duration = time.monotonic() - start
    assert run.returncode == 0, err
    whole = (reference / "big.glb").read_bytes()
    assert _glb_whole(whole)
    old = b"old bytes that an interrupted run must leave exactly as they are\n"
    # before orbviz's own code runs, the interpreter's default SIGINT action applies (a
    # traceback): the earliest signal waits for that start, 0.1 s on an idle machine
    start = time.monotonic()
    subprocess.run([sys.executable, "-c", "import orbviz.cli"], env=_env(), check=True)
    first = max(0.1, 2.0 * (time.monotonic() - start))
    delays = [first, 0.3, 0.6, 1.0, 0.5 * duration]
    delays += [duration - d for d in (0.4, 0.25, 0.15, 0.05) if duration - d > 0.2]
    trials = [(d, signal.SIGINT, existing) for d in delays for existing in (False, True)]
    trials.append((0.5 * duration, signal.SIGTERM, True))
    outcomes = []
    for index, (delay, sig, existing) in enumerate(trials):
        folder = tmp_path / f"run{index}"
        folder.mkdir()
        if existing:
            (folder / "big.glb").write_bytes(old)
        before = _listing(folder)
        status, err = _interrupted_mesh(folder, delay, sig)
        outcomes.append((round(delay, 2), sig.name, existing, status))
        assert "Traceback" not in err and "internal error" not in err, err
        if status == 130:  # interrupted: the folder is exactly as it was
            assert err.strip().splitlines()[-1] == "orbviz: interrupted", err
            assert _listing(folder) == before, outcomes[-1]
            if existing:
                assert (folder / "big.glb").read_bytes() == old
        else:  # it had already finished: the whole new file, nothing else
            assert status == 0, (outcomes[-1], err)
            assert (folder / "big.glb").read_bytes() == whole
            assert _listing(folder) == ["big.glb"]
        if delay <= 0.5 * duration:  # well before the end: the signal must stop the run
            assert status == 130, (outcomes[-1], err)
    print(f"mesh run {duration:.2f} s; interrupts (delay s, signal, old file, status): {outcomes}")


@pytest.mark.slow
def test_interrupt_while_vtk_is_imported_never_crashes(tmp_path):
    # An interrupt raised inside the import of a compiled extension (VTK, imported when the
    # figure opens its window) used to leave it half made: 5 of 42 trials here ended in a
    # segmentation fault (status -11) instead of exit 130. Every trial must now end 130, or 0
    # if the run finished first, with no file or a whole one. The delays are spread over the
    # length of an uninterrupted run measured here (the shorter of two), so they land in the
    # imports however fast the machine renders: fixed delays of 0.3-1.1 s missed the run on a
    # machine where it takes 0.6 s.
    import time

    command = [*ORBVIZ, "render", "3d", "--grid", "32", "-o", str(tmp_path / "z.png")]
    durations = []
    for _ in range(2):
        start = time.perf_counter()
        subprocess.run(command, env=_env(), cwd=tmp_path, check=True, capture_output=True)
        durations.append(time.perf_counter() - start)
    (tmp_path / "z.png").unlink()
    statuses = []
    for delay in np.linspace(0.15, 0.9, 20) * min(durations):
        target = tmp_path / "z.png"
        proc = subprocess.Popen(
            command,
            env=_env(),
            cwd=tmp_path,
            stdout=subprocess.DEVNULL,
            stderr=subprocess.DEVNULL,
        )
        time.sleep(float(delay))
        proc.send_signal(signal.SIGINT)
        statuses.append(proc.wait(timeout=120))
        assert not list(tmp_path.glob("*.part*"))
        if statuses[-1] == 130:
            assert not target.exists()
        target.unlink(missing_ok=True)
    print(f"render run {min(durations):.2f} s; exit statuses: {statuses}")
    assert set(statuses) <= {0, 130}, (min(durations), statuses)
    assert statuses.count(130) >= len(statuses) // 2, (min(durations), statuses)


@pytest.mark.slow
@pytest.mark.parametrize("sig", [signal.SIGINT, signal.SIGTERM], ids=["SIGINT", "SIGTERM"])
@pytest.mark.parametrize("program", ["-m orbviz", "orbviz script"])
def test_interrupt_once_the_file_is_in_place_is_too_late(tmp_path, sig, program):
    # a signal that lands after the output is whole in place (while the process prints and shuts
    # down) cannot undo the run: exit 0 with the whole file, not 130 and not death by the signal
    # (which would report "interrupted" with a new file behind)
    command = ORBVIZ if program == "-m orbviz" else [str(Path(sys.executable).parent / "orbviz")]
    run = _mesh(tmp_path, command)
    while not (tmp_path / "big.glb").exists():
        assert run.poll() is None, run.communicate()
        time.sleep(0.001)
    run.send_signal(sig)
    _, err = run.communicate(timeout=120)
    assert run.returncode == 0, (run.returncode, err.decode())
    assert _glb_whole((tmp_path / "big.glb").read_bytes())
    assert _listing(tmp_path) == ["big.glb"]


@pytest.mark.slow
def test_sigkill_during_mesh_write_leaves_old_or_whole_file(tmp_path):
    # SIGKILL cannot be caught (POSIX), so no cleanup runs: what is on disk at any instant must
    # already be safe. The target is the old file or the whole new one, never missing or cut;
    # a temporary left by the dead process is removed by the next write (export/atomic.py)
    reference = tmp_path / "reference"
    reference.mkdir()
    start = time.monotonic()
    run = _mesh(reference)
    run.communicate(timeout=300)
    duration = time.monotonic() - start
    whole = (reference / "big.glb").read_bytes()
    old = b"old bytes\n"
    seen = []
    for index, delay in enumerate([0.3, 0.6] + [duration - d for d in (0.3, 0.2, 0.1, 0.05)]):
        folder = tmp_path / f"run{index}"
        folder.mkdir()
        (folder / "big.glb").write_bytes(old)
        status, _ = _interrupted_mesh(folder, max(delay, 0.1), signal.SIGKILL)
        now = (folder / "big.glb").read_bytes()
        assert now in (old, whole), (delay, status, len(now))
        leftovers = [p.name for p in folder.iterdir() if p.name != "big.glb"]
        seen.append(("old" if now == old else "new", len(leftovers)))
        assert all(n.startswith(".big.glb.") and n.endswith(".part") for n in leftovers), leftovers
    # and the moment the writer starts writing: the first change in the folder
    for index in range(3):
        folder = tmp_path / f"first-write{index}"
        folder.mkdir()
        (folder / "big.glb").write_bytes(old)
        run = _mesh(folder)
        while len(os.listdir(folder)) == 1 and (folder / "big.glb").stat().st_size == len(old):
            assert run.poll() is None, "the run ended unseen"
            time.sleep(0.0005)
        run.kill()
        run.communicate(timeout=60)
        now = (folder / "big.glb").read_bytes()
        assert now in (old, whole), ("first write", len(now))
        leftovers = [p.name for p in folder.iterdir() if p.name != "big.glb"]
        seen.append(("old" if now == old else "new", len(leftovers)))
        assert all(n.startswith(".big.glb.") and n.endswith(".part") for n in leftovers), leftovers
        if leftovers:  # what the dead process left is removed by the next write to the path
            rerun = _mesh(folder)
            rerun.communicate(timeout=300)
            assert rerun.returncode == 0 and _listing(folder) == ["big.glb"]
    print(f"SIGKILL during a {duration:.2f} s mesh run: (file, temporaries left) {seen}")
    assert any(kind == "old" for kind, _ in seen)  # a kill landed before the file was placed


def test_next_write_removes_temporaries_of_dead_writers_only(tmp_path):
    # export/atomic.py: temporaries are named .NAME.PID.RANDOM.part, and those of a process that
    # is gone are removed on the next write to the same path; the issue: a .part that a live
    # process could still complete is left alone
    dead = subprocess.Popen(["true"])  # a process that has ended: its pid is free
    dead.wait()
    stale = tmp_path / f".big.glb.{dead.pid}.abc123.part"
    live = tmp_path / f".big.glb.{os.getpid()}.def456.part"  # this test process runs on
    stale.write_bytes(b"half")
    live.write_bytes(b"half")
    run = subprocess.run(
        [*ORBVIZ, "mesh", "2pz", "--grid", "48", "-o", str(tmp_path / "big.glb")],
        env=_env(),
        capture_output=True,
        timeout=300,
    )
    assert run.returncode == 0, run.stderr.decode()
    assert not stale.exists() and live.exists()
    assert _glb_whole((tmp_path / "big.glb").read_bytes())


def test_a_system_refusal_while_writing_is_one_line_and_keeps_the_old_file(tmp_path):
    # write(2): EFBIG when a file would pass the process's size limit (RLIMIT_FSIZE,
    # setrlimit(2)); Python ignores SIGXFSZ, so the write fails with an OSError
    import resource

    target = tmp_path / "keep.glb"
    target.write_bytes(b"old")

    def limit() -> None:
        resource.setrlimit(resource.RLIMIT_FSIZE, (20_000, 20_000))

    run = subprocess.run(
        [*ORBVIZ, "mesh", "2pz", "--grid", "48", "-o", str(target)],
        env=_env(),
        capture_output=True,
        timeout=300,
        preexec_fn=limit,
    )
    err = run.stderr.decode()
    assert run.returncode == 2 and err.count("\n") == 1, err
    assert "cannot write" in err and "File too large" in err and "internal error" not in err
    assert target.read_bytes() == b"old"
    assert [p.name for p in tmp_path.iterdir()] == ["keep.glb"]  # no temporary left


def test_a_name_near_the_limit_still_writes(tmp_path):
    # NAME_MAX is 255 bytes (POSIX limits.h); temporaries add a pid and a random part, so
    # their stem is cut to 120 bytes and a 250-byte name still writes
    target = tmp_path / ("b" * 246 + ".glb")
    run = subprocess.run(
        [*ORBVIZ, "mesh", "2pz", "--grid", "32", "-o", str(target)],
        env=_env(),
        capture_output=True,
        timeout=300,
    )
    assert run.returncode == 0, run.stderr.decode()
    assert _glb_whole(target.read_bytes()) and len(list(tmp_path.iterdir())) == 1


# --- 2. A closed pipe -------------------------------------------------------------------------


def _quiet(err: str) -> bool:
    return not any(w in err for w in ("BrokenPipeError", "internal error", "Traceback", "ignored"))


def test_closed_pipe_ends_quietly(tmp_path):
    # `orbviz info 3dz2 | head -1`: the reader goes away; the writer must end without noise.
    # (a) the reader is gone before the first write, so the write surely fails (EPIPE, pipe(7))
    for extra in ([], ["--json"]):
        reader, writer = os.pipe()
        os.close(reader)
        run = subprocess.run(
            [*ORBVIZ, "info", "3dz2", *extra],
            stdout=writer,
            stderr=subprocess.PIPE,
            env=_env(),
            timeout=120,
        )
        os.close(writer)
        err = run.stderr.decode()
        assert run.returncode == 0 and _quiet(err), (extra, run.returncode, err)
    # (b) the reader takes one line and closes its end, as `head -1` does
    with subprocess.Popen(
        [*ORBVIZ, "info", "3dz2"],
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        env={**_env(), "PYTHONUNBUFFERED": "1"},  # write line by line: later lines hit the close
    ) as run:
        assert run.stdout is not None and run.stderr is not None
        assert run.stdout.readline().startswith(b"orbital")
        run.stdout.close()
        err = run.stderr.read().decode()
        assert run.wait(timeout=120) == 0 and _quiet(err), err


# --- batches run as processes -----------------------------------------------------------------

SCENE = """
title = "faults"
[defaults]
grid = 64
outputs = ["png", "glb"]
render = { size = "320x240" }

[[shells]]
n = [1, 3]
"""  # 1 + 9 = 10 items


_GROUPS: list[int] = []  # process groups of the batches started here, ended after each test


@pytest.fixture(autouse=True)
def _no_process_outlives_its_test():
    yield
    while _GROUPS:
        pgid = _GROUPS.pop()
        if _group(pgid):  # a failed test's leftovers: end them, whatever the test found
            os.killpg(pgid, signal.SIGKILL)


def _batch(scene: Path, out: Path, *extra: str, log: Path | None = None) -> subprocess.Popen[bytes]:
    with open(log or os.devnull, "wb") as sink:  # the child keeps its own copy
        run = subprocess.Popen(
            [*ORBVIZ, "batch", str(scene), "-o", str(out), "--jobs", "2", "--no-progress", *extra],
            env=_env(),
            stdout=subprocess.DEVNULL,
            stderr=sink,
            start_new_session=True,  # its own process group, to find every process of the batch
        )
    _GROUPS.append(run.pid)
    return run


def _wait_for_done(out: Path, run: subprocess.Popen[bytes], count: int = 1) -> None:
    deadline = time.monotonic() + 300
    while time.monotonic() < deadline:
        assert run.poll() is None, "the batch ended before the moment to stop it"
        try:
            done = [e for e in _manifest(out)["items"] if e["status"] == "done"]
        except (OSError, ValueError, KeyError):
            done = []
        if len(done) >= count:
            return
        time.sleep(0.02)
    raise AssertionError("no item finished")


def _scene(folder: Path, text: str = SCENE) -> Path:
    folder.mkdir(parents=True, exist_ok=True)
    scene = folder / "scene.toml"
    scene.write_text(text)
    return scene


def _assert_all_gone(processes: dict[int, int], pgid: int) -> None:
    assert processes, "the batch had no worker processes to check"
    left = [pid for pid, start in processes.items() if _alive(pid, start)]
    assert not left, f"processes of the batch still running: {left}"
    assert not _group(pgid), f"processes of the batch's group still running: {_group(pgid)}"


@pytest.mark.slow
def test_sigkill_of_batch_parent_leaves_no_worker_and_no_unlisted_file(tmp_path):
    # the issue: "SIGKILL the parent; 5 s later no worker process of that batch is alive, and
    # every file in DIR ... is listed in manifest.json"; SIGKILL cannot be caught (POSIX)
    scene, out = _scene(tmp_path / "scene"), tmp_path / "out"
    run = _batch(scene, out)
    _wait_for_done(out, run)
    workers = _descendants(run.pid)
    run.kill()
    assert run.wait(timeout=60) == -signal.SIGKILL
    time.sleep(5)
    _assert_all_gone(workers, run.pid)
    manifest = _check_folder_consistent(out)
    assert 1 <= sum(e["status"] == "done" for e in manifest["items"]) < 10
    quiet = _listing(out)
    time.sleep(1)
    assert _listing(out) == quiet  # no live writer is left
    # a rerun takes the lock at once, redoes what is missing and cleans up dead temporaries
    rerun = subprocess.run(
        [*ORBVIZ, "batch", str(scene), "-o", str(out), "--no-progress"],
        env=_env(),
        capture_output=True,
        timeout=600,
    )
    assert rerun.returncode == 0, rerun.stderr.decode()
    manifest = _check_folder_consistent(out)
    assert {e["status"] for e in manifest["items"]} <= {"done", "skipped"}
    assert sum(e["status"] == "skipped" for e in manifest["items"]) >= 1
    assert not _parts(out), _parts(out)


@pytest.mark.slow
@pytest.mark.parametrize("whom", ["SIGTERM to the batch", "SIGINT to its group"])
def test_stopped_batch_stops_its_workers_and_writes_no_more(tmp_path, whom):
    # SIGTERM is a request to stop (POSIX); Ctrl-C at a terminal sends SIGINT to the whole
    # foreground process group, workers included (POSIX job control). Either way: exit 130 with
    # one line (orbviz/cli), no worker left, nothing written after the end
    scene, out = _scene(tmp_path / "scene"), tmp_path / "out"
    log = tmp_path / "stderr.txt"
    run = _batch(scene, out, log=log)
    _wait_for_done(out, run)
    workers = _descendants(run.pid)
    if whom == "SIGTERM to the batch":
        run.terminate()
    else:
        os.killpg(run.pid, signal.SIGINT)
    assert run.wait(timeout=120) == 130
    assert log.read_text() == "orbviz: interrupted\n"  # one line, no worker's traceback
    time.sleep(2)
    _assert_all_gone(workers, run.pid)
    after_exit = _listing(out)
    manifest = _check_folder_consistent(out)
    assert sum(e["status"] == "done" for e in manifest["items"]) < 10
    time.sleep(1)
    assert _listing(out) == after_exit  # nothing writes after the batch has ended


# --- 4. Two batches into one folder -----------------------------------------------------------


def _lock_owner(out: Path) -> str:
    try:
        return (out / ".orbviz-batch.lock").read_text().strip()
    except OSError:
        return ""


@pytest.mark.slow
def test_second_batch_into_a_busy_folder_is_refused(tmp_path):
    # the issue: "the second is refused with exit 2 and one line naming the other's pid; after
    # the first ends (also when it was SIGKILLed), a new batch into the folder works"
    scene, out = _scene(tmp_path / "scene"), tmp_path / "out"
    second = [*ORBVIZ, "batch", str(scene), "-o", str(out), "--no-progress"]
    first = _batch(scene, out)
    _wait_for_done(out, first)
    assert _lock_owner(out) == str(first.pid)
    refused = subprocess.run(second, env=_env(), capture_output=True, timeout=120)
    err = refused.stderr.decode()
    assert refused.returncode == 2 and err.count("\n") == 1 and f"pid {first.pid}" in err, err
    assert first.wait(timeout=600) == 0
    after = subprocess.run(second, env=_env(), capture_output=True, timeout=600)
    assert after.returncode == 0, after.stderr.decode()
    statuses = {e["status"] for e in _manifest(out)["items"]}
    assert statuses == {"skipped"}
    # the lock dies with its holder: a batch killed with SIGKILL does not block the folder
    killed = _batch(scene, out, "--force")
    _wait_for_done(out, killed)
    killed.kill()
    killed.wait(timeout=60)
    after = subprocess.run(second, env=_env(), capture_output=True, timeout=600)
    assert after.returncode == 0, after.stderr.decode()


# --- 5. Resume checks file contents -----------------------------------------------------------

SMALL = """
[defaults]
grid = 32
outputs = ["png", "glb"]
render = { size = "160x120" }

[[orbital]]
spec = "1s"
[[orbital]]
spec = "2pz"
[[orbital]]
spec = "3dxy"
"""


@pytest.mark.slow
def test_rerun_redoes_exactly_the_damaged_items(tmp_path):
    # the issue: a file truncated to zero bytes or changed in place is not a finished output,
    # so a rerun redoes its item; docs/scenes.md: an unchanged item whose files are there skips
    items = parse_scene(SMALL, "small.toml").items
    first = run_scene(items, tmp_path, jobs=2, progress=False)
    assert [e["status"] for e in first["items"]] == ["done"] * 3
    (tmp_path / "1s.glb").write_bytes(b"")  # truncated to zero
    changed = bytearray((tmp_path / "2pz.png").read_bytes())
    changed[len(changed) // 2] ^= 0xFF  # same size, other content
    (tmp_path / "2pz.png").write_bytes(bytes(changed))
    again = run_scene(items, tmp_path, jobs=2, progress=False)
    assert [e["status"] for e in again["items"]] == ["done", "done", "skipped"]
    assert _glb_whole((tmp_path / "1s.glb").read_bytes())
    _check_folder_consistent(tmp_path)
    third = run_scene(items, tmp_path, jobs=2, progress=False)
    assert [e["status"] for e in third["items"]] == ["skipped"] * 3


@pytest.mark.slow
def test_pending_entry_names_every_file_its_item_writes(tmp_path):
    # orbviz/scenes/runner.py: before any worker starts, an item to do is listed as pending with
    # every file it may write (Item.files()), so that no file of a batch killed mid-item is
    # unlisted. That only holds if the list covers what the item really writes, companions too
    from orbviz.scenes.items import OUTPUTS

    text = (  # a superposition of different energies, so that it can be animated too
        "[[orbital]]\nspec = '1s + 2pz'\nname = 'mix'\ngrid = 32\n"
        "render = { size = '160x120' }\nanimate = { frames = 3, grid = 24, size = '80x60' }\n"
        f"outputs = {list(OUTPUTS)!r}\n"
    )
    (item,) = parse_scene(text, "all.toml").items
    (entry,) = run_scene([item], tmp_path, jobs=1, progress=False)["items"]
    assert entry["status"] == "done", entry.get("error")
    assert sorted(entry["files"]) == sorted(f for f in item.files() if f != "thumbs/mix.png")
    assert {"mix.mtl", "mix.bin", "mix-model.3mf", "mix-slice.svg", "mix.mp4"} <= set(
        entry["files"]
    )


# --- 6. A potential table ---------------------------------------------------------------------


def _coulomb_table(path: Path, scale: float = 1.0) -> None:
    """V = -scale / r on a log grid from 1e-6 to 2000 bohr (hartree)."""
    r = np.logspace(-6, np.log10(2000.0), 600)
    np.savetxt(path, np.column_stack([r, -scale / r]), header="r/bohr V/hartree")


TABLE_SCENE = """
[defaults]
grid = 32
outputs = ["glb"]

[[orbital]]
spec = "2pz"
name = "table-2pz"
potential = "table:{table}"

[[orbital]]
spec = "1s"
"""


@pytest.mark.slow
def test_changed_potential_table_is_redone(tmp_path):
    # docs/scenes.md: `potential` takes the command line's forms, table:FILE among them; the
    # issue: a relative table is read from the scene's folder, whatever the working folder, and
    # a changed table's item is redone (its outputs depend on the table's values)
    _scene(tmp_path / "scenes", TABLE_SCENE.format(table="pot.txt"))
    _coulomb_table(tmp_path / "scenes" / "pot.txt")
    elsewhere = tmp_path / "elsewhere"
    elsewhere.mkdir()
    command = [*ORBVIZ, "batch", "../scenes/scene.toml", "-o", "out", "--no-progress"]

    def statuses() -> dict[str, str]:
        run = subprocess.run(command, cwd=elsewhere, env=_env(), capture_output=True, timeout=600)
        assert run.returncode == 0, run.stderr.decode()
        return {e["name"]: e["status"] for e in _manifest(elsewhere / "out")["items"]}

    assert statuses() == {"table-2pz": "done", "1s": "done"}
    first = {e["name"]: e for e in _manifest(elsewhere / "out")["items"]}["table-2pz"]
    assert statuses() == {"table-2pz": "skipped", "1s": "skipped"}  # unchanged: skipped
    _coulomb_table(tmp_path / "scenes" / "pot.txt", scale=1.1)  # V scaled by 1.1
    assert statuses() == {"table-2pz": "done", "1s": "skipped"}
    second = {e["name"]: e for e in _manifest(elsewhere / "out")["items"]}["table-2pz"]
    # -1.1/r is hydrogen-like with Z = 1.1: |psi|^2 scales as Z^3 at scaled radii, so does the
    # level enclosing a fixed fraction (any textbook's scaling of hydrogen-like states)
    assert second["isovalue"] / first["isovalue"] == pytest.approx(1.1**3, rel=0.02)


def test_table_outside_the_scene_folder_needs_permission(tmp_path):
    # the issue: a table outside the scene's folder is refused unless --tables-anywhere
    outside = tmp_path / "tables"
    outside.mkdir()
    _coulomb_table(outside / "pot.txt")
    scene = _scene(tmp_path / "scenes", TABLE_SCENE.format(table="../tables/pot.txt"))
    refused = subprocess.run(
        [*ORBVIZ, "batch", str(scene), "-o", str(tmp_path / "out"), "--no-progress"],
        env=_env(),
        capture_output=True,
        timeout=120,
    )
    err = refused.stderr.decode()
    assert refused.returncode == 2 and err.count("\n") == 1, err
    assert "potential" in err and "scene's folder" in err
    assert not (tmp_path / "out").exists()
    from orbviz.scenes.load import load_scene

    items = load_scene(scene, tables_anywhere=True).items
    assert items[0].inputs[0][0] == str((outside / "pot.txt").resolve())


# --- 7. A worker's memory over many items -----------------------------------------------------


@pytest.mark.slow
def test_batch_worker_memory_stays_flat(tmp_path):
    # the issue: one worker running 50 figures holds within 10% of its memory after 5
    # (a figure that keeps its render window alive grows it by megabytes each). The first item
    # is complex, so the one-time imports (its cyclic colours load skimage.color and with it
    # scipy, ~20 MB) are made before item 5, as a g shell's first complex member would later.
    text = (
        "[defaults]\ngrid = 48\noutputs = ['png']\nrender = { size = '400x300' }\n"
        "[[orbital]]\nspec = '2,1,1'\nname = 'first'\n"
        "[[shells]]\nn = [1, 2, 3, 4, 5]\n"
    )
    items = parse_scene(text, "many.toml").items[:50]
    assert len(items) == 50
    manifest = run_scene(items, tmp_path, jobs=1, progress=False)
    entries = manifest["items"]
    assert all(e["status"] == "done" for e in entries), [e.get("error") for e in entries]
    rss = [e["rss_mb"] for e in entries]
    print(f"worker RSS after item 5: {rss[4]:.1f} MB, after item 50: {rss[49]:.1f} MB")
    assert rss[49] <= 1.10 * rss[4], rss


# --- 8. Dask --------------------------------------------------------------------------------


def _distributed():
    try:
        import distributed
    except ImportError:
        if os.environ.get("CI"):
            pytest.fail("distributed is not installed: the test extra must bring it")
        pytest.skip("distributed not installed (pip install 'distributed>=2024.1')")
    return distributed


@pytest.mark.slow
def test_scene_runs_on_a_dask_cluster(tmp_path):
    # docs/scenes.md, "Beyond one machine": a Dask client's executor runs the items
    distributed = _distributed()
    items = parse_scene(SMALL, "small.toml").items
    items = [dataclasses.replace(i, outputs=("png", "glb", "stl")) for i in items]
    with (
        distributed.LocalCluster(
            n_workers=2, threads_per_worker=1, processes=True, dashboard_address=None
        ) as cluster,
        distributed.Client(cluster) as client,
    ):
        manifest = run_scene(items, tmp_path, executor=client.get_executor(), progress=False)
        workers = set(client.run(os.getpid).values())
    assert [e["status"] for e in manifest["items"]] == ["done"] * 3, manifest
    assert len(workers) == 2 and os.getpid() not in workers
    for entry in manifest["items"]:
        assert set(entry["files"]) == {f"{entry['name']}.{k}" for k in ("png", "glb", "stl")}
    _check_folder_consistent(tmp_path)
    assert (tmp_path / "index.html").exists()
