"""Reciprocating stages through the engine: the cylinder sets or checks the flow, series settle their
interstage pressures, rod loads and limits on the new quantities; staging with given ratios."""
from __future__ import annotations

import json
import math

import pytest
from conftest import flow_job, said

from calcdoc.errors import JobError
from calcdoc.report.jsonfile import dumps

AIR = "{fluid: Air, model: ideal}"
CYL1 = "{bore: 250 mm, stroke: 150 mm, rod: 45 mm, speed: 600 rpm, clearance: 12 %, action: double}"
CYL2 = "{bore: 150 mm, stroke: 150 mm, rod: 45 mm, speed: 600 rpm, clearance: 14 %, action: double}"
TWO_STAGE = f"""\
- name: Stage 1
  process: compressor
  machine: reciprocating
  cylinder: {CYL1}
  efficiency: {{isentropic: 0.80}}
- name: Intercooler
  process: cooler
  pressure_drop: 2 %
  end: {{temperature: 35 degC}}
- name: Stage 2
  process: compressor
  machine: reciprocating
  cylinder: {CYL2}
  efficiency: {{isentropic: 0.80}}
  end: {{pressure: 10 bar}}
"""
R_AIR = 8.314462618 / 0.0289647


def _m(D, d, S, N, c, Ps, Ts, Pd, k=1.4):
    """A double-acting ideal-gas cylinder's mass flow, written out here (closed forms)."""
    Vd = math.pi / 4 * (2 * D**2 - d**2) * S * N
    return (1 - c * ((Pd / Ps) ** (1 / k) - 1)) * Vd * Ps / (R_AIR * Ts)


def test_two_stage_settles_where_both_cylinders_pass_one_flow(run_flow_text):
    res = run_flow_text(flow_job(AIR, "{pressure: 1 bar, temperature: 25 degC}", TWO_STAGE))
    doc = json.loads(dumps(res))
    s1, s2 = doc["legs"][0], doc["legs"][2]
    m1, m2 = s1["cylinder_flow"]["value"], s2["cylinder_flow"]["value"]
    assert abs(m1 - m2) / m1 < 1e-6                                   # equal mass flows through both cylinders
    assert doc["flow"]["m_dot"]["value"] == pytest.approx(m1, rel=1e-12)   # the cylinders set the job's flow
    Pi = doc["interstage"][0]["discharge_pressures"][0]["value"]
    assert doc["states"][1]["P"]["value"] == pytest.approx(Pi, rel=1e-12)
    # hand iteration: bisection on the interstage pressure with the closed forms (the model's k, no Z ratio)
    k = res.gas.k
    lo, hi = 1.0001e5, 10e5 / 0.98
    for _ in range(200):
        mid = 0.5 * (lo + hi)
        a = _m(0.25, 0.045, 0.15, 10.0, 0.12, 1e5, 298.15, mid, k)
        b = _m(0.15, 0.045, 0.15, 10.0, 0.14, 0.98 * mid, 308.15, 10e5, k)
        lo, hi = (lo, mid) if b > a else (mid, hi)
    assert Pi == pytest.approx(0.5 * (lo + hi), rel=1e-8)
    assert "capacity" not in s1 and "capacity" not in s2             # the flow is the cylinders' own
    assert doc["cylinders"][0]["rod_load_reverses"] is True


def test_given_flow_gives_capacity_and_a_limit_can_name_it(run_flow_text):
    legs = f"""\
- name: Stage 1
  process: compressor
  machine: reciprocating
  cylinder: {CYL1}
  efficiency: {{isentropic: 0.80}}
  end: {{pressure: 3 bar}}
"""
    limits = """limits:
  - {name: Cylinder capacity, quantity: capacity, min: 1.05, basis: common practice}
  - {name: Rod load, quantity: rod_load_compression, max: 60 kN, basis: frame rating (demo)}
  - {name: Rod tension, quantity: rod_load_tension, max: 60 kN, basis: frame rating (demo)}
"""
    res = run_flow_text(flow_job(AIR, "{pressure: 1 bar, temperature: 25 degC, mass_flow: 0.15 kg/s}", legs, limits))
    m_cyl = _m(0.25, 0.045, 0.15, 10.0, 0.12, 1e5, 298.15, 3e5, res.gas.k) * R_AIR / res.gas.R
    leg = res.legs[0].quantities
    assert leg["cylinder_flow"].value == pytest.approx(m_cyl, rel=1e-12)
    assert leg["capacity"].value == pytest.approx(m_cyl / 0.15, rel=1e-12)
    checks = {c.name: c for c in res.checks}
    assert checks["Cylinder capacity"].value.value == pytest.approx(m_cyl / 0.15, rel=1e-12)
    assert checks["Cylinder capacity"].status == ("pass" if m_cyl / 0.15 >= 1.05 else "fail")
    # rod loads by hand with the standard atmosphere on the rod (the job gives no site)
    A_he, A_rod = math.pi / 4 * 0.25**2, math.pi / 4 * 0.045**2
    F_c = 3e5 * A_he - 1e5 * (A_he - A_rod) - 101325 * A_rod
    assert checks["Rod load"].value.value == pytest.approx(F_c, rel=1e-12)
    assert any(f.code == "cylinder.rod_standard" for f in res.legs[0].facts)


