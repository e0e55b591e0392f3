"""Each consumer's own inlet limits and heating rule, with documented defaults per kind.

A two-stroke main engine, a four-stroke generator engine and a boiler burner
do not ask the same of the fuel at their inlet, so each consumer gets its own
:class:`planner.ship.thermal.InletWindow`, built in three layers (a later
layer replaces single keys of the earlier one):

1. the default of its kind (:data:`KIND_DEFAULTS`, below, each value with its
   source);
2. the ship file's ``[inlet]`` table, if any (keys for every consumer: how a
   ship file written before per-consumer limits keeps its meaning);
3. the consumer's own ``inlet = { ... }`` table in ``[consumers.NAME]``.

Defaults by kind (°C, cSt, °C/min):

==================  ======  =====  =====  ====  ======  ========
kind                target  min    max    rate  supply  max temp
==================  ======  =====  =====  ====  ======  ========
two-stroke engine   13      2.0    20     2     40      150
four-stroke engine  14      2.0    20     2     40      150
boiler burner       15      1.0    30     10    40      140
==================  ======  =====  =====  ====  ======  ========

- two-stroke main engine: residual fuel heated to about 13-17 cSt at the
  injectors, at least 2 cSt on distillate ([ENGINE-GUIDANCE] [P], the engine
  makers' published guidance on 0.10 % S fuels); at most 20 cSt (common
  practice); at most about 2 °C/min against thermal shock to the injection
  pumps ([TC-SSB-04-2015] [S]); heaters up to about 150 °C
  ([ENGINE-GUIDANCE] [S]).
- four-stroke engine (the generators): residual fuel at about 12-18 cSt at the
  inlet, 14 cSt taken; at least 2 cSt on distillate ([FOUR-STROKE-GUIDANCE]
  [M], from memory: the same figure as the two-stroke guidance is usual in
  four-stroke makers' instructions, some ask for more);
  20 cSt maximum and 2 °C/min (common practice, [TC-SSB-04-2015] [S]: the
  injection pumps are of the same kind).
- boiler burner (pressure-jet or rotary-cup atomiser): residual fuel at about
  12-20 cSt at the burner, 15 cSt taken, and up to about 30 cSt still
  atomised ([BURNER-GUIDANCE] [M], from memory; rotary cups tolerate more);
  at least 1 cSt on distillate (from memory: burner fuel pumps are rated for
  light distillates down to about 1 cSt, [BURNER-GUIDANCE] [M]); no plunger pumps with
  close clearances, so no thermal-shock rule: the burner heater follows its
  viscosity controller, taken at 10 °C/min (common practice, engineering
  judgement: a small heater with a fast controller); heated to at most about
  140 °C (from memory: burner heaters are rated below engine heaters).

Every value above is a default: the engine maker's and the burner maker's
instructions for the ship come first, and the ship file says so.
"""

from __future__ import annotations

from collections.abc import Mapping

from planner.ship.consumers import Consumer
from planner.ship.thermal import InletWindow

TWO_STROKE = InletWindow(target_cst=13.0, min_cst=2.0, max_cst=20.0, max_rate_c_per_min=2.0,
                         supply_temperature_c=40.0, max_temperature_c=150.0)
"""Two-stroke main engine ([ENGINE-GUIDANCE] [P], [TC-SSB-04-2015] [S], common practice)."""

FOUR_STROKE = InletWindow(target_cst=14.0, min_cst=2.0, max_cst=20.0, max_rate_c_per_min=2.0,
                          supply_temperature_c=40.0, max_temperature_c=150.0)
"""Four-stroke engine ([FOUR-STROKE-GUIDANCE] [M]; 20 cSt and 2 °C/min common practice)."""

BOILER_BURNER = InletWindow(target_cst=15.0, min_cst=1.0, max_cst=30.0, max_rate_c_per_min=10.0,
                            supply_temperature_c=40.0, max_temperature_c=140.0)
"""Boiler burner ([BURNER-GUIDANCE] [M], from memory; 10 °C/min common practice)."""

KIND_DEFAULTS: Mapping[str, InletWindow] = {
    "main_engine": TWO_STROKE,
    "generator": FOUR_STROKE,
    "boiler": BOILER_BURNER,
}
"""The default window of each consumer kind (the ship file's ``kind`` word)."""

KIND_WORDS: Mapping[str, str] = {
    "main_engine": "two-stroke main engine",
    "generator": "four-stroke engine",
    "boiler": "boiler burner",
}
"""What each consumer kind's defaults describe, for documents."""

WINDOW_KEYS = ("target_cst", "min_cst", "max_cst", "max_rate_c_per_min", "supply_temperature_c",
               "max_temperature_c")
"""The keys of an ``[inlet]`` table (the fields of :class:`InletWindow`)."""


def consumer_window(consumer: Consumer, ship_wide: Mapping[str, float] | None = None,
                    own: Mapping[str, float] | None = None) -> InletWindow:
    """The inlet window of one consumer: its kind's default, then the ship-wide keys, then its own.

    Parameters
    ----------
    consumer : MainEngine, Generator or Boiler
        The consumer (its ``kind`` picks the default).
    ship_wide : mapping of str to float, optional [cSt, °C, °C/min as named]
        The ship file's ``[inlet]`` keys (°C, cSt, °C/min as named).
    own : mapping of str to float, optional [cSt, °C, °C/min as named]
        The consumer's own ``inlet`` keys.

    Returns
    -------
    InletWindow
        Checked on creation (ValueError when the keys together make no window).

    Notes
    -----
    Defaults and sources in the module notes: [ENGINE-GUIDANCE], [TC-SSB-04-2015],
    from memory and common practice as marked.

    Examples
    --------
    >>> from planner.ship.consumers import Boiler
    >>> w = consumer_window(Boiler(name="aux", fuel_t_h=0.3), {"min_cst": 2.0})
    >>> w.min_cst, w.max_cst, w.max_rate_c_per_min
    (2.0, 30.0, 10.0)
    """
    base = KIND_DEFAULTS[consumer.kind]
    values = {k: getattr(base, k) for k in WINDOW_KEYS}
    values.update(ship_wide or {})
    values.update(own or {})
    return InletWindow(**values)
