"""``changeover log ...`` end to end, as the crew runs it: the sample voyage's changeovers.

Refusals: exit status 2, one line on standard error, and the journal unchanged.
"""

from __future__ import annotations

import csv
import hashlib
import io
import json
import os
import re
import shutil
import sqlite3
import subprocess
import sys
from pathlib import Path

import pytest

from planner.journal.canonical import GENESIS_HASH, canonical_json
from tests.helpers.paths import ROOT

PLAN = ROOT / "tests" / "data" / "journal" / "plan_sample.json"
VOYAGE = "V27-05 Aldmere-Skarvik"


CONFIRMED = {"start", "complete", "back", "back-complete", "tanks", "sample", "note", "fuel"}
"""Commands given --confirm by :func:`run`: the sample voyage is dated 2027, which a clock
before then reads as more than an hour ahead (tested on its own below)."""


def run(journal: Path | None, *args: str, env_journal: bool = True,
        confirm: bool = True) -> subprocess.CompletedProcess:
    if confirm and args and args[0] in CONFIRMED and "--" not in args:
        args = (*args, "--confirm")
    env = {k: v for k, v in os.environ.items() if not k.startswith("CHANGEOVER_")}
    env.update(CHANGEOVER_RANK="Chief Engineer", CHANGEOVER_NAME="R. Halvorsen")
    if journal is not None and env_journal:
        env["CHANGEOVER_JOURNAL"] = str(journal)
    return subprocess.run([sys.executable, "-m", "planner", "log", *args], cwd=ROOT, env=env,
                          capture_output=True, text=True, timeout=60)


def ok(journal: Path, *args: str) -> str:
    r = run(journal, *args)
    assert r.returncode == 0, r.stderr
    return r.stdout


@pytest.fixture(scope="module")
def flow(tmp_path_factory) -> dict:
    d = tmp_path_factory.mktemp("flow")
    j = d / "aurora.db"
    out = {"journal": j, "dir": d}
    out["init"] = ok(j, "init", "--ship", "MV Aurora Tern", "--imo", "IMO 1234567", "--tz",
                     "+12:00", "--tank", "MGO service", "--tank", "MGO settling",
                     "--tank", "MGO storage 3S")
    ok(j, "fuel", "MGO", "--grade", "DMA", "--sulphur", "0.07", "--density", "848.5",
       "--bdn", "ALD-2027-0528-01")
    ok(j, "fuel", "VLSFO", "--grade", "RMG 380", "--sulphur", "0.48", "--density", "989.2",
       "--bdn", "ALD-2027-0528-02")
    out["start"] = ok(j, "start", "--voyage", VOYAGE, "--from-plan", str(PLAN),
                      "--changeover", "1", "--at", "2027-05-31T17:35+12:00",
                      "--pos", "39°19.9'S 176°24.8'E", "--fuel", "MGO", "--from-fuel", "VLSFO",
                      "--rank", "2nd Engineer", "--name", "T. Okafor")
    out["complete"] = ok(j, "complete", "--from-plan", str(PLAN), "--changeover", "1",
                         "--at", "2027-05-31T10:05Z", "--pos", "39 11.6 S 178 00.4 E",
                         "--tank", "MGO service=24.6@38", "--tank", "MGO settling=31.2@30",
                         "--tank", "MGO storage 3S=92.7@22")
    out["correct"] = ok(j, "correct", "5", "--reason", "settling tank sounding misread",
                        "--tank", "MGO service=24.6@38", "--tank", "MGO settling=13.2@30",
                        "--tank", "MGO storage 3S=92.7@22")
    ok(j, "sample", "--number", "MR-0531-1", "--seal", "A 448812", "--point", "ME inlet",
       "--fuel", "MGO", "--at", "2027-05-31T10:30Z")
    out["back"] = ok(j, "back", "--from-plan", str(PLAN), "--changeover", "2", "--as-planned",
                     "--fuel", "VLSFO", "--tank", "MGO service=18.1@37",
                     "--tank", "MGO storage 3S=70.3@22")
    ok(j, "back-complete", "--at", "2027-06-01T11:40Z", "--pos", "-38.8633, -175.1367",
       "--fuel", "VLSFO")
    ok(j, "note", "Engine room manned throughout; no alarms.", "--at", "2027-06-01T12:00Z")
    shutil.copy(j, d / "snapshot.db")
    return out


