"""Per-quantity display units (``units: {system: SI, pressure: barg, volume_flow: L/s, ...}``): the results
file stays SI and identical, every number shown carries the chosen unit, bad unit specs are exit 2."""
from __future__ import annotations

import io
import json
import re

import pytest
from pypdf import PdfReader

import calcdoc
from calcdoc import units
from calcdoc.engine import run
from calcdoc.errors import JobError
from calcdoc.job import loads
from calcdoc.report import format as fmt, jsonfile, render

JOB = """calcdoc: 1
calc: {{number: U-001, title: Plant air, revision: A, date: 2026-11-30}}
units: {units}
site: {{atmosphere: 101.325 kPa}}
gas: {{fluid: Air, model: ideal}}
system: flow
start: {{pressure: 0 barg, temperature: 25 degC, mass_flow: 0.2 kg/s}}
legs:
  - name: Stage 1
    process: compressor
    efficiency: {{isentropic: 0.8}}
    end: {{pressure: 7 barg}}
  - name: Aftercooler
    process: cooler
    pressure_drop: 0.2 bar
    end: {{temperature: 35 degC}}
limits:
  - {{name: Motor, quantity: total_power, max: 100 kW, margin: 10 %, basis: common practice}}
  - {{name: Discharge, quantity: temperature, at: [Stage 1], max: 300 degC, margin: 10 K, basis: common practice}}
"""
OWN = "{system: SI, pressure: barg, temperature: degC, power: kW, duty: kW, volume_flow: L/s, specific_energy: kJ/kg}"


def _results(spec: str):
    return run(loads(JOB.format(units=spec), "job.yaml"))


def test_the_results_file_is_the_same_whatever_the_display_units():
    own, si, us = (json.loads(jsonfile.dumps(_results(s))) for s in (OWN, "SI", "US"))
    for d in (own, si, us):
        d.pop("input_sha256")
    assert own == si == us


def test_display_conversions_follow_the_job():
    spec = loads(JOB.format(units=OWN), "job.yaml").units
    # gauge pressure = absolute − site atmosphere (definition); 1 bar = 1e5 Pa exactly (SI brochure)
    v, u = units.display(801325.0, "Pa", spec)
    assert u == "barg" and v == pytest.approx(7.0, rel=1e-12)
    v, u = units.display(801325.0, "Pa", spec, absolute=True)
    assert u == "bara" and v == pytest.approx(8.01325, rel=1e-12)
    # a pressure difference carries no gauge mark
    assert units.display(2e4, "Pa", spec, difference=True) == (pytest.approx(0.2), "bar")
    # 1 L = 1e-3 m3 exactly (SI brochure, non-SI units accepted for use with the SI)
    assert units.display(0.05, "m**3/s", spec) == (pytest.approx(50.0, rel=1e-12), "L/s")
    assert units.display(0.0, "W|heat", spec)[1] == "kW"
    # differences of temperature: K in an SI job, Δ°F where the job shows °F; never °R
    assert units.display(10.0, "K", spec, difference=True) == (pytest.approx(10.0), "K")
    us = loads(JOB.format(units="{system: SI, temperature: degF}"), "job.yaml").units
    assert units.display(10.0, "K", us, difference=True) == (pytest.approx(18.0, rel=1e-12), "Δ°F")


def test_every_number_in_summary_results_and_checks_carries_the_chosen_unit():
    res = _results(OWN)
    pdf = render.render_pdf(res, jsonfile.dumps(res))
    text = "\n".join(p.extract_text() for p in PdfReader(io.BytesIO(pdf)).pages)
    conclusions = text[text.index("Conclusions"):text.index("1 Summary")]
    summary = text[text.index("1 Summary"):text.index("2 Basis")]
    start = text.index("6 Results")
    results = text[start:text.index("Train totals", start)]
    checks = text[text.index("7 Design checks"):text.index("8 Diagrams")]
    for part in (conclusions, summary, results, checks):
        for unit in ("kPa", "m³/h", "psia", "°R", "°F"):
            assert unit not in part, f"{unit} in:\n{part}"
    assert "P [barg]" in results and "[L/s]" in results and "[°C]" in results
    assert "End P [barg]" in summary and "Gas power [kW]" in summary
    # the failing and passing checks: value, limit and margin in the job's units
    assert re.search(r"max 300\.00\s?°C", checks) and re.search(r"max 100\.00\s?kW", checks)
    assert "required 10 % =" in checks and "required 10 K" in checks


def test_terminal_lines_follow_the_job(tmp_path, capsys):
    path = tmp_path / "job.yaml"
    path.write_text(JOB.format(units=OWN), encoding="utf-8")
    code = calcdoc.main(["run", str(path), "--out", str(tmp_path / "out"), "--no-pdf"])
    out = capsys.readouterr().out
    assert code == 1, out       # the discharge check fails
    line = next(ln for ln in out.splitlines() if "check Discharge" in ln)
    assert "FAIL" in line and "°C" in line and "max 300.00 °C" in line and " K" in line and "required 10 K" in line
    assert "barg" in out and "kPa" not in out


def test_a_value_below_the_tolerance_prints_as_zero():
    # round-off of a first-law sum (−1e−9 J): the report prints 0, never −1.0000×10⁻¹² kJ
    assert str(fmt.qty(-1e-9, "J", "SI")) == "0\u202fkJ"
    assert str(fmt.qty(-2.5, "J", "SI")).startswith("−0.0025")


@pytest.mark.parametrize("spec, message", [
    ("{pressure: L}", "is not a unit of pressure"),
    ("{system: SI, presure: bar}", "did you mean 'pressure'"),
    ("{system: XX}", "valid: SI, US"),
    ("{volume_flow: Nm3/h}", "standard conditions"),
])
def test_a_bad_units_spec_is_exit_2_at_its_line(spec, message):
    with pytest.raises(JobError) as exc:
        loads(JOB.format(units=spec), "job.yaml")
    text = str(exc.value)
    assert "job.yaml:3:" in text and message in text


def test_gauge_display_needs_the_site_atmosphere():
    text = JOB.format(units=OWN).replace("site: {atmosphere: 101.325 kPa}\n", "").replace("0 barg", "1.01325 bar") \
        .replace("7 barg", "8.01325 bar")
    with pytest.raises(JobError) as exc:
        loads(text, "job.yaml")
    assert "no site atmosphere" in str(exc.value) and "job.yaml:3:" in str(exc.value)
