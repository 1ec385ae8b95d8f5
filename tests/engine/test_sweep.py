"""Sweeps: each point equals a separate run at the same inputs; series in the JSON; bad sweeps are
bad input with file:line."""
from __future__ import annotations

import json
import time
from pathlib import Path

import pytest
from _limits_helpers import ideal_job

from calcdoc.engine import run
from calcdoc.errors import JobError
from calcdoc.job import loads
from calcdoc.report.jsonfile import dumps

EXAMPLE = Path(__file__).resolve().parents[2] / "example_jobs" / "press_gas_spring.yaml"

SWEEP = """\
limits:
  - {name: Hot, quantity: temperature, at: Compression, max: 100 degC, basis: common practice}
sweep:
  input: start.temperature
  values: [280 K, 300 K, 320 K]
  follow:
    - {quantity: temperature, at: Compression}
    - {quantity: W_by_gas, at: [Compression]}
"""


def test_ideal_gas_sweep_follows_the_polytropic_law():
    res = run(loads(ideal_job(SWEEP), "job.yaml"))
    sw = json.loads(dumps(res))["sweep"]
    assert [p["entered"] for p in sw["points"]] == ["280 K", "300 K", "320 K"]
    T2 = next(s for s in sw["series"] if s["quantity"] == "temperature")["values"]
    # T2 = T1·(V1/V2)^(n−1) for an ideal gas on P·V^n = const (Çengel, Boles & Kanoğlu 2019, ch. 4)
    assert T2 == pytest.approx([T1 * 2 ** 0.3 for T1 in (280.0, 300.0, 320.0)], rel=1e-12)
    (chk,) = sw["checks"]
    # 100 degC = 373.15 K against 344.7, 369.3, 393.9 K
    assert chk["status"] == ["pass", "pass", "fail"]


def test_each_point_equals_a_separate_run_real_gas():
    text = EXAMPLE.read_text(encoding="utf-8") + """
limits:
  - {name: Peak, quantity: pressure, at: [Compression stroke], max: 350 bar, basis: common practice}
sweep:
  input: legs[Compression stroke].end.volume
  range: {from: 1.0 L, to: 1.3 L, steps: 4}
  follow:
    - {quantity: pressure, at: Compression stroke}
    - {quantity: temperature, at: [2, 4]}
    - Q_to_gas
"""
    t0 = time.perf_counter()
    res = run(loads(text, "spring.yaml"))
    elapsed = time.perf_counter() - t0
    sw = res.extra["sweep"]
    assert [p["entered"] for p in sw["points"]] == ["1 L", "1.1 L", "1.2 L", "1.3 L"]
    for k, vol in enumerate(("1 L", "1.1 L", "1.2 L", "1.3 L")):
        alone = run(loads(text.replace("end: {volume: 1.10 L}", f"end: {{volume: {vol}}}"), "alone.yaml"))
        for s in sw["series"]:
            if s["quantity"] == "pressure":
                assert s["values"][k] == alone.states[1].state.P
            elif s["quantity"] == "temperature":
                label = s["at"].split()[-1]
                assert s["values"][k] == alone.states[int(label) - 1].state.T
            else:
                leg = next(leg for leg in alone.legs if s["at"].startswith(leg.name))
                assert s["values"][k] == leg.quantities["Q_to_gas"].value
        (c,) = alone.checks
        assert sw["checks"][0]["margin"][k] == c.margin and sw["checks"][0]["status"][k] == c.status
    assert len(sw["series"]) == 1 + 2 + 3
    assert elapsed < 5.0          # four real-gas points with one shared gas object (common practice: keep it quick)


@pytest.mark.parametrize("sweep, words", [
    ("  input: start.presure\n  values: [1 bar]\n  follow: [temperature]\n", "no 'presure'"),
    ("  input: legs[Nope].end.volume\n  values: [1 L]\n  follow: [temperature]\n", "no item 'Nope'"),
    ("  input: start.temperature\n  follow: [temperature]\n", "no values"),
    ("  input: start.temperature\n  range: {from: 1 K, to: 3 degC, steps: 3}\n  follow: [temperature]\n", "same unit"),
    ("  input: start.temperature\n  values: [1 K]\n  follow: [power]\n", "steady-flow"),
    ("  input: calc.revision\n  values: [B]\n  follow: [temperature]\n", "not an input a sweep can vary"),
])
def test_bad_sweeps_are_bad_input(sweep, words):
    with pytest.raises(JobError) as ei:
        loads(ideal_job("sweep:\n" + sweep), "job.yaml")
    assert any(words in f"{p.found} {p.valid}" for p in ei.value.problems), ei.value.problems
    assert all(p.line > 0 for p in ei.value.problems)


def test_a_point_that_cannot_be_read_points_at_the_sweep():
    text = ideal_job("sweep:\n  input: start.temperature\n  values: [300 K, 20 barg]\n  follow: [temperature]\n")
    with pytest.raises(JobError) as ei:
        run(loads(text, "job.yaml"))
    (p,) = ei.value.problems
    assert p.line == text.splitlines().index("  values: [300 K, 20 barg]") + 1
    assert "sweep point 2 (20 barg)" in p.found


def test_report_has_the_sensitivity_table_and_chart():
    from calcdoc.report.render import render_html

    html = render_html(run(loads(ideal_job(SWEEP), "job.yaml")))
    section = html[html.index("Sensitivity: start.temperature"):]
    assert "280 K" in section and "320 K" in section and "FAIL" in section
    assert 'alt="Sensitivity to start.temperature"' in section and "data:image/svg+xml;base64," in section


def test_a_sweep_of_a_stage_efficiency_equals_separate_runs():
    from calcdoc.engine import run
    from calcdoc.job import loads

    base = """calcdoc: 1
calc: {number: SW-1, title: Efficiency sweep, revision: A, date: 2026-11-30}
gas: {model: ideal, k: 1.3, molar_mass: 16.04 g/mol}
system: flow
start: {pressure: 20 bar, temperature: 300 K, mass_flow: 5 kg/s}
legs:
  - {name: Stage 1, process: compressor, efficiency: {polytropic: EFF}, end: {pressure: 60 bar}}
"""
    swept = base.replace("EFF", "0.8") + (
        'sweep: {input: "legs[Stage 1].efficiency.polytropic", values: [0.7, 0.8], follow: [power]}\n')
    res = run(loads(swept, "s.yaml"))
    (series,) = res.extra["sweep"]["series"]
    for k, eff in enumerate(("0.7", "0.8")):
        alone = run(loads(base.replace("EFF", eff), "a.yaml"))
        assert series["values"][k] == alone.legs[0].quantities["power"].value   # the same computation, exactly
