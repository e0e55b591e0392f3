"""``changeover log trend`` / ``log export-trend`` (issue 16 item 3): a trend file kept with
its changeover entry, its SHA-256 in the hash chain and its bytes in the journal.

The expected hash of every file is computed here with hashlib (SHA-256, FIPS 180-4 as
Python implements it), independently of the program; the trend is the sample's
(``areas_sample/trends/kb_main_2027-05-30.csv``, fictional). Refusals: one line, exit 2,
the journal's bytes unchanged.
"""

from __future__ import annotations

import hashlib
import json
import re
import shutil
import sqlite3
import subprocess
from pathlib import Path

import pytest

from tests.cli.test_log import one_line_exit_2, run
from tests.helpers.paths import ROOT

TREND = ROOT / "areas_sample" / "trends" / "kb_main_2027-05-30.csv"


def ok(journal: Path, *args: str) -> str:
    r = run(journal, *args)
    assert r.returncode == 0, r.stderr
    return r.stdout


@pytest.fixture(scope="module")
def base(tmp_path_factory) -> dict:
    d = tmp_path_factory.mktemp("trend")
    shutil.copy(ROOT / "areas_sample" / "ship.toml", d / "ship.toml")
    r = run(None, "init", "--ship-file", str(d / "ship.toml"), "--tz", "+12:00")
    assert r.returncode == 0, r.stderr
    j = d / "kestrel_bay_journal.sqlite"
    ok(j, "start", "--at", "2027-05-30T04:00Z", "--pos", "-39.8238 169.2340", "--area",
       "Corran Sea ECA", "--circuit", "main", "--fuel", "mgo", "--from-fuel", "vlsfo")  # 4
    ok(j, "complete", "--at", "2027-05-30T06:21Z", "--pos", "-39.85 169.6", "--area",
       "Corran Sea ECA", "--circuit", "main", "--tank", "mgo_service=24.6@30")           # 5
    ok(j, "note", "engine room manned", "--at", "2027-05-30T06:30Z")                     # 6
    ok(j, "start", "--at", "2027-05-30T07:00Z", "--pos", "-39.8 169.8", "--area",
       "Corran Sea ECA", "--circuit", "boiler", "--fuel", "mgo")                         # 7
    ok(j, "correct", "7", "--void", "--reason", "written for the wrong circuit")         # 8
    out = ok(j, "trend", "5", str(TREND), "--switch-at", "2027-05-30T16:00+12:00",
             "--column", "viscosity=viscosity_cst", "--column", "time=time",
             "--trend-tz", "+12:00")                                                     # 9
    return {"journal": j, "dir": d, "trend_out": out}


@pytest.fixture()
def j(base, tmp_path) -> Path:
    p = tmp_path / "j.sqlite"
    shutil.copy(base["journal"], p)
    return p


def test_the_entry_holds_name_size_hash_switch_and_columns(base):
    data = TREND.read_bytes()
    digest = hashlib.sha256(data).hexdigest()
    out = base["trend_out"]
    assert "entry 9 written: trend file attached" in out
    assert f"trend {TREND.name}, {len(data)} bytes, SHA-256 {digest}" in out
    assert "attached to entry 5" in out and "valve switched 2027-05-30 04:00Z" in out
    doc = json.loads(ok(base["journal"], "show", "--json"))
    e = next(x for x in doc["entries"] if x["seq"] == 9)["entry"]
    d = e["record"]["details"]
    assert (d["type"], d["attaches"], d["file_name"], d["size_bytes"], d["sha256"]) == (
        "trend", 5, TREND.name, len(data), digest)
    assert d["switch_utc"] == "2027-05-30T04:00:00Z" and d["tz"] == "+12:00"
    assert d["columns"] == ["viscosity=viscosity_cst", "time=time"]
    assert e["record"]["area"] == "Corran Sea ECA" and e["record"]["circuit"] == "main"


def test_export_gives_back_the_same_bytes(base, tmp_path):
    out = tmp_path / "back.csv"
    text = ok(base["journal"], "export-trend", "9", str(out))
    assert out.read_bytes() == TREND.read_bytes()
    assert "matches the journal" in text


