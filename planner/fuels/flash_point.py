"""Flash point: the delivery note's figure, or the ISO 8217 minimum for the grade.

ISO 8217 sets a minimum flash point for every marine fuel grade ([ISO-8217]
[M], from memory, in our words): 60 °C for the distillate grades DMA, DMZ and
DMB and for every residual grade (RM...), and 43 °C for DMX alone, the light
distillate kept for emergency equipment (SOLAS II-2 allows fuel below 60 °C
only there). A fuel whose delivery note gives no flash point is taken at the
minimum of its grade; a trade name (``MGO``, ``VLSFO``) at 60 °C, the minimum
of every grade but DMX.

SOLAS II-2 regulation 4.2.2.5 ([SOLAS-1974] [M], from memory) forbids heating
fuel in a tank to within 10 °C below its flash point (with exceptions for
service and settling tanks under conditions). The plan applies the same
10 °C margin (:data:`FLASH_POINT_MARGIN_C`) to the heated volumes a
changeover passes distillate through, as a caution: that use is ours.
"""

from __future__ import annotations

FLASH_POINT_MARGIN_C = 10.0
"""Kept below a fuel's flash point, °C (SOLAS II-2 reg. 4.2.2.5, [SOLAS-1974] [M])."""

ISO_8217_MIN_FLASH_POINT_C = 60.0
"""ISO 8217 minimum flash point of every grade but DMX, °C ([ISO-8217] [M])."""

DMX_MIN_FLASH_POINT_C = 43.0
"""ISO 8217 minimum flash point of DMX, °C ([ISO-8217] [M])."""


def grade_min_flash_point_c(grade: str) -> float:
    """The ISO 8217 minimum flash point of a grade, °C (60, or 43 for DMX).

    Parameters
    ----------
    grade : str
        The delivery note's grade (ISO 8217 name or trade name; case and spaces ignored).

    Returns
    -------
    float [°C]
        43 for DMX, 60 for every other grade and for trade names.

    Notes
    -----
    [ISO-8217] [M], from memory (the minima of its distillate and residual tables).

    Examples
    --------
    >>> grade_min_flash_point_c("DMX"), grade_min_flash_point_c(" dma "), \\
    ...     grade_min_flash_point_c("RMG 380")
    (43.0, 60.0, 60.0)
    """
    if grade.strip().upper().replace(" ", "").startswith("DMX"):
        return DMX_MIN_FLASH_POINT_C
    return ISO_8217_MIN_FLASH_POINT_C
