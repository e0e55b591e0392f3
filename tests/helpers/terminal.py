"""Run the command line as a person does: on a terminal of a given width, or piped.

``on_tty(args, columns)`` gives the command a pseudo-terminal as standard output
(``COLUMNS`` set, as a shell does for a window that wide) and returns what it
printed; ``piped(args)`` runs it with standard output a pipe. Also an
independent degrees-and-minutes formatter and time texts, written out here from
their definitions (not the code under test) to find values in the text.
"""

from __future__ import annotations

import os
import pty
import subprocess
import sys
import threading
from datetime import UTC, datetime

from tests.helpers.paths import ROOT


def on_tty(args: list[str], columns: int, timeout: float = 180) -> str:
    """Standard output of ``changeover ARGS`` printed on a terminal ``columns`` wide."""
    master, slave = pty.openpty()
    env = {**os.environ, "COLUMNS": str(columns), "LINES": "50", "TERM": "dumb"}
    proc = subprocess.Popen([sys.executable, "-m", "planner", *args], cwd=ROOT, env=env,
                            stdout=slave, stderr=subprocess.DEVNULL)
    os.close(slave)
    got: list[bytes] = []

    def drain() -> None:
        while True:
            try:
                data = os.read(master, 65536)
            except OSError:
                return
            if not data:
                return
            got.append(data)

    reader = threading.Thread(target=drain)
    reader.start()
    proc.wait(timeout=timeout)
    reader.join(timeout=10)
    os.close(master)
    assert proc.returncode == 0
    return b"".join(got).decode().replace("\r\n", "\n")


def piped(args: list[str], timeout: float = 180) -> str:
    """Standard output of ``changeover ARGS`` with standard output a pipe."""
    env = {k: v for k, v in os.environ.items() if k != "COLUMNS"}
    r = subprocess.run([sys.executable, "-m", "planner", *args], cwd=ROOT, env=env,
                       capture_output=True, text=True, timeout=timeout)
    assert r.returncode == 0, r.stderr
    return r.stdout


def dm(value: float, hemispheres: str, width: int) -> str:
    """Degrees and minutes to 0.1' with its hemisphere: deg = ⌊|x|⌋, min = (|x| − deg)·60,
    rounded once with the carry into the degrees (common practice on charts)."""
    tenths = round(abs(value) * 600)
    deg, rem = divmod(tenths, 600)
    hemi = hemispheres[1] if value < 0 and tenths else hemispheres[0]
    return f"{deg:0{width}d}°{rem // 10:02d}.{rem % 10}'{hemi}"


def position(lat: float, lon: float) -> str:
    """``39°49.4'S 169°14.0'E``, longitude folded into [−180, 180)."""
    return f"{dm(lat, 'NS', 2)} {dm((lon + 180) % 360 - 180, 'EW', 3)}"


def moment(iso: str) -> datetime:
    return datetime.fromisoformat(iso.replace("Z", "+00:00"))


def utc_full(iso: str) -> str:
    """``2027-05-30 04:47Z``: ISO 8601 UTC, to the minute (truncated, as shown)."""
    return moment(iso).astimezone(UTC).strftime("%Y-%m-%d %H:%MZ")
