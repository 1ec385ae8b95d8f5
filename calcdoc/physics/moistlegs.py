"""Moist-air legs: the humidity of the start state, and coolers whose outlet falls below the dew point.

A cooler (or an intercooler) whose outlet temperature T_2 is below the dew point at its outlet pressure ends
saturated; the water above the saturation humidity ratio W_2 is drained as liquid at (P_2, T_2):

    W_2 = ε·p_ws(T_2)/(P_2 − p_ws(T_2)),   ṁ_da = ṁ_1/(1 + W_1),   ṁ_c = ṁ_da·(W_1 − W_2)
    Q̇ = (ṁ_1 − ṁ_c)·h_2 + ṁ_c·h_f(P_2, T_2) − ṁ_1·h_1

(a steady-flow energy balance over the cooler with the gas and the drained liquid leaving; h per kg of moist
gas at its own humidity, h_f of liquid water on the same reference). The flow after the leg is the moist gas
at W_2, ṁ_1 − ṁ_c. SI: kg/s, J/kg, W.
"""
from __future__ import annotations

from ..errors import PhysicsError
from .calc import Calc, Term
from .closed import LegResult
from .flowlegs import PATH_POINTS, Ctx, heat_exchanger
from .gas import State
from .moist import T_TRIPLE, MoistEos, humidity_ratio, liquid_enthalpy, p_ws, vapour_pressure

__all__ = ["moist_cooler", "start_humidity"]


def start_humidity(kind: str, value: float, P: float, T: float) -> tuple[float, list[Calc]]:
    """The humidity ratio W_1 [kg/kg dry air] of the start state from a relative humidity (fraction), a dew
    point [K] or W itself, with its calcs. A state wetter than saturation, or a dew point above the start
    temperature, is an error."""
    calcs: list[Calc] = []
    Pt, Tt = Term("P_1", P, "Pa"), Term("T_1", T, "K")
    if kind == "humidity_ratio":
        W = value
        calcs.append(Calc("W_1", W, "", "{W}", "input", {"W": Term("W_1", W, "")}, note="moist.W"))
        pv = vapour_pressure(P, W)
        calcs.append(Calc("p_{v,1}", pv, "Pa", "{P}·{W}/(ε + {W})", "moist.ideal_mixture",
                          {"P": Pt, "W": Term("W_1", W, "")}, note="moist.eps"))
        if T < T_TRIPLE or pv > p_ws(T):
            raise PhysicsError("moist.supersaturated_start", T=T, P=P, W=W)
        return W, calcs
    if T < T_TRIPLE:
        raise PhysicsError("moist.saturation_range", T=T)
    if kind == "relative_humidity":
        pws = p_ws(T)
        calcs.append(Calc("p_ws(T_1)", pws, "Pa", "p_ws({T})", "moist.p_ws", {"T": Tt}))
        pv = value * pws
        calcs.append(Calc("p_{v,1}", pv, "Pa", "{phi}·{pws}", "moist.ideal_mixture",
                          {"phi": Term("φ_1", value, ""), "pws": Term("p_ws", pws, "Pa")}))
    else:
        if value > T + 1e-9:
            raise PhysicsError("moist.dew_above_T", T=T, T_dew=value)
        if value < T_TRIPLE:
            raise PhysicsError("moist.saturation_range", T=value)
        pv = p_ws(value)
        calcs.append(Calc("p_{v,1}", pv, "Pa", "p_ws({Td})", "moist.p_ws", {"Td": Term("T_{dew,1}", value, "K")}))
    if pv >= P:
        raise PhysicsError("moist.supersaturated_start", T=T, P=P, W=float("inf"))
    W = humidity_ratio(P, pv)
    calcs.append(Calc("W_1", W, "", "ε·{pv}/({P} − {pv})", "moist.ideal_mixture",
                      {"pv": Term("p_{v,1}", pv, "Pa"), "P": Pt}, note="moist.W"))
    return W, calcs


