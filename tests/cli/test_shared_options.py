"""The shared options of :mod:`planner.cli.options`, on every command that has one.

Each command declares the option the same way (flag, type, help), accepts the
same range (the edges of which are tried here: accepted values reach the work
past the checks, which is stubbed out), and refuses the same bad value with the
same one line on standard error, exit status 2 and no file written (run as a
user runs it). The ranges are those of :mod:`planner.common.defaults` and of the
voyage file.
"""

from __future__ import annotations

import math
import subprocess
import sys
from pathlib import Path

import pytest
import typer.main
from typer.testing import CliRunner

from geo.errors import InputError
from planner.cli import app
from planner.common.defaults import MAX_CONFIDENCE, MIN_CONFIDENCE, MIN_SAMPLES
from tests.helpers.paths import ROOT

SHIP = "areas_sample/ship.toml"
VOYAGE = "areas_sample/voyage.toml"
ARGS = {"flush": ["flush", SHIP], "plan": ["plan", VOYAGE],
        "procedure": ["procedure", SHIP, "--json"]}
# where each command's work starts once its options are checked (stubbed out here)
AFTER_OPTIONS = {"flush": "planner.voyage.onboard.load_ship_or_voyage",
                 "plan": "planner.voyage.run.build_plan",
                 "procedure": "planner.voyage.onboard.load_ship_or_voyage"}
# --target-pct is checked once the file is read (its default is the voyage's fraction)
AFTER_TARGET = {"flush": "planner.flushing.schedule_at",
                "procedure": "planner.procedure.facts.gather"}
# a file each command would write, to check that a refusal writes nothing
OUTPUT = {"flush": "--chart", "plan": "--pdf", "procedure": "--pdf"}

# option: (commands that have it, values accepted, values refused); limit 0.1 for the target
RANGES = {
    "--confidence": (("flush", "plan"), ("0.5", "0.9", str(MAX_CONFIDENCE)),
                     ("0.4999", "0.99999", "1", "1.5", "nan")),
    "--samples": (("flush", "plan"), (str(MIN_SAMPLES), "1000000"),
                  (str(MIN_SAMPLES - 1), "10", "0", "-5", "1000001")),
    "--seed": (("flush", "plan"), ("0", "1", str(2**40)), ("-1",)),
    "--limit": (("flush", "procedure"), ("0.0001", "0.1", "5"), ("0", "-1", "5.01", "nan")),
    "--target-pct": (("flush", "procedure"), ("0.0001", "0.09", "0.1"),
                     ("0", "-0.05", "0.1001", "0.2")),
}
# the bad value run end to end for each option, and what its line must name
BAD = {"--confidence": ("1.5", ("0.5", "0.9999")), "--samples": ("10", ("100",)),
       "--seed": ("-1", ("0",)), "--limit": ("-1", ("5",)), "--target-pct": ("0.2", ("0.1",))}
# declared once: flag -> commands that must all have it, declared identically
SHARED = {
    "--json": ("flush", "plan", "procedure", "route", "areas check", "areas import",
               "areas diff", "log show", "log verify", "calibrate", "nonavailability"),
    "--limit": ("flush", "procedure", "calibrate"),
    "--target-pct": ("flush", "procedure", "calibrate"),
    "--confidence": ("flush", "plan"), "--samples": ("flush", "plan"),
    "--seed": ("flush", "plan"), "--depart": ("route",), "--tz": ("route",),
}

runner = CliRunner()


class Reached(Exception):
    """The command got past its option checks."""


def _stop(*args: object, **kwargs: object) -> None:
    raise Reached(args, kwargs)


def _invoke(monkeypatch: pytest.MonkeyPatch, command: str, option: str, value: str):
    """Run ``command`` in-process with ``option=value``; the work after the checks stubbed."""
    gate = AFTER_TARGET if option == "--target-pct" else AFTER_OPTIONS
    monkeypatch.setattr(gate[command], _stop)
    monkeypatch.chdir(ROOT)
    return runner.invoke(app, [*ARGS[command], f"{option}={value}"])


