"""Everything the README shows after its quick start works as written.

The shell blocks are run command by command (``orbviz`` as this interpreter's ``-m orbviz``) in a
fresh folder holding a copy of the gallery scenes; the console blocks must print what they show;
the Python block runs as written. The README is the outside reference here: a newcomer's copy.
"""

from __future__ import annotations

import re
import shlex
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
README = (ROOT / "README.md").read_text(encoding="utf-8")
USAGE = README[README.index("## Usage") : README.index("## Units and conventions")]


def _blocks(kind: str) -> list[str]:
    return re.findall(rf"```{kind}\n(.*?)```", USAGE, re.S)


def _orbviz(argv: list[str]) -> list[str]:
    assert argv[0] == "orbviz", argv
    return [sys.executable, "-m", "orbviz", *argv[1:]]


@pytest.fixture(scope="module")
def workdir(tmp_path_factory) -> Path:
    folder = tmp_path_factory.mktemp("readme")
    shutil.copytree(ROOT / "gallery_scenes", folder / "gallery_scenes")
    return folder


COMMANDS = [line for block in _blocks("bash") for line in block.splitlines() if line.strip()]


@pytest.mark.slow
@pytest.mark.parametrize("line", COMMANDS)
def test_shell_commands_run(workdir, line):
    argv = shlex.split(line, comments=True)
    result = subprocess.run(_orbviz(argv), cwd=workdir, capture_output=True, text=True)
    assert result.returncode == 0, result.stderr
    assert "error" not in result.stderr


@pytest.mark.slow
@pytest.mark.parametrize("block", _blocks("console"))
def test_console_blocks_print_what_they_show(workdir, block):
    command, *shown = block.strip().splitlines()
    assert command.startswith("$ ")
    result = subprocess.run(
        _orbviz(shlex.split(command[2:])), cwd=workdir, capture_output=True, text=True
    )
    printed = (result.stdout + result.stderr).strip().splitlines()
    assert printed == shown


@pytest.mark.slow
@pytest.mark.parametrize("block", _blocks("python"))
def test_python_block_runs(workdir, block):
    result = subprocess.run(
        [sys.executable, "-c", block], cwd=workdir, capture_output=True, text=True
    )
    assert result.returncode == 0, result.stderr
