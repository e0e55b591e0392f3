"""Command-line values of the plain types read without pydantic, to the same values.

Recent typer converts every parameter's text through a pydantic ``TypeAdapter``
built when a command runs: importing pydantic and building the adapters of a
command's parameters is about 0.1 to 0.2 s of every command, more than the
work of a short one. The commands' parameters are plain: ``str``, ``int``,
``float``, ``Path``, a flag's ``bool`` and lists of them, with no bounds or parsers. For those,
:func:`install` has typer read a value directly when its text is unambiguous
(a string, an integer like ``-12``, a decimal like ``0.99`` or ``1e-3``, a
non-empty path, checked by typer's own path check), giving the value the
adapter gives; anything else (a malformed number, a bound, another type) goes
through typer's own conversion as before, so its error message is typer's.
A typer without these internals is left as it is.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from pathlib import Path
from typing import Any, get_args, get_origin

_INT = re.compile(r"-?(?:0|[1-9][0-9]*)\Z")
_FLOAT = re.compile(r"-?(?:0|[1-9][0-9]*)(?:\.[0-9]+)?(?:[eE][+-]?[0-9]+)?\Z")
_NO = object()  # not read here: typer's conversion reads it


def _leaf(value: Any, kind: type, info: Any, param: Any, ctx: Any, path: Any) -> Any:
    """One value of the plain type ``kind``, or ``_NO``."""
    if kind is str:
        return value if isinstance(value, str) else _NO
    if kind is bool:
        return value if isinstance(value, bool) else _NO
    if kind is int:
        if isinstance(value, int) and not isinstance(value, bool):
            return value
        return int(value) if isinstance(value, str) and _INT.match(value) else _NO
    if kind is float:
        if isinstance(value, float):
            return value
        if isinstance(value, int) and not isinstance(value, bool):
            return float(value)
        return float(value) if isinstance(value, str) and _FLOAT.match(value) else _NO
    if isinstance(value, str) and value:
        value = Path(value)
    if not isinstance(value, Path):
        return _NO
    return path(value, info, path_type=info.path_type or kind, param=param, ctx=ctx)


def install() -> None:
    """Have typer read the plain parameters directly (the module's notes)."""
    try:
        from typer import core
        from typer._coercion import RuntimeParam, build_runtime_param
        from typer._param_types import coerce_cli_path
    except ImportError:  # pragma: no cover - another typer: left as it is
        return
    parameter = getattr(core, "_TyperParameter", None)
    original = getattr(parameter, "get_runtime_param", None)
    if original is None:  # pragma: no cover
        return

    @dataclass(frozen=True)
    class Plain(RuntimeParam):
        descriptor: Any = None
        kind: type = str
        many: bool = False

        def _coerce_value(self, value: Any, param: Any, ctx: Any) -> Any:
            info = self.parameter_info
            if self.many:
                items = value if isinstance(value, (list, tuple)) else [value]
                out = [_leaf(v, self.kind, info, param, ctx, coerce_cli_path) for v in items]
                if not any(v is _NO for v in out):
                    return out
            else:
                out = _leaf(value, self.kind, info, param, ctx, coerce_cli_path)
                if out is not _NO:
                    return out
            typer_own = build_runtime_param(self.descriptor)
            return typer_own._coerce_value(value, param=param, ctx=ctx)

    def plain(descriptor: Any) -> Any:
        info, annotation = descriptor.parameter_info, descriptor.annotation
        if any(getattr(info, k, None) not in (None, False)
               for k in ("parser", "click_type", "min", "max", "clamp")):
            return None
        if getattr(descriptor, "file_annotation", None) is not None:
            return None
        many = get_origin(annotation) is list
        kind = get_args(annotation)[0] if many else annotation
        plain_kind = kind in (str, int, float, bool) or (
            isinstance(kind, type) and issubclass(kind, Path))
        if not plain_kind or (kind is not str and getattr(info, "path_type", None) is not None):
            return None
        return Plain(parameter_info=info, annotation=annotation, descriptor=descriptor,
                     kind=kind, many=many)

    def get_runtime_param(self: Any) -> Any:
        if self._runtime_param is None:
            self._runtime_param = plain(self.type_descriptor)
        return original(self)

    parameter.get_runtime_param = get_runtime_param
