"""The IMO ship identification number and its check digit.

Used by the ship file (``[ship] imo``) and the changeover record (``log init
--imo``): one rule, one place.
"""

from __future__ import annotations

from geo.errors import InputError


def imo_check_digit(first_six: str) -> int:
    """Check digit of an IMO ship number from its first six digits.

    Each digit is multiplied by 7, 6, 5, 4, 3, 2 in turn; the last digit of
    the sum is the check digit [M: the rule as remembered, not checked
    against the IMO resolution here].

    Parameters
    ----------
    first_six : str
        The first six digits.

    Returns
    -------
    int
        The check digit, 0-9.

    Examples
    --------
    >>> imo_check_digit("123456")
    7
    """
    if len(first_six) != 6 or not first_six.isdigit():
        raise ValueError(f"six digits expected, got {first_six!r}")
    return sum(int(d) * w for d, w in zip(first_six, (7, 6, 5, 4, 3, 2), strict=True)) % 10


def valid_imo(number: str) -> bool:
    """Whether ``number`` is seven digits with a valid check digit (:func:`imo_check_digit`).

    Parameters
    ----------
    number : str
        The number, digits only (no ``IMO`` prefix).

    Examples
    --------
    >>> valid_imo("9999993"), valid_imo("9999994")
    (True, False)
    """
    return (len(number) == 7 and number.isdigit()
            and imo_check_digit(number[:6]) == int(number[6]))


def check_imo(imo: str, file: str = "--imo", place: str = "") -> str:
    """The 7 digits of an IMO number typed as ``1234567`` or ``IMO 1234567``, check digit valid.

    Parameters
    ----------
    imo : str
        The number as typed.
    file, place : str
        Where it was typed, for the message (a file and its key, or an option).

    Raises
    ------
    geo.errors.InputError
        When it is not seven digits ending in their check digit.

    Examples
    --------
    >>> check_imo("IMO 9999993")
    '9999993'
    """
    digits = imo.strip().upper().removeprefix("IMO").strip()
    if not valid_imo(digits):
        raise InputError(file, place, imo, "a 7-digit IMO number whose last digit is its check "
                                           "digit (the first six times 7,6,5,4,3,2, summed, "
                                           "mod 10)")
    return digits
