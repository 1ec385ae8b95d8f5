"""The saturation dome for the charts: computed once per fluid and CoolProp version, then read from the
user's cache as the very same floats; a damaged or missing cache only costs the computation."""
from __future__ import annotations

import json

import pytest

from calcdoc.physics import dome
from calcdoc.physics.gas import RealGas


@pytest.fixture
def cache(tmp_path, monkeypatch):
    monkeypatch.setenv("CALCDOC_CACHE_DIR", str(tmp_path))
    return tmp_path


def test_second_dome_comes_from_the_cache_bit_for_bit(cache):
    gas = RealGas("CarbonDioxide")
    n0 = dome.computed
    first = dome.saturation_dome(gas)
    second = dome.saturation_dome(RealGas("CarbonDioxide"))
    assert dome.computed == n0 + 1
    files = list((cache / "dome").glob("CarbonDioxide-*.json"))
    assert len(files) == 1 and not list((cache / "dome").glob(".*"))   # no temporary file left
    assert second == first                       # exact float equality, point by point
    assert first == gas.saturation_curve()       # and the same as computing it afresh


def test_key_names_the_coolprop_version(cache):
    import CoolProp

    dome.saturation_dome(RealGas("Nitrogen"))
    (f,) = (cache / "dome").glob("Nitrogen-*.json")
    assert f"-{CoolProp.__version__}-" in f.name and f.name.endswith(f"-60-v{dome.FORMAT}.json")


@pytest.mark.parametrize("damage", ["", "{not json", '{"points": [[1, 2, 3]]}', '{"points": [[1, 2, 3, NaN]]}'])
def test_damaged_cache_file_is_computed_again(cache, damage):
    gas = RealGas("Methane")
    good = dome.saturation_dome(gas)
    (f,) = (cache / "dome").glob("Methane-*.json")
    f.write_text(damage)
    n0 = dome.computed
    assert dome.saturation_dome(gas) == good
    assert dome.computed == n0 + 1
    assert json.loads(f.read_text())["points"][0] == list(good[0])   # rewritten whole


def test_caching_off_or_unwritable_still_gives_the_dome(tmp_path, monkeypatch):
    gas = RealGas("Argon")
    monkeypatch.setenv("CALCDOC_CACHE_DIR", "")
    off = dome.saturation_dome(gas)
    blocker = tmp_path / "file"
    blocker.write_text("x")
    monkeypatch.setenv("CALCDOC_CACHE_DIR", str(blocker / "sub"))    # cannot be created
    assert dome.saturation_dome(gas) == off == gas.saturation_curve()


def test_mixture_has_no_dome(cache):
    gas = RealGas(None, (("Methane", 0.9), ("Ethane", 0.1)))
    assert dome.saturation_dome(gas) is None
