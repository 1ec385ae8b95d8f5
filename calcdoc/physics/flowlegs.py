"""Steady-flow legs: compressor and expander stages, coolers and heaters, throttles, and the
reversible polytropic, isentropic and isothermal flow processes.

Each function takes the flow context, the leg's start state and its end target, and returns a
:class:`calcdoc.processes.LegResult` whose quantities follow the results contract: per unit mass
``work_in``, ``head`` (polytropic head ∫v·dP), ``head_isentropic`` [J/kg]; ``eta_p``, ``eta_s``, ``n``;
for the flow ``duty``, ``power``, ``shaft_power`` [W]. Sign convention: shaft work and heat INTO
the gas are positive (an expander has negative work_in and power; a cooler negative duty).
"""
from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from ..errors import Finding, PhysicsError
from .calc import Calc, Term
from .closed import LegResult, n_from_states
from .flowpath import Eos, Point, TwoPhaseError, polytropic_path, solve_T
from .gas import R_U, Gas, State

__all__ = ["Ctx", "MeasuredEndError", "machine", "heat_exchanger", "throttle", "reversible"]


class MeasuredEndError(PhysicsError):
    """A measured end temperature that no adiabatic machine of this kind can reach (the engine points
    at the leg's end temperature)."""

PATH_POINTS = 8


@dataclass
class Ctx:
    """What every leg needs: the gas, the counted real-gas flashes (None for an ideal gas), the mass flow."""

    gas: Gas
    eos: Eos | None
    m_dot: float

    @property
    def ideal(self) -> bool:
        """True for the ideal-gas model."""
        return self.eos is None

    @property
    def real(self) -> Eos:
        """The real-gas flash wrapper (only on the real-gas paths)."""
        assert self.eos is not None, "a real-gas path of an ideal-gas leg"
        return self.eos

    def point(self, P: float, T: float) -> Point | State:
        """The state at (P, T), with cp and (∂v/∂T)_P for a real gas."""
        return self.eos.pt(P, T) if self.eos is not None else self.gas.state_PT(P, T)

    def state(self, P: float, T: float) -> State:
        """The state at (P, T)."""
        p = self.point(P, T)
        return p.state if isinstance(p, Point) else p

    def state_any(self, P: float, T: float) -> State:
        """The state at (P, T), two-phase allowed (a mixture inside its envelope)."""
        return self.eos.state_any(P, T) if self.eos is not None else self.gas.state_PT(P, T)


_MachineEnd = tuple[State, State, "Calc | None", Calc, list[State], list[Calc]]


def _t(sym: str, i: int, value: float, unit: str) -> Term:
    return Term(f"{sym}_{i}", value, unit)


def _h_calcs(gas: Gas, pairs: list[tuple[str, State]]) -> list[Calc]:
    return [Calc(f"h_{lab}", s.h, "J/kg", f"h(P_{lab}, T_{lab})", gas.eos_method) for lab, s in pairs]


def _n_calc(i: int, s1: State, s2: State) -> Calc | None:
    return n_from_states(i, s1, s2, method="flow.n_ends", note="")


def _flow_terms(m_dot: float, w: float, sym: str = "w_in") -> dict[str, Term]:
    return {"m": Term("ṁ", m_dot, "kg/s"), "w": Term(sym, w, "J/kg")}


def _path_P(P1: float, P2: float, n: int = PATH_POINTS) -> list[float]:
    return [P1 * (P2 / P1) ** (k / n) for k in range(1, n)]


