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
