"""The command line's plain values read without pydantic give typer's own values.

:mod:`planner.cli.plain_values` has typer read the plain parameters (str, int,
float, Path, flags and lists of them) directly. The reference is typer itself:
for every parameter of every command, each text below is converted both ways,
by the direct reading and by typer's own conversion (``build_runtime_param``,
the pydantic ``TypeAdapter`` it builds), and the two values, or the two error
messages, must be the same.
"""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

typer_main = pytest.importorskip("typer.main")
coercion = pytest.importorskip("typer._coercion")
typer_core = pytest.importorskip("typer.core")

from planner.cli import app  # noqa: E402  (installs the direct reading)

TEXTS = {
    str: ["", "main", "=SUM(A1)", "<b>x</b>", "12", "ü-ß", "-3"],
    int: ["0", "12", "-7", "007", "1.5", "1e3", "x", "", " 4", "+4", "1_000"],
    float: ["0", "0.99", "-12.5", "1e-3", "1E+2", "85", ".5", "5.", "1,5", "nan", "inf", "x",
            "", "+1.0", " 2"],
    Path: ["voyage.toml", "a/b c.toml", "-", "."],
    bool: [True, False],
}


def _walk(command, prefix=""):
    if hasattr(command, "commands"):
        for name, sub in command.commands.items():
            yield from _walk(sub, f"{prefix} {name}")
    else:
        yield prefix.strip(), command


def _parameters():
    group = typer_main.get_command(app)
    for name, command in _walk(group):
        for param in command.params:
            if getattr(param, "type_descriptor", None) is not None:
                yield name, command, param


def _leaf_kind(annotation):
    args = getattr(annotation, "__args__", None)
    return args[0] if args else annotation


def _convert(runtime, value, param, ctx):
    try:
        return ("value", runtime._coerce_value(value, param=param, ctx=ctx))
    except Exception as exc:  # both ways must fail alike
        return ("error", type(exc).__name__, str(exc))


PARAMS = list(_parameters())


def test_the_direct_reading_is_installed_on_this_typer():
    # Without it every command imports pydantic (0.1 to 0.2 s, README "Performance").
    assert typer_core._TyperParameter.get_runtime_param.__module__ == "planner.cli.plain_values"


def test_every_parameter_is_of_a_kind_covered_here():
    kinds = {_leaf_kind(p.type_descriptor.annotation) for _, _, p in PARAMS}
    assert kinds <= set(TEXTS), kinds - set(TEXTS)
    assert len(PARAMS) > 100  # the walk found the commands


@pytest.mark.parametrize("kind", [str, int, float, Path, bool], ids=lambda k: k.__name__)
def test_values_and_errors_are_typers_own(kind):
    import typer._click as click

    checked = 0
    for name, command, param in PARAMS:
        descriptor = param.type_descriptor
        if _leaf_kind(descriptor.annotation) is not kind:
            continue
        ctx = click.Context(command, info_name=name)
        param._runtime_param = None
        direct = param.get_runtime_param()
        own = coercion.build_runtime_param(descriptor)  # typer's conversion (pydantic)
        many = descriptor.is_list
        for text in TEXTS[kind]:
            value = [text, text] if many else text
            got = _convert(direct, value, param, ctx)
            want = _convert(own, value, param, ctx)
            assert repr(got) == repr(want), (name, param.name, text, got, want)  # nan too
            if got[0] == "value":
                assert type(got[1]) is type(want[1])
            checked += 1
    assert checked


def test_a_malformed_number_is_still_refused_by_typer():
    from tests.helpers.cli import changeover

    r = changeover("flush", "areas_sample/ship.toml", "--load", "8,5")
    assert r.returncode == 2 and r.stdout == ""
    # typer refuses it; the line is planner.cli.usage_line's (tests/cli/test_usage_line.py)
    assert r.stderr == ("changeover: error: flush --load '8,5': expected a number, such as "
                        "0.99 or 85 (see 'changeover flush --help')\n")


def test_the_plan_command_does_not_import_pydantic():
    root = Path(__file__).resolve().parents[2]
    code = (
        "import sys, io, contextlib\n"
        "sys.argv = ['changeover', 'plan', 'areas_sample/voyage.toml', '--json']\n"
        "from planner.cli import main\n"
        "out = io.StringIO()\n"
        "try:\n"
        "    with contextlib.redirect_stdout(out):\n"
        "        main()\n"
        "except SystemExit as e:\n"
        "    assert not e.code, e.code\n"
        "assert out.getvalue().lstrip().startswith('{')\n"
        "print('pydantic' in sys.modules)\n"
    )
    r = subprocess.run([sys.executable, "-c", code], cwd=root, capture_output=True, text=True,
                       check=True)
    assert r.stdout.strip().splitlines()[-1] == "False", r.stderr
