"""The calibrated ship file: the input's text with the fitted volumes and spreads.

The new file is the ship file's own text, comments kept, with:

- in each fitted volume's ``[volumes.NAME]`` table, its ``volume_m3`` (or
  ``length_m`` and ``bore_mm``) commented out as it was and the fitted
  ``volume_m3`` written in its place;
- in ``[uncertainty]`` (added when missing), ``volumes_pct`` with the fit's
  95 % half-width for each fitted volume, so the Monte Carlo draws each from
  the fit's spread rather than the default ±10 % (the per-volume form the
  uncertainty inputs already read, :mod:`planner.uncertainty.inputs`). A
  fitted stirred volume is an effective volume (stagnant part and bypass
  included): when every stirred volume of the ship was fitted,
  ``mixing_stagnant`` and ``mixing_bypass`` are set to 0, else they stay
  (conservative: counted twice for the fitted ones);
- the ``pipes`` factor is one for all the circuit's pipes: its spread is
  written on each pipe scaled by ``ΣV / √(ΣV²)``, so the sum of independently
  drawn pipes has the fitted spread of the sum;
- a comment at the top naming the trend files and the date.

A fitted consumption factor is reported, never written (the ship file gives
the makers' consumption; the factor is about the trend's day). The text is
parsed back with the ship loader before anyone writes it.
"""

from __future__ import annotations

import math
import re
import tomllib
from collections.abc import Sequence
from datetime import datetime

from planner.calibration.fit import Calibration, CalibrationError
from planner.calibration.model import CONSUMPTION
from planner.ship.ship_file import parse_ship
from planner.ship.system import FuelSystem, Stirred
from planner.uncertainty.inputs import Z95, UncertaintySpec, parse_uncertainty

MAX_PCT = 50.0  # the uncertainty inputs' largest volumes_pct [%]
_VOLUME_KEYS = re.compile(r"^\s*(volume_m3|length_m|bore_mm)\s*=")


def _section(lines: list[str], header: re.Pattern) -> tuple[int, int] | None:
    start = next((k for k, ln in enumerate(lines) if header.match(ln)), None)
    if start is None:
        return None
    end = next((k for k in range(start + 1, len(lines)) if lines[k].lstrip().startswith("[")),
               len(lines))
    return start, end


def _comment_out(lines: list[str], start: int, end: int, key: re.Pattern, note: str) -> None:
    for k in range(start + 1, end):
        if key.match(lines[k]):
            lines[k] = f"# {note}: {lines[k]}"


def fitted_volumes(system: FuelSystem, cal: Calibration) -> dict[str, tuple[float, float]]:
    """Each fitted volume's new value and the ± written for it.

    Parameters
    ----------
    system : FuelSystem
        The ship file's system.
    cal : Calibration
        Fitted factors [-] and standard errors of ln(factor) [-].

    Returns
    -------
    dict of str to (float, float)
        By volume: the fitted volume [m³] and its ± (95 %) [%] (at least 0.1,
        at most 50; a ``pipes`` factor's scaled by ``ΣV / √(ΣV²)``).
    """
    out: dict[str, tuple[float, float]] = {}
    for f in cal.fitted:
        nodes = f.parameter.nodes
        if not nodes:
            continue
        v = [system.volumes[n].volume_m3 for n in nodes]
        spread = sum(v) / math.sqrt(sum(x * x for x in v))
        pct = min(MAX_PCT, 100.0 * Z95 * f.sd_log * spread)
        for n, x in zip(nodes, v, strict=True):
            out[n] = (x * f.factor, round(max(pct, 0.1), 1))
    return out


def calibrated_text(text: str, file: str, system: FuelSystem, spec: UncertaintySpec,
                    cal: Calibration, trend_files: Sequence[str], when: datetime) -> str:
    """The calibrated ship file's text.

    Parameters
    ----------
    text : str
        The ship file's own text.
    file : str
        The name to give in messages (the file to be written).
    system : FuelSystem
        The system ``text`` describes.
    spec : UncertaintySpec
        Its ``[uncertainty]`` table (± values [%]).
    cal : Calibration
    trend_files : sequence of str
        Named in the first comment.
    when : datetime
        The date in the comments (UTC).

    Returns
    -------
    str
        The new text, parsed back with the ship loader and the uncertainty
        reader. CalibrationError when a fitted volume is not written as its own
        ``[volumes.NAME]`` table, or the result would not load.
    """
    lines = text.splitlines()
    new = fitted_volumes(system, cal)
    for name, (volume, _) in new.items():
        where = _section(lines, re.compile(rf"^\s*\[\s*volumes\.\"?{re.escape(name)}\"?\s*\]"))
        if where is None:
            raise CalibrationError(f"{file}: volume {name!r} is not written as its own "
                                   f"[volumes.{name}] table; write it so to use --write")
        start, end = where
        _comment_out(lines, start, end, _VOLUME_KEYS, "before calibration")
        lines.insert(start + 1, f"volume_m3 = {volume:.6g}   # calibrated, {when:%Y-%m-%d}")
    each = {**spec.volume_pct_by_name, **{n: pct for n, (_, pct) in new.items()}}
    pct_text = ", ".join([f"default = {spec.volumes_pct:g}"] +
                         [f"{n} = {p:g}" for n, p in each.items()])
    add = [f"volumes_pct = {{ {pct_text} }}   # from the calibration's 95 % intervals"]
    keys = "volumes_pct"
    stirred = [n for n, v in system.volumes.items() if isinstance(v, Stirred)]
    if stirred and all(n in new for n in stirred):
        add += ["mixing_stagnant = 0.0   # in the fitted effective volumes",
                "mixing_bypass = 0.0     # in the fitted effective volumes"]
        keys += "|mixing_stagnant|mixing_bypass"
    where = _section(lines, re.compile(r"^\s*\[\s*uncertainty\s*\]"))
    if where is None:
        lines += ["", "[uncertainty]"] + add
    else:
        start, end = where
        _comment_out(lines, start, end, re.compile(rf"^\s*({keys})\s*="), "before calibration")
        lines[start + 1:start + 1] = add
    consumption = [f for f in cal.fitted if f.parameter.name == CONSUMPTION]
    head = [f"# Calibrated by `changeover calibrate` on {when:%Y-%m-%d %H:%M}Z from "
            f"{', '.join(trend_files)} (advisory: a change to the changeover procedure "
            "follows the ship's safety management system).",
            "# Fitted: " + "; ".join(
                f"{f.parameter.name} ×{f.factor:.3f} (95 % ×{f.factor_low:.3f} to "
                f"×{f.factor_high:.3f})" for f in cal.fitted) + "."]
    if consumption:
        head.append(f"# Consumption factor ×{consumption[0].factor:.3f} on the trend's day: "
                    "reported only, not written.")
    out = "\n".join(head + lines) + "\n"
    try:
        data = tomllib.loads(out)
        system2 = parse_ship(data, file)
        parse_uncertainty(data.get("uncertainty"), file, system2)
    except (tomllib.TOMLDecodeError, ValueError) as e:
        raise CalibrationError(f"{file}: the calibrated file would not load back ({e})") from None
    return out
