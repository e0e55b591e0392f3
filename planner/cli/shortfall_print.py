"""The plan's shortfall block on the terminal: where the compliant fuel runs out and what
can be done (the plan document's ``"shortfall"``, :mod:`planner.voyage.shortfall_report`).

Printed by ``changeover plan`` after the warnings; nothing when no compliant fuel is short.
"""

from __future__ import annotations


def shortfall_lines(shortfall: dict | None, cols: int) -> list[str]:
    """The block's lines, ``cols`` characters wide (empty when ``shortfall`` is None).

    Parameters
    ----------
    shortfall : dict or None
        The plan document's ``"shortfall"``.
    cols : int [-]
        Characters per line.
    """
    from planner.cli.console import text_lines

    if not shortfall:
        return []
    out: list[str] = []
    for f in shortfall["fuels"]:
        out += ["", *text_lines(f"Compliant fuel short: {f['fuel']}, {f['short_t']:.1f} t "
                                f"({f['short_m3_15c']:.1f} m³ at 15 °C)", cols)]
        for line in f["advice"]:
            out += text_lines(line, cols, "  ")
    out += text_lines(shortfall["advisory"], cols, "  ")
    return [*out, ""]