def _cases(accepted: bool):
    for option, (commands, good, bad) in RANGES.items():
        for value in good if accepted else bad:
            yield pytest.param(option, value, commands, id=f"{option}={value}")


@pytest.mark.parametrize("option,value,commands", list(_cases(accepted=True)))
def test_every_command_accepts_the_same_range(monkeypatch, option, value, commands):
    for command in commands:
        r = _invoke(monkeypatch, command, option, value)
        assert isinstance(r.exception, Reached), (command, r.exception, r.output)


@pytest.mark.parametrize("option,value,commands", list(_cases(accepted=False)))
def test_every_command_refuses_the_same_values_the_same_way(monkeypatch, option, value,
                                                            commands):
    messages = set()
    for command in commands:
        r = _invoke(monkeypatch, command, option, value)
        assert isinstance(r.exception, InputError), (command, r.exception, r.output)
        assert r.exception.file == option
        messages.add(str(r.exception))
    assert len(messages) == 1, messages


def _run(*args: str) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "planner", *args], cwd=ROOT,
                          capture_output=True, text=True, timeout=300)


@pytest.mark.parametrize("option", sorted(BAD))
def test_a_bad_value_is_one_line_exit_2_nothing_written(tmp_path: Path, option: str):
    value, named = BAD[option]
    lines = {}
    for command in RANGES[option][0]:
        out = tmp_path / f"{command}.out"
        r = _run(*ARGS[command], OUTPUT[command], str(out), f"{option}={value}")
        assert r.returncode == 2, (command, r.stderr)
        assert r.stdout == "" and not out.exists(), command
        assert len(r.stderr.splitlines()) == 1, (command, r.stderr)
        lines[command] = r.stderr.strip()
    assert len(set(lines.values())) == 1, lines
    text = next(iter(lines.values()))
    assert text.startswith(f"changeover: error: {option}: {value}: expected "), text
    for bound in named:
        assert bound in text.split("expected ", 1)[1], text


def _commands() -> dict[str, object]:
    """Every command of the app by its name (``"log show"`` for a subcommand)."""
    found = {}

    def walk(cmd, prefix: str) -> None:
        if hasattr(cmd, "commands"):  # a group (typer carries its own click)
            for name, sub in cmd.commands.items():
                walk(sub, f"{prefix} {name}".strip())
        else:
            found[prefix] = cmd

    walk(typer.main.get_command(app), "")
    return found


def _type(param) -> str:
    """The parameter's type, however this typer stores it."""
    described = getattr(param, "type_descriptor", None)
    return str(getattr(described, "annotation", None) or getattr(param, "type", None))


OPTIONAL = {("--limit", "areas import")}
"""Shared options a command takes without their default (the same flag, help and check):
``areas import`` needs ``--limit`` for a list and only for features without one in a GIS
file, so it has no default there."""


@pytest.mark.parametrize("flag", sorted(SHARED))
def test_a_shared_option_is_declared_once(flag: str):
    commands = _commands()
    declared = {}
    for name in SHARED[flag]:
        (p,) = [p for p in commands[name].params if flag in p.opts]
        declared[name] = (tuple(p.opts), _type(p), p.default, p.help)
    assert len(set(declared.values())) == 1, declared
    for flag_, name in OPTIONAL:
        if flag_ == flag:
            (p,) = [p for p in commands[name].params if flag in p.opts]
            opts, _, _, help_ = next(iter(declared.values()))
            assert (tuple(p.opts), p.default, p.help) == (opts, None, help_), name
    # and no other command has its own --limit, --confidence, ... (log has its own --tz, and
    # calibrate its own: the zone of a trend file's times written without an offset)
    for name, cmd in commands.items():
        if name not in SHARED[flag] and (flag, name) not in OPTIONAL and not (
                flag == "--tz" and (name.startswith("log ") or name == "calibrate")):
            assert not any(flag in p.opts for p in cmd.params), (flag, name)


