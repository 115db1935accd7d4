"""Running the pairflip command line in-process or as a real subprocess."""

from __future__ import annotations

import os
import subprocess
import sys
from dataclasses import dataclass
from pathlib import Path

TESTS = Path(__file__).resolve().parents[1]
HELPERS = TESTS / "helpers"
PYTHON = sys.executable


@dataclass
class Run:
    code: int
    stdout: str
    stderr: str


def run_cli(args: list[str]) -> Run:
    """``pairflip ARGS`` through the typer app in this process (fast; shares the test's threads)."""
    from typer.testing import CliRunner

    from pairflip.cli import app

    res = CliRunner().invoke(app, args)
    return Run(res.exit_code, res.stdout, res.stderr)


def run_pairflip(args: list[str], *, timeout: float = 120, cwd: Path | None = None) -> Run:
    """``pairflip ARGS`` as a real process, with tests/ importable (for helpers.* model specs)."""
    env = dict(os.environ, PYTHONPATH=str(TESTS) + os.pathsep + os.environ.get("PYTHONPATH", ""))
    proc = subprocess.run(
        [PYTHON, "-c", "from pairflip.cli import main; main()", *args],
        capture_output=True, text=True, timeout=timeout, env=env, cwd=cwd,
    )
    return Run(proc.returncode, proc.stdout, proc.stderr)


def line_model(*options: str) -> str:
    """The ``cmd:`` SPEC of the JSON Lines test model script."""
    import shlex

    return "cmd:" + " ".join(shlex.quote(x) for x in [PYTHON, str(HELPERS / "line_model.py"), *options])
