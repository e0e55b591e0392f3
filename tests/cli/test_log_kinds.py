"""``changeover log scrubber``, ``log report`` and ``log export-file`` end to end (issue 14
items 4 and 6, the journal's part): stored, read back, listed, verified, corrected, printed.

Check values: the ratio SO₂/CO₂ is worked out here by hand (25 ppm / 5.00 % v/v = 5.00);
the ratio limits are Table 1 of [MEPC-340] as printed there (4.3 for 0.10 % m/m, 21.7 for
0.50 %; from memory); file hashes are computed with hashlib (SHA-256, FIPS 180-4 as Python
implements it). The ship and voyage are fictional. Refusals: one line, exit 2, the
journal's bytes unchanged.
"""

from __future__ import annotations

import csv
import hashlib
import io
import json
import os
import re
import sqlite3
import subprocess
import sys
from pathlib import Path

import pytest

from tests.cli.test_log import one_line_exit_2, run
from tests.helpers.paths import ROOT

PLAN = ROOT / "tests" / "data" / "journal" / "plan_scrubber.json"
POS = "39°19.9'S 176°24.8'E"
PDF_BYTES = b"%PDF-1.4\n% fictional non-availability report\n" + bytes(range(256)) * 8


def ok(journal: Path, *args: str) -> str:
    r = run(journal, *args)
    assert r.returncode == 0, r.stderr
    return r.stdout


@pytest.fixture(scope="module")
def base(tmp_path_factory) -> dict:
    d = tmp_path_factory.mktemp("kinds")
    j = d / "ship.db"
    ok(j, "init", "--ship", "MV Aurora Tern", "--imo", "1234567", "--tz", "+12:00")     # 1
    out = {"journal": j, "dir": d}
    out["start"] = ok(j, "scrubber", "start", "--scrubber", "EGCS 1", "--mode", "open",
                      "--at", "2026-05-31T10:00+12:00", "--pos", POS, "--voyage", "V26-05")
    out["over"] = ok(j, "scrubber", "ratio-reading", "--scrubber", "EGCS 1", "--so2-ppm",
                     "25", "--co2-pct", "5.0", "--limit-pct", "0.10", "--at",
                     "2026-05-30T23:00Z", "--pos", "-39.33, 175.5")                       # 3
    ok(j, "scrubber", "ratio-reading", "--scrubber", "EGCS 1", "--so2-ppm", "80",
       "--co2-pct", "4.5", "--ratio-limit", "21.7", "--at", "2026-05-30T23:30Z",
       "--pos", "-39.33, 175.6")                                                          # 4
    out["failure"] = ok(j, "scrubber", "failure", "--scrubber", "EGCS 1", "--at",
                        "2026-05-31T01:00Z", "--pos", "-39.3, 175.9", "--note",
                        "changed over to MGO at 01:20Z; flag state informed")            # 5
    doc = d / "NAR V26-05.pdf"
    doc.write_bytes(PDF_BYTES)
    out["report"] = ok(j, "report", str(doc), "--kind", "nonavailability", "--title",
                       "Fuel oil non-availability report", "--at", "2026-05-31T02:00Z")   # 6
    out["correct"] = ok(j, "correct", "3", "--co2-pct", "6.2", "--reason", "CO2 misread")  # 7
    ok(j, "scrubber", "restored", "--scrubber", "EGCS 1", "--at", "2026-05-31T04:00Z",
       "--pos", "-39.2, 176.2")                                                           # 8
    ok(j, "correct", "8", "--void", "--reason", "written before the repair was tested")  # 9
    return out


@pytest.fixture()
def j(base, tmp_path) -> Path:
    p = tmp_path / "j.db"
    p.write_bytes(base["journal"].read_bytes())
    return p


def entries(journal: Path) -> dict[int, dict]:
    doc = json.loads(ok(journal, "show", "--json"))
    return {e["seq"]: e["entry"] for e in doc["entries"]}


def test_the_events_are_stored_as_typed_with_the_ratio_worked_out(base):
    e = entries(base["journal"])
    start = e[2]["record"]["details"]
    assert (start["type"], start["scrubber"], start["event"], start["mode"]) == (
        "scrubber", "EGCS 1", "start", "open")
    assert e[2]["record"]["time_utc"] == "2026-05-30T22:00:00Z"       # 10:00 at +12:00
    assert e[2]["record"]["ship_offset_min"] == 720
    over = e[3]["record"]["details"]
    assert (over["so2_ppm"], over["co2_pct"]) == (25.0, 5.0)
    assert over["ratio"] == pytest.approx(25.0 / 5.0, rel=1e-12)      # by hand: 5.00
    assert over["ratio_limit"] == 4.3 and over["limit_sulphur_pct"] == 0.10   # [MEPC-340]
    assert over["over_limit"] is True
    typed = e[4]["record"]["details"]
    assert typed["ratio"] == pytest.approx(80.0 / 4.5, rel=1e-12)     # 17.78 < 21.7
    assert (typed["ratio_limit"], typed["limit_sulphur_pct"], typed["over_limit"]) == (
        21.7, None, False)
    assert "OVER THE LIMIT" in base["over"] and "ratio 5.00 ppm/% v/v" in base["over"]
    assert "limit 4.3 ppm/% v/v (0.10 % m/m sulphur, MEPC.340(77) Table 1)" in base["over"]


