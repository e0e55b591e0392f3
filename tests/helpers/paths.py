"""Where the repository and the test data are, for every test module."""

from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
"""The repository's root (holds ``areas_sample/`` and ``pyproject.toml``)."""

DATA = ROOT / "tests" / "data"
"""The test fixtures: ``areas/``, ``journal/``, ``routes/``, ``ships/``, ``voyages/``."""