def test_entries_as_written(flow):
    assert "entry 1 written: journal set-up" in flow["init"]
    assert "ship's time 2027-05-31 17:35 (+12:00)" in flow["start"]
    c = flow["complete"]
    assert "entry 5 written: changeover to compliant fuel completed 1 h 42 min before entry" in c
    assert "39°11.6'S 178°00.4'E" in c and "Meridian Reach ECA" in c and "follows entry 4" in c
    assert "MGO service 24.600 m³ @ 38.0 °C" in c and "fuel to: MGO (DMA), 0.07 % m/m S" in c
    assert "planned (plan_sample.json, changeover 1): 2027-05-31 10:20Z; 15 min earlier" in c
    assert "planned boundary entry 2027-05-31 11:46Z" in c and "completed 1 h 42 min before" in c
    assert "correction of entry 5" in flow["correct"] and "13.200 m³" in flow["correct"]
    b = flow["back"]
    assert "time and position confirmed from the plan" in b
    assert "fuel from: MGO" in b and "fuel to: VLSFO" in b
    assert "commenced 16 min after it" in b


def test_verify_show_and_filters(flow):
    j = flow["journal"]
    v = ok(j, "verify")
    assert "10 entries, chain intact" in v
    last = v.split("hash ")[-1].strip()
    assert "entries 1 to 10 are as they were" in ok(j, "verify", "--hash", last)
    doc = json.loads(ok(j, "show", "--json", "--kind", "complete", "--kind", "correction"))
    assert [e["seq"] for e in doc["entries"]] == [5, 6]
    assert doc["entries"][0]["status"] == "corrected by 6"
    assert doc["entries"][1]["entry"]["correction"]["corrects"] == 5
    doc = json.loads(ok(j, "show", "--json", "--since", "2027-06-01", "--area",
                        "Meridian Reach ECA"))
    assert [e["seq"] for e in doc["entries"]] == [8, 9]
    table = ok(j, "show", "--voyage", VOYAGE)
    assert "MV Aurora Tern (IMO 1234567)" in table and "corrected by 6" in table


def test_export_json_can_be_checked_without_the_program(flow, tmp_path):
    j = flow["journal"]
    out = tmp_path / "journal.json"
    assert "10 entries" in ok(j, "export", "--out", str(out))
    doc = json.loads(out.read_text(encoding="utf-8"))
    assert doc["verified"] is True and doc["count"] == 10
    prev = GENESIS_HASH
    for item in doc["entries"]:  # the rule stated in doc["hash_rule"]
        body = canonical_json(item["entry"])
        h = hashlib.sha256(f"{prev}\n{item['seq']}\n{body}".encode()).hexdigest()
        assert h == item["hash"] and item["prev_hash"] == prev
        prev = h
    assert prev == doc["last_hash"]


def test_export_csv(flow, tmp_path):
    out = tmp_path / "journal.csv"
    ok(flow["journal"], "export", "--out", str(out), "--voyage", VOYAGE)
    rows = list(csv.DictReader(io.StringIO(out.read_text(encoding="utf-8"))))
    done = next(r for r in rows if r["seq"] == "5")
    assert done["kind"] == "changeover_completed" and done["corrected_by"] == "6"
    assert done["position"] == "39°11.6'S 178°00.4'E" and done["area"] == "Meridian Reach ECA"
    assert "MGO settling: 31.200 m³ @ 30.0 °C" in done["tanks"]
    assert done["planned_time_utc"] == "2027-05-31T10:20:00Z"
    assert float(done["total_volume15_m3"]) == pytest.approx(147.094, abs=0.001)
    assert next(r for r in rows if r["seq"] == "6")["corrects"] == "5"


def test_print_pdf(flow, tmp_path):
    out = tmp_path / "record.pdf"
    r = run(flow["journal"], "print", "--pdf", str(out), "--voyage", VOYAGE)
    assert r.returncode == 0, r.stderr
    assert "3 changeovers" not in r.stdout and "2 changeovers" in r.stdout
    assert out.read_bytes().startswith(b"%PDF")


