"""The ``changeover`` command line.

Each command lives in its own module (``planner.cmd_*``) and registers itself
on :data:`app`. Bad input anywhere surfaces as :class:`geo.errors.InputError`:
one line on standard error, exit status 2, no output written.
"""

from __future__ import annotations

import sys

import typer

from geo.errors import InputError

app = typer.Typer(
    name="changeover",
    help="Plan, check and record fuel changeovers for sulphur emission control areas "
    "(MARPOL Annex VI regulation 14). Advisory only: the engine makers' instructions and "
    "the ship's safety management system come first.",
    no_args_is_help=True,
    add_completion=False,
    pretty_exceptions_enable=False,
)


def _register() -> None:
    # commands register themselves on import
    from planner import cmd_flush, cmd_log, cmd_plan, cmd_procedure, cmd_route  # noqa: F401


def main() -> None:
    """Console entry point."""
    from geo.ellipsoid import check_proj

    try:
        check_proj()
    except RuntimeError as exc:
        sys.stderr.write(f"changeover: {exc}\n")
        sys.exit(1)
    _register()
    try:
        app()
    except InputError as exc:
        sys.stderr.write(f"changeover: error: {exc}\n")
        sys.exit(2)
