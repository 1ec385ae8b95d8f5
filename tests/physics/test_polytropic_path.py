"""The constant-efficiency path integrator: accuracy against an independent integration, few flashes,
and a flash count that never falls as the tolerance tightens."""
from __future__ import annotations

import math

import pytest

from calcdoc.physics.flowpath import STEP_RTOL, Eos, polytropic_path
from calcdoc.physics.gas import RealGas

CASES = [
    # fluid, P1 [Pa], T1 [K], P2 [Pa], eta_p
    ("CarbonDioxide", 80e5, 313.15, 250e5, 0.80),   # near the critical region
    ("Methane", 30e5, 300.0, 90e5, 0.80),
    ("Nitrogen", 10e5, 300.0, 40e5, 0.78),
    ("Methane", 90e5, 400.0, 20e5, 0.85),           # expander
]


def _reference_dh(fluid: str, P1: float, T1: float, P2: float, eta: float, steps: int = 800) -> float:
    """Enthalpy change along the path by classical RK4 in ln P on h, dh/dlnP = e·P·v(P, h), with
    CoolProp's (h, P) flashes called directly: a formulation independent of the integrator's (P, T)."""
    import CoolProp
    import CoolProp.CoolProp as CP

    AS = CoolProp.AbstractState("HEOS", fluid)
    AS.update(CP.PT_INPUTS, P1, T1)
    h = h1 = AS.hmass()
    e = 1.0 / eta if P2 > P1 else eta

    def f(x: float, hh: float) -> float:
        P = math.exp(x)
        AS.update(CP.HmassP_INPUTS, hh, P)
        return e * P / AS.rhomass()

    x, dx = math.log(P1), (math.log(P2) - math.log(P1)) / steps
    for _ in range(steps):
        k1 = f(x, h)
        k2 = f(x + dx / 2, h + dx / 2 * k1)
        k3 = f(x + dx / 2, h + dx / 2 * k2)
        k4 = f(x + dx, h + dx * k3)
        h += dx / 6 * (k1 + 2 * k2 + 2 * k3 + k4)
        x += dx
    return h - h1


def _path(fluid, P1, T1, P2, eta, rtol=STEP_RTOL):
    gas = RealGas(fluid)
    eos = Eos(gas)
    p1 = eos.pt(P1, T1)
    f0 = gas.flashes
    end, states, steps = polytropic_path(eos, p1, P2, eta, rtol)
    return end.state.h - p1.state.h, gas.flashes - f0, states


@pytest.mark.parametrize("fluid, P1, T1, P2, eta", CASES)
def test_default_tolerance_meets_1e_6_in_head(fluid, P1, T1, P2, eta):
    dh, flashes, states = _path(fluid, P1, T1, P2, eta)
    ref = _reference_dh(fluid, P1, T1, P2, eta)   # CoolProp called directly, 800 RK4 steps on h
    # head = η·Δh (compressor) or Δh/η (expander): the same relative error as Δh
    assert dh == pytest.approx(ref, rel=1e-6)
    # a stage costs few equation-of-state calls (deterministic count, not a timing)
    assert flashes <= 25
    # the path's states run from start to end, monotonic in pressure
    Ps = [s.P for s in states]
    assert Ps[0] == P1 and Ps[-1] == pytest.approx(P2, rel=1e-12)
    assert all((b - a) * (P2 - P1) > 0 for a, b in zip(Ps, Ps[1:], strict=False))


@pytest.mark.parametrize("fluid, P1, T1, P2, eta", CASES[:3])
def test_flashes_never_fall_as_the_tolerance_tightens(fluid, P1, T1, P2, eta):
    tols = [1e-3, 3e-4, 1e-4, 3e-5, 1e-5, 3e-6, 1e-6, 3e-7, 1e-7, 3e-8, 1e-8]
    runs = [_path(fluid, P1, T1, P2, eta, tol) for tol in tols]
    counts = [n for _, n, _ in runs]
    assert counts == sorted(counts), counts
    # and the tightest tolerances agree with each other far below the default's accuracy
    assert runs[-1][0] == pytest.approx(runs[-2][0], rel=1e-7)
