"""Every command's output files through planner.common.outputs (issue 11 item 13): an
unwritable target is one line, exit 2, nothing written; a written file has the umask's mode.

``procedure`` stands for the commands that write a PDF, ``flush --chart`` for the charts
(both write through ``write_atomic``).
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest

from tests.helpers.paths import ROOT

SHIP = ROOT / "areas_sample" / "ship.toml"


def changeover(*args: str, umask: int | None = None) -> subprocess.CompletedProcess:
    pre = (lambda: os.umask(umask)) if umask is not None else None
    return subprocess.run([sys.executable, "-m", "planner", *args], cwd=ROOT,
                          capture_output=True, text=True, timeout=300, preexec_fn=pre)


@pytest.mark.parametrize("where", ["folder", "under a file"])
def test_procedure_pdf_to_an_unwritable_target_is_one_line(tmp_path, where):
    (tmp_path / "plain").write_text("x")
    target = tmp_path if where == "folder" else tmp_path / "plain" / "p.pdf"
    r = changeover("procedure", str(SHIP), "--pdf", str(target))
    assert r.returncode == 2, r.stderr
    lines = r.stderr.strip().splitlines()
    assert len(lines) == 1 and "expected a file path you may write" in lines[0], r.stderr
    assert "Traceback" not in r.stderr
    assert sorted(p.name for p in tmp_path.iterdir()) == ["plain"]


def test_a_written_pdf_has_the_umask_mode(tmp_path):
    out = tmp_path / "p.pdf"
    r = changeover("procedure", str(SHIP), "--pdf", str(out), umask=0o027)
    assert r.returncode == 0, r.stderr
    assert out.read_bytes().startswith(b"%PDF")
    assert oct(out.stat().st_mode & 0o777) == oct(0o640)   # 0o666 & ~0o027, not 0o600
    assert sorted(p.name for p in tmp_path.iterdir()) == ["p.pdf"]


def test_a_chart_to_an_unwritable_target_is_one_line(tmp_path):
    r = changeover("flush", str(SHIP), "--chart", str(tmp_path))
    assert r.returncode == 2, r.stderr
    assert len(r.stderr.strip().splitlines()) == 1 and "it is a folder" in r.stderr
    assert list(Path(tmp_path).iterdir()) == []


# ---- every output option is checked before any input is read or anything computed
# (issue 11 item 13). The input named is missing: were it read first, the error would be
# about it. The targets are a folder and a path under a regular file, which no user (not
# even root, who ignores permission bits) can write a file at.

MISSING = "no_such_input.toml"
COMMANDS = {
    "plan": (["plan", MISSING], ["--pdf", "--chart", "--map", "--geojson", "--sheets",
                                 "--gpx", "--csv"]),
    "route": (["route", "no_such_route.csv", "--areas", "areas_sample"],
              ["--geojson", "--map", "--csv"]),
    "flush": (["flush", MISSING], ["--chart", "--sensitivity-chart", "--csv"]),
    "procedure": (["procedure", MISSING], ["--pdf", "--csv"]),
    "calibrate": (["calibrate", MISSING, "no_such_trend.csv", "--switch-at",
                   "2027-05-30T06:00Z"], ["--chart", "--write"]),
}
CASES = [(cmd, opt) for cmd, (_, opts) in COMMANDS.items() for opt in opts]


def refused_first(args: list[str], option: str, tmp_path: Path) -> str:
    r = changeover(*args)
    assert r.returncode == 2, r.stderr
    lines = r.stderr.strip().splitlines()
    assert len(lines) == 1 and "Traceback" not in r.stderr, r.stderr
    assert f"{option}:" in lines[0] and "no_such" not in lines[0], lines[0]
    assert r.stdout == ""
    return lines[0]


@pytest.mark.parametrize(("command", "option"), CASES)
def test_an_unwritable_output_is_refused_before_the_input_is_read(tmp_path, command, option):
    (tmp_path / "plain").write_text("x")
    args, _ = COMMANDS[command]
    under_file = tmp_path / "plain" / "out"
    line = refused_first([*args, option, str(under_file)], option, tmp_path)
    assert "is a file, not a folder" in line
    if option != "--csv":  # a folder is the right target of --csv
        line = refused_first([*args, option, str(tmp_path)], option, tmp_path)
        assert "it is a folder" in line
    assert sorted(p.name for p in tmp_path.iterdir()) == ["plain"]
    assert (tmp_path / "plain").read_text() == "x"


@pytest.mark.skipif(hasattr(os, "geteuid") and os.geteuid() == 0,
                    reason="root writes into a read-only folder")
@pytest.mark.parametrize("option", ["--pdf", "--csv"])
def test_a_read_only_folder_is_refused_before_the_plan(tmp_path, option):
    ro = tmp_path / "ro"
    ro.mkdir()
    ro.chmod(0o500)
    try:
        target = ro / ("plan.pdf" if option == "--pdf" else "tables")
        line = refused_first(["plan", MISSING, option, str(target)], option, tmp_path)
        assert str(target) in line
        assert list(ro.iterdir()) == []
    finally:
        ro.chmod(0o700)