def test_a_failure_reads_as_a_failure_with_its_action(base):
    out = base["failure"]
    assert out.startswith("entry 5 written: scrubber failure")
    assert "SCRUBBER FAILURE: EGCS 1" in out
    assert "2026-05-31 01:00Z (ship's time 2026-05-31 13:00 (+12:00))" in out
    assert "39°18.0'S 175°54.0'E" in out
    assert "changed over to MGO at 01:20Z; flag state informed" in out
    rows = list(csv.DictReader(io.StringIO(ok(base["journal"], "export", "--format", "csv"))))
    row = next(r for r in rows if r["seq"] == "5")
    assert row["what"] == "scrubber failure" and row["lat_deg"] == "-39.300000"
    assert row["text"] == ("SCRUBBER FAILURE: EGCS 1; changed over to MGO at 01:20Z; flag "
                           "state informed")


def test_a_correction_works_the_ratio_out_again_and_a_void_strikes_out(base):
    e = entries(base["journal"])
    c = e[7]
    assert c["kind"] == "correction" and c["correction"]["corrects"] == 3
    d = c["record"]["details"]
    assert d["co2_pct"] == 6.2 and d["ratio"] == pytest.approx(25.0 / 6.2, rel=1e-12)
    assert d["over_limit"] is False and d["ratio_limit"] == 4.3       # 4.03 < 4.3
    assert "within the limit" in base["correct"]
    assert e[9]["correction"]["void"] is True and e[9]["record"] is None
    listing = ok(base["journal"], "show")
    assert re.search(r"\b3\s+scrubber\b.*", listing)
    assert "corrected by 7" in listing and "struck out by 9" in listing


def test_verify_covers_them_and_finds_an_edited_reading(j):
    assert "9 entries, chain intact" in ok(j, "verify")
    conn = sqlite3.connect(j)
    conn.execute("DROP TRIGGER entries_never_updated")
    body = conn.execute("SELECT body FROM entries WHERE seq = 3").fetchone()[0]
    conn.execute("UPDATE entries SET body = ? WHERE seq = 3",
                 (body.replace('"so2_ppm":25.0', '"so2_ppm":2.0'),))
    conn.commit()
    conn.close()
    r = run(j, "verify")
    assert r.returncode == 1
    assert "entry 3: its content does not match its hash" in r.stdout
    # the stored ratio no longer follows from the readings: the content check says so too
    assert "entry 3: its content is not a valid entry" in r.stdout and "ratio" in r.stdout


def test_show_fits_80_columns_and_lists_by_kind(base):
    r = subprocess.run([sys.executable, "-m", "planner", "log", "show", "--journal",
                        str(base["journal"])], cwd=ROOT, capture_output=True, text=True,
                       env={**os.environ, "COLUMNS": "80"}, timeout=60)
    assert r.returncode == 0, r.stderr
    for line in r.stdout.splitlines():
        assert len(line) <= 80 or " " not in line.strip(), line
    assert "SCRUBBER FAILURE: EGCS 1" in r.stdout
    only = ok(base["journal"], "show", "--kind", "report", "--json")
    assert [e["seq"] for e in json.loads(only)["entries"]] == [6]


def test_the_report_keeps_the_bytes_and_export_file_gives_them_back(base, tmp_path):
    digest = hashlib.sha256(PDF_BYTES).hexdigest()
    assert f"SHA-256 {digest}" in base["report"]
    assert "nonavailability report \u201cFuel oil non-availability report\u201d" in \
           base["report"]
    d = entries(base["journal"])[6]["record"]["details"]
    assert (d["type"], d["report_kind"], d["file_name"], d["size_bytes"], d["sha256"]) == (
        "report", "nonavailability", "NAR V26-05.pdf", len(PDF_BYTES), digest)
    out = tmp_path / "back.pdf"
    assert "matches the journal" in ok(base["journal"], "export-file", "6", str(out))
    assert out.read_bytes() == PDF_BYTES


