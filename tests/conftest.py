"""Shared markers for the whole suite.

Outside references that are programs rather than Python packages are marked,
and a test so marked is skipped, with the reason, when the program is absent:

- ``requires_rhumbsolve``: GeographicLib's ``RhumbSolve`` [KARNEY-RHUMB]
  (Debian package ``geographiclib-tools``);
- ``requires_geodsolve``: GeographicLib's ``GeodSolve`` [KARNEY-2013] (same package);
- ``requires_poppler``: ``pdftotext`` and ``pdftoppm`` (Debian ``poppler-utils``)
  to read back and rasterise the PDFs.

CI (``.ci/run``) installs both packages, so nothing is skipped there.
"""

from __future__ import annotations

import shutil

import pytest

PROGRAMS = {
    "requires_rhumbsolve": ("RhumbSolve",),
    "requires_geodsolve": ("GeodSolve",),
    "requires_poppler": ("pdftotext", "pdftoppm"),
}


def pytest_configure(config: pytest.Config) -> None:
    for marker, programs in PROGRAMS.items():
        config.addinivalue_line("markers", f"{marker}: needs {' and '.join(programs)} on PATH")


def pytest_collection_modifyitems(config: pytest.Config, items: list[pytest.Item]) -> None:
    for item in items:
        for marker, programs in PROGRAMS.items():
            if item.get_closest_marker(marker) is None:
                continue
            missing = [p for p in programs if shutil.which(p) is None]
            if missing:
                item.add_marker(pytest.mark.skip(reason=f"{', '.join(missing)} not installed"))