# -- compressor and expander ------------------------------------------------------------------------
def machine(ctx: Ctx, name: str, process: str, i: int, s1: State, P2: float, eta_p: float | None,
            eta_s: float | None, eta_m: float | None, T2_measured: float | None) -> LegResult:
    """A compressor or expander stage, adiabatic, from s1 to the pressure P2 with a polytropic or an
    isentropic efficiency, or to a measured end temperature (both efficiencies derived)."""
    j = i + 1
    comp = process == "compressor"
    if s1.phase in ("liquid", "two-phase", "supercritical liquid"):
        raise PhysicsError("machine.wet_inlet", process=process, phase=s1.phase, P=s1.P, T=s1.T)
    r = P2 / s1.P
    calcs = [Calc("r", r, "", "{P2}/{P1}", "flow.ratio", {"P2": _t("P", j, P2, "Pa"), "P1": _t("P", i, s1.P, "Pa")})]
    facts: list[Finding] = []
    fn = _machine_ideal if ctx.ideal else _machine_real
    s2, s2s, ep, es, path, more = fn(ctx, comp, i, s1, P2, r, eta_p, eta_s, T2_measured, facts)
    calcs += more
    gas = ctx.gas
    calcs += _h_calcs(gas, [(str(i), s1), (str(j), s2)])
    calcs.append(Calc(f"h_{j}s", s2s.h, "J/kg", f"h(P_{j}, s_{i})", gas.eos_method, note="isentropic_end"))
    w = s2.h - s1.h
    Hs = s2s.h - s1.h
    W = Calc("w_in", w, "J/kg", "{h2} − {h1}", "flow.firstlaw_adiabatic",
             {"h2": _t("h", j, s2.h, "J/kg"), "h1": _t("h", i, s1.h, "J/kg")})
    HS = Calc("H_s", Hs, "J/kg", "{h2s} − {h1}", "flow.head_isentropic",
              {"h2s": Term(f"h_{j}s", s2s.h, "J/kg"), "h1": _t("h", i, s1.h, "J/kg")})
    q: dict[str, Calc] = {"work_in": W, "head_isentropic": HS, "eta_s": es}
    calcs += [W, HS]
    if ep is None:       # a wet expander end: no polytropic head, exponent or Schultz comparison
        _power(ctx, q, calcs, w, comp, eta_m)
        return LegResult(name, process, i, s1, s2, q, tuple(calcs), tuple(path), (), tuple(facts))
    Hp = ep.value * w if comp else w / ep.value
    HP = Calc("H_p", Hp, "J/kg", "{eta}·{w}" if comp else "{w}/{eta}", "flow.head_polytropic",
              {"eta": Term("η_p", ep.value, ""), "w": Term("w_in", w, "J/kg")},
              note="polytropic_head")
    calcs.append(HP)
    n = _n_calc(i, s1, s2)
    if n is not None:
        calcs.append(n)
    q = {"work_in": W, "head": HP, "head_isentropic": HS, "eta_p": ep, "eta_s": es}
    if n is not None:
        q["n"] = n
    if not ctx.ideal and n is not None:
        q.update(_schultz(i, s1, s2, s2s, Hs, w, ep.value, comp, n.value, calcs, facts))
    _power(ctx, q, calcs, w, comp, eta_m)
    return LegResult(name, process, i, s1, s2, q, tuple(calcs), tuple(path), (), tuple(facts))


def _power(ctx: Ctx, q: dict[str, Calc], calcs: list[Calc], w: float, comp: bool, eta_m: float | None) -> None:
    P = Calc("P_gas", ctx.m_dot * w, "W", "{m}·{w}", "flow.power", _flow_terms(ctx.m_dot, w))
    D = Calc("Q̇", 0.0, "W", "0", "flow.firstlaw_adiabatic", note="adiabatic_machine")
    calcs += [P, D]
    q["power"], q["duty"] = P, D
    if eta_m is not None:
        ins = {"P": Term("P_gas", P.value, "W"), "eta": Term("η_m", eta_m, "")}
        S = Calc("P_shaft", P.value / eta_m if comp else P.value * eta_m, "W", "{P}/{eta}" if comp else "{P}·{eta}",
                 "flow.shaft_power", ins, note="driver_delivers" if comp else "shaft_receives")
        calcs.append(S)
        q["shaft_power"] = S


