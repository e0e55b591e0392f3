"""``changeover flush``: how long until each consumer inlet is under the limit.

Holds the command (:func:`flush_cmd`) and its parts: the checks of its own
options, the flush study of each circuit, the optional Monte Carlo (with a bar
of its simulations on standard error when that is a terminal and ``--json`` is
not given: :class:`planner.cli.progress.SimulationsBar`), the JSON document and
the charts. The tables it prints are in :mod:`planner.cli.flush_print`; the
shared options come from :mod:`planner.cli.options`.
"""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING, Annotated

import typer

from planner.cli.csv_tables import CsvOpt, check_csv_folder
from planner.cli.options import (
    FLUSH_CONFIDENCE,
    FLUSH_SAMPLES,
    ConfidenceOpt,
    JsonOpt,
    LimitOpt,
    SamplesOpt,
    SeedOpt,
    TargetOpt,
    check_confidence,
    check_limit,
    check_margin,
    check_samples,
    check_seed,
    check_target,
)
from planner.common.defaults import DEFAULT_LIMIT_PCT

if TYPE_CHECKING:
    from datetime import datetime

    from planner.flushing import ConsumptionSchedule
    from planner.flushing.study import FlushStudy
    from planner.ship.system import FuelSystem
    from planner.uncertainty import CircuitUncertainty
    from planner.voyage.voyage_file import Voyage


def _tanks(system: FuelSystem, circuit: str, from_: str | None,
           to: str | None) -> tuple[str, str]:
    """The tanks changed from and to: ``--from``/``--to`` (fuel or tank), else the
    circuit's highest- and lowest-sulphur."""
    from geo.errors import InputError
    from planner.flushing.study import default_tanks
    from planner.ship.system import FuelSystemError

    a, b = default_tanks(system, circuit)
    try:
        a = system.tank_for(circuit, from_) if from_ else a
        b = system.tank_for(circuit, to) if to else b
    except FuelSystemError as e:
        raise InputError("--from/--to", f"circuit {circuit}", e.value, e.expected) from None
    return a, b


def flush_cmd(
    ship: Annotated[Path, typer.Argument(help="Ship file, or a voyage file (its fuels and "
                                         "tank contents are used).")],
    circuit: Annotated[list[str] | None, typer.Option(help="Circuit(s) to study (default "
                                                      "all).")] = None,
    from_: Annotated[str | None, typer.Option("--from", help="Fuel or tank running now "
                                              "(default the highest-sulphur).")] = None,
    to: Annotated[str | None, typer.Option(help="Fuel or tank to change to (default the "
                                           "lowest-sulphur).")] = None,
    limit: LimitOpt = DEFAULT_LIMIT_PCT,
    target_pct: TargetOpt = None,
    load: Annotated[float | None, typer.Option(help="Main engine load, % MCR, above 0 and at "
                                               "most 110 (default its reference load).")]
    = None,
    table: Annotated[bool, typer.Option("--table", help="Also the duration against main "
                                        "engine load (25-100 % MCR).")] = False,
    json_out: JsonOpt = False,
    chart: Annotated[Path | None, typer.Option(help="Draw sulphur and viscosity at each "
                                               "inlet against time (PNG).")] = None,
    confidence: ConfidenceOpt = None,
    samples: SamplesOpt = None,
    seed: SeedOpt = None,
    sensitivity_chart: Annotated[Path | None, typer.Option(
        help="Draw what moves the start: one-at-a-time swings and rank correlations (PNG).")]
    = None,
    csv: CsvOpt = None,
) -> None:
    """Flushing time of each circuit after the changeover valve is switched."""
    from planner.common.outputs import check_outputs, dumps
    from planner.voyage.onboard import load_ship_or_voyage

    check_outputs({"--chart": chart, "--sensitivity-chart": sensitivity_chart})
    check_csv_folder(csv)
    check_limit(limit)
    check_confidence(confidence)
    n_samples, n_seed = check_samples(samples, FLUSH_SAMPLES), check_seed(seed)
    _check_load(load)
    system, voyage = load_ship_or_voyage(ship)
    target = check_target(target_pct, limit, voyage)
    names = _circuits(system, circuit)
    sched, studies, tables = _studies(ship, system, names, from_, to, load, limit, target, table)
    mc = None
    if any(x is not None for x in (confidence, samples, seed, sensitivity_chart)):
        if confidence is None:
            confidence = voyage.confidence if voyage and voyage.confidence else FLUSH_CONFIDENCE
        mc = _monte_carlo(ship, system, voyage, studies, sched, confidence, n_samples, n_seed,
                          json_out)
    margin_h = check_margin(None, voyage)
    doc = _document(studies, tables if table else None, load, mc, margin_h)
    warnings = flush_warnings(system, studies, voyage.depart_utc if voyage else None)
    doc["warnings"] = [text for _, text in warnings]
    doc["warning_kinds"] = [kind for kind, _ in warnings]
    _draw(system, studies, mc, chart, sensitivity_chart)
    written = []
    if csv is not None:
        from planner.cli.csv_tables import flush_csv, write_csv_dir

        written = write_csv_dir(csv, flush_csv(doc))
    if json_out:
        typer.echo(dumps(doc))
        return
    from planner.cli.flush_print import print_flush

    print_flush(system, studies, tables, load, mc, margin_h, warnings)
    if chart is not None:
        typer.echo(f"wrote {chart}")
    if sensitivity_chart is not None and mc:
        typer.echo(f"wrote {sensitivity_chart}")
    for p in written:
        typer.echo(f"wrote {p}")


