"""Design limits and margins: judged right at, below and above the limit, with margins; bad limits
are bad input with file:line; exit codes of `calcdoc run`."""
from __future__ import annotations

import json
import math

import pytest
from _limits_helpers import ideal_job, write

import calcdoc
from calcdoc.engine import run
from calcdoc.errors import JobError
from calcdoc.job import loads

# Polytropic compression of an ideal gas, P·V^n = const (Çengel, Boles & Kanoğlu 2019, ch. 4):
# P2 = P1·(V1/V2)^n with P1 = 100 kPa, V1/V2 = 2, n = 1.3.
P2_REF = 100e3 * 2 ** 1.3
# T2 = T1·(V1/V2)^(n − 1) for an ideal gas on that path (same source).
T2_REF = 300.0 * 2 ** 0.3


def limit(body: str) -> str:
    return "limits:\n" + body


def checks_of(text: str, name: str = "job.yaml"):
    return run(loads(text, name)).checks


def test_pressure_at_the_limit_passes_with_zero_margin():
    (c,) = checks_of(ideal_job(limit(f"""\
  - {{name: Peak, quantity: pressure, at: [Compression], max: {P2_REF / 1e3:.15g} kPa, basis: common practice}}
""")))
    assert c.status == "pass"
    assert c.value.value == pytest.approx(P2_REF, rel=1e-12)
    assert abs(c.margin) <= 1e-9 * P2_REF


def test_pressure_above_and_below_the_limit():
    low, high = P2_REF * 0.999, P2_REF * 1.001
    below, above = checks_of(ideal_job(limit(f"""\
  - {{name: Roomy, quantity: pressure, at: Compression, max: {high / 1e3:.12g} kPa, basis: datasheet}}
  - {{name: Tight, quantity: pressure, at: Compression, max: {low / 1e3:.12g} kPa, basis: datasheet}}
""")))
    assert below.status == "pass" and above.status == "fail"
    assert below.margin == pytest.approx(high - P2_REF, rel=1e-6)
    assert above.margin == pytest.approx(low - P2_REF, rel=1e-6)          # negative: over the limit
    # an absolute pressure has no percent margin (the trade means a percent of gauge pressure)
    assert math.isnan(below.margin_pct)


def test_min_limit_and_margin_sign():
    (c,) = checks_of(ideal_job(limit("""\
  - {name: Low, quantity: pressure, at: [2], min: 200 kPa, basis: common practice}
""")))
    assert c.kind == "min" and c.status == "pass"
    assert c.margin == pytest.approx(P2_REF - 200e3, rel=1e-9)


@pytest.mark.parametrize("margin, status", [("1 K", "pass"), ("1.5 K", "fail")])
def test_required_margin_absolute(margin, status):
    # The hold ends at 320 K exactly (its end target); a max of 47.85 degC = 321 K leaves 1 K. A percent
    # margin on a temperature is refused as bad input (tests/job/test_margins.py).
    (c,) = checks_of(ideal_job(limit(f"""\
  - {{name: Hot, quantity: temperature, at: [Hold], max: 47.85 degC, margin: {margin}, basis: seal datasheet}}
""")))
    assert c.margin == pytest.approx(1.0, abs=1e-9)
    assert math.isnan(c.margin_pct)          # no percent of a temperature
    assert c.status == status


def test_default_everywhere_reports_the_governing_place():
    (c,) = checks_of(ideal_job(limit("""\
  - {name: Hot, quantity: temperature, max: 100 degC, basis: common practice}
""")))
    # states: 300 K, T2_REF = 369.3 K, 320 K: the compression end governs
    assert c.value.value == pytest.approx(T2_REF, rel=1e-9)
    assert c.where.startswith("state 2") and "of 3" in c.where