def test_export_file_refuses_altered_bytes_and_other_entries(j, tmp_path):
    out = tmp_path / "x.pdf"
    one_line_exit_2(run(j, "export-file", "5", str(out)), "expected a trend or report entry "
                    "(log trend, log report); entry 5 is a scrubber event entry")
    conn = sqlite3.connect(j)
    conn.execute("DROP TRIGGER attachments_never_updated")
    conn.execute("UPDATE attachments SET data = X'00'")
    conn.commit()
    conn.close()
    one_line_exit_2(run(j, "export-file", "6", str(out)), "stored bytes match the SHA-256")
    assert not out.exists()
    assert "entry 6: its document's stored bytes do not give the SHA-256" in \
           run(j, "verify").stdout


@pytest.mark.parametrize(("args", "needle"), [
    (["scrubber", "ratio-reading", "--scrubber", "E1", "--so2-ppm", "nan", "--co2-pct", "5",
      "--pos", POS], "--so2-ppm: nan: expected a reading from 0 to 5000 ppm"),
    (["scrubber", "ratio-reading", "--scrubber", "E1", "--so2-ppm", "-3", "--co2-pct", "5",
      "--pos", POS], "--so2-ppm: -3.0: expected a reading from 0 to 5000 ppm"),
    (["scrubber", "ratio-reading", "--scrubber", "E1", "--so2-ppm", "3", "--co2-pct", "inf",
      "--pos", POS], "--co2-pct: inf: expected a reading from 0.1 to 20 % v/v"),
    (["scrubber", "ratio-reading", "--scrubber", "E1", "--so2-ppm", "3", "--pos", POS],
     "--co2-pct: missing: expected both readings"),
    (["scrubber", "ratio-reading", "--scrubber", "E1", "--pos", POS], "--so2-ppm: missing"),
    (["scrubber", "start", "--scrubber", "E1", "--mode", "semi", "--pos", POS],
     "--mode: 'semi': expected the washwater mode: open or closed"),
    (["scrubber", "start", "--scrubber", "E1", "--pos", POS], "--mode: missing"),
    (["scrubber", "explode", "--scrubber", "E1", "--pos", POS], "EVENT: 'explode': expected "
     "one of start, stop, mode-change, failure, restored, ratio-reading"),
    (["scrubber", "ratio-reading", "--scrubber", "E1", "--so2-ppm", "3", "--co2-pct", "5",
      "--limit-pct", "0.2", "--pos", POS], "--limit-pct: 0.2: expected the sulphur limit in "
     "force, one of 0.10, 0.50, 1.00, 1.50, 3.50, 4.50 % m/m"),
    (["scrubber", "ratio-reading", "--scrubber", "E1", "--so2-ppm", "3", "--co2-pct", "5",
      "--limit-pct", "0.5", "--ratio-limit", "21.7", "--pos", POS], "not both"),
    (["scrubber", "stop", "--scrubber", "E1"], "--pos: missing"),
    (["scrubber", "stop", "--pos", POS], "--scrubber: missing"),
    (["scrubber", "stop", "--scrubber", "E1", "--pos", POS, "--event", "1"], "--from-plan"),
    (["correct", "6", "--so2-ppm", "3", "--reason", "x"], "values of a scrubber entry"),
    (["correct", "3", "--title", "x", "--reason", "x"], "a report entry"),
    (["correct", "3", "--co2-pct", "0", "--reason", "x"], "--co2-pct: 0.0"),
    (["report", "missing.pdf", "--kind", "nonavailability", "--title", "T"],
     "FILE: 'missing.pdf': expected an existing document file"),
    (["report", "/dev/zero", "--kind", "nonavailability", "--title", "T"],
     "expected a regular document file; it is not a regular file"),
    (["report", str(PLAN), "--kind", "=cmd|' /C calc'!A0", "--title", "T"], "--kind"),
    (["report", str(PLAN), "--kind", "nonavailability"], "--title: missing"),
])
def test_refusals_are_one_line_and_write_nothing(j, args, needle):
    before = j.read_bytes()
    one_line_exit_2(run(j, *args), needle)
    assert j.read_bytes() == before


def test_text_like_a_formula_or_markup_is_kept_and_neutralised(j, tmp_path):
    note = "=HYPERLINK(\"http://x\") <b>bold</b> [/] & @SUM(A1)"
    ok(j, "scrubber", "stop", "--scrubber", "+EGCS 1", "--pos", POS, "--at",
       "2026-05-31T05:00Z", "--note", note)                                             # 10
    assert entries(j)[10]["record"]["details"]["remarks"] == note
    rows = list(csv.reader(io.StringIO(ok(j, "export", "--format", "csv"))))
    for row in rows:
        for c in row:
            assert not c or c[0] not in "=+@\t\r" and not (
                c[0] == "-" and not re.fullmatch(r"-[\d.]+", c)), c
    pdf = tmp_path / "r.pdf"
    ok(j, "print", "--pdf", str(pdf))
    text = subprocess.run(["pdftotext", "-raw", str(pdf), "-"], check=True,
                          capture_output=True, text=True).stdout
    assert "<b>bold</b> [/] & @SUM(A1)" in re.sub(r"\s+", " ", text)