def flush_warnings(system: FuelSystem, studies: list[FlushStudy],
                   when: datetime | None = None) -> list[tuple[str, str]]:
    """``(kind, text)`` of the flush's warnings, as the plan words them.

    ``unusual_input``: the ship file's values taken although outside their usual
    range (:attr:`planner.ship.system.FuelSystem.input_warnings`); ``flash_point``:
    a changeover that holds distillate within 10 °C of its flash point in a heated
    volume (:func:`planner.ship.flash_margin.inlet_flash_spans`, the caution and
    its fix :func:`planner.voyage.fuel_checks.changeover_flash_text`);
    ``carriage_ban``: fuel held above what the ship may carry for use
    (:func:`planner.voyage.carriage.carriage_warnings`), at ``when`` (a voyage's
    departure; default now).
    """
    from datetime import UTC
    from datetime import datetime as _datetime

    from planner.ship.flash_margin import inlet_flash_spans
    from planner.voyage.carriage import carriage_warnings
    from planner.voyage.fuel_checks import changeover_flash_text

    out = [("unusual_input", text) for text in system.input_warnings]
    for st in studies:
        s = st.summary
        spans = inlet_flash_spans(st.result, s.circuit, st.paths)
        if spans:
            out.append(("flash_point", changeover_flash_text(system, s.circuit, s.to_fuel, st,
                                                             spans)))
    moment = when if when is not None else _datetime.now(UTC)
    out += [(w.kind, w.text) for w in carriage_warnings(system, moment)]
    return out


def _check_load(load: float | None) -> None:
    """``--load`` [% MCR]: above 0 and at most 110, or None (the engine's reference load)."""
    from geo.errors import InputError

    if load is not None and not 0.0 < load <= 110.0:
        raise InputError("--load", "", load, "a main engine load above 0 and at most 110 % MCR")


def _circuits(system: FuelSystem, circuit: list[str] | None) -> list[str]:
    """The circuits asked for (``--circuit``), else all of the ship's."""
    from geo.errors import InputError

    names = circuit or list(system.circuits)
    for n in names:
        if n not in system.circuits:
            raise InputError("--circuit", "", n, f"one of {', '.join(system.circuits)}")
    return names


