"""Closed-system processes: a fixed mass of gas along a quasi-equilibrium path.

Each function takes the gas, the start state, the mass and the end target(s), and returns a new
:class:`LegResult` (end state, leg quantities as ``Calc`` values, and points along the path).
Sign convention: work done BY the gas and heat added TO the gas are positive.
"""
from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from typing import Any

from ..errors import Finding, PhysicsError
from .calc import Calc, Term
from .gas import Gas, State

__all__ = ["LegResult", "Target", "closed_leg", "n_from_states", "polytropic_work"]

PATH_POINTS = 24


@dataclass(frozen=True)
class Target:
    """An end target in SI: kind is 'P', 'T' or 'v' (specific volume)."""

    kind: str
    value: float


@dataclass(frozen=True)
class LegResult:
    name: str
    process: str
    i: int                        # number of the start state (1-based); the end state is i + 1
    start: State
    end: State
    quantities: dict[str, Calc]   # the results-contract quantities of the leg
    calcs: tuple[Calc, ...]       # every step, in order, for the report
    path: tuple[State, ...]       # states along the path, start to end
    warnings: tuple[Finding, ...] = ()
    facts: tuple[Finding, ...] = ()   # statements about the leg (formula chosen, n derived), as codes
    series: dict[str, Any] | None = None    # a vessel leg's time series: t [s], P [Pa], T [K], m [kg], m_dot [kg/s]


def polytropic_work(P1V1: float, r: float, n: float) -> float:
    """Boundary work done by the gas along P·V^n = const, for a volume ratio r = V2/V1 [J].

    W = P1·V1·(r^(1−n) − 1)/(1 − n) = P1·V1·expm1((1 − n)·ln r)/(1 − n);  W = P1·V1·ln r at n = 1.

    The expm1 form equals (P2·V2 − P1·V1)/(1 − n) and stays accurate as n → 1, where the plain form
    loses digits to cancellation.

    References: Çengel, Boles & Kanoğlu (2019), ch. 4, moving boundary work of a polytropic process.
    Example (the isothermal case, W = P1·V1·ln(V2/V1)): P1·V1 = 100 kJ doubling its volume gives 100·ln 2 kJ.

    >>> round(polytropic_work(100e3, 2.0, 1.0), 1)
    69314.7
    """
    a = (1.0 - n) * math.log(r)
    if abs(1.0 - n) < 1e-12:
        return P1V1 * math.log(r)
    return P1V1 * math.expm1(a) / (1.0 - n)


def _s(name: str, i: int) -> str:
    return f"{name}_{i}"


def _solve(f: Callable[[float], float], x0: float, step: float = 0.05, span: float = 12.0,
           target: dict[str, float] | None = None) -> float:
    """Root of f(x) near x0: expand a bracket both ways, then bisect-secant (Illinois) to 1e-13."""
    f0 = f(x0)
    if f0 == 0.0:
        return x0
    a: float | None = None
    b = fa = fb = 0.0
    d = step
    while d <= span:
        for x in (x0 + d, x0 - d):
            try:
                fx = f(x)
            except PhysicsError:
                continue
            if fx == 0.0:
                return x
            if (fx > 0) != (f0 > 0):
                a, b, fa, fb = x0, x, f0, fx
                break
        if a is not None:
            break
        d *= 1.6
    if a is None:
        raise PhysicsError("path.no_target", target=target or {})
    side = 0
    for _ in range(200):
        c = (a * fb - b * fa) / (fb - fa)
        fc = f(c)
        if abs(b - a) < 1e-13 * max(1.0, abs(c)) or fc == 0.0:
            return c
        if (fc > 0) == (fb > 0):
            b, fb = c, fc
            if side == -1:
                fa /= 2
            side = -1
        else:
            a, fa = c, fc
            if side == 1:
                fb /= 2
            side = 1
    return c


_Leg = Callable[[Gas, str, int, State, float, list[Target], "float | None"], "LegResult"]


