"""Staging a compressor: equal stage ratios with intercooler drops, and the fewest-stages search."""
from __future__ import annotations

import pytest
from conftest import flow_job, said

from calcdoc.errors import JobError

AIR_IDEAL = "{fluid: Air, model: ideal, k: 1.4, R: 287 J/(kg*K)}"
START = "{pressure: 100 kPa, temperature: 300 K, mass_flow: 1 kg/s}"


def _staged(staging: str, eff: str = "{polytropic: 0.8}", end: str = "{pressure: 2700 kPa}") -> str:
    return f"- name: Main\n  process: compressor\n  efficiency: {eff}\n  staging: {staging}\n  end: {end}\n"


def test_equal_ratios_give_equal_ideal_gas_discharge_temperatures(run_flow_text):
    res = run_flow_text(flow_job(AIR_IDEAL, START, _staged(
        "{stages: 3, intercooler: {temperature: 300 K, pressure_drop: 2 %}}")))
    stages = [leg for leg in res.legs if leg.process == "compressor"]
    assert len(stages) == 3
    # algebra of the chain: r^3·P1·(1 − 0.02)^2 = P_out
    r = (2700.0 / (100.0 * 0.98 ** 2)) ** (1 / 3)
    for leg in stages:
        assert leg.end.P / leg.start.P == pytest.approx(r, rel=1e-12)
    # perfect intercooling and equal ratios: equal discharge temperatures (ideal gas, T2/T1 = r^((k−1)/(k·η_p)))
    T2 = 300.0 * r ** (0.4 / (1.4 * 0.8))
    for leg in stages:
        assert leg.end.T == pytest.approx(T2, rel=1e-12)
    assert res.legs[-1].end.P == pytest.approx(2700e3, rel=1e-12)


def test_absolute_intercooler_drop(run_flow_text):
    res = run_flow_text(flow_job(AIR_IDEAL, START, _staged(
        "{stages: 2, intercooler: {temperature: 300 K, pressure_drop: 20 kPa}}")))
    s1, ic, s2 = res.legs
    assert s1.end.P / s1.start.P == pytest.approx(s2.end.P / s2.start.P, rel=1e-12)
    assert ic.start.P - ic.end.P == pytest.approx(20e3, rel=1e-12)
    assert s2.end.P == pytest.approx(2700e3, rel=1e-12)


def test_fewest_stages_under_discharge_limit(run_flow_text):
    limit = 150.0 + 273.15   # API 618 predicted discharge limit 150 °C (from memory; check the edition that applies)
    res = run_flow_text(flow_job(AIR_IDEAL, START, _staged(
        "{max_discharge_temperature: 150 degC, intercooler: {temperature: 35 degC, pressure_drop: 1 %}}")))
    stages = [leg for leg in res.legs if leg.process == "compressor"]
    N = len(stages)
    assert N > 1
    assert max(leg.end.T for leg in stages) <= limit
    fewer = run_flow_text(flow_job(AIR_IDEAL, START, _staged(
        f"{{stages: {N - 1}, intercooler: {{temperature: 35 degC, pressure_drop: 1 %}}}}")))
    assert max(leg.end.T for leg in fewer.legs if leg.process == "compressor") > limit
    assert any("Fewest stages" in f for f in said(res, res.legs[0].facts))
    assert res.extra["staging"][0]["stages"] == N


def test_fewest_stages_with_no_answer_is_a_located_error(run_flow_text):
    with pytest.raises(JobError) as exc:
        run_flow_text(flow_job(AIR_IDEAL, START, _staged(
            "{max_discharge_temperature: 40 degC, max_stages: 3, intercooler: {temperature: 35 degC}}")))
    assert "no number of stages up to 3" in str(exc.value)
    assert "staging.max_discharge_temperature" in str(exc.value)


def test_staging_needs_intercooler_and_one_rule(run_flow_text):
    with pytest.raises(JobError) as exc:
        run_flow_text(flow_job(AIR_IDEAL, START, _staged("{stages: 2, max_discharge_temperature: 150 degC}")))
    msg = str(exc.value)
    assert "exactly one of stages, max_discharge_temperature, ratios, interstage_pressures" in msg
    assert "found stages, max_discharge_temperature" in msg and "intercooler" in msg


def test_demo_booster_job_runs_and_stays_under_its_limit():
    from pathlib import Path

    from calcdoc.engine import run
    from calcdoc.job import load

    res = run(load(Path(__file__).resolve().parents[2] / "example_jobs" / "gas_booster_two_stage.yaml"))
    stages = [leg for leg in res.legs if leg.process == "compressor"]
    assert max(leg.end.T for leg in stages) <= 150.0 + 273.15   # the job's own limit (API 618, from memory)
    assert res.extra["staging"][0]["trials"][0]["max_discharge_temperature"]["value"] > 150.0 + 273.15
