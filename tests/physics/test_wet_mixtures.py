"""Mixtures that always finish, and two-phase states of mixtures.

- The phase envelope is traced in a child process on a budget; a composition whose Helmholtz-energy envelope
  does not finish falls back to the Peng–Robinson one, and the fallback is recorded.
- A natural-gas let-down into the two-phase region against CoolProp's HEOS (h, P) flash called directly.
- Eight natural gases, lean to rich, in one compressor stage and a two-stage train, against a direct
  integration of the path with CoolProp properties (SciPy solve_ivp), with the flashes per stage counted.
"""
from __future__ import annotations

import math
import resource

import pytest
from conftest import flow_job
from natural_gases import NATURAL_GASES

from calcdoc.engine import run
from calcdoc.job import loads
from calcdoc.physics.envelope import phase_envelope
from calcdoc.physics.flowpath import Eos
from calcdoc.physics.gas import RealGas

LETDOWN = {"Methane": 0.86, "Ethane": 0.07, "Propane": 0.05, "n-Butane": 0.02}


def _mix(c: dict) -> str:
    return "{mixture: {" + ", ".join(f"{k}: {v}" for k, v in c.items()) + "}, model: real}"


def _heos(c: dict):
    import CoolProp

    AS = CoolProp.AbstractState("HEOS", "&".join(c))
    AS.set_mole_fractions(list(c.values()))
    return AS


def test_envelope_that_does_not_finish_is_killed_and_falls_back_to_peng_robinson():
    c = NATURAL_GASES["known_slow"]
    env = phase_envelope(tuple(c), tuple(c.values()), heos_budget=1.0, pr_budget=5.0)
    assert [(m, outcome) for m, outcome, _ in env.tried] == [("heos", "timeout"), ("pr", "ok")]
    assert env.source == "pr" and env.margin > 0 and len(env.points) > 20
    # the killed child left nothing running; a second request is answered from the cache
    assert phase_envelope(tuple(c), tuple(c.values()), heos_budget=1.0, pr_budget=5.0) is env


def test_envelope_that_finishes_is_the_helmholtz_one():
    c = NATURAL_GASES["lean"]
    env = phase_envelope(tuple(c), tuple(c.values()))
    assert env.source == "heos" and env.tried[0][1] == "ok"
    # CoolProp called directly in this process: the same envelope
    AS = _heos(c)
    AS.build_phase_envelope("")
    d = AS.get_phase_envelope_data()
    assert max(T for T, _ in env.points) == pytest.approx(max(d.T), rel=1e-9)


def test_natural_gas_letdown_into_the_two_phase_region_against_heos_ph_flash():
    import CoolProp.CoolProp as CP

    text = flow_job(_mix(LETDOWN), "{pressure: 100 bar, temperature: 10 degC, mass_flow: 2 kg/s}",
                    "- {name: Let-down valve, process: throttle, end: {pressure: 40 bar}}\n")
    res = run(loads(text, "job.yaml"))
    end = res.legs[0].end
    # CoolProp HEOS called directly: h1 at (100 bar, 10 °C), then the (h, P) flash at 40 bar
    AS = _heos(LETDOWN)
    AS.update(CP.PT_INPUTS, 100e5, 283.15)
    h1 = AS.hmass()
    AS.update(CP.HmassP_INPUTS, h1, 40e5)
    Q = AS.Q()   # CoolProp's vapour fraction of a mixture is molar; to mass with the phases' molar masses
    Mv = AS.saturated_vapor_keyed_output(CP.iDmass) / AS.saturated_vapor_keyed_output(CP.iDmolar)
    Ml = AS.saturated_liquid_keyed_output(CP.iDmass) / AS.saturated_liquid_keyed_output(CP.iDmolar)
    x_mass = Q * Mv / (Q * Mv + (1 - Q) * Ml)
    assert end.phase == "two-phase"
    assert end.T == pytest.approx(AS.T(), abs=0.05)
    assert end.quality == pytest.approx(x_mass, abs=0.005)
    assert end.h == pytest.approx(h1, rel=1e-6)
    assert math.isnan(end.Z)
    assert end.rho_liquid == pytest.approx(AS.saturated_liquid_keyed_output(CP.iDmass), rel=1e-3)
    assert end.rho_vapour == pytest.approx(AS.saturated_vapor_keyed_output(CP.iDmass), rel=1e-3)
    assert any(getattr(w, "code", "") == "flow.two_phase_outlet" for w in res.warnings)


