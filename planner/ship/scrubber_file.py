"""The ship file's ``[scrubbers.NAME]`` tables: the exhaust gas cleaning systems.

Keys of one table (the README's "Scrubbers" gives an example)::

    [scrubbers.egcs]
    consumers = ["main_engine", "dg1", "dg2"]   # required: whose exhaust it cleans
    mode = "hybrid"                             # required: "open" | "closed" | "hybrid"
    max_sulphur_pct = 3.50                      # required: the highest fuel sulphur approved
    min_load_pct = 25.0                         # optional, % MCR (default 0)
    max_load_pct = 100.0                        # optional, % MCR (default 110)
    approval = "EGCS certificate ..."           # optional text
    note = "..."                                # optional text

Every fault is one :class:`geo.errors.InputError` naming the file and the key
``scrubbers.NAME.key``: an unknown key (nearest key suggested), a wrong type, a
consumer the ship file lacks, a consumer served by two scrubbers, a mode word
not in :data:`planner.ship.scrubbers.MODE_WORDS`, ``max_sulphur_pct`` outside
(0, 4.50] % m/m (the highest sulphur any fuel may have, [MARPOL-VI]), a load
outside 0-110 % MCR, ``min_load_pct`` not below ``max_load_pct``. A circuit
some but not all of whose consumers a scrubber serves gets a warning: a circuit
carries one fuel, so it cannot burn high-sulphur fuel on the scrubber. So does
a load range end above 0 and at most :data:`FRACTION_LOAD_PCT` (``max_load_pct =
1.1`` meant as 110 %): it is taken as written, and so would leave the scrubber
out of the plan on every leg, or rely on it at loads its approval does not cover.
"""

from __future__ import annotations

from collections.abc import Mapping

from planner.ship import plausible as pl
from planner.ship._reader import Reader
from planner.ship.components import Circuit
from planner.ship.consumers import Consumer
from planner.ship.scrubbers import MODE_WORDS, Scrubber

SCRUBBER_KEYS = ("consumers", "mode", "max_sulphur_pct", "min_load_pct", "max_load_pct",
                 "approval", "note")
"""The keys a ``[scrubbers.NAME]`` table may hold."""

FRACTION_LOAD_PCT = 1.5
"""A load range end above 0 and at most this [% MCR] looks like a fraction of MCR written
for a percentage (1.1 for 110 %, 0.25 for 25 %): taken, with an ``unusual_input`` warning.
No engine is approved for scrubber operation at 1.5 % MCR or less, from memory (a
typo guard, not a limit of any scrubber)."""


def parse_scrubbers(r: Reader, group: object, consumers: Mapping[str, Consumer]
                    ) -> dict[str, Scrubber]:
    """The scrubbers of the ship file's ``[scrubbers]`` table, checked.

    Parameters
    ----------
    r : Reader
        The ship file's reader (its file name for the messages, its warnings).
    group : object
        The ``scrubbers`` table as parsed (None: the ship has none).
    consumers : mapping of str to Consumer
        The ship file's consumers, by name.

    Returns
    -------
    dict of str to Scrubber
        By name, in file order (empty when there is no ``[scrubbers]`` table).

    Raises
    ------
    geo.errors.InputError
        On any fault, naming ``scrubbers.NAME.key``.
    """
    if group is None:
        return {}
    if not isinstance(group, dict):
        raise r.fail("scrubbers", group, "a table of [scrubbers.NAME] tables")
    out: dict[str, Scrubber] = {}
    served_by: dict[str, str] = {}
    for name, t in group.items():
        scrubber = _scrubber(r, str(name), t, consumers)
        for c in scrubber.consumers:
            if c in served_by:
                raise r.fail(f"scrubbers.{name}.consumers", c,
                             f"a consumer no other scrubber serves (scrubbers.{served_by[c]} "
                             "serves it)")
            served_by[c] = scrubber.name
        out[scrubber.name] = scrubber
    return out


