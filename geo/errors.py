"""One error type for bad input: the file, the place in it, the value, what is expected.

Every loader raises :class:`InputError`; the command line prints its one-line
message and exits with status 2 before writing any output.
"""

from __future__ import annotations


class InputError(ValueError):
    """Bad input, reported as one line: ``file: place: value: expected``.

    Parameters
    ----------
    file : path or name of the input (``"--speed"`` for a command-line option)
    place : where in it (``"line 4, column lat"``, ``"feature 2 'Alpha', ring 1"``)
    value : the offending value as the user wrote it (``None`` when missing)
    expected : what would have been accepted
    """

    def __init__(self, file: object, place: str, value: object, expected: str) -> None:
        self.file = str(file)
        self.place = place
        self.value = value
        self.expected = expected
        if value is None:
            shown = "missing"
        else:
            shown = repr(value) if isinstance(value, str) else str(value)
        parts = [p for p in (self.file, place) if p]
        super().__init__(f"{': '.join(parts)}: {shown}: expected {expected}")
