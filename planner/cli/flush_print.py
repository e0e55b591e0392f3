"""The tables ``changeover flush`` prints: circuits, load tables and the Monte Carlo.

Rich is imported inside the functions (through :mod:`planner.cli.console`).
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from planner.common.defaults import DEFAULT_MARGIN_H

if TYPE_CHECKING:
    from rich.console import Console

    from planner.flushing.study import FlushStudy
    from planner.ship.system import FuelSystem
    from planner.uncertainty import CircuitUncertainty


def _h(x: float | None) -> str:
    if x is None:
        return "not reached"
    return f"{x:.2f} h ({x * 60:.0f} min)"


def print_flush(system: FuelSystem, studies: list[FlushStudy], tables: dict[str, list],
           load: float | None, mc: list[CircuitUncertainty] | None = None,
           margin_h: float = DEFAULT_MARGIN_H) -> None:
    """The circuits table, the load tables, the Monte Carlo tables and the advisory line."""
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


def _print_uncertainty(con: Console, mc: list[CircuitUncertainty], margin_h: float) -> None:
    """The Monte Carlo tables: quantiles and lead per circuit, then each circuit's swings."""
    from planner.cli.console import table

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
        _print_swings(con, u, margin_h)


def _print_swings(con: Console, u: CircuitUncertainty, margin_h: float) -> None:
    """One circuit's one-at-a-time swings, its compliance probabilities, check and warnings."""
    from planner.cli.console import table
    from planner.uncertainty.report import leads_to_show

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
