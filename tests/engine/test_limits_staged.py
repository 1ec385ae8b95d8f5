"""Limits on the parts of a staged compressor: its stages, intercoolers and the states between them."""
from __future__ import annotations

import pytest
from conftest import flow_job

from calcdoc.engine import run
from calcdoc.errors import JobError
from calcdoc.job import loads

AIR_IDEAL = "{fluid: Air, model: ideal, k: 1.4, R: 287 J/(kg*K)}"
START = "{pressure: 100 kPa, temperature: 300 K, mass_flow: 1 kg/s}"
CP = 1.4 * 287.0 / 0.4     # cp = k·R/(k − 1), ideal gas (Çengel & Boles 2019, ch. 2)


def _job(staging, limits):
    legs = (f"- name: Main\n  process: compressor\n  efficiency: {{polytropic: 0.8}}\n  staging: {staging}\n"
            "  end: {pressure: 2700 kPa}\n")
    return flow_job(AIR_IDEAL, START, legs, "limits:\n" + limits)


def test_limits_on_a_stage_an_intercooler_and_a_state_of_a_staged_compressor():
    text = _job("{stages: 3, intercooler: {temperature: 300 K}}",
                "  - {name: Stage 2 discharge, quantity: temperature, at: ['Main, stage 2'], max: 500 K, basis: x}\n"
                "  - {name: IC1, quantity: cooling_duty, at: ['Main, intercooler 1'], max: 500 kW, basis: x}\n"
                "  - {name: Final, quantity: pressure, at: [6], min: 2 MPa, basis: x}\n")
    t, ic, p = run(loads(text, "job.yaml")).checks
    r = 27 ** (1 / 3)                      # equal ratios, no drop: r = (P_out/P_in)^(1/N)
    T2 = 300.0 * r ** (0.4 / (1.4 * 0.8))  # ideal gas at constant η_p: T2/T1 = r^((k−1)/(k·η_p)) (Dixon & Hall ch. 2)
    assert t.value.value == pytest.approx(T2, rel=1e-12)
    assert ic.value.value == pytest.approx(CP * (T2 - 300.0), rel=1e-9)   # heat removed = ṁ·cp·(T2 − T_ic)
    assert p.value.value == pytest.approx(2700e3, rel=1e-12)


def test_cooling_duty_on_the_staged_leg_means_its_intercoolers():
    text = _job("{stages: 3, intercooler: {temperature: 300 K}}",
                "  - {name: IC, quantity: cooling_duty, at: [Main], max: 500 kW, basis: x}\n")
    checks = run(loads(text, "job.yaml")).checks
    assert [c.where for c in checks] == ["Main, intercooler 1", "Main, intercooler 2"]


def test_a_stage_the_search_did_not_make_is_reported_against_the_computed_legs():
    text = _job("{max_discharge_temperature: 600 K, intercooler: {temperature: 300 K}}",
                "  - {name: S5, quantity: temperature, at: ['Main, stage 5'], max: 500 K, basis: x}\n")
    job = loads(text, "job.yaml")      # accepted at load: the search may give up to 6 stages
    with pytest.raises(JobError) as ei:
        run(job)
    (p,) = ei.value.problems
    assert "Main, stage 5" in p.found and "'Main, stage 1'" in p.valid and "intercooler 1" in p.valid


def test_a_stage_beyond_the_given_number_is_bad_input_at_load():
    text = _job("{stages: 2, intercooler: {temperature: 300 K}}",
                "  - {name: S3, quantity: temperature, at: ['Main, stage 3'], max: 500 K, basis: x}\n")
    with pytest.raises(JobError) as ei:
        loads(text, "job.yaml")
    assert "Main, stage 3" in ei.value.problems[0].found
