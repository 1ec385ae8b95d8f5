"""Train totals in the trade's sense: compressor gas power, expander power output, cooling and heating
duty, and shaft power with a note when a machine has no mechanical efficiency."""
from __future__ import annotations

import json

import pytest
from conftest import flow_job, said

from calcdoc.engine import run
from calcdoc.errors import JobError
from calcdoc.job import loads
from calcdoc.report.jsonfile import dumps

AIR_IDEAL = "{fluid: Air, model: ideal, k: 1.4, R: 287 J/(kg*K)}"
START = "{pressure: 100 kPa, temperature: 300 K, mass_flow: 1 kg/s}"
CP = 1.4 * 287.0 / 0.4     # cp = k·R/(k − 1), ideal gas (Çengel & Boles 2019, ch. 2)
LEGS = ("- {name: C1, process: compressor, efficiency: {isentropic: 0.8}, mechanical_efficiency: 0.95,"
        " end: {pressure: 400 kPa}}\n"
        "- {name: Cooler, process: cooler, end: {temperature: 300 K}}\n"
        "- {name: C2, process: compressor, efficiency: {isentropic: 0.8}, end: {pressure: 1600 kPa}}\n"
        "- {name: Heater, process: heater, end: {temperature: 700 K}}\n"
        "- {name: Turbine, process: expander, efficiency: {isentropic: 0.9}, end: {pressure: 100 kPa}}\n")
# closed forms for an ideal gas with constant cp (Çengel & Boles ch. 7): T2s = T1·r^((k−1)/k),
# compressor ΔT = (T2s − T1)/η_s, expander ΔT = η_s·(T1 − T2s)
DT_C = 300.0 * (4 ** (0.4 / 1.4) - 1) / 0.8          # each compressor: r = 4 from 300 K
T_C2 = 300.0 + DT_C
DT_T = 0.9 * 700.0 * (1 - (1 / 16) ** (0.4 / 1.4))


def _totals(extra=""):
    res = run(loads(flow_job(AIR_IDEAL, START, LEGS, extra), "job.yaml"))
    return res, {c.symbol: c for c in res.totals}


def test_separate_totals_each_positive():
    res, t = _totals()
    assert t["ΣP_comp"].value == pytest.approx(2 * CP * DT_C, rel=1e-9)
    assert t["ΣP_out"].value == pytest.approx(CP * DT_T, rel=1e-9)
    assert t["ΣQ̇_cool"].value == pytest.approx(CP * DT_C, rel=1e-9)            # C1 discharge back to 300 K
    assert t["ΣQ̇_heat"].value == pytest.approx(CP * (700.0 - T_C2), rel=1e-9)
    shaft = t["ΣP_shaft"]
    assert shaft.value == pytest.approx(CP * DT_C / 0.95, rel=1e-9)              # only C1 has η_m
    text = said(res, [shaft.note])[0]
    assert "partial" in text and "C2" in text
    data = json.loads(dumps(res))["totals"]
    assert set(data) == set(t) and data["ΣP_out"]["value"] == pytest.approx(t["ΣP_out"].value, rel=1e-15)


def test_total_limits_and_a_partial_shaft_total():
    res, t = _totals("limits:\n  - {name: Coolers, quantity: total_cooling_duty, max: 1 kW, basis: x}\n"
                     "  - {name: Expander, quantity: total_power_output, min: 1 kW, basis: x}\n")
    cool, out = res.checks
    assert cool.value.value == pytest.approx(CP * DT_C, rel=1e-9) and cool.status == "fail"
    assert out.value.value == pytest.approx(CP * DT_T, rel=1e-9) and out.status == "pass"
    with pytest.raises(JobError) as ei:
        _totals("limits:\n  - {name: Driver, quantity: total_shaft_power, max: 1 MW, basis: x}\n")
    assert "partial" in ei.value.problems[0].found and "C2" in ei.value.problems[0].found
