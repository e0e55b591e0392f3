"""``changeover --help`` stays quick, says everything, and the PROJ check stays with the work.

Quick is checked by what the help imports (a fresh ``python -X importtime -m planner``
per case), never by timing: not pyproj, numpy, shapely, matplotlib, reportlab or SciPy,
not the computing packages, not rich (typer's rich help and its markdown parser) and not
pydantic (typer's value checking, which a subcommand's help need not build). The wall
times are measured by ``tests/bench/bench_cli.py``. A PROJ library that is too old still
stops every computing command with one line and exit status 1 (a stand-in ``pyproj``
reporting PROJ 9.1.1 is put first on the path), and no longer stops the help.
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest

from planner.cli import AREAS, COMPUTING
from planner.cli.areas import areas_app
from planner.cli.log import log_app
from tests.helpers.paths import ROOT

FORBIDDEN = ("pyproj", "numpy", "shapely", "matplotlib", "reportlab", "scipy", "rich",
             "markdown_it", "pydantic", "pyogrio")
"""Top-level packages the help must not import."""

COMPUTING_PACKAGES = ("planner.fuels", "planner.ship", "planner.flushing",
                      "planner.uncertainty", "planner.voyage", "planner.procedure",
                      "planner.journal", "planner.charts", "planner.documents")
"""Planner packages below the command line; of geo only ``geo.errors`` may be imported."""

LOG = [c.name for c in log_app.registered_commands]
HELP_CASES = [["--help"], [], ["log", "--help"], ["log"], ["areas", "--help"], ["areas"]] + [
    [name, "--help"] for name in COMPUTING] + [["log", name, "--help"] for name in LOG] + [
    ["areas", name, "--help"] for name in AREAS]

SAMPLE = ROOT / "areas_sample"
COMMAND_ARGS = {
    "flush": ["flush", "areas_sample/ship.toml"],
    "plan": ["plan", "areas_sample/voyage.toml"],
    "procedure": ["procedure", "areas_sample/ship.toml", "--json"],
    "route": ["route", "areas_sample/aldmere_to_skarvik.csv", "--areas", "areas_sample"],
    "calibrate": ["calibrate", "areas_sample/ship.toml",
                  "areas_sample/trends/kb_main_2027-05-30.csv",
                  "--switch-at", "2027-05-30T16:00+12:00"],
    "nonavailability": ["nonavailability", "tests/data/voyages/short_mgo_t1.toml",
                        "--pdf", "n.pdf"],
}
AREAS_ARGS = {
    "areas": ["areas", "areas_sample"],  # the old form: check
    "areas check": ["areas", "check", "areas_sample"],
    "areas import": ["areas", "import", "areas_sample/none.txt", "--out", "none.geojson"],
    "areas diff": ["areas", "diff", "areas_sample", "areas_sample"],
}


def run(*args: str, env: dict[str, str] | None = None,
        importtime: bool = False) -> subprocess.CompletedProcess:
    flags = ["-X", "importtime"] if importtime else []
    return subprocess.run([sys.executable, *flags, "-m", "planner", *args], cwd=ROOT,
                          capture_output=True, text=True, timeout=120,
                          env={**os.environ, **(env or {})})


def imported(stderr: str) -> list[str]:
    """The modules named in ``-X importtime``'s report."""
    return [line.rsplit("|", 1)[1].strip() for line in stderr.splitlines()
            if line.startswith("import time:") and "|" in line][1:]


def heavy(modules: list[str]) -> list[str]:
    """The modules of ``modules`` that the help must not import."""
    def bad(m: str) -> bool:
        top = m.split(".")[0]
        return (top in FORBIDDEN or (top == "geo" and m not in ("geo", "geo.errors"))
                or any(m == p or m.startswith(p + ".") for p in COMPUTING_PACKAGES))
    return [m for m in modules if bad(m)]


def flat(text: str) -> str:
    """``text`` without any white space (the help wraps lines and breaks at hyphens)."""
    return "".join(text.split())


