"""The shared TOML reader: hostile files end in one line naming the file (issue 11 item 14).

The expected behaviour is ours (README "What input is refused"); each case is a file a
hostile tester gives as the ship or the voyage.
"""

import os

import pytest

from geo.errors import InputError
from planner.common.input_files import MAX_TOML_BYTES, check_finite, read_toml


def _refused(path, what="voyage file") -> str:
    with pytest.raises(InputError) as err:
        read_toml(path, what)
    text = str(err.value)
    assert "\n" not in text and text.startswith(str(path))
    return text


def test_a_good_file_is_read(tmp_path):
    p = tmp_path / "v.toml"
    p.write_bytes("\ufeff[voyage]\nname = \"Å\"\nspeed_kn = 1e1\n".encode())
    assert read_toml(p, "voyage file") == {"voyage": {"name": "Å", "speed_kn": 10.0}}


def test_missing_folder_and_special_files(tmp_path):
    assert "expected an existing voyage file" in _refused(tmp_path / "none.toml")
    assert "'a folder': expected a voyage file (TOML), not a folder" in _refused(tmp_path)
    # /dev/zero would be read without end: it is refused before any byte is read
    assert "not a device, pipe or socket" in _refused("/dev/zero", "ship file")


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="needs named pipes")
def test_a_named_pipe_is_refused_without_blocking(tmp_path):
    fifo = tmp_path / "pipe.toml"
    os.mkfifo(fifo)
    assert "not a device, pipe or socket" in _refused(fifo)


def test_non_utf8_names_the_line_and_byte(tmp_path):
    p = tmp_path / "latin1.toml"
    p.write_bytes("[voyage]\nname = \"Bjørn\"\n".encode("latin-1"))
    assert "line 2: 'byte 0xf8': expected UTF-8 text" in _refused(p)


def test_too_large_and_invalid_toml(tmp_path):
    big = tmp_path / "big.toml"
    big.write_bytes(b"#" * (MAX_TOML_BYTES + 1))
    assert f"file size: '{MAX_TOML_BYTES + 1} bytes'" in _refused(big)
    bad = tmp_path / "bad.toml"
    bad.write_text("[voyage\n")
    assert "expected valid TOML" in _refused(bad)


@pytest.mark.parametrize(("text", "place", "shown"), [
    ("[voyage]\nspeed_kn = nan\n", "voyage.speed_kn", "nan"),
    ("[[fuel]]\nname = 'a'\n[[fuel]]\nsulphur_pct = -inf\n", "fuel[2].sulphur_pct", "-inf"),
    ("[c.me]\nsfoc_curve = [[25.0, 180.0], [50.0, +inf]]\n", "c.me.sfoc_curve[2][2]", "inf"),
])
def test_nan_and_infinity_anywhere_name_the_key(tmp_path, text, place, shown):
    p = tmp_path / "n.toml"
    p.write_text(text)
    assert f"{p}: {place}: {shown}: expected a finite number" in _refused(p)


def test_check_finite_passes_finite_documents():
    check_finite({"a": [1.0, {"b": 2}], "c": "nan"}, "x.toml")  # the text "nan" is no number
