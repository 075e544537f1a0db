"""Fixtures shared by the tests of the command line.

Two ways to run a command: ``cli`` in this process (typer's test runner: fast, and the result
carries any exception), and ``cli_process`` as ``python -m coordination`` in a process of its own
(what ``main`` adds around the commands: exit codes, streams written in full, one-line errors).
"""

from __future__ import annotations

import subprocess
import sys
from collections.abc import Callable
from pathlib import Path

import pytest
from typer.testing import CliRunner, Result

from coordination.cli import app

#: The checkout's root: processes run from here, as a user runs them from the checkout.
ROOT = Path(__file__).resolve().parents[1]


@pytest.fixture(scope="session")
def cli() -> Callable[..., Result]:
    """Run a command in this process: ``cli("check", path, "--json")``.

    Returns
    -------
    Callable[..., Result]
        Takes the command line's words (paths and numbers are turned into text) and returns
        typer's result: ``exit_code``, ``stdout``, ``stderr``, ``stdout_bytes``, ``exception``.
    """
    runner = CliRunner()

    def invoke(*args: object) -> Result:
        return runner.invoke(app, [str(a) for a in args])

    return invoke


@pytest.fixture(scope="session")
def cli_process() -> Callable[..., subprocess.CompletedProcess]:
    """Run ``python -m coordination`` with these words in a process of its own, from the root.

    Returns
    -------
    Callable[..., subprocess.CompletedProcess]
        Takes the command line's words and ``text`` (decode the streams; bytes by default) and
        returns the finished process, whatever its exit code (at most 120 s).
    """

    def run(*args: object, text: bool = False) -> subprocess.CompletedProcess:
        return subprocess.run([sys.executable, "-m", "coordination", *map(str, args)],
                              capture_output=True, text=text, cwd=ROOT, timeout=120, check=False)

    return run
