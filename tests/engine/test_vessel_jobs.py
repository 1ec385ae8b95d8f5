"""Vessel jobs (system: vessel) end to end through the job layer and the engine: the results contract
(duration, time series), limits on the vessel quantities, and computing problems located in the file."""
from __future__ import annotations

import json
import math

import pytest

from calcdoc.engine import run
from calcdoc.errors import JobError
from calcdoc.job import loads
from calcdoc.report.jsonfile import dumps

HEAD = """\
calcdoc: 1
calc: {number: T-V1, title: Receiver blowdown, revision: A, date: 2026-01-01}
gas: {fluid: Air, model: ideal, k: 1.4, molar_mass: 28.965 g/mol}
system: vessel
vessel: {volume: 2 m3}
start: {pressure: 10 bar, temperature: 20 degC}
"""

BLOWDOWN = HEAD + """\
legs:
  - name: Blowdown
    process: discharge
    orifice: {diameter: 10 mm, discharge_coefficient: 0.85, back_pressure: 1 bar}
    heat: adiabatic
    end: {pressure: 3 bar}
"""


def _closed_form_time(P_end: float) -> float:
    """t = 2/(k − 1)·V/(C_d·A·Γ·c0)·[(P/P0)^(−(k−1)/(2k)) − 1], adiabatic choked blowdown of an ideal gas
    (derived in tests/physics/test_vessel.py; Çengel, Boles & Kanoğlu 2019, ch. 5 and 17)."""
    k, R, T0, P0 = 1.4, 8.314462618 / 0.028965, 293.15, 10e5
    G = (2 / (k + 1)) ** ((k + 1) / (2 * (k - 1)))
    A = math.pi * 0.01 ** 2 / 4
    return 2 / (k - 1) * 2.0 / (0.85 * A * G * math.sqrt(k * R * T0)) * ((P_end / P0) ** (-(k - 1) / (2 * k)) - 1)


def test_blowdown_job_gives_duration_end_state_and_series_in_the_results_file():
    res = run(loads(BLOWDOWN, "job.yaml"))
    out = json.loads(dumps(res))
    assert out["system"] == "vessel"
    (leg,) = out["legs"]
    assert leg["duration"]["unit"] == "s"
    assert leg["duration"]["value"] == pytest.approx(_closed_form_time(3e5), rel=1e-7)   # closed form above
    assert out["states"][1]["P"]["value"] == pytest.approx(3e5, rel=1e-9)
    series = leg["series"]
    assert set(series) == {"t", "P", "T", "m", "m_dot"}
    assert series["t"]["unit"] == "s" and series["m_dot"]["unit"] == "kg/s"
    assert len(series["t"]["values"]) == len(series["P"]["values"]) >= 20
    assert series["t"]["values"][-1] == leg["duration"]["value"]
    assert all(x < 0 for x in series["m_dot"]["values"])           # out of the vessel: negative
    assert out["mass"]["value"] == pytest.approx(10e5 * 2.0 / (8.314462618 / 0.028965 * 293.15), rel=1e-12)
    assert dumps(res) == dumps(run(loads(BLOWDOWN, "job.yaml")))  # deterministic


@pytest.mark.parametrize("limit, status", [
    ("{quantity: duration, at: Blowdown, max: 2 min, basis: common practice}", "fail"),
    ("{quantity: duration, at: Blowdown, max: 10 min, basis: common practice}", "pass"),
    ("{quantity: min_temperature, min: -29 degC, basis: common practice}", "fail"),
    ("{quantity: min_temperature, min: -70 degC, basis: common practice}", "pass"),
])
def test_limits_name_the_duration_and_the_minimum_temperature(limit, status):
    # duration: the closed form above gives 172 s, between 2 and 10 min. The lowest gas temperature is the end
    # temperature of the isentropic expansion, 293.15 K·0.3^(0.4/1.4) = 208.3 K = −64.9 °C (Çengel et al.
    # 2019, ch. 7): below −29 °C, above −70 °C.
    assert 120.0 < _closed_form_time(3e5) < 600.0
    res = run(loads(BLOWDOWN + "limits:\n  - " + limit + "\n", "job.yaml"))
    (chk,) = res.checks
    assert chk.status == status
    if chk.quantity == "min_temperature":
        assert chk.value.value == pytest.approx(293.15 * 0.3 ** (0.4 / 1.4), rel=1e-7)


def test_cold_blowdown_warns_of_brittle_fracture():
    res = run(loads(BLOWDOWN, "job.yaml"))
    codes = [getattr(w, "code", "") for w in res.warnings]
    assert "vessel.cold_gas" in codes


def test_an_end_pressure_below_the_back_pressure_is_bad_input_at_its_line():
    text = BLOWDOWN.replace("end: {pressure: 3 bar}", "end: {pressure: 0.5 bar}")
    with pytest.raises(JobError) as exc:
        run(loads(text, "job.yaml"))
    (p,) = exc.value.problems
    assert p.path == "legs[0].end.pressure"
    assert p.line == text.splitlines().index("    end: {pressure: 0.5 bar}") + 1
    assert "cannot be reached" in p.found and "100 kPa" in p.found


@pytest.mark.parametrize("leg, fragment", [
    ("    process: fill\n    orifice: {diameter: 6 mm, discharge_coefficient: 0.8}\n    end: {pressure: 12 bar}\n",
     "missing required key 'supply'"),
    ("    process: discharge\n    heat: wall\n    orifice: {diameter: 6 mm, discharge_coefficient: 0.8, "
     "back_pressure: 1 bar}\n    end: {pressure: 2 bar}\n", "needs the vessel's wall"),
    ("    process: discharge\n    orifice: {diameter: 6 mm, discharge_coefficient: 0.8}\n    end: {pressure: 2 bar}\n",
     "'back_pressure'"),
    ("    process: fill\n    supply: {mass_flow: 0.1 kg/s, temperature: 30 degC}\n    end: {pressure: 12 bar, "
     "duration: 5 min}\n", "both pressure and duration"),
])
def test_vessel_leg_mistakes_are_bad_input(leg, fragment):
    with pytest.raises(JobError) as exc:
        loads(HEAD + "legs:\n  - name: L\n" + leg, "job.yaml")
    assert any(fragment in p.found + p.valid for p in exc.value.problems), exc.value


def test_fill_then_discharge_carries_the_state_over():
    text = HEAD.replace("10 bar", "2 bar") + """\
legs:
  - name: Pump-up
    process: fill
    supply: {mass_flow: 0.05 kg/s, temperature: 40 degC}
    end: {duration: 2 min}
  - name: Vent
    process: discharge
    orifice: {diameter: 10 mm, discharge_coefficient: 0.85, back_pressure: 1 bar}
    end: {pressure: 2 bar}
"""
    out = json.loads(dumps(run(loads(text, "job.yaml"))))
    fill, vent = out["legs"]
    assert fill["duration"]["value"] == pytest.approx(120.0, rel=1e-12)
    assert fill["mass_change"]["value"] == pytest.approx(6.0, rel=1e-9)      # 0.05 kg/s · 120 s
    assert vent["series"]["P"]["values"][0] == out["states"][1]["P"]["value"]
