"""Output files: unwritable targets refused in one line before any work, the user's umask,
and never half a file (issue 11 item 13). Behaviour of POSIX files (common practice)."""

from __future__ import annotations

import os
import stat
import subprocess
import sys
import tempfile
from pathlib import Path

import pytest

from geo.errors import InputError
from planner.common.outputs import check_outputs, check_writable, write_atomic, write_text


def test_a_folder_a_file_as_parent_and_an_empty_name_are_refused(tmp_path):
    (tmp_path / "plain").write_text("x")
    for target, why in ((tmp_path, "it is a folder"),
                        (tmp_path / "plain" / "out.pdf", "is a file, not a folder"),
                        (tmp_path / "plain" / "a" / "b.csv", "is a file, not a folder"),
                        ("", "a file name")):
        with pytest.raises(InputError, match="expected a file path you may write") as e:
            check_writable(target, "--out")
        assert why in str(e.value) and str(e.value).startswith("--out: ")
        assert "\n" not in str(e.value)
    assert sorted(p.name for p in tmp_path.iterdir()) == ["plain"]


def test_check_outputs_names_the_option(tmp_path):
    with pytest.raises(InputError, match=r"^--chart: "):
        check_outputs({"--pdf": tmp_path / "ok.pdf", "--chart": tmp_path, "--map": None})


def test_a_missing_folder_is_made_when_writing(tmp_path):
    target = tmp_path / "new" / "deeper" / "out.txt"
    check_writable(target)
    assert not (tmp_path / "new").exists()  # the check makes nothing
    write_text(target, "hello")
    assert target.read_text() == "hello"


@pytest.mark.parametrize("mask", [0o022, 0o002, 0o077])
def test_files_get_the_users_umask(tmp_path, mask):
    old = os.umask(mask)
    try:
        write_text(tmp_path / "out.txt", "x")
    finally:
        os.umask(old)
    assert stat.S_IMODE((tmp_path / "out.txt").stat().st_mode) == 0o666 & ~mask


def test_a_replaced_file_keeps_its_mode(tmp_path):
    target = tmp_path / "out.txt"
    target.write_text("old")
    target.chmod(0o640)
    write_text(target, "new")
    assert target.read_text() == "new" and stat.S_IMODE(target.stat().st_mode) == 0o640


def test_a_failed_write_leaves_the_old_file_whole_and_nothing_beside_it(tmp_path):
    target = tmp_path / "out.pdf"
    target.write_bytes(b"the old copy")

    def half(path: str) -> None:
        Path(path).write_bytes(b"%PDF half")
        raise RuntimeError("interrupted")

    with pytest.raises(RuntimeError):
        write_atomic(target, half)
    assert target.read_bytes() == b"the old copy"
    assert [p.name for p in tmp_path.iterdir()] == ["out.pdf"]


def test_a_killed_writer_leaves_no_half_file(tmp_path):
    target = tmp_path / "out.txt"
    code = ("import os, sys, time\n"
            "from pathlib import Path\n"
            "from planner.common.outputs import write_atomic\n"
            "def w(p):\n"
            "    Path(p).write_text('half')\n"
            "    os.kill(os.getpid(), 9)\n"
            f"write_atomic({str(target)!r}, w)\n")
    r = subprocess.run([sys.executable, "-c", code], capture_output=True)
    assert r.returncode == -9
    assert not target.exists()  # a leftover temporary name may remain, never the target


def test_a_device_is_written_in_place():
    write_text("/dev/null", "discarded")
    assert Path("/dev/null").is_char_device()


def test_a_read_only_folder_is_refused_even_for_root(tmp_path):
    # tried by making a file there, not judged from the permission bits: for an ordinary
    # user the bits refuse it; for root only a read-only medium would (not made here)
    folder = Path(tempfile.mkdtemp(prefix="changeover-ro-"))
    try:
        folder.chmod(0o555)
        if os.geteuid() == 0:
            check_writable(folder / "out.csv")  # root may write: accepted, nothing left
            assert list(folder.iterdir()) == []
        else:
            with pytest.raises(InputError, match="Permission denied"):
                check_writable(folder / "out.csv", "--out")
    finally:
        folder.chmod(0o755)
        folder.rmdir()
