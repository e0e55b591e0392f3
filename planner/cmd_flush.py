"""``changeover flush``: how long until each consumer inlet is under the limit."""

from __future__ import annotations

from pathlib import Path
from typing import Annotated

import typer

from planner.cli import app


def _tanks(system, circuit: str, from_: str | None, to: str | None) -> tuple[str, str]:
    from geo.errors import InputError
    from planner.flush_study import default_tanks
    from planner.system import FuelSystemError

    a, b = default_tanks(system, circuit)
    try:
        a = system.tank_for(circuit, from_) if from_ else a
        b = system.tank_for(circuit, to) if to else b
    except FuelSystemError as e:
        raise InputError("--from/--to", f"circuit {circuit}", e.value, e.expected) from None
    return a, b


@app.command("flush")
def flush_cmd(
    ship: Annotated[Path, typer.Argument(help="Ship file, or a voyage file (its fuels and "
                                         "tank contents are used).")],
    circuit: Annotated[list[str] | None, typer.Option(help="Circuit(s) to study (default "
                                                      "all).")] = None,
    from_: Annotated[str | None, typer.Option("--from", help="Fuel or tank running now "
                                              "(default the highest-sulphur).")] = None,
    to: Annotated[str | None, typer.Option(help="Fuel or tank to change to (default the "
                                           "lowest-sulphur).")] = None,
    limit: Annotated[float, typer.Option(help="Sulphur limit, % m/m.")] = 0.10,
    target_pct: Annotated[float | None, typer.Option(help="Sulphur target under the limit, "
                                                     "% m/m (default 90 % of the limit).")]
    = None,
    load: Annotated[float | None, typer.Option(help="Main engine load, % MCR (default its "
                                               "reference load).")] = None,
    table: Annotated[bool, typer.Option("--table", help="Also the duration against main "
                                        "engine load (25-100 % MCR).")] = False,
    json_out: Annotated[bool, typer.Option("--json", help="Print JSON.")] = False,
    chart: Annotated[Path | None, typer.Option(help="Draw sulphur and viscosity at each "
                                               "inlet against time (PNG).")] = None,
) -> None:
    """Flushing time of each circuit after the changeover valve is switched."""
    from geo.errors import InputError
    from planner.flush_study import duration_table, flush_json, study
    from planner.flushing import FlushError, schedule_at
    from planner.onboard import load_ship_or_voyage
    from planner.outputs import dumps

    system, voyage = load_ship_or_voyage(ship)
    if not 0.0 < limit <= 5.0:
        raise InputError("--limit", "", limit, "a sulphur limit in % m/m, above 0 and at most 5")
    fraction = voyage.sulphur_target_fraction if voyage else 0.9
    target = target_pct if target_pct is not None else fraction * limit
    if not 0.0 < target <= limit:
        raise InputError("--target-pct", "", target_pct, f"a target above 0 and at most the "
                         f"limit {limit} % m/m")
    if load is not None and not 0.0 < load <= 110.0:
        raise InputError("--load", "", load, "a main engine load above 0 and at most 110 % MCR")
    names = circuit or list(system.circuits)
    for n in names:
        if n not in system.circuits:
            raise InputError("--circuit", "", n, f"one of {', '.join(system.circuits)}")
    try:
        sched = schedule_at(system, load_pct=load)
        studies, tables = [], {}
        for n in names:
            a, b = _tanks(system, n, from_, to)
            if a == b:
                continue
            studies.append(study(system, n, a, b, sched, limit, target))
            if table and _has_main_engine(system, n):
                tables[n] = duration_table(system, n, a, b, limit, target)
    except FlushError as e:
        raise InputError(str(ship), "fuel system", str(e), "a system that can run the "
                         "changeover (tanks not running dry, pumps above consumption)") from None
    doc = flush_json(studies, load)
    if table:
        doc["table"] = {n: [r.__dict__ for r in rows] for n, rows in tables.items()}
    if chart is not None:
        from planner.charts.flush_chart import draw_flush_chart

        draw_flush_chart(studies, chart, title=f"{system.ship.name}: changeover at the inlets")
    if json_out:
        typer.echo(dumps(doc))
        return
    _print(system, studies, tables, load)
    if chart is not None:
        typer.echo(f"wrote {chart}")


def _has_main_engine(system, circuit: str) -> bool:
    from planner.consumers import MainEngine

    return any(isinstance(system.consumers[c], MainEngine)
               for c in system.circuits[circuit].consumers)


def _h(x: float | None) -> str:
    if x is None:
        return "not reached"
    return f"{x:.2f} h ({x * 60:.0f} min)"


def _print(system, studies, tables, load) -> None:
    from planner.console import console, table

    con = console()
    con.print(f"{system.ship.name}: flushing after the changeover valve is switched "
              f"(main engine at {'its reference load' if load is None else f'{load:g} % MCR'})")
    t = table("Circuits", [("Circuit", "l"), ("From → to", "l"), ("Limit %", "r"),
                           ("Target %", "r"), ("To limit", "r"), ("To target", "r"),
                           ("Burnt t", "l"), ("Viscosity cSt", "r"), ("Window", "l")])
    for st in studies:
        s = st.summary
        burnt = ", ".join(f"{k} {v:.2f}" for k, v in s.burnt_t.items() if v > 5e-4)
        window = "inside"
        outside = [k for k, p in st.paths.items() if p.outside()]
        if outside:
            leads = [st.lead_h[k] for k in outside]
            if any(x is None for x in leads):
                window = "outside: switch more slowly"
            else:
                window = f"outside: start temperature change {max(leads) * 60:.0f} min early"
        t.add_row(s.circuit, f"{s.from_fuel} → {s.to_fuel}", f"{s.limit_pct:.2f}",
                  f"{s.target_pct:.3f}", _h(s.time_to_limit_h), _h(s.time_to_target_h), burnt,
                  f"{st.min_viscosity_cst:.1f}-{st.max_viscosity_cst:.1f}", window)
    con.print(t)
    for n, rows in tables.items():
        fuels = sorted({f for r in rows for f in r.burnt_t})
        tt = table(f"Changeover duration against main engine load: circuit {n}",
                   [("Load % MCR", "r"), ("Speed kn", "r"), ("To limit h", "r"),
                    ("To target h", "r")] + [(f"{f} burnt t", "r") for f in fuels])
        for r in rows:
            tt.add_row(f"{r.load_pct:.0f}", "—" if r.speed_kn is None else f"{r.speed_kn:.1f}",
                       "—" if r.time_to_limit_h is None else f"{r.time_to_limit_h:.2f}",
                       "—" if r.time_to_target_h is None else f"{r.time_to_target_h:.2f}",
                       *[f"{r.burnt_t.get(f, 0.0):.2f}" for f in fuels])
        con.print(tt)
    con.print("[dim]Advisory only: the engine and boiler makers' instructions and the ship's "
              "safety management system come first. Keep the engine room manned during a "
              "changeover.[/dim]")
