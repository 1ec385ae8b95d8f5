"""The units read without pint give the very floats pint gives, so a job reads the same either way."""
from __future__ import annotations

import random
import subprocess
import sys
from pathlib import Path

import pint
import pytest

from calcdoc import units

EXAMPLES = sorted((Path(__file__).resolve().parents[2] / "example_jobs").glob("*.yaml"))


@pytest.fixture(scope="module")
def ureg():
    u = pint.UnitRegistry()          # built from pint's own definitions, not calcdoc's cache
    u.define("kmol = 1000 * mol")
    return u


VALUES = [0.0, 1.0, 7.5, 101.325, 1e-9, 123456.789, -40.0] + [random.Random(17).uniform(-1e4, 1e4) for _ in range(40)]


@pytest.mark.parametrize("unit, si", sorted(units._FAST))
def test_table_factor_is_pints(ureg, unit, si):
    f = units._FAST[(unit, si)]
    for x in VALUES:
        assert x * f == ureg.Quantity(x, unit).to(si).magnitude     # bit for bit


@pytest.mark.parametrize("si, unit", sorted(units._FAST_DISPLAY))
def test_display_table_is_what_pint_gives(si, unit):
    ureg = units.registry()          # the registry the report would otherwise convert with
    a = ureg.Quantity(0.0, si).to(unit).magnitude
    b = ureg.Quantity(1.0, si).to(unit).magnitude
    assert units._FAST_DISPLAY[(si, unit)] == (b - a, a)     # bit for bit, by _factor's own formula
    for x in VALUES:                 # and a display from the table is pint's conversion to the last bits
        assert units.convert(x, si, unit) == pytest.approx(ureg.Quantity(x, si).to(unit).magnitude, rel=1e-12, abs=1e-9)


def test_every_unit_of_the_base_systems_displays_without_pint():
    for system in units._SYSTEMS.values():
        for si, unit in system.items():
            assert si in ("", unit) or (si, unit) in units._FAST_DISPLAY, (si, unit)
    for (si, _), unit in units._FLAVOURS.items():
        assert (si.split("|")[0], unit) in units._FAST_DISPLAY


@pytest.mark.parametrize("unit", sorted(units._FAST_T))
def test_absolute_temperatures_are_pints(ureg, unit):
    scale, offset = units._FAST_T[unit]
    for x in VALUES:
        assert x * scale + offset == ureg.Quantity(x, unit).to("K").magnitude
        assert units.parse_quantity(f"{x!r} {unit}", "temperature").si == ureg.Quantity(x, unit).to("K").magnitude


@pytest.mark.parametrize("unit", sorted(units._FAST_DT))
def test_temperature_differences_are_pints(ureg, unit):
    for x in VALUES:
        assert x * units._FAST_DT[unit] == ureg.Quantity(x, unit).to("K").magnitude


def test_parse_goes_through_the_table_for_spellings_engineers_write(ureg):
    for text, kind, unit, si in [("7.5 bar", "pressure", "bar", "Pa"), ("50 L", "volume", "liter", "m**3"),
                                 ("3000 kg/h", "mass_flow", "kg/hour", "kg/s"), ("113 in3", "volume", "in**3", "m**3"),
                                 ("1200 m3/h", "volume_flow", "m**3/hour", "m**3/s"), ("250 kW", "power", "kW", "W")]:
        assert units.parse_quantity(text, kind).si == ureg.Quantity(float(text.split()[0]), unit).to(si).magnitude


def test_check_of_the_examples_loads_the_job_layer_only():
    code = ("import sys\nfrom calcdoc import main\n"
            f"codes = [main(['check', p]) for p in {[str(p) for p in EXAMPLES]!r}]\n"
            "heavy = ('pint', 'CoolProp', 'matplotlib', 'weasyprint', 'jinja2', 'numpy', 'calcdoc.engine',\n"
            "         'calcdoc.report', 'calcdoc.cli.commands', 'importlib.metadata')\n"
            "print(codes, sorted(m for m in heavy if m in sys.modules))")
    # the first check on a machine lists CoolProp's fluids once (kept in the user's cache); later ones do not
    subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=120, check=True)
    r = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=120)
    assert r.returncode == 0, r.stderr
    assert r.stdout.strip().splitlines()[-1] == f"{[0] * len(EXAMPLES)} []"


def test_coolprop_version_read_without_the_library_is_its_installed_version():
    from importlib import metadata

    from calcdoc.physics.fluids import coolprop_version

    assert coolprop_version() == metadata.version("CoolProp")


def test_unknown_or_wrong_units_still_get_pints_judgement():
    with pytest.raises(units.UnitParseError, match="not a unit of volume"):
        units.parse_quantity("5 bar", "volume")
    with pytest.raises(units.UnitParseError, match="not a unit calcdoc knows"):
        units.parse_quantity("5 blorp", "pressure")