@pytest.mark.parametrize(("args", "needle"), [
    (["complete", "--at", "2027-06-01T22:20Z", "--pos", "38°44.0'S 171°41.5'W", "--area",
      "Skarvik Basin ECA", "--fuel", "MGO", "--tank", "MGO servce=23.9@38"],
     "--tank: 'MGO servce': expected one of the journal's tanks"),
    (["tanks", "--fuel", "MGO", "--tank", "MGO service=-3@30"], "a volume of 0 m³ or more"),
    (["start", "--pos", "95°00.0'N 010°00.0'E", "--area", "X", "--fuel", "MGO"],
     "(latitude \"95°00.0'N\": at most 90°)"),
    (["start", "--pos", "45.0, 181.5", "--area", "X", "--fuel", "MGO"],
     "(longitude within ±180°)"),
    (["back-complete", "--at", "2027-06-01T06:00Z", "--pos", "38 51.8 S 175 08.2 W", "--fuel",
      "VLSFO", "--follows", "8"], "expected a time at or after the start of this changeover "
                                 "(entry 8, 2027-06-01 06:30Z)"),
    (["correct", "99", "--reason", "typo", "--at", "2027-06-01T06:00Z"],
     "correct: entry number: 99: expected the number of an entry in this journal (1 to 10)"),
    (["correct", "2", "--reason", "typo", "--at", "2027-06-01T06:00Z"], "superseded"),
    (["tanks", "--fuel", "HFO", "--tank", "MGO service=3@30"], "--fuel: 'HFO'"),
    (["start", "--at", "2027-06-01 17:10", "--pos", "1 1", "--area", "X", "--fuel", "MGO"],
     "--at: '2027-06-01 17:10': expected a time with its UTC offset"),
    (["start", "--from-plan", str(PLAN), "--changeover", "2", "--as-planned", "--fuel", "MGO"],
     "--changeover: 2: expected a to_compliant changeover of the plan"),
    (["complete", "--as-planned", "--pos", "1 1"], "--from-plan: missing"),
    (["note", "x", "--tz", "+15:00"], "--tz: '+15:00'"),
    (["show", "--kind", "bunkering"], "--kind: 'bunkering'"),
    (["verify", "--hash", "abc"], "--hash: 'abc': expected a SHA-256 hash"),
    (["export", "--format", "xml"], "--format: 'xml': expected csv or json"),
    (["print"], "--pdf: missing"),
    (["fuel", "ULSFO", "--density", "920", "--bdn", "X-1"], "--sulphur: missing"),
    # 4.50 % m/m: the highest global limit there has been, MARPOL Annex VI reg. 14.1 [MARPOL-VI]
    (["fuel", "ULSFO", "--sulphur", "4.51", "--density", "920", "--bdn", "X-1"],
     "--sulphur: 4.51: expected % m/m from the delivery note, 0 to 4.50"),
    (["fuel", "ULSFO", "--sulphur", "0.09", "--density", "1100", "--bdn", "X-1"],
     "--density: 1100.0: expected kg/m³ at 15 °C"),
])
def test_bad_input_exits_2_one_line_nothing_written(flow, tmp_path, args, needle):
    j = tmp_path / "ship.db"
    shutil.copy(flow["dir"] / "snapshot.db", j)
    before = j.read_bytes()
    r = run(j, *args)
    assert r.returncode == 2, (r.stdout, r.stderr)
    lines = r.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("changeover: error: "), r.stderr
    assert needle in lines[0], lines[0]
    assert r.stdout == ""
    assert j.read_bytes() == before
    assert sorted(p.name for p in tmp_path.iterdir()) == ["ship.db"]


