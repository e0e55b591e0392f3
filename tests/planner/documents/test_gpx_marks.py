"""``changeover plan VOYAGE --gpx OUT.gpx``: the plan's marks as GPX 1.1 waypoints.

Parsed back with defusedxml and checked against the GPX 1.1 schema's element
names and order ([GPX-11], from memory: the schema is not fetched here) and the
plan's ``--json`` document: every changeover's start and compliant (or
complete) point per circuit, every boundary crossing, numbered as the plan,
with its UTC time; positions equal to the JSON's to 1e-7° (the file's
precision), longitudes in [−180, 180).
"""

from __future__ import annotations

import json

import defusedxml.ElementTree as DET
import pytest

from tests.helpers.cli import changeover_ok as run

NS = "{http://www.topografix.com/GPX/1/1}"
# [GPX-11] [M]: the children of gpx and of wptType, in schema order
GPX_CHILDREN = ["metadata", "wpt", "rte", "trk", "extensions"]
WPT_CHILDREN = ["ele", "time", "magvar", "geoidheight", "name", "cmt", "desc", "src", "link",
                "sym", "type", "fix", "sat", "hdop", "vdop", "pdop", "ageofdgpsdata", "dgpsid",
                "extensions"]
META_CHILDREN = ["name", "desc", "author", "copyright", "link", "time", "keywords", "bounds",
                 "extensions"]




@pytest.fixture(scope="module")
def marks(tmp_path_factory):
    out = tmp_path_factory.mktemp("gpx") / "marks.gpx"
    r = run("plan", "areas_sample/voyage.toml", "--gpx", str(out))
    assert f"wrote {out}" in r.stdout
    doc = json.loads(run("plan", "areas_sample/voyage.toml", "--json").stdout)
    crossings = json.loads(run("route", "areas_sample/aldmere_to_skarvik.csv", "--areas",
                               "areas_sample", "--depart", "2027-05-30T06:00+12:00",
                               "--json").stdout)["crossings"]
    return DET.parse(out).getroot(), doc, crossings


def in_order(names: list[str], schema: list[str]) -> bool:
    idx = [schema.index(n) for n in names]
    return idx == sorted(idx)


def local(tag: str) -> str:
    assert tag.startswith(NS), tag
    return tag[len(NS):]


def test_schema_names_and_order(marks):
    root, _, _ = marks
    assert local(root.tag) == "gpx" and root.get("version") == "1.1" and root.get("creator")
    kids = [local(c.tag) for c in root]
    assert set(kids) <= set(GPX_CHILDREN) and in_order(kids, GPX_CHILDREN)
    meta = [local(c.tag) for c in root.find(f"{NS}metadata")]
    assert set(meta) <= set(META_CHILDREN) and in_order(meta, META_CHILDREN)
    for w in root.findall(f"{NS}wpt"):
        assert set(w.keys()) == {"lat", "lon"}
        assert -90 <= float(w.get("lat")) <= 90 and -180 <= float(w.get("lon")) < 180
        names = [local(c.tag) for c in w]
        assert set(names) <= set(WPT_CHILDREN) and in_order(names, WPT_CHILDREN)
        assert w.find(f"{NS}time").text.endswith("Z")


def test_every_mark_of_the_plan(marks):
    root, doc, crossings = marks
    wpts = {w.find(f"{NS}name").text: w for w in root.findall(f"{NS}wpt")}
    rows = doc["changeovers"]
    for r in rows:
        n, c = r["number"], r["circuit"]
        start = wpts[f"CO{n} {c} start"]
        assert start.find(f"{NS}time").text == r["start_utc"]
        assert abs(float(start.get("lat")) - r["start_lat"]) < 1e-7
        lon = (r["start_lon"] + 180) % 360 - 180
        assert abs(float(start.get("lon")) - lon) < 1e-7
        key = "compliant" if r["direction"] == "to_compliant" else "complete"
        assert wpts[f"CO{n} {c} {key}"].find(f"{NS}time").text == r[f"{key}_utc"]
        b = wpts[f"CO{n} boundary"]
        assert b.find(f"{NS}time").text == r["boundary_utc"]
    # every crossing is a mark: the numbered ones above, the others by event and area
    numbered = {r["number"] for r in rows}
    boundary = [w for w in root.findall(f"{NS}wpt") if w.find(f"{NS}type").text == "boundary"]
    assert len(boundary) == len(crossings)
    assert sum(1 for w in boundary if w.find(f"{NS}name").text.startswith("CO")) == len(numbered)
    assert len(wpts) == 2 * len(rows) + len(crossings)  # names are unique
