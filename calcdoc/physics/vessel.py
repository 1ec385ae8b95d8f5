"""A rigid vessel that fills or empties through an orifice over time: the open-system energy balance.

The gas in the vessel is taken as uniform (one pressure and temperature at each instant); the flow through
the orifice is an isentropic nozzle flow from the upstream stagnation state, choked or subsonic as the
pressure ratio requires, times a discharge coefficient. The energy balance of the vessel (kinetic and
potential energy neglected)

    d(m·u)/dt = ṁ_in·h_in − ṁ_out·h + Q̇

is integrated in time with SciPy's ``solve_ivp`` (DOP853, tolerances :data:`RTOL`, ATOL in :func:`run_leg`), with
an event for the end pressure. Every run is bounded: a largest time (:data:`MAX_TIME_FACTOR` times the
starting emptying or filling time), and a largest number of right-hand-side evaluations
(:data:`MAX_EVALUATIONS`); past either, a :class:`PhysicsError` with a code, never a hang.

SI floats in and out; codes, no words.

References: Çengel, Boles & Kanoğlu (2019), ch. 5 (unsteady-flow processes: charging and discharging of
rigid vessels) and ch. 17 (isentropic nozzle flow, choked flow); Bell et al. (2014) for CoolProp;
Virtanen et al. (2020) for SciPy; Dormand & Prince (1980) and Hairer, Nørsett & Wanner (1993) for the
Runge–Kutta pair.
"""
from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

from ..errors import Finding, PhysicsError
from .calc import Calc, Term
from .closed import LegResult
from .gas import Gas, IdealGas, State

__all__ = ["ATOL_T", "MAX_EVALUATIONS", "MAX_TIME_FACTOR", "RTOL", "SERIES_POINTS", "VesselLeg", "Wall",
           "critical_ratio", "ideal_mass_flux", "real_mass_flux", "run_leg"]

#: Relative tolerance of the time integration (SciPy solve_ivp, DOP853).
RTOL = 1e-9
#: Absolute tolerance on temperatures [K]; the mass tolerance is 1e-12 of the larger of the start and end mass.
ATOL_T = 1e-7
#: Largest number of right-hand-side evaluations of one leg before it is given up.
MAX_EVALUATIONS = 20_000
#: Largest time of a leg that ends at a pressure, in starting emptying (or filling) times m/ṁ.
MAX_TIME_FACTOR = 1e4
#: Points of the time series kept for the results (evenly spaced in time, ends included).
SERIES_POINTS = 61


@dataclass(frozen=True)
class Wall:
    """The vessel wall as one lump: mass [kg], specific heat [J/(kg K)], inner area [m2] and the
    heat-transfer coefficient gas to wall [W/(m2 K)]."""

    m: float
    c: float
    A: float
    h: float


@dataclass(frozen=True)
class VesselLeg:
    """One leg of a vessel: ``process`` discharge or fill, ``heat`` adiabatic, isothermal or wall; the orifice
    (area [m2], discharge coefficient); back pressure [Pa] (discharge), supply pressure and temperature
    [Pa, K] or a supplied mass flow [kg/s] with its temperature (fill); the end: pressure [Pa] or duration [s]."""

    process: str
    heat: str
    A: float = 0.0
    Cd: float = 1.0
    P_back: float = 0.0
    P_supply: float = 0.0
    T_supply: float = 0.0
    m_dot: float = 0.0
    P_end: float | None = None
    t_end: float | None = None


def critical_ratio(k: float) -> float:
    """Critical (choking) pressure ratio of an isentropic nozzle, ideal gas: P*/P0 = (2/(k + 1))^(k/(k − 1)).

    References: Çengel, Boles & Kanoğlu (2019), ch. 17, critical ratios of isentropic flow.
    Example: k = 1.4 gives 0.5283.
    """
    return float((2.0 / (k + 1.0)) ** (k / (k - 1.0)))


