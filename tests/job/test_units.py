"""units.py: parsing, gauge pressure, standard atmosphere, display conversion."""
import math

import pytest

from calcdoc import units
from calcdoc.units import UnitParseError, parse_quantity, standard_atmosphere_pressure


def test_pressure_units_exact():
    # 1 bar = 100 000 Pa exactly; 1 psi = 6 894.757 293 168 Pa (NIST SP 811, appendix B.8)
    assert parse_quantity("8 bara", "pressure").si == pytest.approx(8e5, rel=1e-15)
    assert parse_quantity("100 psia", "pressure").si == pytest.approx(689475.7293168, rel=1e-12)
    assert parse_quantity("101.325 kPa", "pressure").si == pytest.approx(101325.0, rel=1e-15)


def test_gauge_needs_atmosphere_and_adds_it():
    with pytest.raises(UnitParseError) as exc:
        parse_quantity("7 barg", "pressure")
    assert "site" in exc.value.valid
    p = parse_quantity("7 barg", "pressure", atmosphere=101325.0)
    assert p.gauge and p.si == pytest.approx(801325.0, rel=1e-15)   # P = Pg + Patm (definition)
    assert parse_quantity("120 psig", "pressure", atmosphere=101325.0).si == pytest.approx(
        120 * 6894.757293168 + 101325.0, rel=1e-12)                    # NIST SP 811 psi
    for text in ("7 bar(g)", "7 bar gauge", "700 kPag"):
        assert parse_quantity(text, "pressure", atmosphere=1e5).gauge


def test_temperatures_absolute_not_differences():
    # degC and degF are converted as temperatures: 0 degC = 273.15 K, 32 degF = 273.15 K (SI brochure, NIST SP 811)
    assert parse_quantity("25 degC", "temperature").si == pytest.approx(298.15, abs=1e-12)
    assert parse_quantity("32 degF", "temperature").si == pytest.approx(273.15, abs=1e-12)
    assert parse_quantity("491.67 degR", "temperature").si == pytest.approx(273.15, abs=1e-9)
    with pytest.raises(UnitParseError):
        parse_quantity("25 delta_degC", "temperature")


def test_numbers_without_units_and_wrong_dimension():
    with pytest.raises(UnitParseError, match="no unit"):
        parse_quantity(7, "pressure")
    with pytest.raises(UnitParseError, match="not a unit of pressure"):
        parse_quantity("300 K", "pressure")
    with pytest.raises(UnitParseError):
        parse_quantity("7 bananas", "pressure")


def test_volume_spellings():
    # 1 L = 1e-3 m3 exactly; 1 ft = 0.3048 m exactly (SI brochure; NIST SP 811)
    assert parse_quantity("50 L", "volume").si == pytest.approx(0.05, rel=1e-14)
    assert parse_quantity("2 ft3", "volume").si == pytest.approx(2 * 0.3048 ** 3, rel=1e-14)


@pytest.mark.parametrize("z, P", [
    # U.S. Standard Atmosphere 1976, table 1 (geometric altitude), from memory
    (0.0, 101325.0),
    (500.0, 95461.0),
    (1000.0, 89876.0),
    (2000.0, 79501.0),
    (5000.0, 54048.0),
    (10000.0, 26500.0),
])
def test_standard_atmosphere_table(z, P):
    assert standard_atmosphere_pressure(z) == pytest.approx(P, rel=2e-4)


def test_standard_atmosphere_range():
    with pytest.raises(ValueError):
        standard_atmosphere_pressure(12000.0)


def test_display_conversions():
    # 298.15 K shown as 25 degC; 1e5 Pa as 14.5038 psia (NIST SP 811)
    v, u = units.display(298.15, "K", "SI")
    assert v == pytest.approx(25.0, abs=1e-9) and u == "°C"
    v, u = units.display(1e5, "Pa", "US")
    assert v == pytest.approx(1e5 / 6894.757293168, rel=1e-12) and u == "psia"
    # a temperature difference never takes the offset
    v, u = units.display(10.0, "K", "US", difference=True)
    assert v == pytest.approx(18.0, rel=1e-12) and u == "Δ°F"   # the issue: temperature differences as K or Δ°F, never °R
    assert math.isclose(units.display(1000.0, "J", "SI")[0], 1.0)


def test_standard_volume_flow_units():
    # 1 ft = 0.3048 m exactly (NIST SP 811); Nm3 and scf are volumes at stated reference conditions
    assert parse_quantity("60000 Nm3/h", "standard_volume_flow").si == pytest.approx(60000 / 3600, rel=1e-14)
    assert parse_quantity("2 MMSCFD", "standard_volume_flow").si == pytest.approx(2e6 * 0.3048 ** 3 / 86400, rel=1e-14)
    assert parse_quantity("500 scfm", "standard_volume_flow").si == pytest.approx(500 * 0.3048 ** 3 / 60, rel=1e-14)
    with pytest.raises(UnitParseError, match="standard conditions"):
        parse_quantity("1000 Nm3/h", "volume_flow")       # an actual volume flow cannot be in Nm3/h


def test_kgf_per_cm2_gauge():
    # 1 kgf/cm2 = 98 066.5 Pa exactly (standard gravity, CGPM 1901; NIST SP 811)
    p = parse_quantity("10 kgf/cm2g", "pressure", atmosphere=101325.0)
    assert p.gauge and p.si == pytest.approx(980665.0 + 101325.0, rel=1e-14)


@pytest.mark.parametrize("text, kind, si", [
    # exact unit definitions: 1 psi = 6894.757293168 Pa, 1 lb = 0.45359237 kg, 1 ft = 0.3048 m,
    # 1 US gallon = 231 in3 (NIST SP 811, appendix B)
    ("100 PSIG", "pressure", 100 * 6894.757293168 + 101325.0),
    ("8 Bar", "pressure", 8e5),
    ("1000 ACFM", "volume_flow", 1000 * 0.3048 ** 3 / 60),
    ("5 lbm", "mass", 5 * 0.45359237),
    ("100 US gal", "volume", 100 * 231 * 0.0254 ** 3),
    ("10 cu ft", "volume", 10 * 0.3048 ** 3),
    ("1000 Nm³/h", "standard_volume_flow", 1000 / 3600),
    ("20 deg C", "temperature", 293.15),
    ("10 degF", "temperature_difference", 10 / 1.8),           # a margin is a difference
])
def test_datasheet_spellings(text, kind, si):
    assert parse_quantity(text, kind, atmosphere=101325.0).si == pytest.approx(si, rel=1e-12)
