"""Why a plan has no changeover, in one sentence the master can check.

A plan without changeovers is right only for a reason, and the plan says
which: the route enters none of the areas loaded; it enters areas only while
they are not in force (each with its dates, [MARPOL-VI] regulation 14 [P]:
an area's limit applies from the date it takes effect); or the fuel burnt
throughout already meets every limit on the route by its delivery-note
sulphur (the strictest named). Every circuit already on compliant fuel at
departure, on a voyage that never leaves the area, is the fourth reason.
"""

from __future__ import annotations

from collections.abc import Sequence

from geo.compliance import RouteCheck
from planner.voyage.runs import Run


def no_changeover_reason(check: RouteCheck, runs: Sequence[Run],
                         departs_compliant: bool = False) -> str:
    """The reason, in words (see the module notes).

    Parameters
    ----------
    check : RouteCheck
        The route check (areas entered, stretches and their limits).
    runs : sequence of Run
        The plan's runs (one, when there is no changeover).
    departs_compliant : bool
        The voyage departs inside an area (with no changeover, every circuit is then on
        the compliant fuel at departure: ``[port] departure_fuel``).
    """
    fuel = runs[0].fuel
    in_force = {a for st in check.stretches for a in st.areas}
    entered = [t.area for t in check.tracks if t.inside_m > 0.0]
    if departs_compliant:
        return (f"No changeover: every circuit is on {fuel.name} at departure (the voyage "
                f"file's [port] departure_fuel) and the voyage stays on it, inside "
                f"{', '.join(runs[0].areas)}.")
    if not entered:
        names = ", ".join(t.area.name for t in check.tracks) or "none loaded"
        return f"No changeover: the route enters none of the areas ({names})."
    if not in_force:
        parts = []
        for a in entered:
            until = f" to {a.effective_until.isoformat()}" if a.effective_until else ""
            parts.append(f"{a.name} (in force from {a.effective_from.isoformat()}{until})")
        return ("No changeover: the route enters " + "; ".join(parts)
                + " only while it is not in force.")
    strict = min(check.stretches, key=lambda st: st.limit_pct)
    where = ", ".join(strict.areas) or "the global cap"
    return (f"No changeover: {fuel.name} ({fuel.sulphur_pct:.3f} % by its delivery note) is "
            f"burnt throughout and meets every limit on the route, the strictest "
            f"{strict.limit_pct:.2f} % in {where}.")