def _machine_ideal(ctx: Ctx, comp: bool, i: int, s1: State, P2: float, r: float, eta_p: float | None,
                   eta_s: float | None, T2m: float | None, facts: list[Finding]) -> _MachineEnd:
    gas: Any = ctx.gas       # an IdealGas (k, R)
    j = i + 1
    k = gas.k
    T1 = s1.T
    kt, rt, T1t = Term("k", k, ""), Term("r", r, ""), _t("T", i, T1, "K")
    calcs = []
    T2s = T1 * r ** ((k - 1) / k)
    calcs.append(Calc(f"T_{j}s", T2s, "K", "{T1}·{r}^(({k} − 1)/{k})", "ideal.isentropic_T", {"T1": T1t, "r": rt, "k": kt}))
    eps = None
    if eta_p is not None:
        et = Term("η_p", eta_p, "")
        T2 = T1 * r ** ((k - 1) / (k * eta_p)) if comp else T1 * r ** (eta_p * (k - 1) / k)
        calcs.append(Calc(f"T_{j}", T2, "K", "{T1}·{r}^(({k} − 1)/({k}·{eta}))" if comp else
                          "{T1}·{r}^({eta}·({k} − 1)/{k})", "ideal.polytropic_T", {"T1": T1t, "r": rt, "k": kt, "eta": et}))
    elif eta_s is not None:
        et = Term("η_s", eta_s, "")
        T2 = T1 + (T2s - T1) / eta_s if comp else T1 + eta_s * (T2s - T1)
        calcs.append(Calc(f"T_{j}", T2, "K", "{T1} + ({T2s} − {T1})/{eta}" if comp else "{T1} + {eta}·({T2s} − {T1})",
                          "flow.eta_s", {"T1": T1t, "T2s": Term(f"T_{j}s", T2s, "K"), "eta": et}))
    else:
        assert T2m is not None, "no efficiency: the job layer requires a measured end temperature"
        T2 = T2m
        _check_measured(comp, P2, T1, T2, T2s)
        calcs.append(Calc(f"T_{j}", T2, "K", "{T2}", "input", {"T2": _t("T", j, T2, "K")}, note="measured"))
    s2, s2s = gas.state_PT(P2, T2), gas.state_PT(P2, T2s)
    if eta_s is None:
        es = (T2s - T1) / (T2 - T1) if comp else (T2 - T1) / (T2s - T1)
        eps = Calc("η_s", es, "", "({T2s} − {T1})/({T2} − {T1})" if comp else "({T2} − {T1})/({T2s} − {T1})",
                   "flow.eta_s", {"T2s": Term(f"T_{j}s", T2s, "K"), "T1": T1t, "T2": _t("T", j, T2, "K")})
    else:
        eps = Calc("η_s", eta_s, "", "{e}", "input", {"e": Term("η_s", eta_s, "")})
    if eta_p is None:
        a = (k - 1) / k * math.log(r)
        ep = a / math.log(T2 / T1) if comp else math.log(T2 / T1) / a
        ins = {"k": kt, "r": rt, "T2": _t("T", j, T2, "K"), "T1": T1t}
        epc = Calc("η_p", ep, "", "(({k} − 1)/{k})·ln {r} / ln({T2}/{T1})" if comp else
                   "ln({T2}/{T1}) / ((({k} − 1)/{k})·ln {r})", "ideal.polytropic_eta", ins)
        calcs.append(epc)
    else:
        epc = Calc("η_p", eta_p, "", "{e}", "input", {"e": Term("η_p", eta_p, "")})
    calcs.append(eps)
    facts.append(Finding("flow.ideal_closed_form"))
    path = [s1] + [gas.state_PT(P, T1 * (P / s1.P) ** (math.log(T2 / T1) / math.log(r))) for P in _path_P(s1.P, P2)] + [s2]
    return s2, s2s, epc, eps, path, calcs


def _check_measured(comp: bool, P2: float, T1: float, T2: float, T2s: float) -> None:
    """Refuse a measured end temperature that would need an efficiency outside (0, 1]: a compressor
    discharges above its isentropic end temperature; an expander ends between it and its inlet."""
    if comp and T2 < T2s:
        raise MeasuredEndError("measured.compressor_below_isentropic", T2=T2, T2s=T2s, P2=P2)
    if not comp and not (T2s <= T2 < T1):
        raise MeasuredEndError("measured.expander_below_isentropic" if T2 < T2s else "measured.expander_above_inlet",
                               T2=T2, T2s=T2s, P2=P2, T1=T1)


def _isentropic_end(ctx: Ctx, s1: State, P2: float, T_guess: float, wet_ok: bool = False) -> Point:
    """The isentropic end state at P2; an expander's may be two-phase (``wet_ok``)."""
    what = {"s": s1.s}
    if wet_ok:
        return _as_point(ctx.real.flash_P(P2, "s", s1.s, T_guess, what))
    return solve_T(ctx.real, P2, T_guess, "s", s1.s, what)


def _as_point(st: State) -> Point:
    """A state as a path point; a two-phase state has no single-phase cp or (∂v/∂T)_P."""
    return Point(st, math.nan, math.nan)


