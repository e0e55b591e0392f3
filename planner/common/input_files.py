"""Reading a TOML input file (the ship file, the voyage file) without trusting it.

One reader for every TOML input, so that each hostile file ends in the same
one line (``file: place: value: expected``, :class:`geo.errors.InputError`):

- a missing path, a folder, or a special file (``/dev/zero``, a pipe, a
  device) is refused before anything is read: only a regular file is opened;
- at most :data:`MAX_TOML_BYTES` are read, whatever the size the file claims
  (a file that grows while it is read is cut there and refused);
- the bytes must be UTF-8 (a leading byte-order mark is dropped); a bad byte
  is named by its line;
- the text must be valid TOML;
- no number may be NaN or infinite (TOML allows ``nan`` and ``inf``; no
  quantity of a ship or a voyage is either): the first one is named by its
  key path (``consumers.me.mcr_kw``, ``fuel[2].sulphur_pct``).
"""

from __future__ import annotations

import math
import os
import stat
import tomllib
from collections.abc import Iterator
from pathlib import Path
from typing import Any

from geo.errors import InputError

MAX_TOML_BYTES = 1024 * 1024
"""Largest ship or voyage file read, bytes (the sample ship is about 8 kB)."""


def read_toml(path: str | Path, what: str, max_bytes: int = MAX_TOML_BYTES) -> dict[str, Any]:
    """The tables of a TOML input file, or one InputError naming the file.

    Parameters
    ----------
    path : str or Path
        The file as the user named it (the messages name it so).
    what : str
        What the file should be, for the messages: ``"ship file"``, ``"voyage file"``.
    max_bytes : int [bytes], default :data:`MAX_TOML_BYTES`
        Most bytes read.

    Returns
    -------
    dict
        The parsed document (``tomllib``), every number in it finite.

    Raises
    ------
    geo.errors.InputError
        For a missing path, a folder, a special file, a file over ``max_bytes``,
        unreadable or non-UTF-8 bytes, invalid TOML, or a NaN or infinite number.

    Examples
    --------
    >>> try:
    ...     read_toml("no_such_voyage.toml", "voyage file")
    ... except InputError as e:
    ...     print(e)
    no_such_voyage.toml: missing: expected an existing voyage file (TOML)
    """
    file = str(path)
    data = _read_regular(Path(path), file, what, max_bytes)
    try:
        text = data.decode("utf-8-sig")
    except UnicodeDecodeError as e:
        line = data[: e.start].count(b"\n") + 1
        raise InputError(file, f"line {line}", f"byte 0x{data[e.start]:02x}",
                         f"UTF-8 text (a {what})") from None
    try:
        doc = tomllib.loads(text)
    except tomllib.TOMLDecodeError as e:
        raise InputError(file, "", str(e), "valid TOML") from None
    check_finite(doc, file)
    return doc


def _read_regular(p: Path, file: str, what: str, max_bytes: int) -> bytes:
    """The bytes of a regular file, at most ``max_bytes`` (never reads a device or a pipe)."""
    expected = f"an existing {what} (TOML)"
    try:
        st = p.stat()
    except FileNotFoundError:
        raise InputError(file, "", None, expected) from None
    except OSError as e:
        raise InputError(file, "", e.strerror or str(e), expected) from None
    if stat.S_ISDIR(st.st_mode):
        raise InputError(file, "", "a folder", f"a {what} (TOML), not a folder")
    if not stat.S_ISREG(st.st_mode):
        raise InputError(file, "", "a special file",
                         f"a regular {what} (TOML), not a device, pipe or socket")
    if st.st_size > max_bytes:
        raise InputError(file, "file size", f"{st.st_size} bytes", f"at most {max_bytes} bytes")
    try:
        fd = os.open(p, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0))
    except OSError as e:
        raise InputError(file, "", e.strerror or str(e), f"a readable {what}") from None
    try:
        if not stat.S_ISREG(os.fstat(fd).st_mode):  # replaced between stat and open
            raise InputError(file, "", "a special file", f"a regular {what} (TOML)")
        with os.fdopen(fd, "rb", closefd=False) as f:
            data = f.read(max_bytes + 1)
    except OSError as e:
        raise InputError(file, "", e.strerror or str(e), f"a readable {what}") from None
    finally:
        os.close(fd)
    if len(data) > max_bytes:
        raise InputError(file, "file size", f"more than {max_bytes} bytes",
                         f"at most {max_bytes} bytes")
    return data


def _numbers(node: object, place: str) -> Iterator[tuple[str, float]]:
    """Every float of a parsed document with its key path, in file order."""
    if isinstance(node, float):
        yield place, node
    elif isinstance(node, dict):
        for k, v in node.items():
            yield from _numbers(v, f"{place}.{k}" if place else str(k))
    elif isinstance(node, list):
        for i, v in enumerate(node):
            yield from _numbers(v, f"{place}[{i + 1}]")


def check_finite(doc: object, file: str) -> None:
    """Refuse the first NaN or infinite number of a parsed document, naming its key.

    Parameters
    ----------
    doc : dict or list
        A parsed TOML document (or part of one).
    file : str
        The file, for the message.

    Raises
    ------
    geo.errors.InputError
        ``file: key.path: nan: expected a finite number``; list items count from 1.

    Examples
    --------
    >>> try:
    ...     check_finite({"fuel": [{"sulphur_pct": 0.1}, {"sulphur_pct": float("inf")}]}, "v.toml")
    ... except InputError as e:
    ...     print(e)
    v.toml: fuel[2].sulphur_pct: inf: expected a finite number (not nan or inf)
    """
    for place, x in _numbers(doc, ""):
        if not math.isfinite(x):
            raise InputError(file, place, x, "a finite number (not nan or inf)")