def closed_leg(gas: Gas, name: str, process: str, i: int, s1: State, m: float, targets: list[Target],
               n: float | None) -> LegResult:
    """One closed-system leg from state i (s1) of a mass m [kg] to its end target(s).

    Quasi-equilibrium paths of a fixed mass: P·vⁿ = const (polytropic), s = const, T = const, P = const,
    v = const; boundary work ∫P dV and heat from the first law Q = ΔU + W (work done by the gas positive).

    References: Çengel, Boles & Kanoğlu (2019), ch. 4 (moving boundary work, first law of closed systems) and
    ch. 7 (isentropic processes); Moran et al. (2014), sec. 2.2.
    """
    fn: _Leg = {"polytropic": _polytropic, "isentropic": _isentropic, "isothermal": _isothermal,
                "isobaric": _isobaric, "isochoric": _isochoric}[process]
    return fn(gas, name, i, s1, m, targets, n)


# -- shared pieces -----------------------------------------------------------------------------
def _state_calcs(gas: Gas, i: int, s: State, m: float) -> list[Calc]:
    j = i
    return [Calc(_s("u", j), s.u, "J/kg", f"u(P_{j}, T_{j})", gas.eos_method),
            Calc(_s("h", j), s.h, "J/kg", f"h(P_{j}, T_{j})", gas.eos_method),
            Calc(_s("s", j), s.s, "J/(kg*K)", f"s(P_{j}, T_{j})", gas.eos_method)]


def _differences(i: int, s1: State, s2: State, m: float) -> dict[str, Calc]:
    j = i + 1
    mt = Term("m", m, "kg")
    out = {}
    for key, prop, unit in (("dU", "u", "J"), ("dH", "h", "J"), ("dS", "s", "J/K")):
        x1, x2 = getattr(s1, prop), getattr(s2, prop)
        su = "J/(kg*K)" if prop == "s" else "J/kg"
        out[key] = Calc("Δ" + prop.upper(), m * (x2 - x1), unit, "{m}·({x2} − {x1})", "prop.difference",
                        {"m": mt, "x2": Term(_s(prop, j), x2, su), "x1": Term(_s(prop, i), x1, su)})
    return out


def _finish(gas: Gas, name: str, process: str, i: int, s1: State, s2: State, m: float, W: Calc, Q: Calc,
            n: Calc | None, steps: list[Calc], path: list[State], facts: list[Finding],
            targets: Sequence[Target] = ()) -> LegResult:
    d = _differences(i, s1, s2, m)
    q: dict[str, Calc] = {"W_by_gas": W, "Q_to_gas": Q, "dU": d["dU"], "dH": d["dH"], "dS": d["dS"]}
    if n is not None:
        q["n"] = n
    given, found = _end_state_calcs(gas, process, i, s1, s2, m, steps, targets)
    calcs = given + steps + found + _state_calcs(gas, i + 1, s2, m) + [d["dU"], W, Q, d["dH"], d["dS"]]
    # keep each Calc once, in first-use order
    seen: set[int] = set()
    ordered: list[Calc] = []
    for c in calcs:
        if id(c) not in seen:
            seen.add(id(c))
            ordered.append(c)
    return LegResult(name, process, i, s1, s2, q, tuple(ordered), tuple(path), (), tuple(facts))


_UNITS = {"P": "Pa", "T": "K", "v": "m**3/kg"}
_HELD = {"isothermal": "T", "isobaric": "P", "isochoric": "v"}


def _end_state_calcs(gas: Gas, process: str, i: int, s1: State, s2: State, m: float, steps: list[Calc],
                     targets: Sequence[Target]) -> tuple[list[Calc], list[Calc]]:
    """How the end state's P, T and v were found: the end target and the property the process holds (shown
    before the path steps), then what the equation of state gives and the volume of the mass (after them)."""
    j = i + 1
    done = {c.symbol for c in steps}
    kinds = {t.kind for t in targets}
    given: list[Calc] = []
    out: list[Calc] = []
    for prop in ("P", "T", "v"):
        sym, val, unit = _s(prop, j), getattr(s2, prop), _UNITS[prop]
        if sym in done:
            continue
        if _HELD.get(process) == prop:
            given.append(Calc(sym, val, unit, "{x}", "path.constant", {"x": Term(_s(prop, i), getattr(s1, prop), unit)}))
        elif prop == "v" and "v" in kinds:
            given.append(Calc(sym, val, unit, "{V} / {m}", "state.specific_volume",
                              {"V": Term(_s("V", j), val * m, "m**3"), "m": Term("m", m, "kg")}, note="end_target"))
        elif prop in kinds:
            given.append(Calc(sym, val, unit, "", "input", note="end_target"))
        else:
            if process == "isentropic":
                pair = ("P", "s") if "P" in kinds else ("v", "s") if "v" in kinds else ("P", "s")
            else:
                a, b = (x for x in ("P", "T", "v") if x != prop)
                pair = (a, b)
            out.append(Calc(sym, val, unit, f"{prop}({pair[0]}_{j}, {pair[1]}_{j})", gas.eos_method,
                            note="from_eos"))
    if "v" not in kinds or process == "isochoric":
        out.append(Calc(_s("V", j), s2.v * m, "m**3", "{m}·{v}", "state.volume",
                        {"m": Term("m", m, "kg"), "v": Term(_s("v", j), s2.v, "m**3/kg")}))
    return given, out