def ideal_mass_flux(P0: float, T0: float, Pb: float, k: float, R: float) -> tuple[float, bool]:
    """Mass flux of an isentropic nozzle of an ideal gas [kg/(s m2)] and whether it is choked.

    Choked (Pb/P0 ≤ critical ratio): G = P0·√(k/(R·T0))·(2/(k + 1))^((k + 1)/(2(k − 1)));
    subsonic: G = P0/√(R·T0)·√(2k/(k − 1)·(r^(2/k) − r^((k + 1)/k))), r = Pb/P0; zero for Pb ≥ P0.

    Parameters: P0, T0 upstream stagnation pressure [Pa] and temperature [K]; Pb back pressure [Pa];
    k heat capacity ratio; R specific gas constant [J/(kg K)].

    References: Çengel, Boles & Kanoğlu (2019), ch. 17, isentropic flow through nozzles.
    Example: air (k = 1.4, R = 287.05) at 1 MPa, 300 K choked gives G = 2 332 kg/(s m2).
    """
    if Pb >= P0:
        return 0.0, False
    r = Pb / P0
    if r <= critical_ratio(k):
        return P0 * math.sqrt(k / (R * T0)) * (2.0 / (k + 1.0)) ** ((k + 1.0) / (2.0 * (k - 1.0))), True
    return P0 / math.sqrt(R * T0) * math.sqrt(2.0 * k / (k - 1.0) * (r ** (2.0 / k) - r ** ((k + 1.0) / k))), False


def real_mass_flux(gas: Gas, s0: State, Pb: float) -> tuple[float, bool]:
    """Mass flux of an isentropic nozzle of a real gas [kg/(s m2)] and whether it is choked.

    Along the isentrope from the stagnation state, G(P) = ρ(P, s0)·√(2·(h0 − h(P, s0))); the throat takes
    the largest G at a pressure from Pb to P0 (bounded Brent search, to 1e-7·P0); choked when that
    pressure lies above Pb. States from the gas model (CoolProp for a real gas).

    References: Çengel, Boles & Kanoğlu (2019), ch. 17 (isentropic nozzle flow, choking at the largest
    mass flux); Bell et al. (2014) for the properties.
    """
    from scipy.optimize import minimize_scalar

    P0 = s0.P
    if Pb >= P0:
        return 0.0, False

    def G(P: float) -> float:
        st = gas.state_Ps(P, s0.s)
        return st.rho * math.sqrt(max(2.0 * (s0.h - st.h), 0.0))

    res = minimize_scalar(lambda P: -G(P), bounds=(Pb, P0), method="bounded",
                          options={"xatol": 1e-7 * P0, "maxiter": 200})
    Gt, Gb = -float(res.fun), G(Pb)
    if Gb >= Gt:
        return Gb, False
    return Gt, True


class _Budget(Exception):
    """Raised inside the right-hand side when the evaluation budget is spent."""