def _machine_real(ctx: Ctx, comp: bool, i: int, s1: State, P2: float, r: float, eta_p: float | None,
                  eta_s: float | None, T2m: float | None, facts: list[Finding]) -> _MachineEnd:
    eos = ctx.real
    gas = eos.gas
    j = i + 1
    p1 = eos.pt(s1.P, s1.T)
    calcs = []
    f0 = gas.flashes
    R = R_U / gas.M
    if eta_p is not None:
        p2, path, steps = polytropic_path(eos, p1, P2, eta_p)
        T2 = p2.state.T
        calcs.append(Calc(f"T_{j}", T2, "K", "~T_on_path_compressor" if comp else "~T_on_path_expander", "flow.direct",
                          {"P2": _t("P", j, P2, "Pa"), "eta": Term("η_p", eta_p, "")},
                          note=Finding("rk_steps", {"steps": steps})))
        # one Newton step at P2 from the path's end, free of flashes: ds = cp·dT/T at constant P
        guess = T2 * math.exp((s1.s - p2.state.s) / p2.cp)
        p2s = _isentropic_end(ctx, s1, P2, guess)
        eps = None
    else:
        p2s = _isentropic_end(ctx, s1, P2, s1.T * r ** (R / p1.cp), wet_ok=not comp)
        if eta_s is not None:
            Hs = p2s.state.h - s1.h
            h2 = s1.h + (Hs / eta_s if comp else eta_s * Hs)
            calcs.append(Calc(f"h_{j}", h2, "J/kg", "{h1} + ({h2s} − {h1})/{eta}" if comp else
                              "{h1} + {eta}·({h2s} − {h1})", "flow.eta_s",
                              {"h1": _t("h", i, s1.h, "J/kg"), "h2s": Term(f"h_{j}s", p2s.state.h, "J/kg"),
                               "eta": Term("η_s", eta_s, "")}))
            T_guess = s1.T + (p2s.state.T - s1.T) / (eta_s if comp else 1 / eta_s)
            if comp:
                p2 = solve_T(eos, P2, T_guess, "h", h2, {"h": h2})
            else:
                p2 = _as_point(eos.flash_P(P2, "h", h2, T_guess, {"h": h2}))
            calcs.append(Calc(f"T_{j}", p2.state.T, "K", f"T(P_{j}, h_{j})", "eos.real"))
        else:
            assert T2m is not None, "no efficiency: the job layer requires a measured end temperature"
            _check_measured(comp, P2, s1.T, T2m, p2s.state.T)
            p2 = eos.pt(P2, T2m)
            calcs.append(Calc(f"T_{j}", T2m, "K", "{T2}", "input", {"T2": _t("T", j, T2m, "K")}, note="measured"))
        x2 = p2.state.quality
        if x2 is not None:
            # a wet end: no single-phase path of constant polytropic efficiency reaches it
            s2 = p2.state
            calcs.append(Calc(f"x_{j}", x2, "", f"x(P_{j}, h_{j})", "eos.real", note="flow.vapour_fraction"))
            facts.append(Finding("flow.wet_expander_end", {"x": s2.quality, "T": s2.T, "P": s2.P}))
            return _machine_real_wet(calcs, i, s1, p2.state, p2s.state, eta_s, facts)
        eta_p, path, steps = _eta_p_from_end(ctx, comp, p1, p2, p2s)
        calcs.append(Calc("η_p", eta_p, "", "~eta_p_compressor" if comp else "~eta_p_expander",
                          "flow.direct", {"i": Term("i", float(i), ""), "T2": _t("T", j, p2.state.T, "K"),
                                          "P2": _t("P", j, P2, "Pa")},
                          note=Finding("eta_p_secant", {"steps": steps})))
    s2, s2s = p2.state, p2s.state
    calcs.append(Calc(f"T_{j}s", s2s.T, "K", f"T(P_{j}, s = s_{i})", "eos.real", note="isentropic_end"))
    if eta_s is None:
        w, Hs = s2.h - s1.h, s2s.h - s1.h
        es = Hs / w if comp else w / Hs
        eps = Calc("η_s", es, "", "({h2s} − {h1})/({h2} − {h1})" if comp else "({h2} − {h1})/({h2s} − {h1})",
                   "flow.eta_s", {"h2s": Term(f"h_{j}s", s2s.h, "J/kg"), "h1": _t("h", i, s1.h, "J/kg"),
                                  "h2": _t("h", j, s2.h, "J/kg")})
    else:
        eps = Calc("η_s", eta_s, "", "{e}", "input", {"e": Term("η_s", eta_s, "")})
    calcs.append(eps)
    epc = next((c for c in calcs if c.symbol == "η_p"), None) or Calc("η_p", eta_p, "", "{e}", "input",
                                                                       {"e": Term("η_p", eta_p, "")})
    facts.append(Finding("flow.real_path", {"flashes": gas.flashes - f0}))
    return s2, s2s, epc, eps, path, calcs


