"""The ``changeover`` command line.

Each command is a plain function in its own module (``planner.cli.route``,
``planner.cli.plan``, ...); this module builds :data:`app` and registers them,
so imports run one way (the commands never import this module). The options
several commands share are declared and checked once, in
:mod:`planner.cli.options`. Command modules import only typer,
:mod:`planner.common` and their sibling modules at their top; the computing
packages, rich, matplotlib and reportlab are imported inside the commands that
use them, so ``changeover --help`` stays quick. Bad input anywhere surfaces as
:class:`geo.errors.InputError`: one line on standard error, exit status 2,
no output written.
"""

from __future__ import annotations

import sys

import typer

from geo.errors import InputError
from planner.cli import flush, log, plan, procedure, route

app = typer.Typer(
    name="changeover",
    help="Plan, check and record fuel changeovers for sulphur emission control areas "
    "(MARPOL Annex VI regulation 14). Advisory only: the engine makers' instructions and "
    "the ship's safety management system come first.",
    no_args_is_help=True,
    add_completion=False,
    pretty_exceptions_enable=False,
)

app.command("flush")(flush.flush_cmd)
app.command("plan")(plan.plan_cmd)
app.command("procedure")(procedure.procedure_cmd)
app.command("route")(route.route_cmd)
app.command("areas")(route.areas_cmd)
app.add_typer(log.log_app, name="log")


def main() -> None:
    """Console entry point."""
    from geo.ellipsoid import check_proj

    try:
        check_proj()
    except RuntimeError as exc:
        sys.stderr.write(f"changeover: {exc}\n")
        sys.exit(1)
    try:
        app()
    except InputError as exc:
        sys.stderr.write(f"changeover: error: {exc}\n")
        sys.exit(2)
