"""The two main jobs without printing: the route check and the voyage plan.

Each loads every file its input names and computes; the command line prints
and writes the result. Nothing here imports rich, matplotlib or reportlab.
"""

from __future__ import annotations

from collections.abc import Callable
from datetime import date
from pathlib import Path


def run_route_check(route_file: Path, areas: list[Path], depart: str | None, speed: float | None,
                    on: str | None):
    """Load the inputs and run the route check (no printing)."""
    from geo.area_files import load_areas
    from geo.compliance import check_route
    from geo.path import route_path
    from geo.route_loader import load_route
    from geo.schedule import make_schedule
    from planner.common.timefmt import parse_day, parse_moment

    route = load_route(route_file)
    area_list = load_areas(areas)
    depart_utc = parse_moment(depart) if depart else None
    day = parse_day(on) if on else date.today()
    path = route_path(route)
    schedule = make_schedule(path, depart_utc, speed)
    return check_route(path, area_list, schedule, day)


def build_plan(voyage_file: Path, progress: Callable[[str], object] | None = None):
    """Load the voyage and everything it names, and plan it (no printing)."""
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
    check = check_route(path, load_areas(voyage.area_paths), schedule, voyage.depart_utc.date())
    step("simulating every changeover on the voyage timeline")
    return plan_voyage(voyage, system, check)