def test_ratio_and_both_bounds():
    checks = checks_of(ideal_job(limit("""\
  - {name: Ratio, quantity: pressure_ratio, at: Compression, min: 2, max: 2.4, basis: common practice}
""")))
    assert [c.kind for c in checks] == ["max", "min"]
    assert checks[0].value.value == pytest.approx(2 ** 1.3, rel=1e-12)   # P2/P1 = 2^1.3, as above
    assert [c.status for c in checks] == ["fail", "pass"]


def problem_of(text: str, run_it: bool = False):
    with pytest.raises(JobError) as ei:
        job = loads(text, "job.yaml")
        if run_it:
            run(job)
    return ei.value.problems


def test_power_in_a_closed_job_is_bad_input_with_its_line():
    text = ideal_job(limit("""\
  - name: Driver
    quantity: power
    max: 50 kW
    basis: motor datasheet
"""))
    (p,) = problem_of(text)
    line = text.splitlines().index("    quantity: power") + 1
    assert (p.file, p.line) == ("job.yaml", line)
    assert "steady-flow" in p.found and "W_by_gas" in p.valid


def test_a_misspelt_leg_is_bad_input_with_its_line():
    text = ideal_job(limit("""\
  - name: Peak
    quantity: pressure
    at: [Compresion]
    max: 300 kPa
    basis: common practice
"""))
    (p,) = problem_of(text)
    assert p.line == text.splitlines().index("    at: [Compresion]") + 1
    assert "Compresion" in p.found and "did you mean 'Compression'" in p.valid


@pytest.mark.parametrize("body, words", [
    ("  - {quantity: pressure, max: 3 bar}\n", "basis"),
    ("  - {quantity: pressure, basis: x}\n", "neither max nor min"),
    ("  - {quantity: pressure, max: 3 K, basis: x}\n", "not a unit of pressure"),
    ("  - {quantity: temprature, max: 3 K, basis: x}\n", "did you mean 'temperature'"),
    ("  - {quantity: pressure_ratio, at: [2], max: 3, basis: x}\n", "state label"),
    ("  - {quantity: pressure, max: 3 bar, margin: -1 bar, basis: x}\n", "negative"),
])
def test_invalid_limits_name_the_problem(body, words):
    problems = problem_of(ideal_job(limit(body)))
    assert any(words in f"{p.found} {p.valid}" for p in problems), problems
    assert all(p.line > 0 for p in problems)


def test_a_leg_without_the_quantity_is_bad_input_at_run_time():
    # an isochoric leg has no finite polytropic exponent
    text = ideal_job(limit("""\
  - name: Exponent
    quantity: n
    at: [Hold]
    max: 2
    basis: common practice
"""))
    (p,) = problem_of(text, run_it=True)
    assert p.line == text.splitlines().index("    at: [Hold]") + 1
    assert "has no n" in p.found


def test_exit_codes_and_outputs_marked_not_passing(tmp_path, capsys):
    ok = write(tmp_path, "ok.yaml", ideal_job(limit("  - {quantity: pressure, max: 300 kPa, basis: x}\n")))
    bad = write(tmp_path, "bad.yaml", ideal_job(limit("  - {quantity: pressure, max: 200 kPa, basis: x}\n"),
                                                revision="B"))
    broken = write(tmp_path, "broken.yaml", ideal_job(limit("  - {quantity: power, max: 2 kW, basis: x}\n"),
                                                      revision="C"))
    out = tmp_path / "out"
    assert calcdoc.main(["run", str(ok), "--no-pdf", "-o", str(out), "-q"]) == 0
    assert calcdoc.main(["run", str(bad), "--no-pdf", "-o", str(out), "-q"]) == 1
    data = json.loads((out / "T-LIM-001_revB.json").read_text())
    assert data["passed"] is False and data["checks"][0]["status"] == "fail"
    assert calcdoc.main(["run", str(broken), "--no-pdf", "-o", str(out), "-q"]) == 2
    assert f"{broken}:" in capsys.readouterr().err
    assert not (out / "T-LIM-001_revC.json").exists()
