"""Positions, sailings on the WGS84 ellipsoid, routes, control areas and crossings.

Knows nothing of fuel: :mod:`planner` builds on it, never the other way.
"""