@pytest.mark.parametrize("args", HELP_CASES, ids=" ".join)
def test_help_imports_nothing_heavy(args: list[str]):
    r = run(*args, importtime=True)
    assert r.returncode in (0, 2), r.stderr  # a group without a command: help, status 2
    assert "Usage: " in r.stdout + r.stderr
    names = imported(r.stderr)
    assert "typer" in names  # the report was read
    assert not heavy(names), f"changeover {' '.join(args)} imports {heavy(names)}"


@pytest.mark.parametrize("group", [[], ["log"], ["areas"]], ids=["changeover", "log", "areas"])
def test_a_group_alone_prints_its_help_and_exits_2(group: list[str]):
    r = run(*group)
    assert r.returncode == 2 and not r.stderr, r.stderr
    assert r.stdout == run(*group, "--help").stdout


def test_listings_give_each_command_its_whole_summary():
    top, log = run("--help"), run("log", "--help")
    assert top.returncode == 0 and log.returncode == 0, top.stderr + log.stderr
    for name, command in COMPUTING.items():
        first = command.__doc__.split("\n\n")[0]
        assert flat(f"{name} {first}") in flat(top.stdout), name
    assert flat(f"log {log_app.info.help}") in flat(top.stdout)
    assert flat(f"areas {areas_app.info.help}") in flat(top.stdout)
    group = run("areas", "--help")
    for name, command in AREAS.items():
        first = command.__doc__.split("\n\n")[0]
        assert flat(f"{name} {first}") in flat(group.stdout), name
    for info in log_app.registered_commands:
        first = info.callback.__doc__.split("\n\n")[0]
        assert flat(f"{info.name} {first}") in flat(log.stdout), info.name


def test_command_help_keeps_options_defaults_and_required():
    r = run("flush", "--help")
    assert r.returncode == 0, r.stderr
    text = flat(r.stdout)
    for part in ("flush[OPTIONS]{ship}", "[required]", "--limit<float>",
                 "[default:0.1]", "--sensitivity-chart<path>", "--table", "--json"):
        assert part in text, part


@pytest.fixture(scope="module")
def old_proj(tmp_path_factory) -> dict[str, str]:
    """An environment whose ``pyproj`` reports PROJ 9.1.1."""
    d: Path = tmp_path_factory.mktemp("old_proj")
    (d / "pyproj").mkdir()
    (d / "pyproj" / "__init__.py").write_text(
        'proj_version_str = "9.1.1"\n\n\nclass Geod:\n    def __init__(self, **kw):\n'
        '        pass\n', encoding="utf-8")
    return {"PYTHONPATH": os.pathsep.join([str(d), str(ROOT)])}


@pytest.mark.parametrize("name", sorted(COMMAND_ARGS) + sorted(AREAS_ARGS))
def test_too_old_proj_stops_a_computing_command(old_proj, name: str):
    assert set(COMMAND_ARGS) == set(COMPUTING)
    assert {k.split()[-1] for k in AREAS_ARGS} == set(AREAS) | {"areas"}
    r = run(*{**COMMAND_ARGS, **AREAS_ARGS}[name], env=old_proj)
    assert r.returncode == 1, r.stderr
    assert r.stderr.startswith("changeover: PROJ 9.1.1 is too old: changeover needs PROJ "
                               ">= 9.2"), r.stderr
    assert len(r.stderr.splitlines()) == 1 and not r.stdout, r.stderr


def test_too_old_proj_does_not_stop_the_help(old_proj):
    for args in (["--help"], ["plan", "--help"]):
        r = run(*args, env=old_proj)
        assert r.returncode == 0 and "Usage: " in r.stdout, r.stderr


def test_the_journal_needs_no_proj(tmp_path):
    """``log`` commands skip the PROJ check: they never import pyproj."""
    env = {"CHANGEOVER_JOURNAL": str(tmp_path / "j.db"), "CHANGEOVER_RANK": "Master",
           "CHANGEOVER_NAME": "A. Tester"}
    r = run("log", "init", "--ship", "MV Test", "--imo", "IMO 1234567", "--tz", "+00:00",
            env=env)
    assert r.returncode == 0, r.stderr
    for args in (["note", "test"], ["show"], ["verify"]):
        r = run("log", *args, env=env, importtime=True)
        assert r.returncode == 0, r.stderr
        assert "pyproj" not in {m.split(".")[0] for m in imported(r.stderr)}, args