def test_journal_path_refusals(tmp_path):
    r = run(None, "show")
    assert r.returncode == 2
    assert r.stderr.strip() == ("changeover: error: --journal: missing: expected the journal "
                                "file or the ship file (or set CHANGEOVER_JOURNAL or "
                                "CHANGEOVER_SHIP)")
    r = run(tmp_path / "none.db", "show")
    assert r.returncode == 2 and "existing journal file" in r.stderr
    bad = tmp_path / "new.db"
    r = run(bad, "init", "--ship", "MV X", "--imo", "1234568", "--tz", "Z")
    assert r.returncode == 2 and len(r.stderr.strip().splitlines()) == 1
    assert "--imo: '1234568': expected a 7-digit IMO number" in r.stderr
    assert not bad.exists() and list(tmp_path.iterdir()) == []
    r = run(bad, "init", "--ship", "MV X", "--imo", "1234567", "--tz", "Z", "--journal",
            str(bad), env_journal=False)
    assert r.returncode == 0 and bad.exists()
    r = run(bad, "init", "--ship", "MV Y", "--imo", "1234567", "--tz", "Z")
    assert r.returncode == 2 and "never overwritten" in r.stderr


def test_verify_fails_naming_the_entry_after_tampering(flow, tmp_path):
    j = tmp_path / "ship.db"
    shutil.copy(flow["dir"] / "snapshot.db", j)
    conn = sqlite3.connect(j)
    conn.executescript("DROP TRIGGER entries_never_updated;")
    conn.execute("UPDATE entries SET body = json_set(body, '$.record.details.tanks[1].volume_m3',"
                 " 3.2) WHERE seq = 6")
    conn.commit()
    conn.close()
    r = run(j, "verify")
    assert r.returncode == 1
    assert "FAILED verification" in r.stdout
    assert "entry 6: its content does not match its hash" in r.stdout
    doc = json.loads(run(j, "verify", "--json").stdout)
    assert doc["ok"] is False and {p["seq"] for p in doc["problems"]} == {6, None}
    assert {"what": "the journal's trigger entries_never_updated is missing (dropped)",
            "seq": None} in doc["problems"]


# -- issue 11 items 8-11 and the listing at every width --------------------------------------

def one_line_exit_2(r: subprocess.CompletedProcess, needle: str) -> None:
    assert r.returncode == 2, (r.stdout, r.stderr)
    lines = r.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("changeover: error: "), r.stderr
    assert needle in lines[0], lines[0]


@pytest.mark.parametrize(("at", "needle"), [
    ("2027-06-01T10:00+23:00", "a real UTC offset: -12:00 to +14:00"),
    ("2027-06-01T10:00-13:00", "a real UTC offset: -12:00 to +14:00"),
    ("0001-01-01T00:00+14:00", "a year from 1990 to 2100"),
    ("9999-12-31T23:59-12:00", "a year from 1990 to 2100"),
    ("2027-06-01T10:00+05:13", "in steps of 15 minutes"),
    ("yesterday", "an ISO 8601 time with its UTC offset"),
])
def test_at_takes_only_real_offsets_and_years(flow, tmp_path, at, needle):
    j = tmp_path / "ship.db"
    shutil.copy(flow["dir"] / "snapshot.db", j)
    before = j.read_bytes()
    one_line_exit_2(run(j, "note", "x", "--at", at), needle)
    assert j.read_bytes() == before


def test_tz_takes_only_real_offsets(flow, tmp_path):
    j = tmp_path / "ship.db"
    shutil.copy(flow["dir"] / "snapshot.db", j)
    one_line_exit_2(run(j, "note", "x", "--tz", "-13:00"), "--tz: '-13:00'")
    assert "(+05:45)" in ok(j, "note", "x", "--at", "2027-06-01T10:00+05:45")


def sqlite_damage(path: Path, how: str) -> None:
    if how == "page":  # overwrite a page inside the file with noise
        data = bytearray(path.read_bytes())
        data[4096:8192] = bytes(range(256)) * 16
        path.write_bytes(bytes(data))
    elif how == "table":
        conn = sqlite3.connect(path)
        conn.executescript("DROP TRIGGER entries_never_deleted; DROP TABLE entries;")
        conn.close()
    elif how == "header":
        data = bytearray(path.read_bytes())
        data[0:16] = b"not a database!!"
        path.write_bytes(bytes(data))


@pytest.mark.parametrize("how", ["page", "table", "header"])
@pytest.mark.parametrize("cmd", [["show"], ["verify"], ["note", "x"], ["export"]])
def test_a_damaged_journal_is_one_line(flow, tmp_path, how, cmd):
    j = tmp_path / "ship.db"
    shutil.copy(flow["dir"] / "snapshot.db", j)
    sqlite_damage(j, how)
    r = run(j, *cmd)
    if how == "page" and cmd == ["verify"] and r.returncode == 1:
        return  # the damage fell in entry text: verify names the entries instead
    one_line_exit_2(r, str(j))
    assert "Traceback" not in r.stderr


