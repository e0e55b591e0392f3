"""Canonical JSON and the hash chain rule.

Every entry is stored as canonical JSON text: keys sorted, no spaces
(``","`` and ``":"`` separators), UTF-8 text kept as typed (no ``\\u``
escapes, no Unicode normalisation), floats in Python's shortest round-trip
form, NaN and infinity refused. Parsing that text and writing it canonically
again gives the same text, so anyone can re-derive it from an export.

The chain (the rule a reader needs to check a copy by hand)::

    hash(n) = SHA-256( prev_hash + "\\n" + str(n) + "\\n" + body(n) )   as lowercase hex

where ``prev_hash`` is the hash of entry n − 1 (64 zeros for entry 1),
``n`` the entry number and ``body(n)`` the entry's canonical JSON, all
encoded as UTF-8. Including ``n`` means an entry moved to another number no
longer matches its hash even if its neighbours are moved with it.
"""

from __future__ import annotations

import hashlib
import json

GENESIS_HASH = "0" * 64
"""The previous-entry hash of entry 1."""


def canonical_json(obj: object) -> str:
    """The canonical JSON text of ``obj`` (plain dicts, lists, str, int, float, bool, None)."""
    return json.dumps(obj, sort_keys=True, separators=(",", ":"), ensure_ascii=False,
                      allow_nan=False)


def is_canonical(text: str) -> bool:
    """Whether ``text`` is JSON already in canonical form."""
    try:
        return canonical_json(json.loads(text)) == text
    except (ValueError, TypeError):
        return False


def entry_hash(prev_hash: str, seq: int, body: str) -> str:
    """SHA-256 (hex) of entry ``seq`` whose canonical JSON is ``body``, chained to ``prev_hash``."""
    data = f"{prev_hash}\n{seq}\n{body}".encode()
    return hashlib.sha256(data).hexdigest()


def is_hash(text: object) -> bool:
    """Whether ``text`` looks like a SHA-256 hex digest (64 lowercase hex digits)."""
    return (isinstance(text, str) and len(text) == 64
            and all(c in "0123456789abcdef" for c in text))
