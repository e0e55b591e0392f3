"""``changeover flush``: how long until each consumer inlet is under the limit."""

from __future__ import annotations

from pathlib import Path
from typing import Annotated

import typer

from planner.common.defaults import DEFAULT_MARGIN_H


def _tanks(system, circuit: str, from_: str | None, to: str | None) -> tuple[str, str]:
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
    confidence: Annotated[float | None, typer.Option(
        help="Monte Carlo of the uncertain inputs (ship file [uncertainty]): the start lead "
             "at this confidence, e.g. 0.99 (default the voyage's, else 0.99, when --samples, "
             "--seed or --sensitivity-chart is given).")] = None,
    samples: Annotated[int | None, typer.Option(help="Monte Carlo samples (default "
                                                "10000).")] = None,
    seed: Annotated[int | None, typer.Option(help="Random seed of the Monte Carlo (default 0: "
                                             "the same numbers every run).")] = None,
    sensitivity_chart: Annotated[Path | None, typer.Option(
        help="Draw what moves the start: one-at-a-time swings and rank correlations (PNG).")]
    = None,
) -> None:
    """Flushing time of each circuit after the changeover valve is switched."""
    from geo.errors import InputError
    from planner.common.outputs import dumps
    from planner.flushing import FlushError, schedule_at
    from planner.flushing.study import duration_table, flush_json, study
    from planner.voyage.onboard import load_ship_or_voyage

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
    mc = None
    if any(x is not None for x in (confidence, samples, seed, sensitivity_chart)):
        mc = _monte_carlo(ship, system, voyage, studies, sched, confidence, samples, seed)
    doc = flush_json(studies, load)
    if mc is not None:
        from planner.uncertainty import uncertainty_json

        margin = voyage.time_margin_h if voyage else 1.0
        for entry, u in zip(doc["circuits"], mc, strict=True):
            entry["uncertainty"] = uncertainty_json(u, margin)
    if table:
        doc["table"] = {n: [r.__dict__ for r in rows] for n, rows in tables.items()}
    if chart is not None:
        from planner.charts.flush_chart import draw_flush_chart

        draw_flush_chart(studies, chart, title=f"{system.ship.name}: changeover at the inlets")
    if sensitivity_chart is not None and mc:
        from planner.charts.sensitivity_chart import draw_sensitivity_chart

        draw_sensitivity_chart(mc, sensitivity_chart,
                               title=f"{system.ship.name}: what moves the changeover start")
    if json_out:
        typer.echo(dumps(doc))
        return
    _print(system, studies, tables, load, mc, voyage.time_margin_h if voyage else 1.0)
    if chart is not None:
        typer.echo(f"wrote {chart}")
    if sensitivity_chart is not None and mc:
        typer.echo(f"wrote {sensitivity_chart}")


def _monte_carlo(ship, system, voyage, studies, sched, confidence, samples, seed):
    """The Monte Carlo of every studied circuit (InputError on bad settings)."""
    from geo.errors import InputError
    from planner.flushing import FlushError
    from planner.uncertainty import UncertaintyError, analyse, load_uncertainty
    from planner.uncertainty.montecarlo import DEFAULT_SAMPLES, DEFAULT_SEED

    if confidence is None:
        confidence = voyage.confidence if voyage and voyage.confidence else 0.99
    if not 0.5 <= confidence <= 0.9999:
        raise InputError("--confidence", "", confidence, "a probability from 0.5 to 0.9999")
    samples = DEFAULT_SAMPLES if samples is None else samples
    if not 100 <= samples <= 1_000_000:
        raise InputError("--samples", "", samples, "a number of samples from 100 to 1000000")
    seed = DEFAULT_SEED if seed is None else seed
    if seed < 0:
        raise InputError("--seed", "", seed, "a seed of 0 or more")
    if voyage is not None:
        spec = load_uncertainty(voyage.ship_file, system, voyage_file=ship)
    else:
        spec = load_uncertainty(ship, system)
    out = []
    with _Progress() as bar:
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


class _Progress:
    """A progress bar on standard error for the Monte Carlo's simulations, shown only on a
    terminal and only once the work has run longer than a moment."""

    DELAY_S = 0.4

    def __init__(self) -> None:
        import sys
        import time

        self.circuit = ""
        self._t0 = time.monotonic()
        self._tty = sys.stderr.isatty()
        self._bar = None
        self._task = None

    def __enter__(self):
        return self

    def __call__(self, done: int, total: int) -> None:
        import time

        if not self._tty:
            return
        if self._bar is None:
            if time.monotonic() - self._t0 < self.DELAY_S:
                return
            from rich.progress import Progress

            from planner.cli.console import console

            self._bar = Progress(console=console(stderr=True), transient=True)
            self._bar.start()
        if self._task is None or self._bar.tasks[self._task].description != self.circuit:
            self._task = self._bar.add_task(f"{self.circuit}", total=total)
        self._bar.update(self._task, completed=done, total=total,
                         description=f"Monte Carlo {self.circuit}: simulations")

    def __exit__(self, *exc) -> None:
        if self._bar is not None:
            self._bar.stop()