def _machine_real_wet(calcs: list[Calc], i: int, s1: State, s2: State, s2s: State, eta_s: float | None,
                      facts: list[Finding]) -> tuple[State, State, None, Calc, list[State], list[Calc]]:
    """The end of an expander with a two-phase outlet: efficiencies on enthalpy differences only."""
    j = i + 1
    calcs.append(Calc(f"T_{j}s", s2s.T, "K", f"T(P_{j}, s = s_{i})", "eos.real", note="isentropic_end"))
    if s2s.quality is not None:
        calcs.append(Calc(f"x_{j}s", s2s.quality, "", f"x(P_{j}, s = s_{i})", "eos.real",
                          note="flow.vapour_fraction"))
    if eta_s is None:
        w, Hs = s2.h - s1.h, s2s.h - s1.h
        eps = Calc("η_s", w / Hs, "", "({h2} − {h1})/({h2s} − {h1})", "flow.eta_s",
                   {"h2s": Term(f"h_{j}s", s2s.h, "J/kg"), "h1": _t("h", i, s1.h, "J/kg"), "h2": _t("h", j, s2.h, "J/kg")})
    else:
        eps = Calc("η_s", eta_s, "", "{e}", "input", {"e": Term("η_s", eta_s, "")})
    calcs.append(eps)
    return s2, s2s, None, eps, [s1, s2], calcs


def _eta_p_from_end(ctx: Ctx, comp: bool, p1: Point, p2: Point, p2s: Point) -> tuple[float, list[State], int]:
    """The polytropic efficiency whose path reaches the given end state: secant on η_p from the
    Schultz estimate, to 1e-6 K in end temperature."""
    s1, s2, s2s = p1.state, p2.state, p2s.state
    lr = math.log(s2.P / s1.P)
    try:
        ns = lr / math.log(s1.v / s2s.v)
        n = lr / math.log(s1.v / s2.v)
        f = (s2s.h - s1.h) / (ns / (ns - 1) * (s2.P * s2s.v - s1.P * s1.v))
        Hp = f * n / (n - 1) * (s2.P * s2.v - s1.P * s1.v)
        e0 = Hp / (s2.h - s1.h) if comp else (s2.h - s1.h) / Hp
    except (ValueError, ZeroDivisionError):
        e0 = 0.8
    if not 0.05 < e0 <= 1.0:
        e0 = 0.8

    def g(e: float) -> tuple[float, list[State], int]:
        end, path, steps = polytropic_path(ctx.real, p1, s2.P, e)
        return end.state.T - s2.T, path, steps

    a, (ga, _, _) = e0, g(e0)
    b = e0 * (1.002 if e0 < 0.99 else 0.998)
    gb, path_b, steps_b = g(b)
    for _ in range(30):
        if abs(gb) < 1e-6 or gb == ga:
            break
        c = b - gb * (b - a) / (gb - ga)
        c = min(1.0, max(0.02, c))
        a, ga = b, gb
        b = c
        gb, path_b, steps_b = g(b)
    else:
        raise PhysicsError("measured.eta_p_not_converged")
    if b > 1.0 + 1e-9 or abs(gb) > 1e-3:
        raise PhysicsError("measured.no_eta_p_compressor" if comp else "measured.no_eta_p_expander", T=s2.T)
    return b, path_b, steps_b


