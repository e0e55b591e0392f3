"""The processor the benchmarks ran on, as /proc/cpuinfo names it (plain helper, no timing)."""

from __future__ import annotations

import platform
from pathlib import Path


def cpu_model() -> str:
    """The first ``model name`` of /proc/cpuinfo (Linux), else what :mod:`platform` knows."""
    try:
        for line in Path("/proc/cpuinfo").read_text().splitlines():
            if line.startswith("model name"):
                return line.split(":", 1)[1].strip()
    except OSError:
        pass
    return platform.processor() or platform.machine()
