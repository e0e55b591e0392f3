"""A mistyped command line is one line on standard error, exit status 2, nothing written.

The program is run as a user runs it (``python -m planner``). Which input is refused
is typer's decision; the line names the command, the option and the value typed,
and where the help is (planner.cli.usage_line).
"""

from __future__ import annotations

import pytest

from tests.helpers.cli import changeover

CASES = [
    # (the words typed, the whole line expected on standard error)
    (["flush", "areas_sample/ship.toml", "--load", "x"],
     "flush --load 'x': expected a number, such as 0.99 or 85 (see 'changeover flush --help')"),
    (["plan", "areas_sample/voyage.toml", "--confidence=abc"],
     "plan --confidence 'abc': expected a number, such as 0.99 or 85 "
     "(see 'changeover plan --help')"),
    (["plan", "areas_sample/voyage.toml", "--confidence"],
     "plan: Option '--confidence' requires an argument (see 'changeover plan --help')"),
    (["plan"], "plan: Missing argument 'voyage' (see 'changeover plan --help')"),
    (["plan", "areas_sample/voyage.toml", "extra"],
     "plan: Got unexpected extra argument(s) (extra) (see 'changeover plan --help')"),
    (["plann"], "No such command 'plann'. Did you mean 'plan'? (see 'changeover --help')"),
    (["--bogus"], "No such option: --bogus (see 'changeover --help')"),
    (["log", "show", "--journal"],
     "log show: Option '--journal' requires an argument (see 'changeover log show --help')"),
    (["areas", "check"],
     "areas check: Missing argument 'paths' (see 'changeover areas check --help')"),
]


@pytest.mark.parametrize(("args", "line"), CASES, ids=[" ".join(a) for a, _ in CASES])
def test_a_usage_error_is_one_line_with_the_value(args: list[str], line: str):
    r = changeover(*args)
    assert r.returncode == 2
    assert r.stdout == ""
    assert r.stderr == f"changeover: error: {line}\n"


def test_a_formula_typed_as_a_number_is_quoted_not_run():
    # text that looks like a spreadsheet formula is quoted back as typed, nothing else
    r = changeover("flush", "areas_sample/ship.toml", "--load", "=1+2")
    assert r.returncode == 2 and r.stdout == ""
    assert r.stderr.count("\n") == 1 and "--load '=1+2': expected a number" in r.stderr


def test_help_and_bare_groups_keep_their_status():
    assert changeover("--help").returncode == 0
    assert changeover("plan", "--help").returncode == 0
    r = changeover("log")
    assert r.returncode == 2 and "Usage: " in r.stdout  # a group alone: its help, status 2


def test_a_refused_file_is_still_the_input_error_line():
    r = changeover("plan", "nosuch.toml")
    assert r.returncode == 2
    assert r.stderr == ("changeover: error: nosuch.toml: missing: expected an existing "
                        "voyage file (TOML)\n")


def test_a_command_that_works_exits_0():
    r = changeover("flush", "areas_sample/ship.toml", "--json")
    assert r.returncode == 0, r.stderr
    assert r.stdout.lstrip().startswith("{")
