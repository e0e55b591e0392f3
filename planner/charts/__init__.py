"""PNG charts (matplotlib, imported lazily by the command line only)."""