def test_show_and_print_list_it_under_its_changeover(base, tmp_path):
    listing = ok(base["journal"], "show")
    assert re.search(r"\b9\s+trend\b", listing)
    pdf = tmp_path / "r.pdf"
    ok(base["journal"], "print", "--pdf", str(pdf))
    text = re.sub(r"\s+", " ", subprocess.run(["pdftotext", str(pdf), "-"], check=True,
                                              capture_output=True, text=True).stdout)
    digest = hashlib.sha256(TREND.read_bytes()).hexdigest()
    section = text[text.index("Changeover 1:"):text.index("Chief engineer")]
    assert f"Trend file attached, entry 9 by Chief Engineer R. Halvorsen: trend {TREND.name}" \
           in section
    assert digest in section and "attached to entry 5" in section
    # and not again among the other entries
    assert "trend file attached" not in text[text.index("Tank soundings, samples"):]


def test_verify_covers_the_new_kind_and_finds_altered_bytes(j):
    assert "chain intact" in ok(j, "verify")
    conn = sqlite3.connect(j)
    # a hostile edit: the protecting trigger dropped, one byte of the stored trend changed
    conn.execute("DROP TRIGGER attachments_never_updated")
    conn.execute("UPDATE attachments SET data = CAST(replace(CAST(data AS TEXT), '.', ',') "
                 "AS BLOB)")
    conn.commit()
    conn.close()
    r = run(j, "verify", "--hash", "0" * 64)
    assert r.returncode == 1
    assert "entry 9: its trend file's stored bytes do not give the SHA-256" in r.stdout
    assert "trigger attachments_never_updated is missing" in r.stdout
    assert "are as they were" not in r.stdout


def test_the_stored_bytes_cannot_be_changed_or_deleted(j):
    conn = sqlite3.connect(j)
    for sql in ("UPDATE attachments SET size = 1", "DELETE FROM attachments"):
        with pytest.raises(sqlite3.DatabaseError, match="never"):
            conn.execute(sql)
    conn.close()


def test_export_refuses_altered_bytes_and_writes_nothing(j, tmp_path):
    conn = sqlite3.connect(j)
    conn.execute("DROP TRIGGER attachments_never_deleted")
    conn.execute("DELETE FROM attachments")
    conn.commit()
    conn.close()
    out = tmp_path / "x.csv"
    one_line_exit_2(run(j, "export-trend", "9", str(out)), "they are missing")
    assert not out.exists()
    assert "its trend file's bytes are missing" in run(j, "verify").stdout


@pytest.mark.parametrize(("args", "needle"), [
    (["trend", "99", str(TREND)], "ENTRY: 99: expected the number of an entry in this "
                                   "journal (1 to 9)"),
    (["trend", "6", str(TREND)], "expected a changeover start or completion (entry 6 is a "
                                 "note entry)"),
    (["trend", "8", str(TREND)], "expected the changeover entry itself, not a correction"),
    (["trend", "7", str(TREND)], "expected an entry not struck out (entry 7 was struck out "
                                 "by entry 8)"),
    (["trend", "5", "missing.csv"], "TREND.csv: 'missing.csv': expected an existing trend"),
    (["trend", "5", "/dev/zero"], "expected a regular trend file (CSV); it is not a regular"),
    (["trend", "5", "."], "expected a regular trend file (CSV); it is a folder"),
    (["trend", "5", str(TREND), "--column", "flow=x"], "--column: 'flow=x': expected "
                                                       "WHAT=NAME"),
    (["trend", "5", str(TREND), "--switch-at", "2027-05-30 16:48"], "--switch-at"),
    (["export-trend", "5", "out.csv"], "expected a trend entry (log trend); entry 5 is a "
                                       "changeover to compliant fuel completed entry"),
])
def test_refusals_are_one_line_and_write_nothing(j, args, needle):
    before = j.read_bytes()
    one_line_exit_2(run(j, *args), needle)
    assert j.read_bytes() == before
    assert not Path("out.csv").exists()