def test_small_cylinder_warns(run_flow_text):
    legs = f"""\
- name: Stage 1
  process: compressor
  machine: reciprocating
  cylinder: {CYL2}
  efficiency: {{isentropic: 0.80}}
  end: {{pressure: 3 bar}}
"""
    res = run_flow_text(flow_job(AIR, "{pressure: 1 bar, temperature: 25 degC, mass_flow: 0.5 kg/s}", legs))
    assert any("too small for the duty" in w for w in said(res))


def test_single_acting_rod_load_does_not_reverse(run_flow_text):
    legs = """\
- name: Stage 1
  process: compressor
  machine: reciprocating
  cylinder: {bore: 100 mm, stroke: 80 mm, rod: 30 mm, speed: 900 rpm, clearance: 10 %, action: single}
  efficiency: {polytropic: 0.80}
  end: {pressure: 8 bar}
"""
    res = run_flow_text(flow_job(AIR, "{pressure: 2 bar, temperature: 20 degC}", legs,
                                 "site: {atmosphere: 98 kPa}\n"))
    q = res.legs[0].quantities
    assert q["rod_load_tension"].value == pytest.approx((98e3 - 2e5) * math.pi / 4 * 0.03**2, rel=1e-9)
    assert any("does not reverse" in w for w in said(res))
    # single acting: displacement of the head end only (closed form)
    assert q["displacement"].value == pytest.approx(math.pi / 4 * 0.1**2 * 0.08 * 15.0, rel=1e-12)


def test_interstage_end_on_a_series_stage_is_bad_input(run_flow_text):
    legs = TWO_STAGE.replace("  efficiency: {isentropic: 0.80}\n- name: Intercooler",
                             "  efficiency: {isentropic: 0.80}\n  end: {pressure: 3 bar}\n- name: Intercooler", 1)
    with pytest.raises(JobError) as e:
        run_flow_text(flow_job(AIR, "{pressure: 1 bar, temperature: 25 degC}", legs))
    assert "not an input" in str(e.value)


def test_real_gas_cylinder_uses_z_ratio(run_flow_text):
    legs = """\
- name: Stage 1
  process: compressor
  machine: reciprocating
  cylinder: {bore: 120 mm, stroke: 100 mm, rod: 40 mm, speed: 750 rpm, clearance: 15 %, action: double}
  efficiency: {polytropic: 0.80}
  end: {pressure: 90 bar}
"""
    res = run_flow_text(flow_job("{fluid: Methane, model: real}", "{pressure: 30 bar, temperature: 20 degC}", legs))
    leg = res.legs[0]
    Zr = next(c for c in leg.calcs if c.symbol == "Z_s/Z_d").value
    assert Zr == pytest.approx(leg.start.Z / leg.end.Z, rel=1e-12)
    n_e = next(c for c in leg.calcs if c.symbol == "n_e").value
    eta = 1 - 0.15 * (Zr * 3.0 ** (1 / n_e) - 1)                    # closed form with the Z ratio
    assert leg.quantities["volumetric_efficiency"].value == pytest.approx(eta, rel=1e-12)
    from CoolProp.CoolProp import PropsSI

    # CoolProp called directly: the isentropic expansion coefficient and Z at suction, Z at the discharge state
    assert n_e == pytest.approx(PropsSI("isentropic_expansion_coefficient", "P", 30e5, "T", 293.15, "Methane"), rel=1e-8)
    Z_s = PropsSI("Z", "P", 30e5, "T", 293.15, "Methane")
    Z_d = PropsSI("Z", "P", 90e5, "T", leg.end.T, "Methane")
    assert Zr == pytest.approx(Z_s / Z_d, rel=1e-9)


