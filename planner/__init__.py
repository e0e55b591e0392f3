"""Fuel changeover planning under MARPOL Annex VI regulation 14, built on :mod:`geo`."""
