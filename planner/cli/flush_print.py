"""The tables ``changeover flush`` prints: circuits, load tables and the Monte Carlo.

Made as :class:`planner.cli.text_table.TextTable` (never cutting a value) and
printed laid out for the width. A switch back to regular fuel has no limit to
reach: its row says when the inlets pass above the limit and when they are back
on regular fuel (:func:`back_on_regular`, the plan's own rule).
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import TYPE_CHECKING

from planner.cli.text_table import TextTable, atom, table
from planner.common.defaults import DEFAULT_MARGIN_H

if TYPE_CHECKING:
    from planner.flushing.study import FlushStudy
    from planner.ship.system import FuelSystem
    from planner.uncertainty import CircuitUncertainty

DASH = "—"


def _h(x: float | None) -> str:
    if x is None:
        return "not reached"
    return atom(f"{x:.2f} h ({x * 60:.0f} min)")


def _short(x: float | None) -> str:
    return DASH if x is None else f"{x:.2f}"


def back_on_regular(st: FlushStudy) -> tuple[float, float | None]:
    """A switch back's completion: the level every inlet must reach [% m/m] and when it
    has (and stays) there [h after the switch], None if not by the horizon.

    The level is the plan's: within ``SWITCH_BACK_COMPLETE`` (5 %) of the fuels'
    sulphur difference from the regular fuel (common practice; :mod:`planner.voyage.changeovers`).
    """
    from planner.voyage.changeovers import back_on_regular_pct

    s = st.summary
    fuels = {f.name: f.sulphur_pct for f in st.result.fuels}
    level = back_on_regular_pct(fuels[s.from_fuel], fuels[s.to_fuel])
    times = [c.time_at_or_above_h(level, True) for c in st.result.circuit_inlets(s.circuit)]
    return level, None if any(t is None for t in times) else max(times)  # type: ignore[type-var]


def _window(st: FlushStudy) -> str:
    outside = [k for k, p in st.paths.items() if p.outside()]
    if not outside:
        return "inside"
    leads = [st.lead_h[k] for k in outside]
    if any(x is None for x in leads):
        return "outside: switch more slowly"
    return f"outside: start the temperature change {atom(f'{max(leads) * 60:.0f} min')} early"


def circuit_row(st: FlushStudy) -> list[str]:
    """One circuit: change, limit, when the limit is passed, what done means and when."""
    s = st.summary
    burnt = ", ".join(atom(f"{k} {v:.2f}") for k, v in s.burnt_t.items() if v > 5e-4)
    if s.direction == "to_compliant":
        done = f"all inlets ≤ target {atom(f'{s.target_pct:.3f} %')}"
        done_h, passed = s.time_to_target_h, _h(s.time_to_limit_h)
    else:
        level, done_h = back_on_regular(st)
        done = f"back on {s.to_fuel}: all inlets ≥ {atom(f'{level:.3f} %')}"
        passed = _h(s.first_time_to_limit_h) + " (above)"
    visc = f"{st.min_viscosity_cst:.1f}-{st.max_viscosity_cst:.1f}" if st.paths else DASH
    return [atom(s.circuit), f"{s.from_fuel} → {s.to_fuel}", f"{s.limit_pct:.2f}", passed,
            done, _h(done_h), burnt, visc, _window(st)]


def flush_tables(studies: list[FlushStudy], tables: dict[str, list]) -> list[TextTable]:
    """The circuits table and each circuit's duration against main engine load."""
    out = [table("Circuits (times after the valve switch)", [
        ("Circuit", "l"), ("Change", "w"), ("Limit % m/m", "r"), ("Limit passed", "l"),
        ("Done when", "w"), ("Done after", "l"), ("Burnt t", "w"), ("Viscosity cSt", "r"),
        ("Viscosity window", "w")], [circuit_row(st) for st in studies])]
    for n, rows in tables.items():
        fuels = sorted({f for r in rows for f in r.burnt_t})
        out.append(table(f"Changeover duration against main engine load: circuit {n}",
                         [("Load % MCR", "r"), ("Speed kn", "r"), ("To limit h", "r"),
                          ("To target h", "r")] + [(f"{f} burnt t", "r") for f in fuels],
                         [[f"{r.load_pct:.0f}", DASH if r.speed_kn is None else
                           f"{r.speed_kn:.1f}", _short(r.time_to_limit_h),
                           _short(r.time_to_target_h),
                           *[f"{r.burnt_t.get(f, 0.0):.2f}" for f in fuels]] for r in rows]))
    return out


def flush_lines(system: FuelSystem, studies: list[FlushStudy], tables: dict[str, list],
                load: float | None, mc: list[CircuitUncertainty] | None, margin_h: float,
                cols: int, warnings: Sequence[tuple[str, str]] = ()) -> list[str]:
    """The flush as text ``cols`` characters wide: the circuits table, the load tables, the
    Monte Carlo tables, the warnings (``(kind, text)``) and the advisory line."""
    from planner.cli.console import table_lines, text_lines

    out = text_lines(f"{system.ship.name}: flushing after the changeover valve is switched "
                     f"(main engine at "
                     f"{'its reference load' if load is None else f'{load:g} % MCR'})", cols)
    out += ["", *table_lines(flush_tables(studies, tables), cols)]
    if mc:
        out += _uncertainty_lines(mc, margin_h, cols)
    for _, text in warnings:
        out += text_lines(text, cols, "Warning: ")
    return out + text_lines("Advisory only: the engine and boiler makers' instructions and the "
                            "ship's safety management system come first. Keep the engine room "
                            "manned during a changeover.", cols)


