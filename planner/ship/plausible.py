"""Accepted and usual ranges of the ship file's numbers, each with its source.

A number outside its *accepted* range is refused (it cannot describe a ship:
``1e308`` kW, a ``1e-300`` m³ volume); a number inside it but outside its
*usual* range is taken and warned about (``bore_mm = 0.065``, a bore written
in metres; an 800 m³ mixing tank). The accepted ranges are typo guards, wide
on purpose; the usual ranges are what merchant ships have, from memory or
common practice as marked, and a warning is only a request to check the
figure.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Plausible:
    """The accepted and usual range of one ship-file number.

    Attributes
    ----------
    low, high : float
        Accepted range (inclusive); outside it the value is refused.
    usual_low, usual_high : float
        Usual range (inclusive); outside it the value is taken with a warning.
    unit : str
        Unit shown in the messages.
    hint : str
        What an unusual value may be (shown in the warning), and the source.
    low_open : bool
        True when ``low`` itself is refused (the value must be above it).
    """

    low: float
    high: float
    usual_low: float
    usual_high: float
    unit: str
    hint: str = ""
    low_open: bool = False

    def __post_init__(self) -> None:
        if not self.low <= self.usual_low <= self.usual_high <= self.high:
            raise ValueError(f"ranges must nest: {self}")

    def accepts(self, x: float) -> bool:
        """Whether ``x`` is in the accepted range."""
        above = x > self.low if self.low_open else x >= self.low
        return above and x <= self.high

    def usual(self, x: float) -> bool:
        """Whether ``x`` is in the usual range."""
        return self.usual_low <= x <= self.usual_high

    def expected(self) -> str:
        """The accepted range as the message's ``expected`` text."""
        low = f"above {self.low:g}" if self.low_open else f"from {self.low:g}"
        return f"a number {low} to {self.high:g} {self.unit}"


_TYPO = "a typo guard, not a limit of any ship"

TANK_CAPACITY = Plausible(0.0, 1e5, 0.1, 5000.0, "m³", low_open=True,
                          hint="fuel tanks of merchant ships hold up to a few thousand m³, "
                               "from memory")
TANK_VOLUME = Plausible(0.0, 1e5, 0.0, 5000.0, "m³", hint=TANK_CAPACITY.hint)
STIRRED_VOLUME = Plausible(1e-9, 1e4, 1e-3, 10.0, "m³",
                           hint="mixing tanks, heaters and filters hold litres to a few m³, "
                                "common practice")
PIPE_VOLUME = Plausible(1e-9, 1e4, 1e-4, 10.0, "m³",
                        hint="a fuel line holds litres to a few m³, common practice")
PIPE_LENGTH = Plausible(0.0, 1e4, 0.5, 500.0, "m", low_open=True,
                        hint="engine-room fuel lines are metres to a few hundred metres long, "
                             "common practice")
PIPE_BORE = Plausible(0.0, 5000.0, 6.0, 600.0, "mm", low_open=True,
                      hint="fuel lines are DN 6 to a few hundred mm, common practice; "
                           "was it written in metres?")
FLOW_RATE = Plausible(0.0, 1e4, 0.0, 300.0, "m³/h",
                      hint="fuel pumps deliver up to a few hundred m³/h, common practice")
LOOP_FACTOR = Plausible(0.0, 100.0, 1.0, 10.0, "× consumption", low_open=True,
                        hint="booster loops circulate about 2-5 times the consumption, "
                             "common practice")
LINK_FACTOR = Plausible(0.0, 100.0, 0.0, 100.0, "× consumption", low_open=True, hint=_TYPO)
MCR = Plausible(0.0, 2e5, 300.0, 9e4, "kW", low_open=True,
                hint="the largest two-stroke engines are about 80 MW, from memory")
POWER = Plausible(0.0, 1e5, 0.0, 2e4, "kW",
                  hint="generator sets of merchant ships are up to a few MW, from memory")
SFOC = Plausible(50.0, 1000.0, 150.0, 300.0, "g/kWh",
                 hint="diesel engines burn about 160-230 g/kWh at ISO conditions, from memory")
SPEED = Plausible(0.0, 60.0, 3.0, 35.0, "kn", low_open=True,
                  hint="merchant ships sail at about 5-30 kn, common practice")
BOILER_RATE = Plausible(0.0, 100.0, 0.0, 10.0, "t/h",
                        hint="auxiliary boilers burn up to a few t/h, from memory")
VISCOSITY = Plausible(0.0, 1000.0, 1.0, 50.0, "cSt", low_open=True,
                      hint="inlet limits are about 2-30 cSt, from memory")
RATE_C_PER_MIN = Plausible(0.0, 60.0, 0.1, 10.0, "°C/min", low_open=True,
                           hint="about 2 °C/min at an engine inlet, [TC-SSB-04-2015]")
TEMPERATURE = Plausible(-20.0, 250.0, 0.0, 160.0, "°C",
                        hint="fuel is heated to at most about 150 °C, [ENGINE-GUIDANCE]")
SCRUBBER_SULPHUR = Plausible(0.0, 4.5, 1.0, 3.5, "% m/m", low_open=True,
                             hint="scrubbers are usually approved for fuels up to 3.50 % m/m, "
                                  "common practice; above 4.50 % no fuel may be burnt, "
                                  "[MARPOL-VI]")
SCRUBBER_LOAD = Plausible(0.0, 110.0, 0.0, 110.0, "% MCR",
                          hint="the load range the EGCS approval states, " + _TYPO)
