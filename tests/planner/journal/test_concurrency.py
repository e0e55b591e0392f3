"""Writers in other processes: killed with SIGKILL mid-batch, and two appending at once."""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from planner.journal import Journal
from tests.helpers.paths import ROOT
from tests.planner.journal.test_store import new_journal

# A writer appending notes "<tag> <i>" in batches of BATCH entries per transaction; after
# each commit it prints the number of entries it has committed, then pauses PAUSE seconds
# (without a pause one writer can hold the lock throughout while the other backs off).
WRITER = """
import sys, time
from planner.journal import Journal
from planner.journal.compose import Typed, note_entry
path, tag, total, batch = sys.argv[1], sys.argv[2], int(sys.argv[3]), int(sys.argv[4])
pause = float(sys.argv[5])
t = Typed(rank="3rd Engineer", name=f"writer {tag}", at="2027-06-01T00:00Z", tz="+12:00",
          confirm=True)
done = 0
with Journal.open(path) as j:
    print("ready", flush=True)
    sys.stdin.readline()                     # start together
    while done < total:
        j.append_many([note_entry(t, f"{tag} {done + i}") for i in range(batch)])
        done += batch
        print(done, flush=True)
        time.sleep(pause)
"""


def writer(path: Path, tag: str, total: int, batch: int, pause_s: float = 0.0
           ) -> subprocess.Popen:
    return subprocess.Popen([sys.executable, "-c", WRITER, str(path), tag, str(total),
                             str(batch), str(pause_s)], cwd=ROOT, stdin=subprocess.PIPE,
                            stdout=subprocess.PIPE, text=True)


def notes_by(path: Path, tag: str) -> list[int]:
    with Journal.open(path) as j:
        st = j.state()
    out = []
    for s in st.stored.values():
        d = s.entry.record.details if s.entry.record else None
        text = getattr(d, "text", "")
        if text.startswith(f"{tag} "):
            out.append(int(text.split()[1]))
    return out


@pytest.mark.skipif(not hasattr(signal, "SIGKILL"), reason="needs SIGKILL")
@pytest.mark.parametrize("delay_s", [0.0, 0.013, 0.037])
def test_sigkill_mid_batch_keeps_every_committed_entry(tmp_path, delay_s):
    path = tmp_path / "ship.db"
    new_journal(path).close()
    batch = 7
    p = writer(path, "k", 100_000, batch)
    assert p.stdout.readline().strip() == "ready"
    p.stdin.write("go\n")
    p.stdin.flush()
    reported = 0
    while reported < 5 * batch:              # let it commit a few batches first
        reported = int(p.stdout.readline())
    time.sleep(delay_s)
    os.kill(p.pid, signal.SIGKILL)
    rest = p.stdout.read().split()           # lines printed before it died
    p.wait()
    assert p.returncode == -signal.SIGKILL
    if rest:
        reported = int(rest[-1])
    with Journal.open(path) as j:             # opens, and the chain is intact
        report = j.verify()
    assert report.ok, report.problems
    got = notes_by(path, "k")
    # Every committed entry is there, in order; a batch is all there or not at all.
    assert got == list(range(len(got)))
    assert reported <= len(got) <= reported + batch
    assert len(got) % batch == 0
    assert report.entries == 3 + len(got)


def test_two_writers_at_once_lose_nothing(tmp_path):
    path = tmp_path / "ship.db"
    new_journal(path).close()
    n = 200
    procs = [writer(path, tag, n, 1, pause_s=0.002) for tag in ("a", "b")]
    for p in procs:
        assert p.stdout.readline().strip() == "ready"
    t0 = time.perf_counter()
    for p in procs:
        p.stdin.write("go\n")
        p.stdin.flush()
    for p in procs:
        p.stdout.read()
        assert p.wait(timeout=120) == 0
    elapsed = time.perf_counter() - t0
    with Journal.open(path) as j:
        report = j.verify()
        seqs = [r.seq for r in j.rows()]
    assert report.ok, report.problems
    assert seqs == list(range(1, 3 + 2 * n + 1))
    a, b = notes_by(path, "a"), notes_by(path, "b")
    assert a == list(range(n)) and b == list(range(n))
    # Both really ran at the same time: their entries interleave.
    with Journal.open(path) as j:
        tags = [s.entry.who.name for s in j.state().stored.values()][3:]
    switches = sum(1 for x, y in zip(tags, tags[1:], strict=False) if x != y)
    # (a loaded machine may let one writer run on for a while: a few switches prove it)
    assert switches >= 4, f"writers did not overlap ({switches} switches, {elapsed:.1f} s)"


def test_readers_during_writers_see_whole_journals(tmp_path):
    # open_read copies the journal while two writers append: every copy is a whole journal
    # (its chain verifies) and no copy is older than the one before it
    path = tmp_path / "ship.db"
    new_journal(path).close()
    n = 150
    procs = [writer(path, tag, n, 1, pause_s=0.001) for tag in ("a", "b")]
    for p in procs:
        assert p.stdout.readline().strip() == "ready"
    for p in procs:
        p.stdin.write("go\n")
        p.stdin.flush()
    last, reads = 0, 0
    while any(p.poll() is None for p in procs) or reads < 3:
        with Journal.open_read(path) as j:
            report = j.verify()
        assert report.ok, report.problems
        assert report.last_seq >= last
        last, reads = report.last_seq, reads + 1
    for p in procs:
        p.stdout.read()
        assert p.wait(timeout=120) == 0
    with Journal.open_read(path) as j:
        assert j.verify().entries == 3 + 2 * n
    assert reads >= 3