def test_a_file_over_the_cap_is_refused(j, tmp_path):
    from planner.journal.details import MAX_TREND_BYTES

    big = tmp_path / "big.csv"
    with big.open("wb") as f:
        f.truncate(MAX_TREND_BYTES + 1)     # sparse: one byte over 20 MiB
    before = j.read_bytes()
    one_line_exit_2(run(j, "trend", "5", str(big)), f"expected a trend file of at most "
                                                     f"{MAX_TREND_BYTES} bytes")
    assert j.read_bytes() == before


def test_the_same_bytes_twice_are_kept_once_and_a_void_strikes_the_trend(j):
    ok(j, "trend", "4", str(TREND))                                                   # 10
    conn = sqlite3.connect(j)
    assert conn.execute("SELECT COUNT(*) FROM attachments").fetchone()[0] == 1
    conn.close()
    out = ok(j, "correct", "10", "--void", "--reason", "attached to the start by mistake")
    assert "strike-out of entry 10 (trend file attached)" in out
    assert "chain intact" in ok(j, "verify")


def _calibrate(*args: str) -> subprocess.CompletedProcess:
    import sys

    return subprocess.run([sys.executable, "-m", "planner", "calibrate",
                           "areas_sample/ship.toml", *args], cwd=ROOT, capture_output=True,
                          text=True, timeout=300)


def test_calibrate_takes_the_trend_and_switch_time_from_the_record(j, tmp_path):
    """A trend attached to the completion (entry 5) with no --switch-at takes the switch time
    of the start it follows (entry 4, 04:00Z); the fit then equals the one from the file
    with that --switch-at given by hand."""
    ok(j, "trend", "5", str(TREND))                                                   # 10
    by_hand = _calibrate(str(TREND), "--switch-at", "2027-05-30T04:00Z", "--json")
    from_record = _calibrate("--journal", str(j), "--entry", "10", "--json")
    assert by_hand.returncode == 0 and from_record.returncode == 0, from_record.stderr
    a, b = json.loads(by_hand.stdout), json.loads(from_record.stdout)
    assert a["parameters"] == b["parameters"] and a["time_to_target"] == b["time_to_target"]
    (tr,) = b["trends"]
    assert tr["switch_utc"] == "2027-05-30T04:00:00Z"
    assert tr["file"] == f"{TREND.name} (journal {j.name} entry 10)"
    # entry 9 carries its own switch time (16:00+12:00 = 04:00Z) and column names
    nine = json.loads(_calibrate("--journal", str(j), "--entry", "9", "--json").stdout)
    assert nine["parameters"] == a["parameters"]


@pytest.mark.parametrize(("args", "needle"), [
    (["--entry", "9"], "--journal: missing: expected the journal holding the --entry"),
    (["--journal", "J", "--entry", "5"], "expected a trend entry (log trend); entry 5"),
    (["--journal", "J"], "--entry: missing"),
])
def test_calibrate_from_the_record_refusals(j, args, needle):
    args = [str(j) if a == "J" else a for a in args]
    one_line_exit_2(_calibrate(*args), needle)


def test_calibrate_refuses_altered_stored_bytes(j):
    conn = sqlite3.connect(j)
    conn.execute("DROP TRIGGER attachments_never_updated")
    conn.execute("UPDATE attachments SET data = CAST(replace(CAST(data AS TEXT), '.', ',') "
                 "AS BLOB)")
    conn.commit()
    conn.close()
    one_line_exit_2(_calibrate("--journal", str(j), "--entry", "9"),
                    "stored bytes match the SHA-256")


def test_the_csv_export_names_the_trend(base):
    import csv
    import io

    rows = list(csv.DictReader(io.StringIO(ok(base["journal"], "export", "--format", "csv"))))
    row = next(r for r in rows if r["seq"] == "9")
    digest = hashlib.sha256(TREND.read_bytes()).hexdigest()
    assert row["kind"] == "trend" and digest in row["text"] and "attached to entry 5" in row["text"]