def test_help_gives_the_unit_and_range():
    params = {p.opts[0]: p.help for p in _commands()["flush"].params}
    params.update({p.opts[0]: p.help for p in _commands()["procedure"].params})
    assert "% m/m" in params["--limit"] and "at most 5" in params["--limit"]
    assert "% m/m" in params["--target-pct"] and "90 %" in params["--target-pct"]
    assert f"{MIN_CONFIDENCE:g} to {MAX_CONFIDENCE:g}" in params["--confidence"]
    assert str(MIN_SAMPLES) in params["--samples"]
    assert "plan 4000" in params["--samples"] and "flush 10000" in params["--samples"]
    assert "0 or more" in params["--seed"]
    assert ", h, 0 to 48" in params["--margin"]


def test_ranges_agree_with_the_monte_carlo_and_the_voyage_file(tmp_path: Path):
    from planner.cli import options
    from planner.uncertainty import montecarlo
    from planner.voyage.voyage_file import load_voyage

    assert options.FLUSH_SAMPLES == montecarlo.DEFAULT_SAMPLES
    assert options.DEFAULT_SEED == montecarlo.DEFAULT_SEED
    assert 0.5 <= MIN_CONFIDENCE and MAX_CONFIDENCE < 1.0  # what analyse() accepts
    text = (ROOT / VOYAGE).read_text(encoding="utf-8")
    for name in ("ship.toml", "aldmere_to_skarvik.csv", "corran_sea.geojson",
                 "meridian_reach.geojson", "skarvik_basin.geojson",
                 "cautions/aldmere_cautions.geojson"):
        text = text.replace(f'"{name}"', f'"{(ROOT / "areas_sample" / name).as_posix()}"')
    assert text.rstrip().splitlines()[-1].startswith("sulphur_target_fraction")  # [margins]
    for c in (MIN_CONFIDENCE, MAX_CONFIDENCE, math.nextafter(MIN_CONFIDENCE, 0.0),
              math.nextafter(MAX_CONFIDENCE, 1.0)):
        path = tmp_path / "voyage.toml"
        path.write_text(f"{text.rstrip()}\nconfidence = {c!r}\n", encoding="utf-8")
        try:
            file_ok = load_voyage(path).confidence == c
        except InputError:
            file_ok = False
        try:
            option_ok = options.check_confidence(c) == c
        except InputError:
            option_ok = False
        assert file_ok == option_ok, c


def test_default_samples_differ_by_command_as_the_help_says(monkeypatch):
    """plan: 4000 per changeover; flush: 10000 per circuit (both seed 0)."""
    from types import SimpleNamespace

    monkeypatch.chdir(ROOT)
    monkeypatch.setattr("planner.voyage.run.build_plan",
                        lambda *a, **k: SimpleNamespace(voyage=SimpleNamespace(confidence=None),
                                                          scrubber_spans=()))
    monkeypatch.setattr("planner.voyage.report.plan_json", lambda plan: {})
    monkeypatch.setattr("planner.voyage.confidence.add_uncertainty", _stop)
    r = runner.invoke(app, ["plan", VOYAGE, "--json", "--confidence", "0.9"])
    assert isinstance(r.exception, Reached), r.output
    (_, _, confidence, samples, seed, _), _ = r.exception.args
    assert (confidence, samples, seed) == (0.9, 4000, 0)
    monkeypatch.setattr("planner.uncertainty.analyse", _stop)
    r = runner.invoke(app, ["flush", SHIP, "--json", "--circuit", "main", "--confidence", "0.9"])
    assert isinstance(r.exception, Reached), r.output
    _, kwargs = r.exception.args
    assert (kwargs["confidence"], kwargs["samples"], kwargs["seed"]) == (0.9, 10_000, 0)
