"""The first law of every closed-system leg, held to references computed without calcdoc.

For each leg the reference end state, the change of internal energy and the boundary work are computed
here from the definition of the process alone: the energies from CoolProp called directly at both ends
(real gas) or from u = cv·T (ideal gas with constant specific heats), the work by SciPy quadrature of
P dV along the path the process defines (P·V^n = const; s = const and T = const with P from CoolProp's
high-level interface; P = const; V = const). The heat calcdoc reports must equal ΔU + W of these.
"""
from __future__ import annotations

import math

import CoolProp.CoolProp as CP
import pytest
from scipy.integrate import quad

from calcdoc.physics.closed import Target, closed_leg
from calcdoc.physics.gas import R_U, IdealGas, RealGas

M_GAS = 0.7          # kg of gas in every leg
P1, T1 = 2e6, 320.0
FLUID = "Nitrogen"


def _props(out: str, a: str, x: float, b: str, y: float) -> float:
    return CP.PropsSI(out, a, x, b, y, FLUID)                  # CoolProp called directly


def _reference_real(process: str, v1: float, s1: float, target: tuple[str, float], n: float | None):
    """(P2, T2, v2, W) of a leg of nitrogen from (P1, T1) to the target, from CoolProp and SciPy only."""
    kind, x = target
    if process == "polytropic":
        v2 = x
        P2 = P1 * (v1 / v2) ** n                                                # P·v^n = const
        W, _ = quad(lambda V: P1 * (M_GAS * v1 / V) ** n, M_GAS * v1, M_GAS * v2, epsrel=1e-12)
        T2 = _props("T", "P", P2, "D", 1 / v2)
    elif process == "isentropic":
        P2 = x
        v2 = 1 / _props("D", "P", P2, "S", s1)
        W, _ = quad(lambda V: _props("P", "S", s1, "D", M_GAS / V), M_GAS * v1, M_GAS * v2, epsrel=1e-11, limit=200)
        T2 = _props("T", "P", P2, "S", s1)
    elif process == "isothermal":
        v2 = x
        W, _ = quad(lambda V: _props("P", "T", T1, "D", M_GAS / V), M_GAS * v1, M_GAS * v2, epsrel=1e-11, limit=200)
        P2, T2 = _props("P", "T", T1, "D", 1 / v2), T1
    elif process == "isobaric":
        T2 = x
        v2 = 1 / _props("D", "P", P1, "T", T2)
        P2, W = P1, P1 * M_GAS * (v2 - v1)
    else:                                                                       # isochoric
        T2, v2, W = x, v1, 0.0
        P2 = _props("P", "T", T2, "D", 1 / v1)
    return P2, T2, v2, W


LEGS = [("polytropic", ("v", 0.5), 1.3), ("isentropic", ("P", 5e6), None), ("isothermal", ("v", 2.0), None),
        ("isobaric", ("T", 400.0), None), ("isochoric", ("T", 280.0), None)]


@pytest.mark.parametrize("process, target, n", LEGS, ids=[leg[0] for leg in LEGS])
def test_real_gas_leg_obeys_the_first_law_with_independent_energies_and_work(process, target, n):
    gas = RealGas(FLUID)
    s1 = gas.state_PT(P1, T1)
    v1 = 1 / _props("D", "P", P1, "T", T1)
    s_1 = _props("S", "P", P1, "T", T1)
    kind, x = target
    x = x * v1 if kind == "v" else x                                            # volume targets as ratios of v1
    P2, T2, v2, W = _reference_real(process, v1, s_1, (kind, x), n)
    res = closed_leg(gas, "leg", process, 1, s1, M_GAS, [Target(kind, x)], n)
    dU = M_GAS * (_props("U", "P", P2, "T", T2) - _props("U", "P", P1, "T", T1))   # CoolProp at both ends
    assert res.end.P == pytest.approx(P2, rel=1e-7)
    assert res.end.T == pytest.approx(T2, rel=1e-7)
    assert res.quantities["W_by_gas"].value == pytest.approx(W, rel=1e-7, abs=1e-9 * abs(dU))
    assert res.quantities["Q_to_gas"].value == pytest.approx(dU + W, rel=1e-7, abs=1e-7 * max(abs(dU), abs(W)))


@pytest.mark.parametrize("process, target, n", LEGS, ids=[leg[0] for leg in LEGS])
def test_ideal_gas_leg_obeys_the_first_law_with_closed_forms(process, target, n):
    k, M = 1.4, 0.0280134                     # a nitrogen-like ideal gas with constant specific heats (demo values)
    R = R_U / M
    cv = R / (k - 1)
    gas = IdealGas("demo", k, M)
    s1 = gas.state_PT(P1, T1)
    v1 = R * T1 / P1                                                            # P·v = R·T
    kind, x = target
    x = x * v1 if kind == "v" else x
    if process == "polytropic":
        v2 = x
        P2 = P1 * (v1 / v2) ** n
        W, _ = quad(lambda V: P1 * (M_GAS * v1 / V) ** n, M_GAS * v1, M_GAS * v2, epsrel=1e-12)
    elif process == "isentropic":
        P2 = x
        v2 = v1 * (P1 / P2) ** (1 / k)                                          # P·v^k = const
        W, _ = quad(lambda V: P1 * (M_GAS * v1 / V) ** k, M_GAS * v1, M_GAS * v2, epsrel=1e-12)
    elif process == "isothermal":
        v2 = x
        P2 = P1 * v1 / v2
        W = P1 * M_GAS * v1 * math.log(v2 / v1)                                  # P1·V1·ln(V2/V1)
    elif process == "isobaric":
        P2, v2 = P1, R * x / P1
        W = P1 * M_GAS * (v2 - v1)
    else:
        P2, v2, W = R * x / v1, v1, 0.0
    T2 = P2 * v2 / R
    dU = M_GAS * cv * (T2 - T1)                                                 # u = cv·T + const
    res = closed_leg(gas, "leg", process, 1, s1, M_GAS, [Target(kind, x)], n)
    assert res.end.T == pytest.approx(T2, rel=1e-10)
    assert res.quantities["W_by_gas"].value == pytest.approx(W, rel=1e-9, abs=1e-9 * abs(dU))
    assert res.quantities["Q_to_gas"].value == pytest.approx(dU + W, rel=1e-9, abs=1e-9 * max(abs(dU), abs(W)))
