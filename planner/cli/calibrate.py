"""``changeover calibrate``: fit the ship file's flushing to logged inlet trends.

Loads the ship and the trends, calls :func:`planner.calibration.calibrate`,
prints the fitted values against the ship file's with their intervals and the
time to target both ways, and writes the JSON, the chart
(:mod:`planner.charts.calibration_chart`) and the calibrated ship file
(:mod:`planner.calibration.shipfile`, through
:func:`planner.common.outputs.write_atomic`) when asked. Every check happens
before anything is written.
"""

from __future__ import annotations

from datetime import UTC, datetime
from pathlib import Path
from typing import TYPE_CHECKING, Annotated

import typer

from planner.cli.options import JsonOpt, LimitOpt, TargetOpt, check_limit, check_target
from planner.common.defaults import DEFAULT_LIMIT_PCT

if TYPE_CHECKING:
    from planner.calibration import Calibration, Changeover, TimeToTarget, Trend
    from planner.ship.system import FuelSystem

ADVISORY = ("Advisory only: a calibrated model is an estimate from the logged trends; any "
            "change to the changeover procedure follows the ship's safety management system "
            "and the engine maker's instructions.")


def calibrate_cmd(
    ship: Annotated[Path, typer.Argument(help="Ship file (TOML).")],
    trends: Annotated[list[Path] | None, typer.Argument(
        help="Trend CSV file(s): time, inlet temperature °C, inlet viscosity cSt (or take "
             "them from the journal: --journal with --entry).")] = None,
    switch_at: Annotated[list[str] | None, typer.Option(
        "--switch-at", help="When the changeover valve was switched, ISO 8601 (with offset, "
        "or in --tz); one per trend file, in the trends' order.")] = None,
    journal: Annotated[Path | None, typer.Option(
        help="The ship's journal holding trends attached with log trend (with --entry).")]
        = None,
    entry: Annotated[list[int] | None, typer.Option(
        help="A trend entry of --journal (log trend): its stored trend, checked against its "
             "SHA-256, with its switch time (else the changeover start's) and column "
             "names; repeatable.")] = None,
    circuit: Annotated[str | None, typer.Option(help="Circuit whose valve was switched "
                                                "(default the ship's first).")] = None,
    from_: Annotated[str | None, typer.Option("--from", help="Fuel or tank changed from "
                                              "(default the highest-sulphur).")] = None,
    to: Annotated[str | None, typer.Option(help="Fuel or tank changed to (default the "
                                           "lowest-sulphur).")] = None,
    inlet: Annotated[str | None, typer.Option(help="Consumer whose inlet the viscometer reads "
                                              "(default the circuit's first).")] = None,
    time_col: Annotated[str, typer.Option(help="Name of the time column.")] = "time",
    temp_col: Annotated[str, typer.Option(help="Name of the inlet temperature column, "
                                          "°C.")] = "temperature_c",
    visc_col: Annotated[str, typer.Option(help="Name of the inlet viscosity column, "
                                          "cSt.")] = "viscosity_cst",
    load_col: Annotated[str | None, typer.Option(
        help="Name of a column of the main engine's load, % MCR (optional): the consumption "
        "then follows the log.")] = None,
    tz: Annotated[str | None, typer.Option(help="UTC offset of times written without one "
                                           "(else they are refused), e.g. +12:00.")] = None,
    fit: Annotated[list[str] | None, typer.Option(
        help="Parameter to fit: 'pipes', 'consumption' or a volume of the circuit; "
        "repeatable (default: pipes and each stirred volume, those the trend cannot "
        "determine left at the ship file's value).")] = None,
    load: Annotated[float | None, typer.Option(help="Main engine load, % MCR, above 0 and at "
                                               "most 110, during trends without --load-col and "
                                               "for the time to target (default its reference "
                                               "load).")] = None,
    limit: LimitOpt = DEFAULT_LIMIT_PCT,
    target_pct: TargetOpt = None,
    json_out: JsonOpt = False,
    chart: Annotated[Path | None, typer.Option(help="Draw measured and modelled blend "
                                               "curves (PNG).")] = None,
    write: Annotated[Path | None, typer.Option(help="Write a calibrated copy of the ship file "
                                               "(never the input itself).")] = None,
) -> None:
    """Fit the ship file's pipe and stirred volumes to logged inlet viscosity trends."""
    from geo.errors import InputError
    from planner.calibration import (
        BlendError,
        CalibrationError,
        calibrate,
        calibrated_text,
        parameters,
        prior_sd,
        time_to_target,
    )
    from planner.common.outputs import check_outputs, dumps, write_atomic
    from planner.ship.ship_file import load_ship
    from planner.uncertainty import load_uncertainty

    check_outputs({"--chart": chart, "--write": write})
    check_limit(limit)
    target = check_target(target_pct, limit)
    if load is not None and not 0.0 < load <= 110.0:
        raise InputError("--load", "", load, "a main engine load above 0 and at most 110 % MCR")
    if write is not None and write.resolve() == ship.resolve():
        raise InputError("--write", "", str(write), "a new file, not the ship file itself")
    system = load_ship(ship)
    change = _changeover(system, circuit, from_, to, inlet, load)
    read = _trends(trends or [], switch_at or [], tz, time_col, temp_col, visc_col, load_col)
    named_journal: list[str] = []
    if entry or journal is not None:
        from planner.cli.calibrate_journal import journal_trends

        more, named_journal = journal_trends(journal, entry or [], tz, time_col, temp_col,
                                             visc_col, load_col)
        read += more
    if not read:
        raise InputError("TREND.csv", "", None, "a trend file, or --journal with --entry")
    changes = [_logged(system, change, tr) for tr in read]
    try:
        params = parameters(system, change.circuit, fit)
    except ValueError as e:
        raise InputError("--fit", "", ", ".join(fit or []), str(e)) from None
    spec = load_uncertainty(ship, system)
    used = {n for q in params for n in q.nodes} | {q.name for q in params}
    fixed = tuple(q for q in parameters(system, change.circuit, None)
                  if not (set(q.nodes) & used or q.name in used))
    try:
        cal = calibrate(system, changes, read, params, explicit=fit is not None,
                        prior_sd=prior_sd(system, spec, params + fixed), fixed=fixed)
        ttt = time_to_target(system, cal, change, limit, target)
        text = None
        if write is not None:
            import hashlib

            named = [f"{t.name} (SHA-256 {hashlib.sha256(t.read_bytes()).hexdigest()})"
                     for t in trends or []] + named_journal
            text = calibrated_text(ship.read_text(encoding="utf-8-sig"), str(write), system,
                                   spec, cal, named, datetime.now(UTC))
    except (CalibrationError, BlendError) as e:
        raise InputError(", ".join([str(t) for t in trends or []] + named_journal),
                         "calibration", str(e),
                         "trends that determine the fitted parameters") from None
    doc = calibration_json(system, change, cal, ttt)
    if chart is not None:
        from planner.charts.calibration_chart import draw_calibration_chart

        draw_calibration_chart(cal, chart, title=f"{system.ship.name}: circuit "
                               f"{change.circuit}, measured and modelled blend at the inlet")
    if write is not None and text is not None:
        write_atomic(write, lambda p: Path(p).write_text(text, encoding="utf-8"))
    if json_out:
        typer.echo(dumps(doc))
        return
    _print(doc)
    for path in (chart, write):
        if path is not None:
            typer.echo(f"wrote {path}")