class _Vessel:
    """The right-hand side of the vessel's balance of mass and energy: y = (m, T, T_wall, Q)."""

    def __init__(self, gas: Gas, V: float, leg: VesselLeg, wall: Wall | None):
        self.gas, self.V, self.leg = gas, V, leg
        self.wall = wall if wall is not None else Wall(1.0, 1.0, 0.0, 0.0)   # no heat unless a wall is given
        self.ideal_gas = gas if isinstance(gas, IdealGas) else None
        self.ideal = self.ideal_gas is not None
        self.evaluations = 0
        self.supply = gas.state_PT(leg.P_supply, leg.T_supply) if leg.process == "fill" and leg.P_supply else None

    def flux(self, s0: State, Pb: float) -> tuple[float, bool]:
        if self.ideal_gas is not None:
            return ideal_mass_flux(s0.P, s0.T, Pb, self.ideal_gas.k, self.ideal_gas.R)
        return real_mass_flux(self.gas, s0, Pb)

    def flows(self, st: State) -> tuple[float, float, float, bool]:
        """(ṁ_in, h_in, ṁ_out, choked) with the vessel at state st."""
        leg = self.leg
        if leg.process == "discharge":
            G, choked = self.flux(st, leg.P_back)
            return 0.0, 0.0, leg.Cd * leg.A * G, choked
        if self.supply is not None:
            G, choked = self.flux(self.supply, st.P)
            return leg.Cd * leg.A * G, self.supply.h, 0.0, choked
        return leg.m_dot, self.gas.state_PT(st.P, leg.T_supply).h, 0.0, False

    def derivatives(self, st: State) -> tuple[float, float]:
        """c_v = (∂u/∂T)_v and (∂u/∂v)_T: exact for the ideal gas, central differences on the gas model otherwise."""
        if self.ideal_gas is not None:
            return self.ideal_gas.cv, 0.0
        dT, dv = 1e-4 * st.T, 1e-6 * st.v
        cv = (self.gas.state_Tv(st.T + dT, st.v).u - self.gas.state_Tv(st.T - dT, st.v).u) / (2 * dT)
        dudv = (self.gas.state_Tv(st.T, st.v + dv).u - self.gas.state_Tv(st.T, st.v - dv).u) / (2 * dv)
        return cv, dudv

    def state(self, y: Sequence[float]) -> State:
        return self.gas.state_Tv(float(y[1]), self.V / float(y[0]))

    def rhs(self, t: float, y: Sequence[float]) -> list[float]:
        self.evaluations += 1
        if self.evaluations > MAX_EVALUATIONS:
            raise _Budget()
        m, T, Tw = float(y[0]), float(y[1]), float(y[2])
        if not (m > 0 and T > 0):
            raise PhysicsError("vessel.empty", t=float(t), m=m, T=T)
        st = self.state(y)
        m_in, h_in, m_out, _ = self.flows(st)
        cv, dudv = self.derivatives(st)
        dm = m_in - m_out
        E = m_in * (h_in - st.u) - m_out * (st.h - st.u) + dudv * (self.V / m) * dm
        if self.leg.heat == "isothermal":
            Qdot, dT = -E, 0.0
        else:
            Qdot = self.wall.h * self.wall.A * (Tw - T) if self.leg.heat == "wall" else 0.0
            dT = (E + Qdot) / (m * cv)
        dTw = -Qdot / (self.wall.m * self.wall.c) if self.leg.heat == "wall" else 0.0
        return [dm, dT, dTw, Qdot]


