"""Unknown keys are refused with the nearest valid key (common practice for typo'd input)."""

import pytest

from geo.errors import InputError
from planner.common.keys import check_keys, nearest_key


@pytest.mark.parametrize(("typed", "meant"), [
    ("speed_kts", "speed_kn"),
    ("volume_l", "volume_m3"),
    ("Depart", "depart"),
])
def test_a_typo_names_the_key_meant(typed: str, meant: str) -> None:
    allowed = ("speed_kn", "volume_m3", "depart", "route")
    assert nearest_key(typed, allowed) == meant
    with pytest.raises(InputError) as err:
        check_keys({typed: 1}, allowed, "v.toml", "voyage")
    assert f"voyage.{typed}" in str(err.value)
    assert f"did you mean {meant!r}" in str(err.value)


def test_known_keys_pass_and_far_keys_get_no_hint() -> None:
    check_keys({"depart": 1, "route": 2}, ("depart", "route"), "v.toml", "voyage")
    with pytest.raises(InputError) as err:
        check_keys({"xyzzy": 1}, ("depart", "route"), "v.toml", "")
    assert "did you mean" not in str(err.value)
    assert str(err.value).startswith("v.toml: xyzzy: 'xyzzy': expected one of the keys")