def _has_main_engine(system, circuit: str) -> bool:
    from planner.ship.consumers import MainEngine

    return any(isinstance(system.consumers[c], MainEngine)
               for c in system.circuits[circuit].consumers)


def _h(x: float | None) -> str:
    if x is None:
        return "not reached"
    return f"{x:.2f} h ({x * 60:.0f} min)"


def _print(system, studies, tables, load, mc=None, margin_h: float = DEFAULT_MARGIN_H) -> None:
    from planner.cli.console import console, table

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
    if mc:
        _print_uncertainty(con, mc, margin_h)
    con.print("[dim]Advisory only: the engine and boiler makers' instructions and the ship's "
              "safety management system come first. Keep the engine room manned during a "
              "changeover.[/dim]")


def _short(x: float | None) -> str:
    return "—" if x is None else f"{x:.2f}"


def _print_uncertainty(con, mc, margin_h: float) -> None:
    """The Monte Carlo tables: quantiles and lead per circuit, then each circuit's swings."""
    from planner.cli.console import table
    from planner.uncertainty.report import leads_to_show

    c = mc[0].confidence
    pc = f"{c * 100:.4g} %"
    t = table(f"Uncertainty at confidence {pc} ({mc[0].samples.n} samples, seed "
              f"{mc[0].samples.seed}): time to target after the switch, h; lead: before the "
              "planned boundary, with its timing", [
                  ("Circuit", "l"), ("Plain", "r"), ("P50", "r"), ("P90", "r"), ("P99", "r"),
                  (f"At {pc}", "r"), (f"Lead {pc}", "r"), ("MC 95 % interval", "r"),
                  (f"Lead to limit {pc}", "r"), ("Extra compliant t", "r"), ("Main driver", "l")])
    for u in mc:
        q = u.time_quantiles("target")
        lo, hi = u.lead_at_confidence_interval_h
        extra = u.extra_compliant_t
        t.add_row(u.circuit, _short(u.deterministic.time_to_target_h), _short(q[0.5]),
                  _short(q[0.9]), _short(q[0.99]), _short(u.time_at_confidence_h),
                  _short(u.lead_at_confidence_h),
                  "—" if lo is None and hi is None else f"{_short(lo)}-{_short(hi)}",
                  _short(u.lead_limit_at_confidence_h),
                  "—" if extra is None else f"{extra:.2f}", u.driver or "—")
    con.print(t)
    for u in mc:
        st = table(f"What moves the start: circuit {u.circuit} (lead needed, each input alone "
                   f"at the ends of its 95 % range; ρ: rank correlation with the lead)",
                   [("Input", "l"), ("Low", "r"), ("High", "r"), ("Lead at low, h", "r"),
                    ("Lead at high, h", "r"), ("Swing min", "r"), ("ρ", "r"), ("", "l")])
        for s in u.sensitivity.swings:
            fmt = "{:.4f}" if s.unit == "% m/m" else "{:.3f}"
            unit = "" if s.unit in ("×", "") else f" {s.unit}"
            st.add_row(s.label, fmt.format(s.low) + unit, fmt.format(s.high) + unit,
                       _short(s.lead_low_h), _short(s.lead_high_h),
                       "—" if s.swing_h is None else f"{s.swing_h * 60:.1f}",
                       f"{u.sensitivity.rank_correlation.get(s.key, 0.0):+.2f}",
                       "" if s.exact else "interpolated")
        con.print(st)
        con.print("  — : not reached (by the analysis horizon, or never: see below)")
        shown = [f"{x:.2f} h: {u.p_compliant(x):.1%}" for x in leads_to_show(u, margin_h)]
        if shown:
            con.print(f"  {u.circuit}: probability of being at or below the limit at the "
                      f"boundary when switched this long before it: {'; '.join(shown)}")
        err = u.check.max_error_s
        if err is not None:
            con.print(f"  {u.circuit}: {len(u.check.index)} samples simulated exactly differ "
                      f"from the surrogate by at most {err:.1f} s ({u.simulations} "
                      f"simulations in all)")
        for w in u.warnings:
            con.print(f"  [yellow]{u.circuit}: {w}[/yellow]")
