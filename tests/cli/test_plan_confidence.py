"""``changeover plan --confidence``: the plan's JSON gains the confidence and P50/confidence
starts, and zero spread would give the deterministic start (checked in the uncertainty tests)."""

from __future__ import annotations

import json
import subprocess
import sys
from datetime import datetime

from tests.helpers.paths import ROOT


def _t(s: str) -> datetime:
    return datetime.fromisoformat(s.replace("Z", "+00:00"))


def test_plan_with_confidence_reports_p50_and_confidence_starts():
    r = subprocess.run([sys.executable, "-m", "planner", "plan", "areas_sample/voyage.toml",
                        "--json", "--confidence", "0.95", "--samples", "500", "--seed", "3"],
                       cwd=ROOT, capture_output=True, text=True, timeout=300)
    assert r.returncode == 0, r.stderr
    doc = json.loads(r.stdout)
    assert doc["uncertainty"]["confidence"] == 0.95
    assert doc["uncertainty"]["seed"] == 3 and doc["uncertainty"]["samples"] == 500
    rows = [c for c in doc["changeovers"] if c["direction"] == "to_compliant"]
    assert rows and all("start_p50_utc" in c for c in rows)
    for c in rows:
        # a higher confidence never starts later than the median (it needs more lead)
        if c["start_confidence_utc"] is not None:
            assert _t(c["start_confidence_utc"]) <= _t(c["start_p50_utc"])
        assert c["lead_confidence_h"] >= c["lead_p50_h"] - 1e-9


def test_bad_confidence_is_refused():
    r = subprocess.run([sys.executable, "-m", "planner", "plan", "areas_sample/voyage.toml",
                        "--confidence", "1.5"], cwd=ROOT, capture_output=True, text=True,
                       timeout=120)
    assert r.returncode == 2 and "--confidence" in r.stderr
    assert len(r.stderr.strip().splitlines()) == 1