def _studies(ship: Path, system: FuelSystem, names: list[str], from_: str | None,
             to: str | None, load: float | None, limit: float, target: float,
             table: bool) -> tuple[ConsumptionSchedule, list[FlushStudy], dict[str, list]]:
    """The consumption, the flush study of each circuit and, with ``--table``, its duration
    against main engine load (InputError when the system cannot run the changeover)."""
    from geo.errors import InputError
    from planner.flushing import FlushError, expected_for, schedule_at
    from planner.flushing.study import duration_table, study
    from planner.voyage.changeovers import switch_back_level_pct

    try:
        sched = schedule_at(system, load_pct=load)
        studies, tables = [], {}
        for n in names:
            a, b = _tanks(system, n, from_, to)
            if a == b:
                continue
            back = switch_back_level_pct(system, a, b)  # a switch back runs until complete
            studies.append(study(system, n, a, b, sched, limit, target if back is None else back))
            if table and _has_main_engine(system, n):
                tables[n] = duration_table(system, n, a, b, limit, target)
    except FlushError as e:
        raise InputError(str(ship), "fuel system", str(e), expected_for(
            e, "a system that can run the changeover (tanks not running dry, pumps above "
            "consumption)")) from None
    return sched, studies, tables


def _document(studies: list[FlushStudy], tables: dict[str, list] | None, load: float | None,
              mc: list[CircuitUncertainty] | None, margin_h: float) -> dict:
    """The JSON document: the circuits (with their uncertainty) and, when ``--table`` was
    given (``tables`` not None, perhaps empty), the load tables."""
    from planner.cli.flush_print import back_on_regular
    from planner.flushing.study import flush_json

    doc = flush_json(studies, load)
    for entry, st in zip(doc["circuits"], studies, strict=True):
        if st.summary.direction == "to_regular":
            entry["back_on_regular_pct"], entry["back_on_regular_h"] = back_on_regular(st)
    if mc is not None:
        from planner.uncertainty import uncertainty_json

        for entry, u in zip(doc["circuits"], mc, strict=True):
            entry["uncertainty"] = uncertainty_json(u, margin_h)
    if tables is not None:
        doc["table"] = {n: [r.__dict__ for r in rows] for n, rows in tables.items()}
    return doc


def _draw(system: FuelSystem, studies: list[FlushStudy], mc: list[CircuitUncertainty] | None,
          chart: Path | None, sensitivity_chart: Path | None) -> None:
    """The PNG charts asked for."""
    if chart is not None:
        from planner.charts.flush_chart import draw_flush_chart

        draw_flush_chart(studies, chart, title=f"{system.ship.name}: changeover at the inlets",
                         kinds={n: c.kind for n, c in system.consumers.items()})
    if sensitivity_chart is not None and mc:
        from planner.charts.sensitivity_chart import draw_sensitivity_chart

        draw_sensitivity_chart(mc, sensitivity_chart,
                               title=f"{system.ship.name}: what moves the changeover start")


def _monte_carlo(ship: Path, system: FuelSystem, voyage: Voyage | None,
                 studies: list[FlushStudy], sched: ConsumptionSchedule, confidence: float,
                 samples: int, seed: int, json_out: bool) -> list[CircuitUncertainty]:
    """The Monte Carlo of every studied circuit (InputError when the system cannot run it),
    with a bar of its simulations on a terminal unless ``--json`` is given."""
    from geo.errors import InputError
    from planner.cli.progress import SimulationsBar
    from planner.flushing import FlushError
    from planner.uncertainty import UncertaintyError, analyse, load_uncertainty

    if voyage is not None:
        spec = load_uncertainty(voyage.ship_file, system, voyage_file=ship)
    else:
        spec = load_uncertainty(ship, system)
    out = []
    with SimulationsBar(json_out) as bar:
        for st in studies:
            s = st.summary
            bar.circuit = s.circuit
            try:
                out.append(analyse(system, s.circuit, s.from_tank, s.to_tank, sched,
                                   limit_pct=s.limit_pct, target_pct=s.target_pct, spec=spec,
                                   confidence=confidence, samples=samples, seed=seed,
                                   deterministic=s, progress=bar))
            except FlushError as e:
                raise InputError(str(ship), f"circuit {s.circuit}, uncertainty", str(e),
                                 "a system that runs the changeover across the uncertain "
                                 "range (pumps above consumption, tanks not running dry)"
                                 ) from None
            except UncertaintyError as e:
                raise InputError(str(ship), f"circuit {s.circuit}", str(e),
                                 "a circuit fed from its two valve tanks only") from None
    return out


def _has_main_engine(system: FuelSystem, circuit: str) -> bool:
    from planner.ship.consumers import MainEngine

    return any(isinstance(system.consumers[c], MainEngine)
               for c in system.circuits[circuit].consumers)
