"""``changeover plan`` with a scrubber's load range typed as a fraction, end to end.

A copy of the scrubber sample (``areas_sample``, fictional) with ``max_load_pct = 1.1``
(meant 110 %): the plan is made (exit 0) and says, in the text and the JSON, that the value
looks like a fraction (the ship file's key, the value, what is expected) and that the
scrubber is relied on nowhere because of its load range: the main engine at 85 % MCR at
14 kn (its reference point) is above 1.1 % on every leg. Before, it only printed "No
scrubber event: the plan relies on no scrubber on this voyage."
"""

from __future__ import annotations

import json
import shutil

import pytest

from tests.cli.test_scrubber_load_journal import run
from tests.helpers.paths import ROOT

FRACTION = "scrubbers.egcs.max_load_pct = 1.1 % MCR looks like a fraction of MCR; expected " \
           "per cent of MCR, such as 110 (max_load_pct = 110 for 1.1 × MCR)"


@pytest.fixture(scope="module")
def fraction(tmp_path_factory) -> dict:
    d = tmp_path_factory.mktemp("fraction")
    shutil.copytree(ROOT / "areas_sample", d, dirs_exist_ok=True)
    ship = d / "ship_egcs.toml"
    text = ship.read_text(encoding="utf-8")
    assert "max_load_pct = 110.0" in text
    ship.write_text(text.replace("max_load_pct = 110.0", "max_load_pct = 1.1"),
                    encoding="utf-8")
    out = {}
    for key, args in (("json", ["--json"]), ("text", [])):
        r = run(d, "plan", "egcs_voyage.toml", *args, env=_wide())
        assert r.returncode == 0, r.stderr
        out[key] = r.stdout
    return out


def _wide() -> dict:
    import os

    return {**os.environ, "COLUMNS": "2000"}


def _flat(text: str) -> str:
    return " ".join(text.split())


def test_the_json_warns_and_says_why_the_scrubber_is_not_relied_on(fraction):
    doc = json.loads(fraction["json"])
    assert any(FRACTION in w for w in doc["warnings"])
    assert doc["scrubber_events"] == [] and doc["scrubber_spans"] == []
    why = doc["scrubbers"][0]["not_relied_on"]
    assert why.startswith("the engines it serves run outside its load range 0-1.1 % MCR on "
                          "every leg sailed (main_engine load 85.0 % MCR at 14.0 kn")


def test_the_text_warns_and_says_why_the_scrubber_is_not_relied_on(fraction):
    text = _flat(fraction["text"])
    assert "Warning: " in text and FRACTION in text
    assert ("No scrubber event: the plan relies on no scrubber on this voyage. Scrubber egcs "
            "is not relied on: the engines it serves run outside its load range 0-1.1 % MCR "
            "on every leg sailed") in text


def test_the_sample_gives_no_reason_and_no_fraction_warning():
    r = run(ROOT, "plan", "areas_sample/egcs_voyage.toml", "--json")
    assert r.returncode == 0, r.stderr
    doc = json.loads(r.stdout)
    assert doc["scrubbers"][0]["not_relied_on"] is None
    assert not any("looks like a fraction" in w for w in doc["warnings"])
