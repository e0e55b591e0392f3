"""Calibration: fit the ship file's flushing parameters to logged inlet trends.

Public API:

- :func:`read_trend`, :class:`Trend`, :class:`TrendColumns`
  (:mod:`~planner.calibration.trend`): the monitoring system's CSV export;
- :func:`share_of_b` (:mod:`~planner.calibration.blend`): a viscosity reading at
  its temperature as the new fuel's share ([ASTM-D341], [MAPLES-2000]);
- :func:`parameters`, :class:`Changeover` (:mod:`~planner.calibration.model`):
  what is fitted and the modelled blend;
- :func:`calibrate`, :class:`Calibration`, :class:`CalibrationError`
  (:mod:`~planner.calibration.fit`): the least-squares fit ([SCIPY-LSQ]) and its
  intervals ([BATES-WATTS-1988]);
- :func:`time_to_target` (:mod:`~planner.calibration.target`);
- :func:`calibrated_text` (:mod:`~planner.calibration.shipfile`): the new ship file.
"""

from planner.calibration.blend import BlendError, share_of_b
from planner.calibration.fit import Calibration, CalibrationError, Fitted, calibrate
from planner.calibration.model import Changeover, Parameter, parameters, prior_sd
from planner.calibration.shipfile import calibrated_text
from planner.calibration.target import TimeToTarget, time_to_target
from planner.calibration.trend import Trend, TrendColumns, read_trend

__all__ = [
    "BlendError",
    "Calibration",
    "CalibrationError",
    "Changeover",
    "Fitted",
    "Parameter",
    "TimeToTarget",
    "Trend",
    "TrendColumns",
    "calibrate",
    "calibrated_text",
    "parameters",
    "prior_sd",
    "read_trend",
    "share_of_b",
    "time_to_target",
]