def _schultz(i: int, s1: State, s2: State, s2s: State, Hs: float, w: float, eta_p: float, comp: bool, n: float,
             calcs: list[Calc], facts: list[Finding]) -> dict[str, Calc]:
    """The Schultz (1962) polytropic head from the same end states, as ASME PTC 10 uses it."""
    j = i + 1
    lr = math.log(s2.P / s1.P)
    ns = lr / math.log(s1.v / s2s.v)
    NS = Calc("n_s", ns, "", "ln({P2}/{P1}) / ln({v1}/{v2s})", "schultz.ns",
              {"P2": _t("P", j, s2.P, "Pa"), "P1": _t("P", i, s1.P, "Pa"), "v1": _t("v", i, s1.v, "m**3/kg"),
               "v2s": Term(f"v_{j}s", s2s.v, "m**3/kg")})
    f = Hs / (ns / (ns - 1) * (s2.P * s2s.v - s1.P * s1.v))
    F = Calc("f", f, "", "{Hs} / [{ns}/({ns} − 1)·({P2}·{v2s} − {P1}·{v1})]", "schultz.f",
             {"Hs": Term("H_s", Hs, "J/kg"), "ns": Term("n_s", ns, ""), "P2": _t("P", j, s2.P, "Pa"),
              "v2s": Term(f"v_{j}s", s2s.v, "m**3/kg"), "P1": _t("P", i, s1.P, "Pa"), "v1": _t("v", i, s1.v, "m**3/kg")})
    Hp = f * n / (n - 1) * (s2.P * s2.v - s1.P * s1.v)
    HP = Calc("H_p,S", Hp, "J/kg", "{f}·{n}/({n} − 1)·({P2}·{v2} − {P1}·{v1})", "schultz.head",
              {"f": Term("f", f, ""), "n": Term("n", n, ""), "P2": _t("P", j, s2.P, "Pa"),
               "v2": _t("v", j, s2.v, "m**3/kg"), "P1": _t("P", i, s1.P, "Pa"), "v1": _t("v", i, s1.v, "m**3/kg")})
    e = Hp / w if comp else w / Hp
    E = Calc("η_p,S", e, "", "{H}/{w}" if comp else "{w}/{H}", "schultz.head",
             {"H": Term("H_p,S", Hp, "J/kg"), "w": Term("w_in", w, "J/kg")})
    D = Calc("Δη_p", 100.0 * (e - eta_p), "", "100·({eS} − {e})", "schultz.head",
             {"eS": Term("η_p,S", e, ""), "e": Term("η_p", eta_p, "")},
             note="schultz_points")
    calcs += [NS, F, HP, E, D]
    facts.append(Finding("flow.schultz", {"f": f, "eta": e, "points": 100 * (e - eta_p)}))
    return {"head_schultz": HP, "eta_p_schultz": E, "f_schultz": F, "n_s": NS}


# -- coolers, heaters, throttles ------------------------------------------------------------------
def heat_exchanger(ctx: Ctx, name: str, process: str, i: int, s1: State, P2: float, T2: float,
                   drop_calc: Calc | None) -> LegResult:
    """A cooler or heater from s1 to (P2, T2): q_in = h2 − h1, no shaft work (first law for steady flow)."""
    j = i + 1
    gas = ctx.gas
    path = [s1] + [ctx.state_any(s1.P + (P2 - s1.P) * x, s1.T + (T2 - s1.T) * x)
                   for x in (k / PATH_POINTS for k in range(1, PATH_POINTS))]
    s2 = ctx.state_any(P2, T2)
    path.append(s2)
    calcs = [drop_calc] if drop_calc is not None else []
    calcs += _h_calcs(gas, [(str(i), s1), (str(j), s2)])
    qv = s2.h - s1.h
    Q = Calc("q_in", qv, "J/kg", "{h2} − {h1}", "flow.firstlaw_heat",
             {"h2": _t("h", j, s2.h, "J/kg"), "h1": _t("h", i, s1.h, "J/kg")})
    D = Calc("Q̇", ctx.m_dot * qv, "W", "{m}·{w}", "flow.power", _flow_terms(ctx.m_dot, qv, "q_in"),
             note="heat_removed" if qv < 0 else "")
    W = Calc("w_in", 0.0, "J/kg", "0", "flow.firstlaw_heat", note="no_shaft_work")
    P = Calc("P_gas", 0.0, "W", "0", "flow.firstlaw_heat")
    calcs += [Q, D]
    return LegResult(name, process, i, s1, s2, {"work_in": W, "duty": D, "power": P, "q_in": Q}, tuple(calcs),
                     tuple(path), (), ())


