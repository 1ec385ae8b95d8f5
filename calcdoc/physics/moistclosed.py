"""A fixed mass of moist air at constant volume (a receiver) cooled or warmed to a temperature, with the water
that condenses below the dew point.

Dry air m_da and water m_w = W_1·m_da are fixed. At the end temperature T_2 the water stays vapour when the gas
at W_1 filling the volume is not saturated; otherwise the gas is saturated, W_2 = ε·p_ws(T_2)/(P_2 − p_ws(T_2)),
and the rest is liquid (condensate m_c = m_da·(W_1 − W_2)) taking its own volume:

    m_da·(1 + W_2)·v(P_2, T_2, W_2) + m_c·v_f(T_2) = V,   solved for P_2 (secant, to 1e-10 relative)
    Q = ΔU = [m_da·(1 + W_2)·u_2 + m_c·u_f] − m·u_1,   W_by_gas = 0

with the moist-air model of :mod:`calcdoc.physics.moist` and liquid water from CoolProp's Water. SI.
"""
from __future__ import annotations

from collections.abc import Callable

from ..errors import PhysicsError
from .calc import Calc, Term
from .closed import LegResult
from .gas import State
from .moist import MoistEos, humidity_ratio, liquid_state, p_ws, vapour_pressure

__all__ = ["receiver_leg"]


def _solve_P(f: Callable[[float], float], P0: float) -> float:
    """Secant on P for f(P) = 0 (the volume balance), to 1e-10 relative."""
    a, b = P0, P0 * 1.01
    fa, fb = f(a), f(b)
    for _ in range(60):
        if fb == fa:
            break
        c = b - fb * (b - a) / (fb - fa)
        c = max(c, 0.5 * b)
        a, fa, b = b, fb, c
        fb = f(b)
        if abs(b - a) < 1e-10 * b:
            return float(b)
    raise PhysicsError("moist.receiver_pressure")


def receiver_leg(meos: MoistEos, name: str, i: int, s1: State, m: float, V: float, T2: float
                 ) -> tuple[LegResult, MoistEos, float]:
    """The leg, the moist gas after it and the condensate in the volume [kg]."""
    j = i + 1
    W1 = meos.W
    m_da = m / (1.0 + W1)

    def v_dry(P: float) -> float:
        return m * meos.pt(P, T2).state.v - V

    P_dry = _solve_P(v_dry, s1.P * T2 / s1.T)
    wet = vapour_pressure(P_dry, W1) > p_ws(T2) if T2 < 647.0 else False
    calcs: list[Calc] = []
    if not wet:
        after, W2, m_c, P2 = meos, W1, 0.0, P_dry
        s2 = meos.pt(P2, T2).state
        vf = uf = sf = 0.0
    else:
        pws = p_ws(T2)

        def balance(P: float) -> float:
            W2 = humidity_ratio(P, pws)
            vf_, _, _ = liquid_state(P, T2)
            return m_da * (1 + W2) * meos.with_W(W2).pt(P, T2).state.v + m_da * (W1 - W2) * vf_ - V

        P2 = _solve_P(balance, P_dry)
        W2 = humidity_ratio(P2, pws)
        after = meos.with_W(W2)
        s2 = after.pt(P2, T2).state
        m_c = m_da * (W1 - W2)
        vf, uf, sf = liquid_state(P2, T2)
        calcs += [
            Calc(f"p_ws(T_{j})", pws, "Pa", "p_ws({T})", "moist.p_ws", {"T": Term(f"T_{j}", T2, "K")}),
            Calc(f"P_{j}", P2, "Pa", "P such that m_da·(1 + W_2)·v(P, T_2, W_2) + m_c·v_f = V", "moist.receiver",
                 {"V": Term("V", V, "m**3")}, note="moist.receiver_P"),
            Calc(f"W_{j}", W2, "", "ε·{pws}/({P2} − {pws})", "moist.ideal_mixture",
                 {"pws": Term("p_ws", pws, "Pa"), "P2": Term(f"P_{j}", P2, "Pa")}, note="moist.saturated_outlet"),
        ]
    if not wet:
        calcs.append(Calc(f"P_{j}", P2, "Pa", "P such that m·v(P, T_2, W_1) = V", "moist.receiver",
                          {"V": Term("V", V, "m**3")}, note="moist.no_condensate"))
    mg = m - m_c
    C = Calc("m_c", m_c, "kg", "{mda}·({W1} − {W2})", "moist.receiver",
             {"mda": Term("m_da", m_da, "kg"), "W1": Term(f"W_{i}", W1, ""), "W2": Term(f"W_{j}", W2, "")},
             note="moist.condensate" if m_c > 0 else "moist.no_condensate")
    U1, U2 = m * s1.u, mg * s2.u + m_c * uf
    H1, H2 = m * s1.h, mg * s2.h + m_c * (uf + P2 * vf)
    S1, S2 = m * s1.s, mg * s2.s + m_c * sf
    dU = Calc("ΔU", U2 - U1, "J", "({mg}·{u2} + {mc}·{uf}) − {m}·{u1}", "moist.receiver",
              {"mg": Term("m_g", mg, "kg"), "u2": Term(f"u_{j}", s2.u, "J/kg"), "mc": Term("m_c", m_c, "kg"),
               "uf": Term("u_f", uf, "J/kg"), "m": Term("m", m, "kg"), "u1": Term(f"u_{i}", s1.u, "J/kg")},
              note="moist.receiver_U")
    W = Calc("W", 0.0, "J", "0", "path.constant", note="moist.no_boundary_work")
    Q = Calc("Q", dU.value, "J", "{dU}", "moist.receiver", {"dU": Term("ΔU", dU.value, "J")},
             note="moist.duty_closed")
    dH = Calc("ΔH", H2 - H1, "J", "(m_g·h_2 + m_c·h_f) − m·h_1", "moist.receiver")
    dS = Calc("ΔS", S2 - S1, "J/K", "(m_g·s_2 + m_c·s_f) − m·s_1", "moist.receiver")
    calcs += [C, dU, W, Q, dH, dS]
    q = {"W_by_gas": W, "Q_to_gas": Q, "dU": dU, "dH": dH, "dS": dS, "condensate": C}
    if m_c > 0:
        q["humidity_ratio_out"] = next(c for c in calcs if c.symbol == f"W_{j}")
    path = [s1, s2]
    return LegResult(name, "isochoric", i, s1, s2, q, tuple(calcs), tuple(path), (), ()), after, m_c
