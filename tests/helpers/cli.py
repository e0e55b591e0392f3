"""Running the command line as a user does: ``python -m planner ARGS`` from the repository."""

from __future__ import annotations

import subprocess
import sys

from tests.helpers.paths import ROOT


def changeover(*args: str, timeout: float = 300) -> subprocess.CompletedProcess:
    """``changeover ARGS`` in a new process from the repository root, output captured."""
    return subprocess.run([sys.executable, "-m", "planner", *args], cwd=ROOT,
                          capture_output=True, text=True, timeout=timeout)


def changeover_ok(*args: str, timeout: float = 300) -> subprocess.CompletedProcess:
    """:func:`changeover`, asserting that it succeeded (its standard error shown if not)."""
    r = changeover(*args, timeout=timeout)
    assert r.returncode == 0, r.stderr
    return r