def test_staging_with_given_ratios_and_per_stage_efficiencies(run_flow_text):
    legs = """\
- name: Train
  process: compressor
  efficiency: {polytropic: [0.80, 0.78, 0.76]}
  staging: {ratios: [3.0, 2.8], intercooler: {temperature: 35 degC, pressure_drop: 2 %}}
  end: {pressure: 20 bar}
"""
    res = run_flow_text(flow_job("{fluid: Nitrogen, model: ideal}",
                                 "{pressure: 1 bar, temperature: 25 degC, mass_flow: 1 kg/s}", legs))
    comp = [leg for leg in res.legs if leg.process == "compressor"]
    assert [leg.quantities["eta_p"].value for leg in comp] == [0.80, 0.78, 0.76]
    assert comp[0].end.P == pytest.approx(3e5, rel=1e-12)
    assert comp[1].end.P == pytest.approx(2.8 * 0.98 * 3e5, rel=1e-12)
    assert comp[2].end.P == pytest.approx(20e5, rel=1e-12)
    # interstage pressures given instead
    legs2 = legs.replace("ratios: [3.0, 2.8]", "interstage_pressures: [3 bar, 8 bar]")
    res2 = run_flow_text(flow_job("{fluid: Nitrogen, model: ideal}",
                                  "{pressure: 1 bar, temperature: 25 degC, mass_flow: 1 kg/s}", legs2))
    comp2 = [leg for leg in res2.legs if leg.process == "compressor"]
    assert [round(leg.end.P) for leg in comp2] == [300000, 800000, 2000000]


def test_staging_search_rejects_a_trial_outside_the_equation_of_state(run_flow_text):
    # hydrogen 20 → 700 bar in one stage discharges beyond the equation of state's range (CoolProp)
    legs = """\
- name: Train
  process: compressor
  efficiency: {polytropic: 0.78}
  staging: {max_discharge_temperature: 150 degC, intercooler: {temperature: 35 degC}}
  end: {pressure: 700 bar}
"""
    res = run_flow_text(flow_job("{fluid: Hydrogen, model: real}",
                                 "{pressure: 20 bar, temperature: 25 degC, mass_flow: 0.1 kg/s}", legs))
    trials = res.extra["staging"][0]["trials"]
    assert trials[0]["rejected"] == "eos_range" and trials[0]["max_discharge_temperature"] is None
    assert res.extra["staging"][0]["stages"] > 1
    assert any("rejected" in said(res, [f])[0] for f in res.legs[0].facts if f.code == "staging.fewest")


def test_a_cylinder_that_passes_no_gas_points_at_its_clearance(run_flow_text):
    legs = """\
- name: Stage 1
  process: compressor
  machine: reciprocating
  cylinder: {bore: 250 mm, stroke: 150 mm, rod: 45 mm, speed: 600 rpm, clearance: 60 %, action: double}
  efficiency: {isentropic: 0.80}
  end: {pressure: 9 bar}
"""
    # 1 − 0.6·(9^(1/1.4) − 1) < 0 (closed form): the clearance gas fills the stroke
    with pytest.raises(JobError) as e:
        run_flow_text(flow_job(AIR, "{pressure: 1 bar, temperature: 25 degC}", legs))
    p = e.value.problems[0]
    assert p.path == "legs[0].cylinder.clearance" and "passes no gas" in p.found


def test_a_sweep_can_vary_the_clearance_and_follow_the_capacity(run_flow_text):
    legs = f"""\
- name: Stage 1
  process: compressor
  machine: reciprocating
  cylinder: {CYL1}
  efficiency: {{isentropic: 0.80}}
  end: {{pressure: 3 bar}}
"""
    sweep = ("sweep:\n  input: legs[Stage 1].cylinder.clearance\n  values: [8 %, 20 %]\n"
             "  follow: [volumetric_efficiency]\n")
    res = run_flow_text(flow_job(AIR, "{pressure: 1 bar, temperature: 25 degC, mass_flow: 0.1 kg/s}", legs, sweep))
    k = res.gas.k
    vals = res.extra["sweep"]["series"][0]["values"]
    assert vals == pytest.approx([1 - c * (3 ** (1 / k) - 1) for c in (0.08, 0.20)], rel=1e-12)   # closed form
