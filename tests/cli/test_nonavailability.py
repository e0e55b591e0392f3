"""``changeover nonavailability`` and the plan's shortfall block end to end, as a user runs
them, on fictional voyages short of mgo (``tests/data/voyages/sample_short_mgo.toml``: the
sample voyage with 40 m³ less mgo; ``short_mgo_t1.toml``).

The report is read back with poppler's ``pdftotext`` (every item of regulation 18.2 and
the report template of [MEPC-320] that the command fills, from memory, and every labelled
blank line); the journal entry is read back through the journal's own read API. Bad input
is one line on standard error, exit 2, and nothing written.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from planner.documents.nonavailability_pdf import BLANKS, SECTIONS, TITLE
from tests.helpers.cli import changeover, changeover_ok
from tests.helpers.paths import ROOT

VOYAGES = ROOT / "tests" / "data" / "voyages"
SIGNER = {"CHANGEOVER_RANK": "Master", "CHANGEOVER_NAME": "A. Tester (fictional)"}


def flat(text: str) -> str:
    return " ".join(text.split())


@pytest.fixture(scope="module")
def report(tmp_path_factory):
    """The sample short of mgo, with a journal holding a sounding of the mgo tanks."""
    import os

    d = tmp_path_factory.mktemp("nonavail")
    j, pdf = d / "kb.sqlite", d / "report.pdf"
    old = {k: os.environ.get(k) for k in SIGNER}
    os.environ.update(SIGNER)
    try:
        changeover_ok("log", "init", "--ship-file", "areas_sample/ship.toml", "-j", str(j),
                      "--tz", "+12:00")
        changeover_ok("log", "tanks", "-j", str(j), "--tank", "mgo_service=26@30",
                      "--tank", "mgo_storage=70@25", "--fuel", "mgo")
        r = changeover_ok("nonavailability", str(VOYAGES / "sample_short_mgo.toml"), "--pdf",
                          str(pdf), "--journal", str(j), "--json")
    finally:
        for k, v in old.items():
            if v is None:
                os.environ.pop(k, None)
            else:
                os.environ[k] = v
    return json.loads(r.stdout), pdf, j


def test_json_holds_the_facts(report):
    facts, pdf, _ = report
    assert set(facts) >= {"ship", "voyage_plan", "fuel", "shortfall", "purchase_attempts",
                          "next_port", "actions", "journal", "journal_entry", "pdf"}
    assert facts["ship"] == {"name": "MV Kestrel Bay", "imo": "9999993", "flag": None}
    v = facts["voyage_plan"]
    assert v["departure_port"] == "Port Aldmere" and v["arrival_port"] == "Skarvik"
    assert [e["area"] for e in v["area_entries"]] == [
        "Corran Sea ECA", "Corran Sea ECA", "Meridian Reach ECA", "Skarvik Basin ECA"]
    (f,) = facts["shortfall"]["fuels"]
    assert f["fuel"] == "mgo" and f["short_t"] > 0
    assert facts["shortfall"]["must_notify"] is True
    assert [a["supplier"] for a in facts["purchase_attempts"]] == [
        "Aldmere Bunker Services (fictional)", "Kelso Marine Fuels (fictional)"]
    assert facts["purchase_attempts"][1]["answer"] is None
    assert facts["next_port"]["name"] == "Port Halvey (fictional)"
    assert facts["next_port"]["confirmed"] is True
    assert {t["tank"] for t in facts["journal"]["tanks"]} == {"mgo_service", "mgo_storage"}
    assert pdf.stat().st_size > 0


def test_the_report_is_recorded_in_the_journal(report):
    from planner.journal import Journal
    from planner.journal.entries import REPORT

    facts, pdf, j = report
    n = facts["journal_entry"]
    assert n == facts["journal"]["entries"] + 1
    with Journal.open_read(j) as jr:
        st = jr.state()
        e = st.stored[n].entry
        check = jr.verify()
    assert check.ok and check.last_seq == n
    assert e.kind == REPORT
    assert e.record.details.title == TITLE
    assert e.record.details.report_kind == "nonavailability"
    import hashlib

    assert e.record.details.sha256 == hashlib.sha256(pdf.read_bytes()).hexdigest()


@pytest.mark.requires_poppler
def test_pdf_reads_back_every_item_and_blank(report):
    from tests.helpers.pdf import pdf_flat

    facts, pdf, _ = report
    text = pdf_flat(pdf)
    assert TITLE in text and "regulation 18.2" in text
    for n, s in enumerate(SECTIONS, start=1):
        assert f"{n}. {s}" in text, s
    for b in BLANKS:
        assert flat(b) in text, b
    for word in ("MV Kestrel Bay", "9999993", "Port Aldmere", "Skarvik", "Corran Sea ECA",
                 "Meridian Reach ECA", "Skarvik Basin ECA", "Aldmere Bunker Services",
                 "Kelso Marine Fuels", "2027-05-27", "2027-05-28",
                 "no DMA until 2027-06-10: refinery outage", "Port Halvey (fictional)",
                 "mgo_service", "mgo_storage", "KB-BDN-0413", "Signature", "Name", "Date",
                 "(c) Neither a lower speed nor a bunker port"):
        assert word in text, word
    ro = facts["shortfall"]["fuels"][0]["runs_out"]
    assert ro["utc"][:10] + " " + ro["utc"][11:16] + "Z" in text
    assert f"{facts['shortfall']['fuels'][0]['short_t']:.1f}" in text


def _copy(tmp_path: Path, extra: str = "", replace: tuple[str, str] = ("", "")) -> Path:
    """``short_mgo_t1.toml`` in ``tmp_path`` with absolute paths, ``replace`` applied and
    ``extra`` added."""
    text = (VOYAGES / "short_mgo_t1.toml").read_text(encoding="utf-8")
    for name in ("ship_t1.toml", "short_east.csv", "meridian_5e.geojson"):
        text = text.replace(f'"{name}"', f'"{(VOYAGES / name).as_posix()}"')
    if replace[0]:
        assert replace[0] in text
        text = text.replace(*replace)
    p = tmp_path / "voyage.toml"
    p.write_text(text + extra, encoding="utf-8")
    return p


def _refused(r, *parts: str) -> None:
    assert r.returncode == 2, r.stdout + r.stderr
    assert len(r.stderr.strip().splitlines()) == 1, r.stderr
    for p in parts:
        assert p in r.stderr, r.stderr


@pytest.mark.parametrize(("replace", "extra", "parts"), [
    (('waypoint = "Deep Point"', 'waypoint = "Nowhere"'), "",
     ("bunker_port[2].waypoint", "'Nowhere'", "a waypoint name of the route")),
    (("waypoint = 1", "waypoint = 9"), "", ("bunker_port[3].waypoint", "9", "1 to 2")),
    (("distance_nm = 150.0", "distance_nm = 999.0"), "",
     ("bunker_port[1].distance_nm", "999.0", "0 to 271.0 nm")),
    (("quantity_t = 10.0", "quantity_t = -3.0"), "",
     ("purchase_attempt[1].quantity_t", "-3.0", "above 0")),
    (("", ""), '\n[[purchase_attempt]]\nport = "P"\nsupplier = "S"\nfuel = "DMA"\n'
     "quantity_t = 1.0\n", ("purchase_attempt[2].date", "missing", "YYYY-MM-DD")),
    (("", ""), '\n[[bunker_port]]\nname = "Q"\n', ("bunker_port[4]", "exactly one of")),
])
def test_bad_tables_are_refused_and_nothing_written(tmp_path, replace, extra, parts):
    voyage = _copy(tmp_path, extra, replace)
    pdf = tmp_path / "r.pdf"
    _refused(changeover("nonavailability", str(voyage), "--pdf", str(pdf)),
             str(voyage), *parts)
    assert not pdf.exists()
    _refused(changeover("plan", str(voyage), "--json"), *parts)


def test_pdf_is_required(tmp_path):
    _refused(changeover("nonavailability", str(VOYAGES / "short_mgo_t1.toml")), "--pdf")


def test_another_ships_journal_is_refused(tmp_path):
    j, pdf = tmp_path / "other.sqlite", tmp_path / "r.pdf"
    changeover_ok("log", "init", "-j", str(j), "--ship", "MV Other (fictional)",
                  "--imo", "9999993", "--tz", "+01:00", "--rank", "Master",
                  "--name", "A. Tester")
    r = changeover("nonavailability", str(VOYAGES / "short_mgo_t1.toml"), "--pdf", str(pdf),
                   "--journal", str(j), "--rank", "Master", "--name", "A. Tester")
    _refused(r, "--journal", "IMO 9999993", "IMO 0000000")
    assert not pdf.exists()


def test_recording_needs_who(tmp_path):
    import os

    j, pdf = tmp_path / "j.sqlite", tmp_path / "r.pdf"
    env = {k: v for k, v in os.environ.items() if k not in SIGNER}
    import subprocess
    import sys

    r = subprocess.run([sys.executable, "-m", "planner", "nonavailability",
                        str(VOYAGES / "short_mgo_t1.toml"), "--pdf", str(pdf), "--journal",
                        str(j)], cwd=ROOT, capture_output=True, text=True, env=env,
                       timeout=300)
    _refused(r, "--rank")
    assert not pdf.exists() and not j.exists()


def test_plan_prints_the_shortfall_block_and_json_key():
    r = changeover_ok("plan", str(VOYAGES / "short_mgo_t1.toml"))
    text = flat(r.stdout)
    assert "Compliant fuel short: mgo" in text
    assert "(a) Reduce to 9.9 kn inside Meridian Five ECA" in text
    assert "(b) Bunker at Port Fennick (fictional)" in text
    assert "Advisory: the master decides." in text
    doc = json.loads(changeover_ok("plan", str(VOYAGES / "short_mgo_t1.toml"), "--json").stdout)
    sf = doc["shortfall"]
    assert "shortfall" in doc
    assert set(sf["fuels"][0]) >= {"fuel", "needed_t", "on_board_t", "short_t", "short_m3_15c",
                                   "runs_out", "not_compliant", "reduced_speed",
                                   "bunker_ports", "must_notify", "advice"}
    assert sf["must_notify"] is False


def test_shortfall_block_fits_every_width():
    from planner.cli.shortfall_print import shortfall_lines
    from planner.voyage.report import plan_json
    from planner.voyage.run import build_plan

    doc = plan_json(build_plan(VOYAGES / "short_mgo_t1.toml"))
    assert shortfall_lines(None, 80) == []
    for cols in (80, 120, 160):
        lines = shortfall_lines(doc["shortfall"], cols)
        assert lines[1].startswith("Compliant fuel short: mgo")
        assert all(len(x) <= cols for x in lines), cols
