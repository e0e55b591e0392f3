"""Uncertainty and sensitivity of a changeover: how sure is the start?

Public API:

- :class:`UncertaintySpec`, :func:`load_uncertainty`, :func:`parse_uncertainty`
  (:mod:`~planner.uncertainty.inputs`): the uncertain inputs, their defaults
  and sources, the ship file's ``[uncertainty]`` table;
- :func:`analyse`, :class:`CircuitUncertainty`
  (:mod:`~planner.uncertainty.montecarlo`): the Monte Carlo of one circuit;
- :func:`start_quantiles`, :class:`StartQuantiles`
  (:mod:`~planner.uncertainty.start`): the start leads for the voyage plan;
- :func:`uncertainty_json` (:mod:`~planner.uncertainty.report`): the JSON of it.

Method and what is exact or approximated: :mod:`~planner.uncertainty.model`
and :mod:`~planner.uncertainty.surrogate`.
"""

from planner.uncertainty.inputs import UncertaintySpec, load_uncertainty, parse_uncertainty
from planner.uncertainty.model import UncertaintyError
from planner.uncertainty.montecarlo import CircuitUncertainty, analyse
from planner.uncertainty.report import uncertainty_json
from planner.uncertainty.start import StartQuantiles, start_quantiles

__all__ = [
    "CircuitUncertainty",
    "StartQuantiles",
    "UncertaintyError",
    "UncertaintySpec",
    "analyse",
    "load_uncertainty",
    "parse_uncertainty",
    "start_quantiles",
    "uncertainty_json",
]