def _scrubber(r: Reader, name: str, t: object, consumers: Mapping[str, Consumer]) -> Scrubber:
    place = f"scrubbers.{name}"
    if not isinstance(t, dict):
        raise r.fail(place, t, "a table with consumers, mode and max_sulphur_pct")
    if not name.strip():
        raise r.fail(place, name, "a non-empty scrubber name")
    r.keys(t, SCRUBBER_KEYS, place)
    if "consumers" not in t:
        raise r.fail(f"{place}.consumers", None, "a list of the consumers it serves")
    who = r.names(t, "consumers", place)
    if not who:
        raise r.fail(f"{place}.consumers", who, "a list of at least one consumer")
    for c in who:
        if c not in consumers:
            raise r.fail(f"{place}.consumers", c,
                         f"a consumer of [consumers]: {', '.join(consumers)}")
        if who.count(c) > 1:
            raise r.fail(f"{place}.consumers", c, "each consumer named once")
    mode = t.get("mode")
    if not isinstance(mode, str) or mode not in MODE_WORDS:
        raise r.fail(f"{place}.mode", mode, " | ".join(f'"{w}"' for w in MODE_WORDS))
    sulphur = r.number(t, "max_sulphur_pct", place, plausible=pl.SCRUBBER_SULPHUR)
    low = r.number(t, "min_load_pct", place, required=False, plausible=pl.SCRUBBER_LOAD)
    high = r.number(t, "max_load_pct", place, required=False, plausible=pl.SCRUBBER_LOAD)
    texts = {}
    for key in ("approval", "note"):
        value = t.get(key, "")
        if not isinstance(value, str):
            raise r.fail(f"{place}.{key}", value, "text")
        texts[key] = value.strip()
    typed = {"min_load_pct": low, "max_load_pct": high}
    low = 0.0 if low is None else low
    high = 110.0 if high is None else high
    fractions = [k for k, x in typed.items() if x is not None and _fraction(x)]
    if not low < high:
        hint = "".join(f"; {k} = {typed[k]:g} looks like a fraction of MCR: "
                       f"{_per_cent(k, typed[k])}" for k in fractions)
        raise r.fail(f"{place}.min_load_pct", low,
                     f"a load below max_load_pct ({high:g} % MCR){hint}")
    for key in fractions:
        r.warnings.append(
            f"{r.file}: {place}.{key} = {typed[key]:g} % MCR looks like a fraction of MCR; "
            f"expected {_per_cent(key, typed[key])}; as written, the plan relies on "
            f"scrubber {name} only while the engines it serves run at {low:g}-{high:g} % "
            "MCR; check the ship file.")
    try:
        return Scrubber(name, tuple(who), MODE_WORDS[mode], sulphur,  # type: ignore[arg-type]
                        low, high, **texts)
    except ValueError as e:
        raise r.fail(place, name, f"valid scrubber data ({e})") from None


def _fraction(x: float) -> bool:
    """A load range end that looks like a fraction of MCR (:data:`FRACTION_LOAD_PCT`)."""
    return 0.0 < x <= FRACTION_LOAD_PCT


def _per_cent(key: str, x: float) -> str:
    """What is expected of a load range end ``x`` [% MCR] written as a fraction, in words."""
    return f"per cent of MCR, such as 110 ({key} = {100.0 * x:.4g} for {x:g} × MCR)"


def partial_circuit_warnings(file: str, scrubbers: Mapping[str, Scrubber],
                             circuits: Mapping[str, Circuit]) -> list[str]:
    """One warning per circuit some but not all of whose consumers a scrubber serves.

    Parameters
    ----------
    file : str
        The ship file, for the messages.
    scrubbers : mapping of str to Scrubber
        The ship's scrubbers.
    circuits : mapping of str to Circuit
        The ship's circuits.

    Returns
    -------
    list of str
        One line per such circuit, in circuit order: a circuit carries one fuel, so
        the consumers on it the scrubbers do not serve keep it on compliant fuel.
    """
    out = []
    for circuit in circuits.values():
        by = {c: s.name for s in scrubbers.values() for c in s.consumers
              if c in circuit.consumers}
        rest = [c for c in circuit.consumers if c not in by]
        if not by or not rest:
            continue
        names = sorted(set(by.values()), key=list(scrubbers).index)
        served = [c for c in circuit.consumers if c in by]
        out.append(
            f"{file}: scrubbers.{names[0]}.consumers: {', '.join(names)} serve "
            f"{', '.join(served)} but not {', '.join(rest)} of circuit {circuit.name}; a "
            "circuit carries one fuel, so it cannot burn high-sulphur fuel on the scrubber "
            "(put the unserved consumers on a circuit of their own, or the scrubber "
            "on them); check the ship file.")
    return out
