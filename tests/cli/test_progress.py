"""Progress on standard error: only on a terminal, never with ``--json``, never in the output.

End to end, standard error is a pseudo-terminal and standard output a pipe, as when a
user runs ``changeover route ... > crossings.txt`` at the console. In-process, the work
is stubbed to see what the command hands it: ``progress=`` when the work takes it, and
nothing when it does not (the same command either way).
"""

from __future__ import annotations

import json
import os
import pty
import subprocess
import sys
import threading

import pytest
from typer.testing import CliRunner

from planner.cli import app, progress
from tests.helpers.paths import ROOT

ROUTE = ["route", "areas_sample/aldmere_to_skarvik.csv", "--areas", "areas_sample",
         "--depart", "2027-05-30T06:00+12:00"]
runner = CliRunner()


NO_DELAY = ("import sys; from planner.cli.progress import SimulationsBar; "
            "SimulationsBar.DELAY_S = 0.0; from planner.cli import main; "
            "sys.argv[0] = 'changeover'; main()")
"""The command line with the Monte Carlo bar's quiet time set to 0, so that whether the bar
is drawn does not depend on how fast this machine runs the simulations."""


def on_terminal(*args: str, no_delay: bool = False) -> tuple[str, str, int]:
    """Run with standard error on a pseudo-terminal: (standard output, what the terminal
    got, exit status)."""
    master, slave = pty.openpty()
    env = {**os.environ, "TERM": "xterm-256color"}
    start = ["-c", NO_DELAY] if no_delay else ["-m", "planner"]
    proc = subprocess.Popen([sys.executable, *start, *args], cwd=ROOT, env=env,
                            stdout=subprocess.PIPE, stderr=slave)
    os.close(slave)
    got: list[bytes] = []

    def drain() -> None:
        while True:
            try:
                data = os.read(master, 4096)
            except OSError:  # the other side closed
                return
            if not data:
                return
            got.append(data)

    reader = threading.Thread(target=drain)
    reader.start()
    out, _ = proc.communicate(timeout=180)
    reader.join(timeout=10)
    os.close(master)
    return out.decode(), b"".join(got).decode(errors="replace"), proc.returncode


def test_route_status_on_the_terminal_never_in_the_output():
    out, terminal, status = on_terminal(*ROUTE)
    assert status == 0, terminal
    # the first status, or the finer texts geo reports while it checks the areas
    assert "checking the route" in terminal or "crossings: area 1 of 3" in terminal
    piped = subprocess.run([sys.executable, "-m", "planner", *ROUTE], cwd=ROOT,
                           capture_output=True, text=True, timeout=120)
    assert out == piped.stdout and "\x1b" not in out
    assert piped.stderr == ""


def test_json_on_a_terminal_shows_nothing():
    out, terminal, status = on_terminal(*ROUTE, "--json")
    assert status == 0, terminal
    assert terminal == ""
    assert json.loads(out)["crossings"]


def test_flush_monte_carlo_bar_on_the_terminal():
    out, terminal, status = on_terminal("flush", "areas_sample/ship.toml", "--circuit", "main",
                                        "--confidence", "0.9", "--samples", "100",
                                        no_delay=True)
    assert status == 0, terminal
    assert "Monte Carlo main: simulations" in terminal
    assert "Circuits" in out and "\x1b" not in out


def test_progress_goes_only_to_work_that_takes_it():
    def old(path): ...

    def new(path, *, progress=None): ...

    def say(text: str) -> None: ...

    assert progress.progress_kwargs(old, say) == {}
    assert progress.progress_kwargs(new, say) == {"progress": say}
    assert progress.progress_kwargs(new, None) == {}


class _Terminal:
    def isatty(self) -> bool:
        return True

    def write(self, text: str) -> int:
        return len(text)

    def flush(self) -> None:
        pass


def test_json_turns_progress_off_even_on_a_terminal(monkeypatch):
    monkeypatch.setattr(sys, "stderr", _Terminal())
    assert progress.shown(json_out=False) and not progress.shown(json_out=True)
    with progress.status("working", json_out=True) as say:
        assert say is None
    bar = progress.SimulationsBar(json_out=True)
    bar.DELAY_S = 0.0
    with bar:
        bar(1, 10)
    assert bar._bar is None


class _Recorder:
    """Stands in for rich's Progress: records the bars added."""

    def __init__(self, **kwargs: object) -> None:
        self.tasks: list[str] = []
        self.done: dict[int, int] = {}

    def start(self) -> None: ...

    def stop(self) -> None: ...

    def add_task(self, description: str, total: int) -> int:
        self.tasks.append(description)
        return len(self.tasks) - 1

    def update(self, task: int, completed: int, total: int) -> None:
        self.done[task] = completed


def test_one_bar_per_circuit(monkeypatch):
    monkeypatch.setattr(progress, "shown", lambda json_out: not json_out)
    monkeypatch.setattr("rich.progress.Progress", _Recorder)
    bar = progress.SimulationsBar(json_out=False)
    bar.DELAY_S = 0.0
    with bar:
        for circuit, total in (("main", 30), ("boiler", 20)):
            bar.circuit = circuit
            for done in range(0, total + 1, 10):
                bar(done, total)
    assert bar._bar.tasks == ["Monte Carlo main: simulations",
                              "Monte Carlo boiler: simulations"]
    assert bar._bar.done == {0: 30, 1: 20}


class Reached(Exception):
    """The work was called."""


@pytest.mark.parametrize("takes_progress", [True, False])
def test_route_and_areas_pass_their_status_either_way(monkeypatch, takes_progress: bool):
    monkeypatch.setattr(progress, "shown", lambda json_out: not json_out)
    monkeypatch.chdir(ROOT)
    seen: list[dict] = []

    def work_new(*args, progress=None):
        seen.append({"progress": progress})
        if progress:
            progress("reading areas 1/1")
        raise Reached

    def work_old(*args):
        seen.append({})
        raise Reached

    work = work_new if takes_progress else work_old
    monkeypatch.setattr("planner.voyage.run.run_route_check", work)
    monkeypatch.setattr("geo.area_files.load_areas", work)
    for args in (ROUTE, ["areas", "areas_sample"]):
        for json_out in ([], ["--json"]):
            r = runner.invoke(app, [*args, *json_out])
            assert isinstance(r.exception, Reached), r.output
            given = seen.pop()
            if takes_progress:
                assert callable(given["progress"]) != bool(json_out), (args, json_out)
            else:
                assert given == {}
