"""The ``changeover`` command line.

Each command is a plain function in its own module (``planner.cli.route``,
``planner.cli.plan``, ...); this module builds :data:`app` and registers them,
so imports run one way (the commands never import this module). The options
several commands share are declared and checked once, in
:mod:`planner.cli.options`. Command modules import only typer,
:mod:`planner.common` and their sibling modules at their top; the computing
packages, rich, matplotlib and reportlab are imported inside the commands that
use them. Bad input anywhere surfaces as :class:`geo.errors.InputError`: one
line on standard error, exit status 2, no output written.

``changeover --help`` (and ``changeover COMMAND --help``) stays quick, and
``tests/cli/test_help.py`` keeps it so (``tests/bench/bench_cli.py`` times it):

- the PROJ version check, which imports pyproj, runs when a computing command
  starts (:data:`COMPUTING`, :func:`_check_proj`), never for the help; the
  ``log`` commands need no PROJ and skip it;
- the help is typer's plain text (``rich_markup_mode=None``), so neither rich
  nor its markdown parser is imported to print it; each command's summary in
  the listings is its docstring's whole first paragraph (:func:`_summary`), as
  the rich help showed it;
- the groups' own ``--help`` flag is a plain ``False`` unless given
  (:data:`_CONTEXT`), so one command's help does not build the group flag's
  value checker (which imports pydantic in recent typer);
- typer reads every command's signature on each start; each is evaluated once
  here (:func:`_registered`) rather than compiled from strings twice by typer.

``changeover``, ``changeover areas`` or ``changeover log`` alone prints the help on
standard output and exits with status 2 (:func:`_help_when_bare`).
"""

from __future__ import annotations

import functools
import inspect
import sys
from collections.abc import Callable

import typer

from geo.errors import InputError
from planner.cli import areas, calibrate, flush, log, plan, procedure, route
from planner.cli.nonavailability import nonavailability_cmd
from planner.cli.plain_values import install as _read_plain_values

_read_plain_values()  # plain values without pydantic (planner.cli.plain_values)

COMPUTING: dict[str, Callable[..., None]] = {
    "flush": flush.flush_cmd,
    "plan": plan.plan_cmd,
    "procedure": procedure.procedure_cmd,
    "route": route.route_cmd,
    "calibrate": calibrate.calibrate_cmd,
    "nonavailability": nonavailability_cmd,
}
"""The commands that compute, in the order the help lists them; each checks PROJ first."""

AREAS: dict[str, Callable[..., None]] = {
    "check": areas.check_cmd,
    "import": areas.import_cmd,
    "diff": areas.diff_cmd,
}
"""The ``areas`` group's commands (all compute and check PROJ first); ``check`` is also what
``changeover areas PATHS...`` runs (:class:`planner.cli.areas.AreasGroup`)."""

_CONTEXT = {"default_map": {"help": False, "log": {"help": False}, "areas": {"help": False}}}
"""The groups' ``--help`` is False unless given (see the module's notes)."""

app = typer.Typer(
    name="changeover",
    help="Plan, check and record fuel changeovers for sulphur emission control areas "
    "(MARPOL Annex VI regulation 14). Advisory only: the engine makers' instructions and "
    "the ship's safety management system come first.",
    add_completion=False,
    pretty_exceptions_enable=False,
    rich_markup_mode=None,
    context_settings=_CONTEXT,
)


@app.callback(invoke_without_command=True)
def _help_when_bare(ctx: typer.Context) -> None:
    """``changeover``, ``changeover areas`` or ``changeover log`` alone: the help, exit 2."""
    if ctx.invoked_subcommand is None:
        typer.echo(ctx.get_help())
        raise typer.Exit(2)


def _summary(text: str | None) -> str | None:
    """The first paragraph of a help text on one line: a command's summary in a listing."""
    if not text:
        return None
    return " ".join(inspect.cleandoc(text).split("\n\n")[0].split())


def _check_proj() -> None:
    """Exit 1 with one line on standard error when the PROJ library is too old."""
    from geo.ellipsoid import check_proj

    try:
        check_proj()
    except RuntimeError as exc:
        sys.stderr.write(f"changeover: {exc}\n")
        sys.exit(1)


def _registered(command: Callable[..., None], proj: bool) -> Callable[..., None]:
    """``command`` as typer registers it: its signature with the annotations evaluated
    (once, here), and with ``proj`` the PROJ check run before it. The command function
    itself is left as it is."""

    @functools.wraps(command)
    def run(*args: object, **kwargs: object) -> None:
        if proj:
            _check_proj()
        command(*args, **kwargs)

    signature = inspect.signature(command, eval_str=True)
    run.__signature__ = signature  # typer reads this rather than the strings again
    run.__annotations__ = {name: p.annotation for name, p in signature.parameters.items()
                           if p.annotation is not p.empty}
    return run


for _name, _command in COMPUTING.items():
    app.command(_name, short_help=_summary(_command.__doc__))(_registered(_command, proj=True))
for _name, _command in AREAS.items():
    areas.areas_app.command(_name, short_help=_summary(_command.__doc__))(
        _registered(_command, proj=True))
areas.areas_app.callback(invoke_without_command=True)(_help_when_bare)
app.add_typer(areas.areas_app, name="areas", short_help=_summary(areas.areas_app.info.help))
for _info in log.log_app.registered_commands:
    _info.short_help = _info.short_help or _summary(_info.callback.__doc__)
    _info.callback = _registered(_info.callback, proj=False)
log.log_app.callback(invoke_without_command=True)(_help_when_bare)
app.add_typer(log.log_app, name="log", short_help=_summary(log.log_app.info.help))


def main() -> None:
    """Console entry point: a refusal or a mistyped command line is one line, exit 2."""
    try:
        code = app(standalone_mode=False, prog_name="changeover")
    except InputError as exc:
        sys.stderr.write(f"changeover: error: {exc}\n")
        sys.exit(2)
    except Exception as exc:  # typer's click errors, as its own standalone mode would
        sys.exit(_click_error(exc))
    sys.exit(code if isinstance(code, int) else 0)


def _click_error(exc: Exception) -> int:
    """Report typer's (click's) error ``exc`` on standard error; its exit status.

    A usage error is one line (:mod:`planner.cli.usage_line`); any other is shown as
    typer shows it. Anything that is not click's is raised again."""
    from planner.cli.usage_line import is_usage_error, usage_line

    names = {k.__name__ for k in type(exc).__mro__}
    if is_usage_error(exc):
        root = None if getattr(exc, "ctx", None) is not None else typer.main.get_command(app)
        sys.stderr.write(usage_line(exc, sys.argv[1:], root) + "\n")
        return 2
    if "ClickException" in names:
        exc.show()  # type: ignore[attr-defined]
        return int(exc.exit_code)  # type: ignore[attr-defined]
    if "Abort" in names:
        sys.stderr.write("Aborted!\n")
        return 1
    raise exc