def test_mixture_cooler_into_the_envelope_drops_liquid():
    import CoolProp.CoolProp as CP

    text = flow_job(_mix(LETDOWN), "{pressure: 40 bar, temperature: 30 degC, mass_flow: 1 kg/s}",
                    "- {name: Chiller, process: cooler, end: {temperature: -20 degC}}\n")
    res = run(loads(text, "job.yaml"))
    end = res.legs[0].end
    AS = _heos(LETDOWN)   # CoolProp HEOS called directly: PT flash inside the envelope
    AS.update(CP.PT_INPUTS, 40e5, 253.15)
    assert 0 < AS.Q() < 1
    assert end.phase == "two-phase" and end.h == pytest.approx(AS.hmass(), rel=1e-9)
    assert 0 < end.quality < 1


def _direct_T2(c: dict, P1: float, T1: float, P2: float, eta_p: float) -> tuple[float, float]:
    """Reference: the compressor path dh = v·dP/η_p integrated in ln P with SciPy's DOP853 (rtol 1e-11), the
    enthalpy and volume from CoolProp HEOS PT flashes (gas phase imposed) and cp and (∂h/∂P)_T by central
    differences, so no analytic derivative of ours is reused. Returns T2 [K] and h2 − h1 [J/kg]."""
    import CoolProp.CoolProp as CP
    from scipy.integrate import solve_ivp

    AS = _heos(c)

    def hv(P, T):
        AS.specify_phase(CP.iphase_gas)
        AS.update(CP.PT_INPUTS, P, T)
        out = AS.hmass(), 1.0 / AS.rhomass()
        AS.unspecify_phase()
        return out

    def rhs(x, y):
        P, T = math.exp(x), y[0]
        h, v = hv(P, T)
        cp = (hv(P, T + 0.01)[0] - hv(P, T - 0.01)[0]) / 0.02
        dhdP = (hv(P * 1.0001, T)[0] - hv(P * 0.9999, T)[0]) / (0.0002 * P)
        return [P * (v / eta_p - dhdP) / cp]

    sol = solve_ivp(rhs, (math.log(P1), math.log(P2)), [T1], method="DOP853", rtol=1e-11, atol=1e-9)
    T2 = float(sol.y[0, -1])
    return T2, hv(P2, T2)[0] - hv(P1, T1)[0]


STAGE = "- {name: Stage, process: compressor, efficiency: {polytropic: 0.78}, end: {pressure: 55 bar}}\n"
TRAIN = ("- name: Train\n  process: compressor\n  efficiency: {polytropic: 0.78}\n"
         "  staging: {stages: 2, intercooler: {temperature: 40 degC}}\n  end: {pressure: 100 bar}\n")
START = "{pressure: 25 bar, temperature: 40 degC, mass_flow: 5 kg/s}"


@pytest.mark.parametrize("name", sorted(NATURAL_GASES))
def test_eight_natural_gases_finish_and_agree_with_a_direct_integration(name):
    c = NATURAL_GASES[name]
    one = run(loads(flow_job(_mix(c), START, STAGE), "one.yaml"))
    eos = Eos(RealGas(None, tuple(c.items())))
    assert eos.envelope_source in ("heos", "pr")
    codes = [getattr(w, "code", "") for w in one.warnings]
    # a fallback is never silent
    assert ("mixture.envelope_fallback" in codes) == (eos.envelope_source != "heos")
    T2, dh = _direct_T2(c, 25e5, 313.15, 55e5, 0.78)
    leg = one.legs[0]
    assert leg.end.T == pytest.approx(T2, abs=2e-3)
    assert leg.quantities["work_in"].value == pytest.approx(dh, rel=2e-5)
    flashes_one = one.extra["eos_flashes"]
    assert flashes_one < 200   # counted flashes of one stage (Dormand–Prince steps, end states, isentropic end)
    two = run(loads(flow_job(_mix(c), START, TRAIN), "two.yaml"))
    stages = [leg for leg in two.legs if leg.process == "compressor"]
    assert len(stages) == 2
    T2a, _ = _direct_T2(c, stages[0].start.P, 313.15, stages[0].end.P, 0.78)
    assert stages[0].end.T == pytest.approx(T2a, abs=2e-3)
    assert two.extra["eos_flashes"] < 500
    # memory of this process stays bounded (the envelope tracer's growth is confined to its killed child)
    assert resource.getrusage(resource.RUSAGE_SELF).ru_maxrss < 1.5e6   # kB