def _heat_first_law(i: int, dU: float, W: float) -> Calc:
    return Calc("Q", dU + W, "J", "{dU} + {W}", "firstlaw.closed",
                {"dU": Term("ΔU", dU, "J"), "W": Term("W", W, "J")})


def n_from_states(i: int, s1: State, s2: State, method: str = "path.polytropic_n",
                  note: str = "n_equivalent") -> Calc | None:
    """The polytropic exponent joining states i and i + 1, n = ln(P2/P1)/ln(v1/v2); None where P or v is
    the same at both ends (no exponent joins them).

    References: Moran et al. (2014), sec. 2.2 (polytropic process P·Vⁿ = const, taken through two states).
    """
    j = i + 1
    if s2.v == s1.v or s2.P == s1.P:
        return None
    val = math.log(s2.P / s1.P) / math.log(s1.v / s2.v)
    return Calc("n", val, "", "ln({P2}/{P1}) / ln({v1}/{v2})", method,
                {"P2": Term(_s("P", j), s2.P, "Pa"), "P1": Term(_s("P", i), s1.P, "Pa"),
                 "v1": Term(_s("v", i), s1.v, "m**3/kg"), "v2": Term(_s("v", j), s2.v, "m**3/kg")}, note=note)


def _geom(a: float, b: float, k: int = PATH_POINTS) -> list[float]:
    if a <= 0 or b <= 0:
        return [a + (b - a) * t / (k - 1) for t in range(k)]
    la, lb = math.log(a), math.log(b)
    return [math.exp(la + (lb - la) * t / (k - 1)) for t in range(k)]


def _one(targets: list[Target], allowed: str, process: str) -> Target:
    t = targets[0]
    if len(targets) != 1 or t.kind not in allowed:
        keys = {"P": "pressure", "T": "temperature", "v": "volume"}      # the end-target keys of the job file
        raise PhysicsError("leg.target_not_reachable" if t.kind not in allowed else "leg.one_target", process=process,
                           target=keys[t.kind], allowed=", ".join(keys[k] for k in allowed))
    return t


