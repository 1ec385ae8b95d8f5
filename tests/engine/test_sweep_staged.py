"""A sweep over a staged compressor whose number of stages changes between points: a check that
exists at some points only has no margin at the others, shown as "—" in the report."""
from __future__ import annotations

import pytest
from conftest import flow_job

from calcdoc.engine import run
from calcdoc.job import loads
from calcdoc.report.format import value_in
from calcdoc.report.render import render_html

AIR_IDEAL = "{fluid: Air, model: ideal, k: 1.4, R: 287 J/(kg*K)}"
START = "{pressure: 100 kPa, temperature: 300 K, mass_flow: 1 kg/s}"
LEGS = ("- name: Main\n  process: compressor\n  efficiency: {polytropic: 0.8}\n"
        "  staging: {max_discharge_temperature: 450 K, intercooler: {temperature: 300 K}}\n"
        "  end: {pressure: 900 kPa}\n")
SWEEP = ("limits:\n  - {name: Discharge, quantity: temperature, at: [Main], max: 450 K, basis: common practice}\n"
         "sweep:\n  input: legs[Main].end.pressure\n  values: [900 kPa, 2700 kPa]\n  follow: [pressure_ratio]\n")


def test_sweep_with_staging_renders_missing_margins_as_dash():
    res = run(loads(flow_job(AIR_IDEAL, START, LEGS, SWEEP), "job.yaml"))
    rows = {c["at"]: c for c in res.extra["sweep"]["checks"]}
    third = next(c for at, c in rows.items() if at.startswith("Main, stage 3"))
    # 900 kPa: two stages of r = 3; 2700 kPa: three stages of r = 3 (equal ratios, no drop). Ideal gas at
    # constant η_p: T2 = T1·r^((k−1)/(k·η_p)) (Dixon & Hall ch. 2)
    assert third["margin"][0] is None and third["status"][0] is None
    assert third["margin"][1] == pytest.approx(450.0 - 300.0 * 3 ** (0.4 / (1.4 * 0.8)), rel=1e-9)
    html = render_html(res)
    row = html[html.index("Margin: Discharge (max) at Main, stage 3"):]
    row = row[:row.index("</tr>")]
    assert "—" in row and "FAIL" not in row


def test_value_in_none_is_a_dash():
    assert str(value_in(None, "W", "SI")) == "—"
    assert str(value_in(float("nan"), "K", "US", difference=True)) == "—"
