"""The two main jobs without printing: the route check and the voyage plan.

Each loads every file its input names and computes; the command line prints
and writes the result. Nothing here imports rich, matplotlib or reportlab; the
loaders and the planner are imported inside the functions, so the route check
does not load the planning model.
"""

from __future__ import annotations

from collections.abc import Callable
from datetime import date
from pathlib import Path
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from geo.compliance import RouteCheck
    from planner.voyage.flush_cache import FlushCache
    from planner.voyage.plan import Plan
    from planner.voyage.scrubber_events import ScrubberOutage, ZonePassage
    from planner.voyage.voyage_file import Voyage


def run_route_check(route_file: Path, areas: list[Path], depart: str | None, speed: float | None,
                    on: str | None, progress: Callable[[str], None] | None = None) -> RouteCheck:
    """Load the inputs and run the route check (no printing).

    Parameters
    ----------
    route_file : Path
        The route (any supported format).
    areas : list of Path
        Area files or folders of them.
    depart : str or None
        Departure, ISO 8601 with its UTC offset (None: no schedule unless the route has one).
    speed : float or None [kn]
        Speed for legs without their own speed or ETA.
    on : str or None
        The date whose rules apply when there is no schedule, ``YYYY-MM-DD`` (default: today).
    progress : callable, optional
        Called with a short text now and then while big files are read and checked.
    """
    from geo.area_files import load_areas
    from geo.compliance import check_route
    from geo.path import route_path
    from geo.route_loader import load_route
    from geo.schedule import make_schedule
    from planner.common.timefmt import parse_day, parse_moment

    route = load_route(route_file)
    area_list = load_areas(areas, progress=progress)
    depart_utc = parse_moment(depart) if depart else None
    day = parse_day(on) if on else date.today()
    path = route_path(route)
    schedule = make_schedule(path, depart_utc, speed)
    return check_route(path, area_list, schedule, day, progress=progress)


def build_plan(voyage_file: Path, progress: Callable[[str], object] | None = None,
               flushes: FlushCache | None = None) -> Plan:
    """Load the voyage and everything it names, and plan it (no printing).

    Parameters
    ----------
    voyage_file : Path
        The voyage file (TOML).
    progress : callable, optional
        Called with a line of text at each stage.
    flushes : FlushCache, optional
        Where the plan's flushes are remembered (default: a new cache, kept with the plan;
        ``FlushCache(enabled=False)`` simulates every one).
    """
    from geo.area_files import load_areas
    from geo.compliance import check_route
    from geo.path import route_path
    from geo.route_loader import load_route
    from geo.schedule import make_schedule
    from planner.voyage.onboard import ship_for_voyage
    from planner.voyage.plan import plan_voyage
    from planner.voyage.voyage_file import load_voyage

    step = progress or (lambda text: None)
    step("reading the voyage, ship, route and areas")
    voyage = load_voyage(voyage_file)
    system = ship_for_voyage(voyage)
    path = route_path(load_route(voyage.route_file))
    schedule = make_schedule(path, voyage.depart_utc, voyage.speed_kn)
    step("finding the boundary crossings")
    check = check_route(path, load_areas(voyage.area_paths, progress=step), schedule,
                        voyage.depart_utc.date(), progress=step)
    passages, outages = scrubber_inputs(voyage, check)
    step("simulating every changeover on the voyage timeline")
    return plan_voyage(voyage, system, check, flushes, passages, outages)


def scrubber_inputs(voyage: Voyage, check: RouteCheck
                    ) -> tuple[tuple[ZonePassage, ...], tuple[ScrubberOutage, ...]]:
    """What the plan's scrubbers depend on, from the voyage: the route's passages through its
    washwater discharge zones (``[voyage] discharge_zones``) and the scrubbers' planned
    outages (``[[scrubber_outage]]``); the one place the plan takes them from.

    Parameters
    ----------
    voyage : Voyage
        The voyage file as loaded.
    check : RouteCheck
        The route check of the voyage, with its schedule.
    """
    from planner.voyage.discharge import discharge_passages

    return discharge_passages(voyage, check), tuple(voyage.scrubber_outages)
