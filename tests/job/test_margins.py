"""Percent margins only where a quantity has a true zero that the trade uses that way; refused (exit 2,
a message about the margin that suggests an absolute one) elsewhere. Reasons are "common practice" where
no standard is at hand."""
from __future__ import annotations

import math

import pytest

from calcdoc.errors import JobError
from calcdoc.job import loads
from calcdoc.job.quantities import PERCENT_MARGIN, QUANTITIES, percent_margin

JOB = """calcdoc: 1
calc: {{number: M-001, title: Margins, revision: A, date: 2026-11-30}}
site: {{atmosphere: 100 kPa}}
gas: {{fluid: Nitrogen, model: ideal}}
system: flow
start: {{pressure: 2 barg, temperature: 30 degC, mass_flow: 1 kg/s}}
legs:
  - name: Stage 1
    process: compressor
    efficiency: {{polytropic: 0.8}}
    end: {{pressure: 6 barg}}
  - name: Cooler
    process: cooler
    pressure_drop: 0.1 bar
    end: {{temperature: 40 degC}}
limits:
  - name: L
    quantity: {q}
    {at}max: {lim}
    margin: {margin}
    basis: common practice
"""

# (quantity, limit, at) for a job of the kind above; the expected answer is the trade's usage (common practice)
ALLOWED = [("power", "500 kW", "Stage 1"), ("shaft_power", "500 kW", "Stage 1"), ("cooling_duty", "500 kW", "Cooler"),
           ("head", "500 kJ/kg", "Stage 1"), ("work_in", "500 kJ/kg", "Stage 1"), ("volume_flow", "1 m3/s", None),
           ("total_power", "500 kW", None), ("pressure", "10 barg", "Stage 1")]
REFUSED = [("temperature", "150 degC", "Stage 1", "10 K"), ("discharge_temperature", "150 degC", "Stage 1", "10 K"),
           ("pressure", "11 bara", "Stage 1", "0.5 bar"), ("enthalpy", "900 kJ/kg", "Stage 1", "5 kJ/kg"),
           ("eta_p", "0.9", "Stage 1", "0.02"), ("pressure_ratio", "4", "Stage 1", "0.02"),
           ("density", "20 kg/m3", "Stage 1", "1 kg/m3")]


def _job(q, lim, at, margin):
    return JOB.format(q=q, lim=lim, margin=margin, at=f"at: [{at}]\n    " if at else "")


def test_every_quantity_states_whether_a_percent_margin_is_allowed_and_why():
    assert set(PERCENT_MARGIN) == set(QUANTITIES)
    for name, (kind, why) in PERCENT_MARGIN.items():
        assert kind in ("percent", "gauge", "refused"), name
        assert len(why) > 30, name
        if kind != "refused":
            assert "common practice" in why, f"{name}: a percent margin allowed with no stated basis"


@pytest.mark.parametrize("q,lim,at", ALLOWED, ids=[a[0] + ("_gauge" if "g" in a[1][-1] else "") for a in ALLOWED])
def test_percent_margin_allowed_on_a_quantity_with_a_true_zero(q, lim, at):
    job = loads(_job(q, lim, at, "10 %"), "m.yaml")
    spec = job.limits[0]
    assert spec.margin.percent and spec.margin.si == pytest.approx(0.10)
    assert spec.percent_zero == (100e3 if q == "pressure" else 0.0)


@pytest.mark.parametrize("q,lim,at,example", REFUSED, ids=[r[0] + "_" + r[1].split()[-1] for r in REFUSED])
def test_percent_margin_refused_without_a_true_zero(q, lim, at, example):
    with pytest.raises(JobError) as exc:
        loads(_job(q, lim, at, "10 %"), "m.yaml")
    text = str(exc.value)
    assert "margin" in text and f"margin: {example}" in text
    assert f"m.yaml:{_job(q, lim, at, '10 %').splitlines().index('    margin: 10 %') + 1}:" in text


@pytest.mark.parametrize("q,lim,at,example", REFUSED[:3], ids=[r[0] for r in REFUSED[:3]])
def test_the_suggested_absolute_margin_is_accepted(q, lim, at, example):
    job = loads(_job(q, lim, at, example), "m.yaml")
    assert not job.limits[0].margin.percent


def test_percent_of_gauge_pressure_is_judged_on_the_gauge_value():
    from calcdoc.engine import run

    res = run(loads(_job("pressure", "10 barg", "Stage 1", "10 %"), "m.yaml"))
    (c,) = res.checks
    P2 = res.states[1].state.P
    # definition of gauge pressure: P_g = P − P_atm (site atmosphere 100 kPa as given in the job)
    assert c.required_margin == pytest.approx(0.10 * (P2 - 100e3), rel=1e-12)
    assert c.margin_pct == pytest.approx((11e5 - P2) / (P2 - 100e3) * 100.0, rel=1e-9)


def test_no_percent_is_reported_for_a_temperature_margin():
    from calcdoc.engine import run

    res = run(loads(_job("temperature", "150 degC", "Stage 1", "10 K"), "m.yaml"))
    assert math.isnan(res.checks[0].margin_pct)
    assert percent_margin(QUANTITIES["temperature"])[0] == "refused"
