"""Limits on signed quantities: the trade's quantities (cooling and heating duty, power output) and
a clear error when a limit on a signed quantity meets a negative value."""
from __future__ import annotations

import pytest
from _limits_helpers import ideal_job
from conftest import flow_job

from calcdoc.engine import run
from calcdoc.errors import JobError
from calcdoc.job import loads

AIR_IDEAL = "{fluid: Air, model: ideal, k: 1.4, R: 287 J/(kg*K)}"
HOT_START = "{pressure: 500 kPa, temperature: 400 K, mass_flow: 1 kg/s}"
# Ideal gas with constant cp: cp = k·R/(k − 1) (Çengel & Boles 2019, ch. 2/4): 1.4·287/0.4 = 1004.5 J/(kg K)
CP = 1.4 * 287.0 / 0.4
LEGS = ("- {name: Cooler, process: cooler, end: {temperature: 300 K}}\n"
        "- {name: Expander, process: expander, efficiency: {isentropic: 0.85}, mechanical_efficiency: 0.95,"
        " end: {pressure: 100 kPa}}\n"
        "- {name: Heater, process: heater, end: {temperature: 350 K}}\n")


def _job(limit: str) -> str:
    return flow_job(AIR_IDEAL, HOT_START, LEGS, "limits:\n" + limit)


def _problem(text: str):
    with pytest.raises(JobError) as ei:
        run(loads(text, "job.yaml"))
    (p,) = ei.value.problems
    return p


@pytest.mark.parametrize("quantity, at, instead", [
    ("duty", "Cooler", "cooling_duty"),
    ("power", "Expander", "power_output"),
    ("shaft_power", "Expander", "shaft_power_output"),
])
def test_a_limit_on_a_negative_signed_value_is_an_error_at_the_limit(quantity, at, instead):
    text = _job(f"  - name: Lim\n    quantity: {quantity}\n    at: [{at}]\n    max: 50 kW\n    basis: datasheet\n")
    p = _problem(text)
    assert p.line == text.splitlines().index("  - name: Lim") + 1
    assert "negative" in p.found and "sign convention" in p.found
    assert instead in p.valid


def test_cooling_duty_is_heat_removed_and_positive():
    text = _job("  - {name: Cooler rating, quantity: cooling_duty, max: 50 kW, basis: cooler datasheet}\n")
    (c,) = run(loads(text, "job.yaml")).checks
    # heat removed = ṁ·cp·(T1 − T2) = 1 kg/s · 1004.5 J/(kg K) · 100 K (closed form, ideal gas, constant cp)
    assert c.value.value == pytest.approx(CP * 100.0, rel=1e-9)
    assert c.where.startswith("Cooler") and c.status == "fail"


def test_power_output_of_an_expander():
    text = _job("  - {name: Generator, quantity: shaft_power_output, min: 10 kW, basis: generator rating}\n"
                "  - {name: Gas power, quantity: power_output, max: 500 kW, basis: common practice}\n")
    shaft, gas = run(loads(text, "job.yaml")).checks
    # isentropic end T2s = T1·(P2/P1)^((k−1)/k), T1 = 300 K after the cooler (Çengel & Boles ch. 7); η_s = 0.85
    T2s = 300.0 * (100 / 500) ** (0.4 / 1.4)
    w_out = CP * 0.85 * (300.0 - T2s)
    assert gas.value.value == pytest.approx(w_out, rel=1e-9)
    assert shaft.value.value == pytest.approx(0.95 * w_out, rel=1e-9)   # shaft receives η_m·P_gas
    assert gas.status == "pass" and shaft.status == "pass"


def test_cooling_duty_on_a_machine_is_bad_input_at_load():
    text = _job("  - {name: Lim, quantity: cooling_duty, at: [Expander], max: 50 kW, basis: x}\n")
    with pytest.raises(JobError) as ei:
        loads(text, "job.yaml")
    (p,) = ei.value.problems
    assert "expander leg" in p.found and "cooler" in p.valid


def test_closed_work_on_a_compression_leg():
    text = ideal_job("limits:\n  - name: Work\n    quantity: W_by_gas\n    at: [Compression]\n    max: 1 kJ\n"
                     "    basis: common practice\n")
    p = _problem(text)
    assert "work_on_gas" in p.valid and "negative" in p.found
    ok = ideal_job("limits:\n  - {name: Work, quantity: work_on_gas, at: [Compression], max: 1 kJ, basis: x}\n")
    (c,) = run(loads(ok, "job.yaml")).checks
    # W_on = m·R·(T2 − T1)/(n − 1) for P·V^n = const (Çengel & Boles ch. 4); m·R·T1 = P1·V1 = 100 J,
    # T2/T1 = 2^(n−1), n = 1.3
    assert c.value.value == pytest.approx(100.0 * (2 ** 0.3 - 1) / 0.3, rel=1e-9)
