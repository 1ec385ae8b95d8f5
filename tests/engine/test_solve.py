"""Solve: an input found so that one result meets a target, against closed forms; bad solves are bad input
with file:line."""
from __future__ import annotations

import json

import pytest

from calcdoc.engine import run
from calcdoc.errors import JobError
from calcdoc.job import loads
from calcdoc.report.jsonfile import dumps

ACCUMULATOR = """\
calcdoc: 1
calc: {number: T-S1, title: Accumulator precharge, revision: A, date: 2026-01-01}
gas: {fluid: Nitrogen, model: ideal, k: 1.4, molar_mass: 28.0134 g/mol}
start:
  pressure: 90 bar
  temperature: 20 degC
  volume: 50 L
legs:
  - name: Charge
    process: isothermal
    end: {pressure: 250 bar}
  - name: Discharge
    process: isentropic
    end: {pressure: 100 bar}
solve:
  vary: start.volume
  between: [10 L, 500 L]
  so_that: {quantity: volume_change, at: Discharge, equals: 20 L}
"""

STAGE = """\
calcdoc: 1
calc: {number: T-S2, title: Stage pressure for a discharge temperature, revision: A, date: 2026-01-01}
gas: {fluid: Air, model: ideal, k: 1.4, molar_mass: 28.965 g/mol}
system: flow
start: {pressure: 1 bar, temperature: 20 degC, mass_flow: 1 kg/s}
legs:
  - name: Stage 1
    process: compressor
    efficiency: {polytropic: 0.8}
    end: {pressure: 3 bar}
solve:
  vary: legs[0].end.pressure
  between: [1.5 bar, 10 bar]
  so_that: {quantity: discharge_temperature, at: Stage 1, equals: 150 degC}
"""


def test_accumulator_precharge_volume_matches_closed_form():
    """Isothermal charge P1 → P2 (V2 = V0·P1/P2), isentropic discharge P2 → P3 (V3 = V2·(P2/P3)^(1/k)):
    the oil delivered ΔV = V3 − V2 = V0·(P1/P2)·((P2/P3)^(1/k) − 1), so
        V0 = ΔV / ((P1/P2)·((P2/P3)^(1/k) − 1))
    (ideal gas, Çengel, Boles & Kanoğlu 2019, ch. 4 and 7)."""
    res = run(loads(ACCUMULATOR, "acc.yaml"))
    out = json.loads(dumps(res))
    P1, P2, P3, k, dV = 90.0, 250.0, 100.0, 1.4, 0.020
    V0 = dV / ((P1 / P2) * ((P2 / P3) ** (1 / k) - 1))
    sv = out["solve"]
    assert sv["value"]["value"] == pytest.approx(V0, rel=1e-6)          # closed form above
    assert sv["value"]["unit"] == "m**3"
    assert sv["target"]["value"] == pytest.approx(0.020, rel=1e-12)
    assert sv["achieved"]["value"] == pytest.approx(0.020, rel=1e-9)
    assert sv["vary"] == "start.volume" and sv["iterations"] >= 1
    assert [b["entered"] for b in sv["bracket"]] == ["10 L", "500 L"]
    # every table is at the solved value: the start volume of the states
    assert out["states"][0]["V"]["value"] == pytest.approx(V0, rel=1e-6)
    # the job file is not rewritten: the results keep its hash and text
    assert out["input_sha256"] == loads(ACCUMULATOR, "acc.yaml").sha256


def test_stage_discharge_pressure_for_a_discharge_temperature_matches_closed_form():
    """Ideal-gas stage at constant polytropic efficiency: T2/T1 = (P2/P1)^((k−1)/(k·η_p)), so
        P2 = P1·(T2/T1)^(k·η_p/(k − 1))
    (Dixon & Hall 2014, ch. 2, small-stage efficiency; cited from memory)."""
    out = json.loads(dumps(run(loads(STAGE, "stage.yaml"))))
    P2 = 1e5 * (423.15 / 293.15) ** (1.4 * 0.8 / 0.4)
    assert out["solve"]["value"]["value"] == pytest.approx(P2, rel=1e-6)   # closed form above
    assert out["states"][1]["T"]["value"] == pytest.approx(423.15, rel=1e-9)


def test_limits_are_judged_at_the_solved_value():
    text = STAGE + "limits:\n  - {quantity: pressure_ratio, at: Stage 1, max: 3, basis: common practice}\n"
    res = run(loads(text, "stage.yaml"))
    (chk,) = res.checks
    # the solved ratio (423.15/293.15)^2.8 = 2.80 passes; the 3 bar written in the job file would give 3.0
    assert chk.value.value == pytest.approx((423.15 / 293.15) ** 2.8, rel=1e-6)
    assert chk.status == "pass"


def test_a_bracket_that_does_not_straddle_the_target_gives_both_achieved_values():
    text = ACCUMULATOR.replace("between: [10 L, 500 L]", "between: [10 L, 40 L]")
    with pytest.raises(JobError) as exc:
        run(loads(text, "acc.yaml"))
    (p,) = exc.value.problems
    assert p.path == "solve.between" and p.line == text.splitlines().index("  between: [10 L, 40 L]") + 1
    # ΔV at the ends from the closed form above: 10 L → 3.327 L, 40 L → 13.31 L, both below 20 L
    assert "3.327003 L" in p.found and "13.30801 L" in p.found and "below" in p.found


def test_a_job_that_fails_inside_the_bracket_says_where():
    # below 1 bar the stage would not compress: the job cannot be computed at the lower end
    text = STAGE.replace("between: [1.5 bar, 10 bar]", "between: [0.5 bar, 10 bar]")
    with pytest.raises(JobError) as exc:
        run(loads(text, "stage.yaml"))
    (p,) = exc.value.problems
    assert p.path == "solve.between"
    assert "cannot be computed at legs[0].end.pressure = 0.5 bar" in p.found


@pytest.mark.parametrize("old, new, path, fragment", [
    ("vary: start.volume", "vary: start.volumes", "solve.vary", "start.volume"),
    ("vary: start.volume", "vary: calc.title", "solve.vary", "not an input"),
    ("between: [10 L, 500 L]", "between: [10 L, 500 kg]", "solve.between", "same unit"),
    ("between: [10 L, 500 L]", "between: [10 kg, 500 kg]", "solve.between[0]", "volume"),
    ("quantity: volume_change", "quantity: volume_chnage", "solve.so_that.quantity", "did you mean 'volume_change'"),
    ("equals: 20 L", "equals: 20 bar", "solve.so_that.equals", "volume"),
])
def test_bad_solves_are_bad_input_at_their_line(old, new, path, fragment):
    text = ACCUMULATOR.replace(old, new)
    with pytest.raises(JobError) as exc:
        loads(text, "acc.yaml")
    hits = [p for p in exc.value.problems if p.path == path and fragment in p.found + p.valid]
    assert hits, exc.value
    line = next(i for i, ln in enumerate(text.splitlines(), 1) if new.split(":")[0].strip() in ln and
                new.split(":", 1)[1].strip()[:6] in ln)
    assert hits[0].line == line


def test_a_sweep_over_a_solved_job_is_refused_with_a_clear_message():
    text = ACCUMULATOR + "sweep:\n  input: start.temperature\n  values: [10 degC, 30 degC]\n  follow: [pressure]\n"
    with pytest.raises(JobError) as exc:
        loads(text, "acc.yaml")
    (p,) = [p for p in exc.value.problems if p.path == "solve"]
    assert "both a sweep and a solve" in p.found
    assert "sweep a copy" in p.valid
