"""A mistyped command line in one line: what was wrong, the value, where the help is.

typer (and the click it is built on) reports a usage error (an unknown option or
command, a missing or malformed value, an extra argument) in four lines: the
usage, a hint, a blank line and the error, without the value that was refused.
The ship's other refusals are one line on standard error (:class:`geo.errors.InputError`);
:func:`usage_line` gives these the same form::

    changeover: error: plan --confidence 'abc': expected a number (see 'changeover plan --help')

The exit status stays 2. Only the text is rewritten; which input is refused is
typer's decision, unchanged.
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

PLAIN_WORDS = (
    ("Input should be a valid number", "expected a number, such as 0.99 or 85"),
    ("Input should be a valid integer", "expected a whole number, such as 3"),
    ("Input should be a valid boolean", "expected true or false"),
)
"""typer's (pydantic's) wording of a malformed value and the words used instead."""


def _base(exc: BaseException, name: str) -> type | None:
    """The class called ``name`` among ``exc``'s bases (typer's click, vendored or not)."""
    return next((k for k in type(exc).__mro__ if k.__name__ == name), None)


def is_usage_error(exc: BaseException) -> bool:
    """Whether ``exc`` is click's ``UsageError`` (or one of its kinds)."""
    return _base(exc, "UsageError") is not None


def _given(argv: Sequence[str], opts: Sequence[str]) -> str | None:
    """The text typed after the last of the option names ``opts`` in ``argv``."""
    found = None
    for i, word in enumerate(argv):
        for opt in opts:
            if word == opt and i + 1 < len(argv):
                found = argv[i + 1]
            elif word.startswith(opt + "="):
                found = word[len(opt) + 1:]
    return found


def _message(exc: Any) -> str:
    """The error's own words, a malformed value's put plainly, on one line."""
    plain = _base(exc, "BadParameter") is not None and _base(exc, "MissingParameter") is None
    text = exc.message if plain else exc.format_message()
    for theirs, ours in PLAIN_WORDS:
        if text.startswith(theirs):
            return ours
    return " ".join(str(text).split()).rstrip(".")


def command_path(root: Any, argv: Sequence[str]) -> str:
    """The command named by the first words of ``argv`` under the click group ``root``
    (for an error that carries no command, such as an option left without its value)."""
    words, command = ["changeover"], root
    for word in argv:
        sub = getattr(command, "commands", {}).get(word)
        if sub is None:
            break
        words.append(word)
        command = sub
    return " ".join(words)


def usage_line(exc: Any, argv: Sequence[str], root: Any = None) -> str:
    """The one line for the usage error ``exc`` raised on the command line ``argv``.

    Parameters
    ----------
    exc : click.UsageError
        The error (``exc.ctx`` its command, ``exc.param`` the parameter for a bad value).
    argv : sequence of str
        The words after the program's name, to quote the value refused.
    root : click.Group, optional
        The program's command, to name the command of an error that carries none.
    """
    ctx = getattr(exc, "ctx", None)
    if ctx is not None:
        path = ctx.command_path
    else:
        path = command_path(root, argv) if root is not None else "changeover"
    command = path.split(" ", 1)[1] if " " in path else ""
    param = getattr(exc, "param", None)
    where = command
    if (param is not None and _base(exc, "BadParameter") is not None
            and _base(exc, "MissingParameter") is None):
        opts = list(getattr(param, "opts", []) or [])
        is_option = any(o.startswith("-") for o in opts)
        name = opts[-1] if is_option and opts else param.human_readable_name
        given = _given(argv, opts) if is_option else None
        where = " ".join(w for w in (command, name) if w)
        if given is not None:
            where += f" {given!r}"
    head = f"{where}: " if where else ""
    return f"changeover: error: {head}{_message(exc)} (see '{path} --help')"