@pytest.mark.requires_poppler
def test_the_printed_record_lists_the_events_and_the_document(base, tmp_path):
    pdf = tmp_path / "r.pdf"
    out = ok(base["journal"], "print", "--pdf", str(pdf))
    assert "5 scrubber events, 1 documents made" in out   # one struck out
    raw = subprocess.run(["pdftotext", "-raw", str(pdf), "-"], check=True,
                         capture_output=True, text=True).stdout
    text = re.sub(r"\s+", " ", raw)
    section = text[text.index("Scrubber events"):text.index("Documents made")]
    # time order: start 22:00Z, readings 23:00Z and 23:30Z, failure 01:00Z, restored 04:00Z
    order = [section.index(w) for w in ("scrubber started: EGCS 1, open loop",
                                        "SO2 25.0 ppm", "SO2 80.0 ppm", "SCRUBBER FAILURE",
                                        "scrubber back in service")]
    assert order == sorted(order)
    assert "2026-05-30 22:00Z" in section and "2026-05-31 10:00 UTC+12:00" in section
    assert "39°19.9'S 176°24.8'E" in section
    assert "OVER THE LIMIT" in section                         # the original, struck
    assert "correction of 3: CO2 misread" in section and "within the limit" in section
    assert "struck out: written before the repair was tested" in section
    box = section[section.index("Scrubber failures and readings over the limit"):]
    assert "entry 5, 2026-05-31 01:00Z, 39°18.0'S 175°54.0'E: SCRUBBER FAILURE: EGCS 1; " \
           "action: changed over to MGO at 01:20Z; flag state informed" in box
    assert "entry 3" not in box                                # corrected to within it
    docs = text[text.index("Documents made"):]
    digest = hashlib.sha256(PDF_BYTES).hexdigest()
    assert "Fuel oil non-availability report" in docs and f"{digest[:16]}…" in docs
    assert "NAR V26-05.pdf" in docs and "2026-05-31 02:00Z" in docs


def test_prefilled_from_the_plan_event(j):
    out = ok(j, "scrubber", "mode-change", "--from-plan", str(PLAN), "--event", "2",
             "--as-planned")                                                             # 10
    d = entries(j)[10]["record"]
    assert d["time_utc"] == "2026-05-31T03:12:00Z"
    assert (d["position"]["lat_deg"], d["position"]["lon_deg"]) == (-39.333333, 176.0)
    det = d["details"]
    assert (det["scrubber"], det["mode"], det["plan_source"], det["plan_event"]) == (
        "EGCS 1", "closed", "plan_scrubber.json", 2)
    assert det["from_plan"] == ["time", "position"]
    assert det["planned_reason"] == "entering the Harrow Sound no-discharge zone"
    assert "time and position confirmed from the plan, not typed" in out
    # the plan's out_of_service is the journal's failure; the time typed wins
    ok(j, "scrubber", "failure", "--from-plan", str(PLAN), "--event", "3", "--at",
       "2026-05-31T06:10Z", "--pos", POS, "--note", "sea chest strainer blocked")        # 11
    f = entries(j)[11]["record"]
    assert f["time_utc"] == "2026-05-31T06:10:00Z" and f["details"]["from_plan"] == []
    assert f["details"]["planned_utc"] == "2026-05-31T06:00:00Z"
    assert "chain intact" in ok(j, "verify")


@pytest.mark.parametrize(("args", "needle"), [
    (["scrubber", "start", "--from-plan", str(PLAN), "--event", "2", "--as-planned"],
     "--event: 2: expected a start event of the plan (number 2 is a mode-change: use it "
     "with log scrubber mode-change)"),
    (["scrubber", "stop", "--from-plan", str(PLAN), "--event", "9", "--pos", POS],
     "--event: 9: expected a scrubber event of"),
    (["scrubber", "stop", "--from-plan", str(PLAN), "--event", "4", "--as-planned"],
     "the time: the plan has none for this event"),
    (["scrubber", "start", "--from-plan", str(PLAN), "--event", "1", "--scrubber", "EGCS 2",
      "--pos", POS], "--scrubber: 'EGCS 2': expected the plan's scrubber for event 1"),
    (["scrubber", "start", "--from-plan", str(ROOT / "tests" / "data" / "journal" /
                                              "plan_sample.json"), "--event", "1", "--pos",
      POS], "scrubber_events: missing: expected a plan with a list of scrubber events"),
])
def test_plan_prefill_refusals(j, args, needle):
    before = j.read_bytes()
    one_line_exit_2(run(j, *args), needle)
    assert j.read_bytes() == before
