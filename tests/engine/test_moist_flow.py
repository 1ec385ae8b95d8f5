"""Moist air in steady flow: a compressor with an intercooler and an aftercooler against a hand balance of water
and of energy (CoolProp's Air and Water called directly), the warnings, and bad humidity inputs (exit 2)."""
from __future__ import annotations

import pytest
from conftest import flow_job

from calcdoc.engine import run
from calcdoc.errors import JobError
from calcdoc.job import loads
from calcdoc.report.words import say

AIR = "{fluid: Air, model: real}"
TRAIN = """\
- name: Compressor
  process: compressor
  efficiency: {polytropic: 0.8}
  staging: {stages: 2, intercooler: {temperature: 35 degC, pressure_drop: 0.1 bar}}
  end: {pressure: 8 bar}
- {name: Aftercooler, process: cooler, end: {temperature: 35 degC}}
"""
EPS = 0.018015268 / 0.02896546   # M_w/M_a, molar masses of IAPWS-95 water and Lemmon et al. (2000) air


def _pws(T):
    import CoolProp.CoolProp as CP

    return CP.PropsSI("P", "T", T, "Q", 0, "Water")   # CoolProp Water called directly


def test_condensate_of_compressor_and_coolers_against_a_hand_water_balance():
    text = flow_job(AIR, "{pressure: 101.325 kPa, temperature: 30 degC, relative_humidity: 70 %, mass_flow: 1 kg/s}",
                    TRAIN)
    res = run(loads(text, "job.yaml"))
    # hand balance: W = ε·p_v/(P − p_v); the flow given is moist; condensate = ṁ_da·ΔW at each cooler
    pv1 = 0.7 * _pws(303.15)
    W1 = EPS * pv1 / (101325 - pv1)
    m_da = 1.0 / (1 + W1)
    P_ic = res.legs[1].end.P
    W2 = EPS * _pws(308.15) / (P_ic - _pws(308.15))
    W3 = EPS * _pws(308.15) / (8e5 - _pws(308.15))
    ic, ac = res.legs[1], res.legs[3]
    assert ic.quantities["condensate"].value == pytest.approx(m_da * (W1 - W2), rel=1e-6)
    assert ac.quantities["condensate"].value == pytest.approx(m_da * (W2 - W3), rel=1e-6)
    # water in = water out: vapour leaving plus the condensate drained
    out = m_da * res.states[-1].humidity.W + ic.quantities["condensate"].value + ac.quantities["condensate"].value
    assert out == pytest.approx(m_da * W1, rel=1e-9)
    assert res.states[2].humidity.phi == pytest.approx(1.0, abs=1e-9)
    # the second stage takes saturated air: droplets
    codes = [(w.code, w.values.get("leg")) for w in res.warnings if hasattr(w, "code")]
    assert ("moist.wet_inlet", "Compressor, stage 2") in codes
    assert ("moist.wet_inlet", "Compressor, stage 1") not in codes


def test_aftercooler_duty_includes_latent_heat_and_drained_liquid():
    import CoolProp.CoolProp as CP

    text = flow_job(AIR, "{pressure: 8 bar, temperature: 150 degC, humidity_ratio: 0.015, mass_flow: 2 kg/s}",
                    "- {name: Aftercooler, process: cooler, end: {temperature: 30 degC}}\n")
    res = run(loads(text, "job.yaml"))
    leg = res.legs[0]
    # hand energy balance per kg of dry air, CoolProp Air and Water called directly: dry air at the total
    # pressure, vapour as an ideal gas (Water at a vanishing density), liquid at the outlet
    W1, W2 = 0.015, EPS * _pws(303.15) / (8e5 - _pws(303.15))
    m_da = 2.0 / (1 + W1)
    dha = CP.PropsSI("H", "P", 8e5, "T", 303.15, "Air") - CP.PropsSI("H", "P", 8e5, "T", 423.15, "Air")
    hv = lambda T: CP.PropsSI("H", "D", 1e-6, "T", T, "Water")   # noqa: E731
    hf = CP.PropsSI("H", "P", 8e5, "T", 303.15, "Water")
    Q = m_da * (dha + W2 * hv(303.15) - W1 * hv(423.15) + (W1 - W2) * hf)
    assert leg.quantities["duty"].value == pytest.approx(Q, rel=1e-6)
    assert leg.quantities["condensate"].value == pytest.approx(m_da * (W1 - W2), rel=1e-9)
    latent = m_da * (W1 - W2) * (hv(303.15) - hf)
    assert latent > 0.1 * abs(Q)   # the latent heat is a large part of this duty


def test_cooler_above_the_dew_point_drains_nothing_and_site_humidity_is_used():
    text = flow_job(AIR, "{pressure: 101.325 kPa, temperature: 40 degC, mass_flow: 1 kg/s}",
                    "- {name: Cooler, process: cooler, end: {temperature: 30 degC}}\n",
                    extra="site: {atmosphere: 101.325 kPa, relative_humidity: 30 %}\n")
    res = run(loads(text, "job.yaml"))
    assert res.legs[0].quantities["condensate"].value == 0.0
    assert res.states[0].humidity.phi == pytest.approx(0.3, rel=1e-12)
    assert res.states[1].humidity.W == res.states[0].humidity.W


def test_a_saturated_compressor_inlet_is_warned_in_words():
    text = flow_job(AIR, "{pressure: 1 bar, temperature: 25 degC, relative_humidity: 100 %, mass_flow: 1 kg/s}",
                    "- {name: Stage, process: compressor, efficiency: {polytropic: 0.8}, end: {pressure: 3 bar}}\n")
    res = run(loads(text, "job.yaml"))
    words = [say(w) for w in res.warnings]
    assert any("Stage" in w and "droplets" in w for w in words)


@pytest.mark.parametrize("gas, start, found", [
    ("{fluid: Nitrogen, model: real}", "relative_humidity: 50 %", "given for Nitrogen"),
    (AIR, "dew_point: 40 degC", "above the start temperature"),
    (AIR, "humidity_ratio: 0.5", "more water than saturated air"),
    (AIR, "relative_humidity: 120 %", "relative humidity of 120 %"),
])
def test_bad_humidity_inputs_name_the_key(gas, start, found):
    text = flow_job(gas, "{pressure: 1 bar, temperature: 25 degC, " + start + ", mass_flow: 1 kg/s}",
                    "- {name: Cooler, process: cooler, end: {temperature: 20 degC}}\n")
    with pytest.raises(JobError) as ei:
        run(loads(text, "job.yaml"))
    (p,) = ei.value.problems
    assert found in p.found and p.path.startswith("start.") and p.line == 5
