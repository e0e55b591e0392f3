"""``flush --from mgo --to vlsfo``: a switch back says when it is back on regular fuel.

A switch back has no limit to reach ("To limit: not reached" read like
non-compliance). The rule is the plan's: complete when every inlet is within
5 % of the fuels' sulphur difference from the regular fuel (common practice;
planner.voyage.changeovers). Hand value from areas_sample/voyage.toml: vlsfo
0.45 % m/m, mgo 0.08 % m/m, so the level is 0.45 − 0.05 × (0.45 − 0.08) =
0.4315 % m/m. At the voyage's speed the plan's own switch back of the same
circuit must take the same time.
"""

from __future__ import annotations

import json

from tests.helpers.cli import changeover_ok as run

ARGS = ["flush", "areas_sample/voyage.toml", "--from", "mgo", "--to", "vlsfo"]




def test_switch_back_reports_back_on_regular():
    doc = json.loads(run(*ARGS, "--json").stdout)
    plan = json.loads(run("plan", "areas_sample/voyage.toml", "--json").stdout)
    text = run(*ARGS).stdout
    assert "not reached" not in text
    for c in doc["circuits"]:
        assert c["direction"] == "to_regular"
        assert abs(c["back_on_regular_pct"] - 0.4315) < 1e-12
        assert c["back_on_regular_h"] > c["time_to_limit_h"] > 0
        assert f"back on vlsfo: all inlets ≥ {c['back_on_regular_pct']:.3f} %" in text
        h = c["back_on_regular_h"]
        assert f"{h:.2f} h ({h * 60:.0f} min)" in text
        back = next(r for r in plan["changeovers"]
                    if r["direction"] == "to_regular" and r["circuit"] == c["name"])
        assert abs(back["duration_h"] - h) < 2 / 60  # the plan's switch back, within 2 min