# -- the processes -------------------------------------------------------------------------------
def _polytropic(gas: Gas, name: str, i: int, s1: State, m: float, targets: list[Target],
                n: float | None) -> LegResult:
    j = i + 1
    facts: list[Finding] = []
    steps: list[Calc] = []
    P1, v1 = s1.P, s1.v
    if n is None:
        # n derived from a measured end state: pressure and (temperature or volume)
        tP = next(t for t in targets if t.kind == "P")
        other = next(t for t in targets if t.kind != "P")
        s2 = gas.state_PT(tP.value, other.value) if other.kind == "T" else gas.state_Pv(tP.value, other.value)
        nc = n_from_states(i, s1, s2)
        if nc is None:
            raise PhysicsError("polytropic.measured_same_end")
        n = nc.value
        steps.append(nc)
        facts.append(Finding("closed.n_derived", {"n": n}))
        ncalc = nc
    else:
        t = targets[0]
        nterm = Term("n", n, "")
        if t.kind == "P":
            if n == 0.0:
                raise PhysicsError("polytropic.n0_pressure")
            v2 = v1 * (P1 / t.value) ** (1.0 / n)
            steps.append(Calc(_s("v", j), v2, "m**3/kg", "{v1}·({P1}/{P2})^(1/{n})", "path.polytropic",
                              {"v1": Term(_s("v", i), v1, "m**3/kg"), "P1": Term(_s("P", i), P1, "Pa"),
                               "P2": Term(_s("P", j), t.value, "Pa"), "n": nterm}))
            s2 = gas.state_Pv(t.value, v2)
        elif t.kind == "v":
            P2 = P1 * (v1 / t.value) ** n
            steps.append(Calc(_s("P", j), P2, "Pa", "{P1}·({v1}/{v2})^{n}", "path.polytropic",
                              {"P1": Term(_s("P", i), P1, "Pa"), "v1": Term(_s("v", i), v1, "m**3/kg"),
                               "v2": Term(_s("v", j), t.value, "m**3/kg"), "n": nterm}))
            s2 = gas.state_Pv(P2, t.value)
        else:
            T2 = t.value
            if gas.model == "ideal":
                if abs(n - 1.0) < 1e-12:
                    raise PhysicsError("polytropic.n1_temperature")
                v2 = v1 * (s1.T / T2) ** (1.0 / (n - 1.0))
                steps.append(Calc(_s("v", j), v2, "m**3/kg", "{v1}·({T1}/{T2})^(1/({n} − 1))", "path.polytropic",
                                  {"v1": Term(_s("v", i), v1, "m**3/kg"), "T1": Term(_s("T", i), s1.T, "K"),
                                   "T2": Term(_s("T", j), T2, "K"), "n": nterm}))
            else:
                def f(x: float) -> float:
                    v = v1 * math.exp(x)
                    return gas.state_Pv(P1 * (v1 / v) ** n, v).T - T2
                v2 = v1 * math.exp(_solve(f, 0.0, target={"T": T2, "n": n}))
                steps.append(Calc(_s("v", j), v2, "m**3/kg", "~v_on_path", "path.polytropic",
                                  {"T2": Term(_s("T", j), T2, "K"), "n": nterm},
                                  note="solved_on_path"))
            s2 = gas.state_Pv(P1 * (v1 / v2) ** n, v2)
        ncalc = Calc("n", n, "", "{n}", "input", {"n": nterm})
    # boundary work
    r = s2.v / v1
    P1V1 = P1 * v1 * m
    Wv = polytropic_work(P1V1, r, n)
    if abs(n - 1.0) < 0.05:
        W = Calc("W", Wv, "J", "{P1}·{V1}·[exp((1 − {n})·ln({V2}/{V1})) − 1]/(1 − {n})" if n != 1.0 else
                 "{P1}·{V1}·ln({V2}/{V1})", "work.polytropic_n1",
                 {"P1": Term(_s("P", i), P1, "Pa"), "V1": Term(_s("V", i), v1 * m, "m**3"),
                  "V2": Term(_s("V", j), s2.v * m, "m**3"), "n": Term("n", n, "")},
                 note="n1_form")
        facts.append(Finding("closed.n1_form"))
    else:
        W = Calc("W", Wv, "J", "({P2}·{V2} − {P1}·{V1})/(1 − {n})", "work.polytropic",
                 {"P2": Term(_s("P", j), s2.P, "Pa"), "V2": Term(_s("V", j), s2.v * m, "m**3"),
                  "P1": Term(_s("P", i), P1, "Pa"), "V1": Term(_s("V", i), v1 * m, "m**3"), "n": Term("n", n, "")})
    dU = m * (s2.u - s1.u)
    Q = _heat_first_law(i, dU, Wv)
    path = [gas.state_Pv(P1 * (v1 / v) ** n, v) for v in _geom(v1, s2.v)[1:-1]]
    return _finish(gas, name, "polytropic", i, s1, s2, m, W, Q, ncalc, steps, [s1, *path, s2], facts, targets)


def _isentropic(gas: Gas, name: str, i: int, s1: State, m: float, targets: list[Target],
                n: float | None) -> LegResult:
    j = i + 1
    t = _one(targets, "PTv", "isentropic")
    if t.kind == "P":
        s2 = gas.state_Ps(t.value, s1.s)
    elif t.kind == "v":
        s2 = gas.state_vs(t.value, s1.s)
    else:
        x = _solve(lambda x: gas.state_Ps(s1.P * math.exp(x), s1.s).T - t.value, 0.0,
                   target={"T": t.value})
        s2 = gas.state_Ps(s1.P * math.exp(x), s1.s)
    steps = [Calc(_s("s", j), s1.s, "J/(kg*K)", "{s1}", "work.adiabatic", {"s1": Term(_s("s", i), s1.s, "J/(kg*K)")},
                  note="isentropic")]
    dU = m * (s2.u - s1.u)
    W = Calc("W", -dU, "J", "−{dU}", "work.adiabatic", {"dU": Term("ΔU", dU, "J")})
    Q = Calc("Q", 0.0, "J", "0", "work.adiabatic")
    # along v with (density, entropy) flashes: fast for pure fluids and mixtures alike
    path = [gas.state_vs(v, s1.s) for v in _geom(s1.v, s2.v)[1:-1]] if s2.v != s1.v else []
    return _finish(gas, name, "isentropic", i, s1, s2, m, W, Q, n_from_states(i, s1, s2), steps,
                   [s1, *path, s2], [], targets)