def run_leg(gas: Gas, name: str, i: int, s1: State, V: float, leg: VesselLeg, wall: Wall | None = None,
            T_wall: float | None = None) -> LegResult:
    """One vessel leg from state i (s1, volume V [m3]) to its end pressure or over its duration.

    The balance of mass dm/dt = ṁ_in − ṁ_out and of energy m·c_v·dT/dt = ṁ_in·(h_in − u) − ṁ_out·(h − u) +
    Q̇ + (∂u/∂v)_T·(V/m)·dm/dt (from d(m·u)/dt = ṁ_in·h_in − ṁ_out·h + Q̇, u = u(T, v), v = V/m), with Q̇ = 0
    (adiabatic), Q̇ holding T constant (isothermal), or Q̇ = h·A·(T_w − T) with m_w·c_w·dT_w/dt = −Q̇ (wall).

    Returns a :class:`LegResult` with the quantities duration [s], T_min, T_max [K] (and T_wall_min,
    T_wall_max with a wall), mass_change [kg], Q_to_gas [J], and the time series (t, P, T, m, m_dot).

    Raises PhysicsError: ``vessel.mixture`` (a real-gas mixture: refused), ``vessel.end_reached`` (the end pressure lies on the wrong side of the start),
    ``vessel.end_unreachable`` (beyond the back or supply pressure), ``vessel.no_flow``,
    ``vessel.too_long`` (the end is not reached within the largest time), ``vessel.budget`` (too many
    evaluations), ``vessel.empty``.

    References: Çengel, Boles & Kanoğlu (2019), ch. 5 (unsteady-flow energy balance of a control volume);
    Virtanen et al. (2020), SciPy solve_ivp; Dormand & Prince (1980).
    """
    import numpy as np
    from scipy.integrate import solve_ivp

    if getattr(gas, "pure", True) is False:
        # a mixture's pressure–entropy flash takes ~0.1 s and may not converge near its phase envelope: a leg
        # needs thousands of them, so it is refused rather than left to run for hours
        raise PhysicsError("vessel.mixture", gas=gas.name)
    if leg.heat == "wall" and wall is None:
        raise PhysicsError("vessel.no_wall")
    model = _Vessel(gas, V, leg, wall)
    m1 = V / s1.v
    Tw1 = s1.T if T_wall is None else T_wall
    sign = -1.0 if leg.process == "discharge" else 1.0
    if leg.P_end is not None:
        if sign * (leg.P_end - s1.P) <= 0:
            raise PhysicsError("vessel.end_reached", P=s1.P, P_end=leg.P_end, process=leg.process)
        limit = leg.P_back if leg.process == "discharge" else (leg.P_supply or math.inf)
        if sign * (leg.P_end - limit) >= 0:
            raise PhysicsError("vessel.end_unreachable", P_end=leg.P_end, P_limit=limit, process=leg.process)
    m_in, _, m_out, choked1 = model.flows(s1)
    if m_in == 0.0 and m_out == 0.0:
        other = leg.P_back if leg.process == "discharge" else leg.P_supply
        raise PhysicsError("vessel.no_flow", P=s1.P, P_other=other, process=leg.process)
    m_dot1 = m_in - m_out
    if leg.t_end is not None:
        t_max = leg.t_end
    else:
        m_ref = max(m1, leg.P_end * V / (s1.P * s1.v)) if leg.P_end else m1
        t_max = MAX_TIME_FACTOR * m_ref / abs(m_dot1)
    m_scale = max(m1, (leg.P_end or s1.P) * V / (s1.P * s1.v))
    Q_scale = m_scale * 1e3 * s1.T

    events: Any = None
    P_end = leg.P_end
    if P_end is not None:
        def reach(t: float, y: Sequence[float]) -> float:
            return model.state(y).P - P_end
        events = reach
        events.terminal = True
        events.direction = sign
    try:
        sol = solve_ivp(model.rhs, (0.0, t_max), [m1, s1.T, Tw1, 0.0], method="DOP853", rtol=RTOL,
                        atol=[1e-12 * m_scale, ATOL_T, ATOL_T, 1e-12 * Q_scale], events=events,
                        dense_output=True, max_step=t_max / 20.0)
    except _Budget:
        raise PhysicsError("vessel.budget", evaluations=MAX_EVALUATIONS) from None
    if sol.status < 0:
        raise PhysicsError("vessel.integration", reason=str(sol.message)[:200])
    if leg.P_end is not None:
        if not len(sol.t_events[0]):
            P_last = model.state(sol.y[:, -1]).P
            raise PhysicsError("vessel.too_long", t=float(sol.t[-1]), P=P_last, P_end=leg.P_end)
        t_end = float(sol.t_events[0][0])
        y_end = sol.y_events[0][0]
    else:
        t_end, y_end = float(sol.t[-1]), sol.y[:, -1]
    ts = [float(x) for x in np.linspace(0.0, t_end, SERIES_POINTS)]
    ys = [sol.sol(t) for t in ts[:-1]] + [y_end]
    states, flows = [], []
    for y in ys:
        st = model.state(y)
        a, _, b, ch = model.flows(st)
        states.append(st)
        flows.append((a - b, ch))
    s2 = states[-1]
    # extremes over every accepted step (a terminal event ends the steps at the end time), not only the series
    T_all = [float(x) for x in sol.y[1]] + [float(y_end[1])]
    Tw_all = [float(x) for x in sol.y[2]] + [float(y_end[2])]
    series = {"t": ts, "P": [s.P for s in states], "T": [s.T for s in states], "m": [float(y[0]) for y in ys],
              "m_dot": [f for f, _ in flows]}
    if leg.heat == "wall":
        series["T_wall"] = [float(y[2]) for y in ys]
    return _result(gas, name, i, s1, s2, V, leg, wall, model, t_end, float(y_end[0]), float(y_end[3]),
                   (min(T_all), max(T_all)), (min(Tw_all), max(Tw_all)), m_dot1, choked1, states, series,
                   sol.nfev)