def throttle(ctx: Ctx, name: str, i: int, s1: State, P2: float) -> LegResult:
    """A throttle from s1 to P2: adiabatic, no work, h2 = h1 (the outlet may be two-phase for a pure fluid)."""
    j = i + 1
    if ctx.ideal:
        s2 = ctx.gas.state_PT(P2, s1.T)
        path = [s1] + [ctx.gas.state_PT(P, s1.T) for P in _path_P(s1.P, P2, 4)] + [s2]
        note = "throttle_ideal"
    elif ctx.real.gas.pure:
        # pure fluid: the HmassP flash gives single-phase and two-phase outlets alike
        path = [s1] + [ctx.gas.state_Ph(P, s1.h) for P in _path_P(s1.P, P2, 4) + [P2]]
        s2 = path[-1]
        note = "throttle_ph_flash"
    else:
        path, T = [s1], s1.T
        for P in _path_P(s1.P, P2, 4) + [P2]:
            st = ctx.real.flash_P(P, "h", s1.h, T, {"h": s1.h})
            T = st.T
            path.append(st)
        s2 = path[-1]
        note = "throttle_eos"
    wet = s2.quality is not None
    if wet:
        note = "throttle_wet" if getattr(ctx.gas, "pure", True) else "throttle_wet_mixture"
    calcs = [Calc(f"h_{j}", s1.h, "J/kg", "{h1}", "flow.throttle", {"h1": _t("h", i, s1.h, "J/kg")},
                  note="throttle_h"),
             Calc(f"T_{j}", s2.T, "K", f"T(P_{j}, h_{j})", ctx.gas.eos_method, note=note)]
    dT = Calc("ΔT", s2.T - s1.T, "K", "{T2} − {T1}", "flow.throttle",
              {"T2": _t("T", j, s2.T, "K"), "T1": _t("T", i, s1.T, "K")}, difference=True)
    calcs.append(dT)
    facts_wet = []
    if wet and s2.quality is not None:
        calcs.append(Calc(f"x_{j}", s2.quality, "", f"x(P_{j}, h_{j})", ctx.gas.eos_method,
                          note="flow.vapour_fraction"))
        facts_wet.append(Finding("leg.two_phase_outlet", {"x": s2.quality, "T": s2.T, "P": s2.P}))
    zero_w = Calc("w_in", 0.0, "J/kg", "0", "flow.throttle")
    zero = Calc("Q̇", 0.0, "W", "0", "flow.throttle")
    facts = [Finding("throttle.dT", {"dT": s2.T - s1.T})] + facts_wet
    return LegResult(name, "throttle", i, s1, s2, {"work_in": zero_w, "duty": zero,
                                                   "power": Calc("P_gas", 0.0, "W", "0", "flow.throttle"), "dT": dT},
                     tuple(calcs), tuple(path), (), tuple(facts))