def run_unprivileged(journal: Path, *args: str) -> subprocess.CompletedProcess:
    """``run`` as an ordinary user (root ignores file permissions): setpriv to nobody."""
    env = {k: v for k, v in os.environ.items() if not k.startswith("CHANGEOVER_")}
    env.update(CHANGEOVER_RANK="C/E", CHANGEOVER_NAME="R. H", CHANGEOVER_JOURNAL=str(journal))
    pre = []
    if os.geteuid() == 0:
        pre = ["setpriv", "--reuid", "65534", "--regid", "65534", "--clear-groups"]
    return subprocess.run([*pre, sys.executable, "-m", "planner", "log", *args], cwd=ROOT,
                          env=env, capture_output=True, text=True, timeout=60)


@pytest.mark.skipif(os.geteuid() == 0 and shutil.which("setpriv") is None,
                    reason="root ignores file permissions and setpriv is missing")
@pytest.mark.parametrize("what", ["file", "folder"])
def test_read_only_journal_or_folder(flow, what):
    import tempfile

    top = Path(tempfile.mkdtemp(prefix="changeover-ro-"))  # reachable by nobody
    top.chmod(0o755)
    folder = top / "ro"
    folder.mkdir()
    j = folder / "ship.db"
    shutil.copy(flow["dir"] / "snapshot.db", j)
    j.chmod(0o444 if what == "file" else 0o644)
    folder.chmod(0o555 if what == "folder" else 0o777)
    try:
        for args, needle in ((["verify"], "10 entries, chain intact"), (["show"], "MV Aurora"),
                             (["export"], '"last_seq": 10')):
            r = run_unprivileged(j, *args)
            assert r.returncode == 0 and needle in r.stdout, r.stderr
        r = run_unprivileged(j, "note", "x")
        one_line_exit_2(r, "a journal file you may write, in a folder you may write")
        assert sorted(p.name for p in folder.iterdir()) == ["ship.db"]
    finally:
        folder.chmod(0o755)
        shutil.rmtree(top)


def test_an_unreadable_journal_is_one_line(flow, tmp_path):
    import tempfile

    top = Path(tempfile.mkdtemp(prefix="changeover-nr-"))
    try:
        j = top / "ship.db"
        shutil.copy(flow["dir"] / "snapshot.db", j)
        j.chmod(0o600)
        for args in (["show"], ["note", "x"]):
            r = run_unprivileged(j, *args)
            if os.geteuid() != 0 and not shutil.which("setpriv"):
                break
            one_line_exit_2(r, str(j))
    finally:
        shutil.rmtree(top)


def test_read_only_commands_never_write_the_journal(flow, tmp_path):
    j = tmp_path / "ship.db"
    shutil.copy(flow["dir"] / "snapshot.db", j)
    before = j.read_bytes()
    for args in (["show"], ["verify"], ["export"], ["print", "--pdf", str(tmp_path / "r.pdf")]):
        ok(j, *args)
    assert j.read_bytes() == before
    assert sorted(p.name for p in tmp_path.iterdir()) == ["r.pdf", "ship.db"]


def test_a_journal_made_by_schema_version_2_is_read_and_migrated(tmp_path):
    old = ROOT / "tests" / "data" / "journal" / "schema2_journal.sqlite"
    j = tmp_path / "old.db"
    shutil.copy(old, j)
    assert "6 entries, chain intact" in ok(j, "verify")       # read-only: not migrated
    assert sqlite3.connect(j).execute("PRAGMA user_version").fetchone()[0] == 2
    assert "written by schema version 2" in ok(j, "show")
    ok(j, "note", "written by schema version 4")               # writing migrates it
    conn = sqlite3.connect(j)
    assert conn.execute("PRAGMA user_version").fetchone()[0] == 5
    with pytest.raises(sqlite3.DatabaseError, match="journal head"):
        conn.execute("UPDATE head SET seq = 1")
    conn.close()
    v = ok(j, "verify")
    assert "7 entries, chain intact" in v