def _changeover(system: FuelSystem, circuit: str | None, from_: str | None, to: str | None,
                inlet: str | None, load: float | None) -> Changeover:
    """The changeover the trends record (InputError on a name the ship does not have)."""
    from geo.errors import InputError
    from planner.calibration import Changeover
    from planner.flushing import schedule_at
    from planner.flushing.study import default_tanks
    from planner.ship.system import FuelSystemError

    name = circuit or next(iter(system.circuits))
    if name not in system.circuits:
        raise InputError("--circuit", "", name, f"one of {', '.join(system.circuits)}")
    c = system.circuits[name]
    a, b = default_tanks(system, name)
    try:
        a = system.tank_for(name, from_) if from_ else a
        b = system.tank_for(name, to) if to else b
    except FuelSystemError as e:
        raise InputError("--from/--to", f"circuit {name}", e.value, e.expected) from None
    if a == b:
        raise InputError("--from/--to", f"circuit {name}", a, "two different tanks")
    where = inlet or c.consumers[0]
    if where not in c.consumers:
        raise InputError("--inlet", "", where, f"a consumer of circuit {name}: "
                         f"{', '.join(c.consumers)}")
    return Changeover(name, a, b, where, schedule_at(system, load_pct=load, circuits=[name]))


def _logged(system: FuelSystem, change: Changeover, trend: Trend) -> Changeover:
    """The changeover with the consumption following the trend's logged load, if it has one."""
    from geo.errors import InputError
    from planner.calibration import Changeover
    from planner.calibration.model import logged_schedule

    if trend.load_pct is None:
        return change
    try:
        sched = logged_schedule(system, change.circuit, trend.time_h, trend.load_pct)
    except ValueError as e:
        raise InputError(trend.file, "load column", "", str(e)) from None
    return Changeover(change.circuit, change.from_tank, change.to_tank, change.inlet, sched)


def _trends(paths: list[Path], switch_at: list[str], tz: str | None, time_col: str,
            temp_col: str, visc_col: str, load_col: str | None) -> list:
    """The trends read, each against its own switch time."""
    from geo.errors import InputError
    from planner.calibration import TrendColumns, read_trend
    from planner.common.timefmt import parse_offset

    if len(switch_at) != len(paths):
        raise InputError("--switch-at", "", f"{len(switch_at)} given for {len(paths)} trend(s)",
                         "one --switch-at per trend file, in the same order")
    zone = parse_offset(tz) if tz is not None else None
    cols = TrendColumns(time_col, temp_col, visc_col, load_col)
    out = []
    for path, text in zip(paths, switch_at, strict=True):
        moment = _switch_moment(text, zone)
        out.append(read_trend(path, moment, cols, zone))
    return out