# -- reversible flow processes ---------------------------------------------------------------------
def reversible(ctx: Ctx, name: str, process: str, i: int, s1: State, P2: float, n: float | None) -> LegResult:
    """Internally reversible steady flow: w_in = ∫v·dP along the path, q_in = Δh − w_in."""
    j = i + 1
    gas: Any = ctx.gas       # IdealGas (k, R) on the ideal paths, RealGas on the others
    ins = {"P1": _t("P", i, s1.P, "Pa"), "P2": _t("P", j, P2, "Pa"), "v1": _t("v", i, s1.v, "m**3/kg")}
    calcs: list[Calc] = []
    if process == "isentropic":
        if ctx.ideal:
            k = gas.k
            pts = [gas.state_Ps(P, s1.s) for P in _path_P(s1.P, P2)]
            s2 = gas.state_Ps(P2, s1.s)
            wv = k / (k - 1) * s1.P * s1.v * ((P2 / s1.P) ** ((k - 1) / k) - 1)
            W = Calc("w_in", wv, "J/kg", "{k}/({k} − 1)·{P1}·{v1}·(({P2}/{P1})^(({k} − 1)/{k}) − 1)",
                     "flow.work_isentropic_ideal", {**ins, "k": Term("k", k, "")})
        else:
            p1 = ctx.real.pt(s1.P, s1.T)
            pe, pts, _ = polytropic_path(ctx.real, p1, P2, 1.0)
            s2 = solve_T(ctx.real, P2, pe.state.T, "s", s1.s, {"s": s1.s}).state
            pts = pts[1:-1]
            wv = s2.h - s1.h
            calcs.append(Calc(f"T_{j}", s2.T, "K", f"T(P_{j}, s = s_{i})", "eos.real"))
            calcs += _h_calcs(gas, [(str(i), s1), (str(j), s2)])
            W = Calc("w_in", wv, "J/kg", "{h2} − {h1}", "flow.firstlaw_adiabatic",
                     {"h2": _t("h", j, s2.h, "J/kg"), "h1": _t("h", i, s1.h, "J/kg")}, note="isentropic_work")
    elif process == "isothermal":
        if not ctx.ideal and ctx.real.side(s1.P, s1.T) != ctx.real.side(P2, s1.T):
            rg = ctx.real.gas     # the saturation pressure at T_1 lies between the ends
            AS = rg.AS
            AS.update(rg._CP.QT_INPUTS, 1.0, s1.T)
            raise TwoPhaseError(Finding("what.isothermal_path"), AS.p(), s1.T)
        pts = [ctx.state(P, s1.T) for P in _path_P(s1.P, P2)]
        s2 = ctx.state(P2, s1.T)
        if ctx.ideal:
            wv = gas.R * s1.T * math.log(P2 / s1.P)
            W = Calc("w_in", wv, "J/kg", "{R}·{T}·ln({P2}/{P1})", "flow.work_isothermal_ideal",
                     {"R": Term("R", gas.R, "J/(kg*K)"), "T": _t("T", i, s1.T, "K"), **ins})
        else:
            qv = s1.T * (s2.s - s1.s)
            calcs += _h_calcs(gas, [(str(i), s1), (str(j), s2)])
            calcs.append(Calc("q_in", qv, "J/kg", "{T}·({s2} − {s1})", "heat.isothermal",
                              {"T": _t("T", i, s1.T, "K"), "s2": _t("s", j, s2.s, "J/(kg*K)"),
                               "s1": _t("s", i, s1.s, "J/(kg*K)")}))
            wv = s2.h - s1.h - qv
            W = Calc("w_in", wv, "J/kg", "({h2} − {h1}) − {q}", "flow.firstlaw_heat",
                     {"h2": _t("h", j, s2.h, "J/kg"), "h1": _t("h", i, s1.h, "J/kg"), "q": Term("q_in", qv, "J/kg")})
    else:
        assert n is not None, "a polytropic flow leg has its exponent (the job layer requires it)"
        v_at = [s1.v * (s1.P / P) ** (1.0 / n) for P in _path_P(s1.P, P2)]
        v2 = s1.v * (s1.P / P2) ** (1.0 / n)
        calcs.append(Calc(f"v_{j}", v2, "m**3/kg", "{v1}·({P1}/{P2})^(1/{n})", "path.polytropic",
                          {**ins, "n": Term("n", n, "")}))
        pts = [_state_Pv(ctx, P, v, s1) for P, v in zip(_path_P(s1.P, P2), v_at, strict=True)]
        s2 = _state_Pv(ctx, P2, v2, s1)
        if abs(n - 1.0) < 1e-9:
            wv = s1.P * s1.v * math.log(P2 / s1.P)
            W = Calc("w_in", wv, "J/kg", "{P1}·{v1}·ln({P2}/{P1})", "flow.work_polytropic", ins)
        else:
            wv = n / (n - 1) * (P2 * v2 - s1.P * s1.v)
            W = Calc("w_in", wv, "J/kg", "{n}/({n} − 1)·({P2}·{v2} − {P1}·{v1})", "flow.work_polytropic",
                     {**ins, "n": Term("n", n, ""), "v2": _t("v", j, v2, "m**3/kg")})
    calcs.append(W)
    qv = (s2.h - s1.h) - W.value
    if process == "isentropic":
        Q = Calc("q_in", 0.0, "J/kg", "0", "flow.firstlaw_adiabatic")
    else:
        Q = Calc("q_in", qv, "J/kg", "({h2} − {h1}) − {w}", "flow.firstlaw_heat",
                 {"h2": _t("h", j, s2.h, "J/kg"), "h1": _t("h", i, s1.h, "J/kg"), "w": Term("w_in", W.value, "J/kg")})
    if not any(c.symbol == "q_in" for c in calcs):
        calcs.append(Q)
    Qc = next(c for c in calcs if c.symbol == "q_in")
    D = Calc("Q̇", ctx.m_dot * Qc.value, "W", "{m}·{w}", "flow.power", _flow_terms(ctx.m_dot, Qc.value, "q_in"))
    P = Calc("P_gas", ctx.m_dot * W.value, "W", "{m}·{w}", "flow.power", _flow_terms(ctx.m_dot, W.value))
    calcs += [D, P]
    q = {"work_in": W, "head": W, "duty": D, "power": P, "q_in": Qc}
    nc = _n_calc(i, s1, s2)
    if nc is not None:
        calcs.append(nc)
        q["n"] = nc
    return LegResult(name, process, i, s1, s2, q, tuple(calcs), tuple([s1, *pts, s2]), (),
                     (Finding("flow.reversible"),))


def _state_Pv(ctx: Ctx, P: float, v: float, s1: State) -> State:
    if ctx.ideal:
        return ctx.gas.state_Pv(P, v)
    return solve_T(ctx.real, P, s1.T * (P * v) / (s1.P * s1.v), "v", v, {"v": v}).state
