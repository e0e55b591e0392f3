"""Writing output files all-or-nothing, and refusing an unwritable target before the work.

Every command computes first and writes last; each file is written to a temporary name
beside the target, flushed to disk and renamed into place, so an error or an interruption
never leaves a half-written file (the old file, if any, stays whole until the rename).

- :func:`check_writable` refuses, with one :class:`geo.errors.InputError`, a target that
  cannot be written: a folder, a path under a file, a folder that does not let us create a
  file (read-only, or on a read-only medium: it is tried, not guessed from permission
  bits). Commands call it for every output option before any long computation
  (:func:`writable_path` is the same check as a typer option callback).
- Files are created with the user's umask (``0o666 & ~umask``, as any program's new file),
  or keep the mode of the file they replace; never the 0600 of a temporary file.
- A write that fails (disk full, permission) is one ``InputError``; the temporary file is
  removed and the target left as it was.
"""

from __future__ import annotations

import contextlib
import json
import os
import stat
import tempfile
from collections.abc import Callable, Mapping
from pathlib import Path

from geo.errors import InputError

WRITABLE_EXPECTED = "a file path you may write: in a folder that exists or can be made"


def _existing_ancestor(path: Path) -> Path:
    p = path.parent
    while not p.exists() and p != p.parent:
        p = p.parent
    return p


def _refuse(option: str, shown: str, why: str) -> InputError:
    """``--pdf: 'x': expected ... (why)``, or without an option ``x: why: expected ...``."""
    if option:
        return InputError(option, "", shown, f"{WRITABLE_EXPECTED} ({why})")
    return InputError(shown, "", why, WRITABLE_EXPECTED)


def check_writable(target: str | Path, option: str = "") -> Path:
    """``target`` as a :class:`~pathlib.Path` if a file can be written there, else one
    :class:`InputError` naming the option (when given) and the path. Nothing is left
    behind: the probe file made in the folder is removed."""
    path = Path(target)
    shown = str(target)
    if not shown or shown.endswith(os.sep):
        raise _refuse(option, shown, "a file name, not a folder")
    try:
        if path.is_dir():
            raise _refuse(option, shown, "it is a folder")
        if _is_device(path):
            if not os.access(path, os.W_OK):
                raise _refuse(option, shown, "not writable")
            return path
        if path.exists() and not path.is_file():
            raise _refuse(option, shown, "it is not a regular file")
        folder = _existing_ancestor(path)
        if not folder.is_dir():
            raise _refuse(option, shown, f"{folder} is a file, not a folder")
        fd, probe = tempfile.mkstemp(prefix=".changeover-probe-", dir=folder)
        os.close(fd)
        os.unlink(probe)
    except InputError:
        raise
    except OSError as exc:
        raise _refuse(option, shown, str(exc.strerror or exc)) from None
    return path


def check_outputs(targets: Mapping[str, str | Path | None]) -> None:
    """:func:`check_writable` for each ``{option: path}`` given (None: not asked for)."""
    for option, target in targets.items():
        if target is not None:
            check_writable(target, option)


def writable_path(value: Path | None) -> Path | None:
    """A typer option callback: the path, checked by :func:`check_writable` while the
    command line is read (before any work)."""
    return None if value is None else check_writable(value)


def _is_device(path: Path) -> bool:
    """A character device such as ``/dev/null`` or ``/dev/stdout``: written in place."""
    try:
        return stat.S_ISCHR(path.stat().st_mode)
    except OSError:
        return False


def _umask() -> int:
    mask = os.umask(0o022)
    os.umask(mask)
    return mask


def new_file_mode(target: Path) -> int:
    """The mode a written file gets: the replaced file's, else ``0o666 & ~umask``."""
    try:
        st = target.stat()
        if stat.S_ISREG(st.st_mode):
            return stat.S_IMODE(st.st_mode)
    except OSError:
        pass
    return 0o666 & ~_umask()


def write_atomic(target: str | Path, write: Callable[[str], None], suffix: str = "") -> None:
    """Call ``write(tmp_path)`` then move the file onto ``target`` (see the module notes)."""
    target = check_writable(target)
    if _is_device(target):
        _write_device(target, write, suffix)
        return
    try:
        target.parent.mkdir(parents=True, exist_ok=True)
        fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=suffix or target.suffix,
                                   dir=target.parent)
        os.close(fd)
    except OSError as exc:
        raise InputError(str(target), "", exc.strerror or str(exc), WRITABLE_EXPECTED) from None
    try:
        write(tmp)
        os.chmod(tmp, new_file_mode(target))
        with open(tmp, "rb+") as f:
            os.fsync(f.fileno())
        os.replace(tmp, target)
    except OSError as exc:
        raise InputError(str(target), "", exc.strerror or str(exc),
                         f"{WRITABLE_EXPECTED} (nothing was written)") from None
    finally:
        if os.path.exists(tmp):
            with contextlib.suppress(OSError):
                os.unlink(tmp)


def _write_device(target: Path, write: Callable[[str], None], suffix: str) -> None:
    """Make the whole file elsewhere, then copy it to the device (nothing half-made)."""
    with tempfile.TemporaryDirectory(prefix="changeover-") as d:
        tmp = str(Path(d) / f"out{suffix or target.suffix}")
        write(tmp)
        try:
            with open(tmp, "rb") as src, open(target, "wb") as dst:
                while chunk := src.read(1 << 20):
                    dst.write(chunk)
        except OSError as exc:
            raise InputError(str(target), "", exc.strerror or str(exc), WRITABLE_EXPECTED
                             ) from None


def write_text(target: str | Path, text: str) -> None:
    """Write ``text`` (UTF-8) atomically."""
    write_atomic(target, lambda p: Path(p).write_text(text, encoding="utf-8"))


def write_json(target: str | Path, doc: object) -> None:
    """Write a JSON document atomically (UTF-8, indented)."""
    write_text(target, json.dumps(doc, indent=2, ensure_ascii=False) + "\n")


def dumps(doc: object) -> str:
    """The JSON printed by ``--json``."""
    return json.dumps(doc, indent=2, ensure_ascii=False)