def _isothermal(gas: Gas, name: str, i: int, s1: State, m: float, targets: list[Target],
                n: float | None) -> LegResult:
    j = i + 1
    t = _one(targets, "Pv", "isothermal")
    s2 = gas.state_PT(t.value, s1.T) if t.kind == "P" else gas.state_Tv(s1.T, t.value)
    dU = m * (s2.u - s1.u)
    facts = []
    if gas.model == "ideal":
        Wv = polytropic_work(s1.P * s1.v * m, s2.v / s1.v, 1.0)
        W = Calc("W", Wv, "J", "{P1}·{V1}·ln({V2}/{V1})", "work.polytropic_n1",
                 {"P1": Term(_s("P", i), s1.P, "Pa"), "V1": Term(_s("V", i), s1.v * m, "m**3"),
                  "V2": Term(_s("V", j), s2.v * m, "m**3")})
        Q = _heat_first_law(i, dU, Wv)
    else:
        Qv = m * s1.T * (s2.s - s1.s)
        Q = Calc("Q", Qv, "J", "{m}·{T}·({s2} − {s1})", "heat.isothermal",
                 {"m": Term("m", m, "kg"), "T": Term(_s("T", i), s1.T, "K"),
                  "s2": Term(_s("s", j), s2.s, "J/(kg*K)"), "s1": Term(_s("s", i), s1.s, "J/(kg*K)")})
        W = Calc("W", Qv - dU, "J", "{Q} − {dU}", "firstlaw.work", {"Q": Term("Q", Qv, "J"), "dU": Term("ΔU", dU, "J")})
        facts.append(Finding("closed.isothermal_real"))
    path = [gas.state_Tv(s1.T, v) for v in _geom(s1.v, s2.v)[1:-1]]
    return _finish(gas, name, "isothermal", i, s1, s2, m, W, Q, n_from_states(i, s1, s2), [], [s1, *path, s2], facts,
                   targets)


def _isobaric(gas: Gas, name: str, i: int, s1: State, m: float, targets: list[Target],
              n: float | None) -> LegResult:
    j = i + 1
    t = _one(targets, "Tv", "isobaric")
    s2 = gas.state_PT(s1.P, t.value) if t.kind == "T" else gas.state_Pv(s1.P, t.value)
    Wv = s1.P * m * (s2.v - s1.v)
    W = Calc("W", Wv, "J", "{P}·({V2} − {V1})", "work.isobaric",
             {"P": Term(_s("P", i), s1.P, "Pa"), "V2": Term(_s("V", j), s2.v * m, "m**3"),
              "V1": Term(_s("V", i), s1.v * m, "m**3")})
    Q = _heat_first_law(i, m * (s2.u - s1.u), Wv)
    path = [gas.state_Pv(s1.P, v) for v in _geom(s1.v, s2.v)[1:-1]]
    return _finish(gas, name, "isobaric", i, s1, s2, m, W, Q, Calc("n", 0.0, "", "0", "path.polytropic"), [],
                   [s1, *path, s2], [], targets)


def _isochoric(gas: Gas, name: str, i: int, s1: State, m: float, targets: list[Target],
               n: float | None) -> LegResult:
    t = _one(targets, "PT", "isochoric")
    s2 = gas.state_Pv(t.value, s1.v) if t.kind == "P" else gas.state_Tv(t.value, s1.v)
    W = Calc("W", 0.0, "J", "0", "work.isochoric")
    Q = _heat_first_law(i, m * (s2.u - s1.u), 0.0)
    path = [gas.state_Tv(T, s1.v) for T in _geom(s1.T, s2.T)[1:-1]]
    return _finish(gas, name, "isochoric", i, s1, s2, m, W, Q, Calc("n", math.inf, "", "∞", "path.polytropic"), [],
                   [s1, *path, s2], [], targets)