def print_flush(system: FuelSystem, studies: list[FlushStudy], tables: dict[str, list],
                load: float | None, mc: list[CircuitUncertainty] | None = None,
                margin_h: float = DEFAULT_MARGIN_H,
                warnings: Sequence[tuple[str, str]] = ()) -> None:
    """The flush on standard output, laid out for its width."""
    from planner.cli.console import echo_lines, width

    echo_lines(flush_lines(system, studies, tables, load, mc, margin_h, width(), warnings))


def _within(u: CircuitUncertainty, x: float | None) -> str:
    """A time after the switch [h], or a dash when it is beyond the analysis horizon (a
    quantile that falls among samples never reaching the level)."""
    return DASH if x is None or not x <= u.horizon_h else f"{x:.2f}"


def uncertainty_table(mc: list[CircuitUncertainty]) -> TextTable:
    """Quantiles of the time to target and the lead at the confidence, per circuit."""
    c = mc[0].confidence
    pc = f"{c * 100:.4g} %"
    rows = []
    for u in mc:
        q = u.time_quantiles("target")
        lo, hi = u.lead_at_confidence_interval_h
        extra = u.extra_compliant_t
        rows.append([atom(u.circuit), _short(u.deterministic.time_to_target_h),
                     _within(u, q[0.5]), _within(u, q[0.9]), _within(u, q[0.99]),
                     _within(u, u.time_at_confidence_h),
                     _short(u.lead_at_confidence_h),
                     DASH if lo is None and hi is None else f"{_short(lo)}-{_short(hi)}",
                     _short(u.lead_limit_at_confidence_h),
                     DASH if extra is None else f"{extra:.2f}", u.driver or DASH])
    return table(f"Uncertainty at confidence {pc} ({mc[0].samples.n} samples, seed "
                 f"{mc[0].samples.seed}): time to target after the switch, h; lead: before "
                 "the planned boundary, with its timing", [
                     ("Circuit", "l"), ("Plain h", "r"), ("P50 h", "r"), ("P90 h", "r"),
                     ("P99 h", "r"), (f"At {pc} h", "r"), (f"Lead {pc} h", "r"),
                     ("MC 95 % interval h", "r"), (f"Lead to limit {pc} h", "r"),
                     ("Extra compliant t", "r"), ("Main driver", "w")], rows)


def swings_table(u: CircuitUncertainty) -> TextTable:
    """One circuit's one-at-a-time swings."""
    rows = []
    for s in u.sensitivity.swings:
        fmt = "{:.4f}" if s.unit == "% m/m" else "{:.3f}"
        unit = "" if s.unit in ("×", "") else f" {s.unit}"
        rows.append([s.label, atom(fmt.format(s.low) + unit), atom(fmt.format(s.high) + unit),
                     _short(s.lead_low_h), _short(s.lead_high_h),
                     DASH if s.swing_h is None else f"{s.swing_h * 60:.1f}",
                     f"{u.sensitivity.rank_correlation.get(s.key, 0.0):+.2f}",
                     "" if s.exact else "interpolated"])
    return table(f"What moves the start: circuit {u.circuit} (lead needed, each input alone "
                 f"at the ends of its 95 % range; ρ: rank correlation with the lead)",
                 [("Input", "w"), ("Low", "r"), ("High", "r"), ("Lead at low h", "r"),
                  ("Lead at high h", "r"), ("Swing min", "r"), ("ρ", "r"), ("Note", "l")],
                 rows, "— : not reached (by the analysis horizon, or never: see below)")


def _uncertainty_lines(mc: list[CircuitUncertainty], margin_h: float, cols: int) -> list[str]:
    """The Monte Carlo tables, then each circuit's swings, probabilities, check, warnings."""
    from planner.cli.console import table_lines, text_lines
    from planner.uncertainty.report import leads_to_show

    out = table_lines([uncertainty_table(mc)], cols)
    for u in mc:
        out += table_lines([swings_table(u)], cols)
        shown = [f"{x:.2f} h: {u.p_compliant(x):.1%}" for x in leads_to_show(u, margin_h)]
        if shown:
            out += text_lines(f"{u.circuit}: probability of being at or below the limit at "
                              f"the boundary when switched this long before it: "
                              f"{'; '.join(shown)}", cols)
        err = u.check.max_error_s
        if err is not None:
            out += text_lines(f"{u.circuit}: {len(u.check.index)} samples simulated exactly "
                              f"differ from the surrogate by at most {err:.1f} s "
                              f"({u.simulations} simulations in all)", cols)
        for w in u.warnings:
            out += text_lines(w, cols, f"Warning ({u.circuit}): ")
        out.append("")
    return out