def moist_cooler(ctx: Ctx, name: str, process: str, i: int, s1: State, P2: float, T2: float,
                 drop_calc: Calc | None) -> LegResult:
    """A cooler or heater of moist air; below the dew point the outlet is saturated and the condensate drains.

    Changes ``ctx`` for the legs that follow a condensing cooler: the gas at W_2 and the flow ṁ_1 − ṁ_c."""
    meos = ctx.eos
    assert isinstance(meos, MoistEos)
    W1 = meos.W
    j = i + 1
    m1 = ctx.m_dot
    Td = meos.dew_temperature(P2)
    zero = Calc("ṁ_c", 0.0, "kg/s", "0", "moist.condensate", note="moist.no_condensate")
    if process != "cooler" or Td is None or T2 >= Td:
        res = heat_exchanger(ctx, name, process, i, s1, P2, T2, drop_calc)
        if process != "cooler":
            return res
        return LegResult(res.name, res.process, res.i, res.start, res.end, {**res.quantities, "condensate": zero},
                         res.calcs + (zero,), res.path, res.warnings, res.facts)
    if T2 < T_TRIPLE:
        raise PhysicsError("moist.ice", T=T2, T_dew=Td, P=P2)
    pws = p_ws(T2)
    W2 = humidity_ratio(P2, pws)
    after = meos.with_W(W2)
    s2 = after.pt(P2, T2).state
    m_da = m1 / (1.0 + W1)
    m_c = m_da * (W1 - W2)
    hf = liquid_enthalpy(P2, T2)
    Q = (m1 - m_c) * s2.h + m_c * hf - m1 * s1.h
    wt = {"W1": Term(f"W_{i}", W1, ""), "W2": Term(f"W_{j}", W2, "")}
    calcs = [drop_calc] if drop_calc is not None else []
    calcs += [
        Calc(f"T_{{dew,{j}}}", Td, "K", f"T_sat(p_v at P_{j}, W_{i})", "moist.p_ws", note="moist.dew_point"),
        Calc(f"p_ws(T_{j})", pws, "Pa", "p_ws({T})", "moist.p_ws", {"T": Term(f"T_{j}", T2, "K")}),
        Calc(f"W_{j}", W2, "", "ε·{pws}/({P2} − {pws})", "moist.ideal_mixture",
             {"pws": Term("p_ws", pws, "Pa"), "P2": Term(f"P_{j}", P2, "Pa")}, note="moist.saturated_outlet"),
        Calc("ṁ_{da}", m_da, "kg/s", "{m}/(1 + {W1})", "moist.condensate",
             {"m": Term(f"ṁ_{i}", m1, "kg/s"), "W1": wt["W1"]}, note="moist.dry_flow"),
    ]
    C = Calc("ṁ_c", m_c, "kg/s", "{mda}·({W1} − {W2})", "moist.condensate",
             {"mda": Term("ṁ_{da}", m_da, "kg/s"), **wt}, note="moist.condensate")
    H1 = Calc(f"h_{i}", s1.h, "J/kg", f"h(P_{i}, T_{i}, W_{i})", "moist.ideal_mixture")
    H2 = Calc(f"h_{j}", s2.h, "J/kg", f"h(P_{j}, T_{j}, W_{j})", "moist.ideal_mixture")
    HF = Calc("h_f", hf, "J/kg", f"h_water(P_{j}, T_{j})", "moist.liquid", note="moist.liquid")
    D = Calc("Q̇", Q, "W", "({m1} − {mc})·{h2} + {mc}·{hf} − {m1}·{h1}", "moist.condensate",
             {"m1": Term(f"ṁ_{i}", m1, "kg/s"), "mc": Term("ṁ_c", m_c, "kg/s"), "h2": Term(f"h_{j}", s2.h, "J/kg"),
              "hf": Term("h_f", hf, "J/kg"), "h1": Term(f"h_{i}", s1.h, "J/kg")}, note="moist.duty")
    q = Calc("q_in", Q / m1, "J/kg", "{Q}/{m1}", "moist.condensate",
             {"Q": Term("Q̇", Q, "W"), "m1": Term(f"ṁ_{i}", m1, "kg/s")}, note="moist.q_per_inlet")
    calcs += [C, H1, H2, HF, D, q]
    W = Calc("w_in", 0.0, "J/kg", "0", "flow.firstlaw_heat", note="no_shaft_work")
    P = Calc("P_gas", 0.0, "W", "0", "flow.firstlaw_heat")
    path = [s1]
    for k in range(1, PATH_POINTS):
        x = k / PATH_POINTS
        Pk, Tk = s1.P + (P2 - s1.P) * x, s1.T + (T2 - s1.T) * x
        Tdk = meos.dew_temperature(Pk)
        eos_k = meos if Tdk is None or Tk >= Tdk else meos.with_W(humidity_ratio(Pk, p_ws(Tk)))
        path.append(eos_k.pt(Pk, Tk).state)
    path.append(s2)
    ctx.eos, ctx.gas, ctx.m_dot = after, after.gas, m1 - m_c
    quantities = {"work_in": W, "duty": D, "power": P, "q_in": q, "condensate": C,
                  "humidity_ratio_out": next(c for c in calcs if c.symbol == f"W_{j}")}
    return LegResult(name, process, i, s1, s2, quantities, tuple(calcs), tuple(path), (), ())