def _result(gas: Gas, name: str, i: int, s1: State, s2: State, V: float, leg: VesselLeg, wall: Wall | None,
            model: _Vessel, t_end: float, m2: float, Q: float, T_ext: tuple[float, float],
            Tw_ext: tuple[float, float], m_dot1: float, choked1: bool, states: list[State],
            series: dict[str, list[float]], nfev: int) -> LegResult:
    j = i + 1
    m1 = V / s1.v
    calcs: list[Calc] = []
    method = "nozzle.ideal" if model.ideal else "nozzle.real"
    if leg.A:
        d = math.sqrt(4.0 * leg.A / math.pi)
        calcs.append(Calc("A", leg.A, "m**2", "π·{d}²/4", "orifice.area", {"d": Term("d", d, "m")}))
    if model.ideal_gas is not None and leg.A:
        k = model.ideal_gas.k
        calcs.append(Calc("r*", critical_ratio(k), "", "(2/({k} + 1))^({k}/({k} − 1))", "nozzle.critical",
                          {"k": Term("k", k, "")}))
    upstream = s1 if leg.process == "discharge" else model.supply
    if leg.A and upstream is not None:
        Pb = leg.P_back if leg.process == "discharge" else s1.P
        calcs.append(Calc(f"m\u0307_{i}", abs(m_dot1), "kg/s", "{Cd}·{A}·G({P0}, {T0}, {Pb})", method,
                          {"Cd": Term("C_d", leg.Cd, ""), "A": Term("A", leg.A, "m**2"),
                           "P0": Term("P_0", upstream.P, "Pa"), "T0": Term("T_0", upstream.T, "K"),
                           "Pb": Term("P_b", Pb, "Pa")},
                          note="vessel.choked" if choked1 else "vessel.subsonic"))
    elif not leg.A:
        calcs.append(Calc("m\u0307_in", leg.m_dot, "kg/s", "", "input"))
    calcs.append(Calc(f"m_{i}", m1, "kg", "{V} / {v}", "state.mass",
                      {"V": Term("V", V, "m**3"), "v": Term(f"v_{i}", s1.v, "m**3/kg")}))
    bal = "vessel.balance"
    note = {"adiabatic": "vessel.adiabatic", "isothermal": "vessel.isothermal", "wall": "vessel.wall"}[leg.heat]
    if leg.P_end is not None:
        t = Calc("t", t_end, "s", "t at which P = {P2}", bal, {"P2": Term(f"P_{j}", leg.P_end, "Pa")}, note=note)
    else:
        t = Calc("t", t_end, "s", "", "input", note="end target")
    calcs.append(t)
    calcs.append(Calc(f"m_{j}", m2, "kg", "m at t = {t}", bal, {"t": Term("t", t_end, "s")}))
    calcs.append(Calc(f"P_{j}", s2.P, "Pa", f"P(T_{j}, v_{j} = V/m_{j})", gas.eos_method))
    calcs.append(Calc(f"T_{j}", s2.T, "K", "T at t = {t}", bal, {"t": Term("t", t_end, "s")}))
    dm = Calc("Δm", m2 - m1, "kg", "{m2} − {m1}", "prop.difference",
              {"m2": Term(f"m_{j}", m2, "kg"), "m1": Term(f"m_{i}", m1, "kg")})
    Tmin = Calc("T_min", T_ext[0], "K", "min T(t), 0 ≤ t ≤ {t}", bal, {"t": Term("t", t_end, "s")})
    Tmax = Calc("T_max", T_ext[1], "K", "max T(t), 0 ≤ t ≤ {t}", bal, {"t": Term("t", t_end, "s")})
    Qc = Calc("Q", Q, "J", "∫Q̇·dt", bal, note=note)
    calcs += [dm, Tmin, Tmax, Qc]
    quantities = {"duration": t, "mass_change": dm, "T_min": Tmin, "T_max": Tmax, "Q_to_gas": Qc}
    if leg.heat == "wall":
        Twmin = Calc("T_w,min", Tw_ext[0], "K", "min T_w(t)", bal)
        Twmax = Calc("T_w,max", Tw_ext[1], "K", "max T_w(t)", bal)
        calcs += [Twmin, Twmax]
        quantities.update(T_wall_min=Twmin, T_wall_max=Twmax)
    facts = (Finding("vessel.integrated", {"n": int(nfev), "rtol": RTOL, "atol": ATOL_T}),)
    return LegResult(name, leg.process, i, s1, s2, quantities, tuple(calcs), tuple(states), (), facts,
                     series=series)
