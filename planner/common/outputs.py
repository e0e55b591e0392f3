"""Writing output files all-or-nothing.

Every command computes first and writes last; each file is written to a
temporary name beside the target and renamed into place, so an error or an
interruption never leaves a half-written file.
"""

from __future__ import annotations

import json
import os
import tempfile
from collections.abc import Callable
from pathlib import Path


def write_atomic(target: str | Path, write: Callable[[str], None], suffix: str = "") -> None:
    """Call ``write(tmp_path)`` then move the file onto ``target``."""
    target = Path(target)
    target.parent.mkdir(parents=True, exist_ok=True)
    fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=suffix or target.suffix,
                               dir=target.parent)
    os.close(fd)
    try:
        write(tmp)
        os.replace(tmp, target)
    except BaseException:
        if os.path.exists(tmp):
            os.unlink(tmp)
        raise


def write_json(target: str | Path, doc: object) -> None:
    """Write a JSON document atomically (UTF-8, indented)."""
    text = json.dumps(doc, indent=2, ensure_ascii=False) + "\n"
    write_atomic(target, lambda p: Path(p).write_text(text, encoding="utf-8"))


def dumps(doc: object) -> str:
    """The JSON printed by ``--json``."""
    return json.dumps(doc, indent=2, ensure_ascii=False)