def _switch_moment(text: str, zone: object) -> datetime:
    from geo.errors import InputError

    try:
        moment = datetime.fromisoformat(text.strip().replace("z", "Z"))
    except ValueError:
        raise InputError("--switch-at", "", text, "an ISO 8601 time such as "
                         "2027-05-30T04:00+12:00") from None
    if moment.tzinfo is None:
        if zone is None:
            raise InputError("--switch-at", "", text, "a time with its UTC offset, or --tz")
        moment = moment.replace(tzinfo=zone)  # type: ignore[arg-type]
    return moment.astimezone(UTC)


def calibration_json(system: FuelSystem, change: Changeover, cal: Calibration,
                     ttt: TimeToTarget) -> dict:
    """The document the table is printed from (and ``--json`` prints)."""
    from planner.common.timefmt import iso_utc

    return {
        "ship": system.ship.name,
        "circuit": change.circuit, "from_tank": change.from_tank, "to_tank": change.to_tank,
        "inlet": change.inlet,
        "parameters": [{"name": f.parameter.name, "label": f.parameter.label,
                        "unit": f.parameter.unit, "ship_value": f.parameter.ship_value,
                        "fitted": f.value, "low_95": f.low, "high_95": f.high,
                        "factor": f.factor, "sd_log": f.sd_log} for f in cal.fitted],
        "not_fitted": [{"name": p.name, "label": p.label, "reason": why}
                       for p, why in cal.kept],
        "time_to_target": {"direction": ttt.direction, "limit_pct": ttt.limit_pct,
                           "target_pct": ttt.target_pct,
                           "ship_file_h": ttt.ship_h, "fitted_h": ttt.fitted_h,
                           "fitted_low_95_h": ttt.fitted_low_h,
                           "fitted_high_95_h": ttt.fitted_high_h},
        "fit": {"readings": cal.readings, "spikes_left_out": cal.spikes,
                "residual_sd": cal.residual_sd, "noise_sd": cal.noise_sd,
                "simulations": cal.evaluations},
        "trends": [{"file": s.trend.file, "switch_utc": iso_utc(s.trend.switch_utc),
                    "readings": len(s.trend.time_h), "gaps_or_dropouts": s.trend.skipped,
                    "before_switch": s.trend.before_switch, "end_h": s.trend.end_h}
                   for s in cal.series],
        "cautions": [ADVISORY],
    }


def _h(x: float | None) -> str:
    return "not reached" if x is None else f"{x:.2f} h ({x * 60:.0f} min)"


def _print(doc: dict) -> None:
    """The fitted values against the ship file's, the time to target, the fit's figures."""
    typer.echo(f"{doc['ship']}: circuit {doc['circuit']}, {doc['from_tank']} → "
               f"{doc['to_tank']}, viscometer at {doc['inlet']}")
    rows = [("parameter", "ship file", "fitted", "95 % interval")]
    for p in doc["parameters"]:
        u, fmt = p["unit"], ("{:.4g}" if p["unit"] == "×" else "{:.4g} " + p["unit"])
        rows.append((p["label"], fmt.format(p["ship_value"]).replace(" ×", ""),
                     fmt.format(p["fitted"]), f"{p['low_95']:.4g} to {p['high_95']:.4g} {u}"))
    widths = [max(len(r[k]) for r in rows) for k in range(4)]
    for r in rows:
        typer.echo("  " + "  ".join(c.ljust(w) for c, w in zip(r, widths, strict=True)))
    for p in doc["not_fitted"]:
        typer.echo(f"  not fitted, ship file's value kept: {p['label']}: {p['reason']}")
    t = doc["time_to_target"]
    level = "at or below" if t["direction"] == "to_compliant" else "at or above"
    typer.echo(f"time until every inlet stays {level} {t['target_pct']:g} % m/m (limit "
               f"{t['limit_pct']:g} %): ship file "
               f"{_h(t['ship_file_h'])}, fitted {_h(t['fitted_h'])}" +
               ("" if t["fitted_low_95_h"] is None else
                f" (95 %: {t['fitted_low_95_h']:.2f} to {t['fitted_high_95_h']:.2f} h)"))
    f = doc["fit"]
    typer.echo(f"fit: {f['readings']} readings, {f['spikes_left_out']} spikes left out, "
               f"residual sd {100 * f['residual_sd']:.2f} % of the blend (reading noise "
               f"{100 * f['noise_sd']:.2f} %), {f['simulations']} simulations")
    for tr in doc["trends"]:
        typer.echo(f"  {tr['file']}: switch {tr['switch_utc']}, {tr['readings']} readings to "
                   f"{tr['end_h']:.2f} h, {tr['gaps_or_dropouts']} blank or out of range, "
                   f"{tr['before_switch']} before the switch")
    typer.echo(ADVISORY)