def test_text_is_shown_as_typed(flow, tmp_path):
    j = tmp_path / "ship.db"
    shutil.copy(flow["dir"] / "snapshot.db", j)
    ok(j, "note", "valve [/] and [bold]V-12[/bold] \x1b[31mred", "--at", "2027-06-01T13:00Z")
    out = ok(j, "show", "--kind", "note")
    assert "valve [/] and [bold]V-12[/bold] \\x1b[31mred" in out
    assert "\x1b" not in out


def _listing_lines(j: Path, width: int | None) -> list[str]:
    env = {} if width is None else {"COLUMNS": str(width)}
    r = subprocess.run([sys.executable, "-m", "planner", "log", "show", "--journal", str(j)],
                       cwd=ROOT, env={**os.environ, **env}, capture_output=True, text=True,
                       timeout=60)
    assert r.returncode == 0, r.stderr
    return r.stdout.splitlines()


@pytest.mark.parametrize("width", [80, 120, None])  # None: piped, 160 columns
def test_show_never_cuts_a_number_time_or_position(flow, width):
    j = flow["journal"]
    lines = _listing_lines(j, width)
    text = "\n".join(lines)
    assert all(len(x) <= (width or 160) for x in lines), max(lines, key=len)
    assert all(x == x.rstrip() for x in lines)  # no padding at the ends of lines
    doc = json.loads(ok(j, "show", "--json"))
    for e in doc["entries"]:
        rec = e["entry"]["record"] or {}
        assert re.search(rf"(?m)^\s*{e['seq']}\s", text), e["seq"]
        if rec.get("time_utc"):
            utc = rec["time_utc"][:16].replace("T", " ") + "Z"
            assert utc in text, utc
        if rec.get("position"):
            p = rec["position"]
            lat = f"{int(abs(p['lat_deg'])):02d}°{abs(p['lat_deg']) % 1 * 60:04.1f}'"
            assert lat in text, lat
        for t in (rec.get("details") or {}).get("tanks") or []:
            if isinstance(t, dict):
                total = sum(x["volume15_m3"] for x in rec["details"]["tanks"])
                assert f"{total:.3f}" in text


@pytest.mark.parametrize("text", ["=HYPERLINK(\"http://x\",\"y\")", "+1+2", "-2+3",
                                  "@SUM(A1)"])
def test_export_csv_neutralises_formulas(flow, tmp_path, text):
    # [OWASP-CSV]: a cell starting with = + - @ tab or CR is prefixed with ' (read as text)
    j = tmp_path / "ship.db"
    shutil.copy(flow["dir"] / "snapshot.db", j)
    ok(j, "note", "--at", "2027-06-01T13:00Z", "--rank", text, "--name", "A. B", "--confirm",
       "--", text)
    out = tmp_path / "j.csv"
    ok(j, "export", "--out", str(out))
    rows = list(csv.DictReader(io.StringIO(out.read_text(encoding="utf-8"))))
    assert rows[-1]["text"] == "'" + text and rows[-1]["rank"] == "'" + text
    for row in rows:
        for v in row.values():
            assert not v or v[0] not in "=+@\t\r", v
            assert v[:1] != "-" or re.fullmatch(r"-\d+(\.\d+)?", v), v
    start = next(r for r in rows if r["seq"] == "4")
    assert start["lat_deg"] == "-39.331667"  # negative numbers stay numbers


@pytest.mark.parametrize("cmd", [["export", "--out"], ["print", "--pdf"]])
def test_unwritable_outputs_are_one_line_before_any_work(flow, tmp_path, cmd):
    j = tmp_path / "ship.db"
    shutil.copy(flow["dir"] / "snapshot.db", j)
    (tmp_path / "plain").write_text("x")
    for target, why in ((tmp_path, "it is a folder"),
                        (tmp_path / "plain" / "out.x", "is a file, not a folder")):
        one_line_exit_2(run(j, *cmd, str(target)), f"{cmd[1]}: '{target}': expected a file "
                                                   "path you may write")
        assert why in run(j, *cmd, str(target)).stderr
        # checked first: refused for the output even when the journal is missing too
        r = run(tmp_path / "none.db", *cmd, str(target))
        one_line_exit_2(r, cmd[1])
    assert sorted(p.name for p in tmp_path.iterdir()) == ["plain", "ship.db"]


