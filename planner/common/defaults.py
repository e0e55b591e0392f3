"""Planning defaults shared by the voyage file, the procedure and the commands.

One definition each, so a command-line default, a ship-file default and the
printed procedure can never disagree.
"""

from __future__ import annotations

DEFAULT_LIMIT_PCT = 0.10
"""Sulphur limit in an emission control area from 2015-01-01 [% m/m] ([MARPOL-VI] reg. 14)."""

DEFAULT_TARGET_FRACTION = 0.9
"""Flush to this fraction of the limit [-]: the planning margin on sulphur (common practice)."""

DEFAULT_MARGIN_H = 1.0
"""Be compliant this long before the boundary [h] (common practice)."""

SERVICE_ENDURANCE_H = 8.0
"""A service tank holds at least 8 h at MCR ([SOLAS-1974] II-1/26.11 [P]); one at the valve
that runs dry sooner at the planned draw must be refilled by transfer while the changeover
is watched, so the plan warns (a later dry time is the ordinary transfer routine) [h]."""

MIN_CONFIDENCE = 0.5
"""Lowest confidence a Monte Carlo start may be asked for [-] (below it is not a margin)."""

MAX_CONFIDENCE = 0.9999
"""Highest confidence [-]: beyond it the Monte Carlo tail has too few samples to mean much."""

MIN_SAMPLES = 100
"""Fewest Monte Carlo samples per changeover [-]."""

MAX_SAMPLES = 1_000_000
"""Most Monte Carlo samples per changeover [-] (memory: a few arrays of this length)."""
