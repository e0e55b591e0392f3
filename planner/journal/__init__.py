"""The ship's changeover journal: append-only, hash-chained, in one SQLite file per ship.

Modules, one concept each:

- :mod:`.entries`, :mod:`.details`: the entry dataclasses (frozen, checked on creation);
- :mod:`.canonical`: canonical JSON and the hash rule; :mod:`.codec`: entries to JSON and back;
- :mod:`.schema`: the versioned SQLite schema, triggers and migrations;
- :mod:`.store`: :class:`~planner.journal.store.Journal`, create / open / append / read / verify;
- :mod:`.verify`: the chain check that names every edited, removed or moved entry;
- :mod:`.state`: the journal as it stands (ship, tanks, fuels, corrections);
- :mod:`.checks`: the refusals checked inside each append;
- :mod:`.inputs`, :mod:`.compose`, :mod:`.plan_link`: entries from what the crew typed,
  prefilled from a plan;
- :mod:`.book`: the record grouped for printing; :mod:`.export`: CSV and JSON.

Nothing here imports rich or reportlab.
"""

from planner.journal.store import Journal

__all__ = ["Journal"]