@pytest.mark.skipif(os.geteuid() == 0 and shutil.which("setpriv") is None,
                    reason="root ignores file permissions and setpriv is missing")
def test_output_into_a_read_only_folder_is_one_line(flow):
    import tempfile

    top = Path(tempfile.mkdtemp(prefix="changeover-out-"))
    try:
        top.chmod(0o755)
        j = top / "ship.db"
        shutil.copy(flow["dir"] / "snapshot.db", j)
        j.chmod(0o644)
        ro = top / "ro"
        ro.mkdir()
        ro.chmod(0o555)
        r = run_unprivileged(j, "export", "--out", str(ro / "j.csv"))
        one_line_exit_2(r, "Permission denied")
        assert list(ro.iterdir()) == []
    finally:
        (top / "ro").chmod(0o755)
        shutil.rmtree(top)


def test_exported_files_get_the_users_umask(flow, tmp_path):
    out = tmp_path / "j.csv"
    r = subprocess.run(["sh", "-c", f"umask 002 && {sys.executable} -m planner log export "
                        f"--journal {flow['journal']} --out {out}"], cwd=ROOT,
                       capture_output=True, text=True, timeout=60)
    assert r.returncode == 0, r.stderr
    assert oct(out.stat().st_mode & 0o777) == oct(0o664)  # 0o666 & ~0o002, not 0o600


@pytest.mark.parametrize(("content", "needle"), [
    (None, "expected an existing plan JSON file"),                      # a folder
    ("/dev/zero", "expected an existing plan JSON file"),               # a device: never read
    (b"\xff\xfe{}", "expected valid JSON (UTF-8)"),
    (b'{"changeovers": [{"number": 1, "area": "A", "direction": "to_compliant", '
     b'"start_utc": "0001-01-01T00:00+14:00", "start_lat": 1, "start_lon": 1}]}',
     "changeovers[0].start_utc: '0001-01-01T00:00+14:00': expected an ISO 8601 time of a "
     "year between 2 and 9998"),
    (b"[" * 100000, "expected valid JSON"),
])
def test_hostile_plan_files_are_one_line(flow, tmp_path, content, needle):
    j = tmp_path / "ship.db"
    shutil.copy(flow["dir"] / "snapshot.db", j)
    if content is None:
        plan = tmp_path / "folder"
        plan.mkdir()
    elif isinstance(content, str):
        plan = Path(content)
    else:
        plan = tmp_path / "plan.json"
        plan.write_bytes(content)
    r = run(j, "start", "--from-plan", str(plan), "--changeover", "1", "--as-planned",
            "--fuel", "MGO")
    one_line_exit_2(r, needle)


@pytest.mark.parametrize("cmd", [["export", "--out"], ["print", "--pdf"]])
def test_an_output_onto_the_journal_is_refused(flow, tmp_path, cmd):
    j = tmp_path / "ship.db"
    shutil.copy(flow["dir"] / "snapshot.db", j)
    before = j.read_bytes()
    for target in (j, tmp_path / "." / "ship.db"):
        one_line_exit_2(run(j, *cmd, str(target), "--format", "json") if cmd[0] == "export"
                        else run(j, *cmd, str(target)), "expected a file other than the journal")
    assert j.read_bytes() == before


@pytest.mark.parametrize("opt", ["--rank", "--name", "--area", "--voyage", "--circuit"])
def test_names_longer_than_120_characters_are_refused(flow, tmp_path, opt):
    j = tmp_path / "ship.db"
    shutil.copy(flow["dir"] / "snapshot.db", j)
    r = run(j, "start", "--at", "2027-06-01T17:10Z", "--pos", "1 1", "--area", "A", "--fuel",
            "MGO", opt, "x" * 121)
    one_line_exit_2(r, "expected at most 120 characters (only notes, remarks and reasons")
    assert "started" in ok(j, "start", "--at", "2027-06-01T17:10Z", "--pos", "1 1", "--area",
                           "A", "--fuel", "MGO", opt, "x" * 120)
