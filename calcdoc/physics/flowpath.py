"""Real-gas paths of steady-flow machines: counted PT flashes on one reused CoolProp state, the
phase envelope of a mixture, and the constant-polytropic-efficiency path integrated in ln P.

Everything is SI: P [Pa], T [K], v [m3/kg], h [J/kg], s [J/(kg K)], cp [J/(kg K)].

The path of a compressor stage at constant polytropic efficiency η_p is dh = v·dP/η_p (for an
expander dh = η_p·v·dP). With (P, T) as the state and h = h(P, T):

    dh = cp·dT + (v − T·(∂v/∂T)_P)·dP

so along the path, with x = ln P and e = 1/η_p (compressor) or η_p (expander),

    dT/dx = P·[v·(e − 1) + T·(∂v/∂T)_P] / cp                                   (1)

Every right-hand side needs one PT flash (cheap for pure fluids, and for mixtures once the gas
phase is imposed outside the phase envelope), which gives v, cp and (∂v/∂T)_P together. Eq. (1) is
integrated with the Dormand–Prince 5(4) embedded Runge–Kutta pair (Dormand & Prince 1980), the
fifth-order solution carried forward (local extrapolation), the fourth-order one giving the error
estimate. Error norm: the estimate in enthalpy, cp·|δT|, relative to the path's estimated enthalpy
change. Step control: the proportional–integral controller of Gustafsson (1991) with the constants
of Hairer & Wanner's DOPRI5 (exponents 0.2 − 0.75·β and β = 0.04, safety 0.9, growth ≤ 10, no
growth right after a rejected step), and the first step from one trial slope (Hairer, Nørsett &
Wanner 1993, sec. II.4). The step sequence then varies smoothly with the tolerance, so a tighter
tolerance never takes fewer flashes (tests/physics/test_polytropic_path.py). With the default
tolerance the error of the carried fifth-order solution is below 1e-6 relative in head against
fine independent integrations (methane, nitrogen, CO2 80 → 250 bar at 40 °C).
"""
from __future__ import annotations

import math
from dataclasses import dataclass

from ..errors import Finding, PhysicsError
from .envelope import HEOS_BUDGET_S, PR_MARGIN_K, phase_envelope
from .gas import _PHASES, RealGas, State

__all__ = ["Eos", "Point", "TwoPhaseError", "polytropic_path", "solve_T"]

#: Most flashes with the phase-stability test spent on one two-phase state of a mixture.
WET_ITERATIONS = 40

#: Tolerance of the embedded (fourth-order) error estimate per step in enthalpy, relative to the
#: estimated enthalpy change of the path; the fifth-order solution carried forward is about two
#: orders of magnitude more exact (measured: below 1e-6 relative in head, see the module note).
STEP_RTOL = 1e-4
#: Step controller (Gustafsson 1991; the DOPRI5 constants of Hairer & Wanner).
_BETA, _SAFETY, _FAC_MIN, _FAC_MAX = 0.04, 0.9, 0.2, 10.0

# Dormand–Prince 5(4) tableau (Dormand & Prince 1980; Hairer, Nørsett & Wanner 1993, table II.5.2).
_C = (0.0, 1 / 5, 3 / 10, 4 / 5, 8 / 9, 1.0, 1.0)
_A = ((), (1 / 5,), (3 / 40, 9 / 40), (44 / 45, -56 / 15, 32 / 9),
      (19372 / 6561, -25360 / 2187, 64448 / 6561, -212 / 729),
      (9017 / 3168, -355 / 33, 46732 / 5247, 49 / 176, -5103 / 18656),
      (35 / 384, 0.0, 500 / 1113, 125 / 192, -2187 / 6784, 11 / 84))
_E = (71 / 57600, 0.0, -71 / 16695, 71 / 1920, -17253 / 339200, 22 / 525, -1 / 40)


class TwoPhaseError(PhysicsError):
    """A pure fluid's path enters the two-phase region at the pressure P [Pa], where the saturation
    temperature is T_sat [K]; the engine points at the leg's end target."""

    def __init__(self, what: Finding, P: float, T_sat: float):
        self.P, self.T_sat = P, T_sat
        super().__init__("two_phase.enters", what=what, P=P, T_sat=T_sat)


@dataclass(frozen=True)
class Point:
    """A state with the derivatives the path needs: cp [J/(kg K)] and (∂v/∂T)_P [m3/(kg K)]."""

    state: State
    cp: float
    vT: float


class Eos:
    """PT flashes for the flow engine on the gas's one ``AbstractState``, counted in ``gas.flashes``.

    Mixtures: the phase envelope is built once; a state outside it (hotter than the upper dew
    temperature at its pressure, or above the cricondenbar on the gas side) is flashed with the
    gas phase imposed (CoolProp ``specify_phase(iphase_gas)``), which skips the slow phase-stability
    test. If that fails the free flash is tried; a state neither can compute is an error naming it.
    """

    def __init__(self, gas: RealGas):
        self.gas = gas
        self.AS = gas.AS
        self.CP = gas._CP
        self.mixture = not gas.pure
        self.envelope: list[tuple[float, float]] = []   # (T, P) along the phase envelope
        self.envelope_source = ""                       # 'heos', 'pr' or 'none' (mixtures)
        self.envelope_curve: tuple[tuple[float, float, float, float, float], ...] = ()
        self.margin = 0.0                               # room on the gas side of the envelope [K]
        self.findings: list[Finding] = []               # fallbacks taken, for the report's warnings
        self._recent: dict[tuple[float, float], Point] = {}   # states already flashed (a leg's start)
        if self.mixture:
            comps = tuple(c for c, _ in gas.mixture)
            x = tuple(f for _, f in gas.mixture)
            env = phase_envelope(comps, x)
            self.envelope = list(env.points)
            self.envelope_source = env.source
            self.envelope_curve = env.curve if env.source == "heos" else ()   # (T, P, v, s, h) for the charts
            self.margin = env.margin
            spent = {m: outcome for m, outcome, _ in env.tried}
            if env.source != "heos":
                outcome = "the tracer did not finish" if spent["heos"] == "timeout" else "the tracer failed"
                self.findings.append(Finding("mixture.envelope_fallback", {
                    "outcome": outcome, "budget": HEOS_BUDGET_S, "source": env.source, "margin": PR_MARGIN_K}))
        if self.envelope:
            i = max(range(len(self.envelope)), key=lambda k: self.envelope[k][1])
            self.T_cricondenbar, self.P_cricondenbar = self.envelope[i]
            self.T_cricondentherm = max(T for T, _ in self.envelope)

    # -- phase ------------------------------------------------------------------------------------
    def dew_temperature(self, P: float) -> float | None:
        """Upper dew (pure: saturation) temperature at P [K]; None above the cricondenbar or the
        critical pressure, or when unknown."""
        if not self.mixture:
            return self.gas.dew_temperature(P)
        env = self.envelope
        found = []
        for (Ta, Pa), (Tb, Pb) in zip(env, env[1:]):
            if (Pa - P) * (Pb - P) <= 0 and Pa != Pb:
                w = (math.log(P) - math.log(Pa)) / (math.log(Pb) - math.log(Pa))
                found.append(Ta + w * (Tb - Ta))
        return max(found) if found else None

    def outside_envelope(self, P: float, T: float) -> bool:
        """True where the envelope shows a mixture state is single-phase on the gas side."""
        if not self.envelope:
            return False
        m = self.margin
        if T > self.T_cricondentherm + m:
            return True
        if P > self.P_cricondenbar * (1.0 + m / 100.0):
            return T >= self.T_cricondenbar + m
        dew = self.dew_temperature(P)
        return dew is not None and T > dew + m

    def saturation(self, P: float) -> tuple[float, dict[str, float], dict[str, float]] | None:
        """Pure fluids below the critical pressure: (T_sat, saturated liquid, saturated vapour), each
        a dict of h, s, v; None for a mixture, at or above the critical pressure, or when unknown."""
        gas = self.gas
        if self.mixture or not P < gas.Pc:
            return None
        out = []
        try:
            for Q in (0.0, 1.0):
                gas.flashes += 1
                self.AS.update(self.CP.PQ_INPUTS, P, Q)
                out.append({"h": self.AS.hmass(), "s": self.AS.smass(), "v": 1.0 / self.AS.rhomass(), "T": self.AS.T()})
        except ValueError:
            return None
        return out[1]["T"], out[0], out[1]

    def side(self, P: float, T: float) -> int:
        """Pure fluids: +1 on the vapour (or supercritical) side of the saturation line, −1 on the
        liquid side; 0 for mixtures."""
        gas = self.gas
        if self.mixture:
            return 0
        if T >= gas.Tc:
            return 1
        if P >= gas.Pc:
            return -1
        Ts = gas.dew_temperature(P)
        gas.flashes += 1
        if Ts is None or abs(T - Ts) < 1e-4:
            return 0          # on the line (within 0.1 mK): no single-phase flash there
        return 1 if T > Ts else -1

    # -- flashes ----------------------------------------------------------------------------------
    def pt(self, P: float, T: float) -> Point:
        """The state at (P, T) with cp and (∂v/∂T)_P."""
        if not (P > 0 and T > 0 and math.isfinite(P) and math.isfinite(T)):
            raise PhysicsError("state.unphysical", P=P, T=T)
        key = (P, T)
        if key in self._recent:
            return self._recent[key]
        pt = self._pt(P, T)
        if len(self._recent) > 64:
            self._recent.clear()
        self._recent[key] = pt
        return pt

    def _pt(self, P: float, T: float) -> Point:
        gas = self.gas
        if not (gas.Tmin * 0.999 <= T <= gas.Tmax) or P > gas.pmax:
            raise PhysicsError("eos.range", state={"P": P, "T": T}, T=T, P=P, Tmin=gas.Tmin, Tmax=gas.Tmax,
                               pmax=gas.pmax)
        if self.mixture and self.outside_envelope(P, T):
            pt = self._flash(P, T, impose=True)
            if pt is not None:
                return pt
        pt = self._flash(P, T, impose=False)
        if pt is not None:
            return pt
        dew = self.dew_temperature(P)
        if dew:
            raise PhysicsError("eos.path_state_near_dew", P=P, T=T, dew=dew)
        raise PhysicsError("eos.path_state", P=P, T=T)

    def _flash(self, P: float, T: float, impose: bool) -> Point | None:
        AS, CP = self.AS, self.CP
        self.gas.flashes += 1
        try:
            if impose:
                AS.specify_phase(CP.iphase_gas)
            AS.update(CP.PT_INPUTS, P, T)
            rho = AS.rhomass()
            Q = AS.Q()
            if 0.0 <= Q <= 1.0:
                return None   # two-phase: no single-phase cp or derivative
            cp = AS.cpmass()
            vT = -AS.first_partial_deriv(CP.iDmass, CP.iT, CP.iP) / (rho * rho)
            if impose:
                phase = "gas"
            else:
                phase = _PHASES.get(getattr(AS.phase(), "name", str(AS.phase())).split(".")[-1], "unknown")
            st = State(P, T, 1.0 / rho, AS.umass(), AS.hmass(), AS.smass(), AS.compressibility_factor(), phase)
        except ValueError:
            return None
        finally:
            if impose:
                AS.unspecify_phase()
        if not (math.isfinite(cp) and cp > 0 and math.isfinite(vT) and math.isfinite(st.h)):
            return None
        return Point(st, cp, vT)


    # -- two-phase states -------------------------------------------------------------------------
    def state_any(self, P: float, T: float) -> State:
        """The state at (P, T), single-phase or (mixtures) two-phase, from a flash with the
        phase-stability test where the envelope does not show the state single-phase."""
        if self.mixture and not self.outside_envelope(P, T):
            wet = self._wet_PT(P, T)
            if wet is not None:
                return wet
        return self.pt(P, T).state

    def _wet_PT(self, P: float, T: float) -> State | None:
        """A two-phase state at (P, T) with its vapour fraction on a mass basis, or None (single phase, or
        the flash failed)."""
        AS, CP = self.AS, self.CP
        self.gas.flashes += 1
        try:
            AS.update(CP.PT_INPUTS, P, T)
            Q = AS.Q()
            if not 0.0 <= Q <= 1.0:
                return None
            return self._wet_state(P, T, Q)
        except ValueError:
            return None

    def _wet_state(self, P: float, T: float, Q: float) -> State:
        """The two-phase state the AbstractState holds: CoolProp's vapour fraction Q (molar for mixtures) is
        turned to a mass basis with the molar masses of the two phases, x = Q·M_V / (Q·M_V + (1 − Q)·M_L)."""
        AS, CP = self.AS, self.CP
        rv = AS.saturated_vapor_keyed_output(CP.iDmass)
        rl = AS.saturated_liquid_keyed_output(CP.iDmass)
        if self.mixture:
            Mv = rv / AS.saturated_vapor_keyed_output(CP.iDmolar)
            Ml = rl / AS.saturated_liquid_keyed_output(CP.iDmolar)
            x = Q * Mv / (Q * Mv + (1.0 - Q) * Ml)
        else:
            x = Q
        return State(P, T, 1.0 / AS.rhomass(), AS.umass(), AS.hmass(), AS.smass(), math.nan, "two-phase", x,
                     rho_liquid=rl, rho_vapour=rv)

    def flash_P(self, P: float, prop: str, target: float, T0: float, what: dict[str, float]) -> State:
        """The state at pressure P where ``prop`` ('h' or 's') equals target, single-phase or two-phase.

        Single-phase first (:func:`solve_T`); where that fails, pure fluids take CoolProp's (h, P) or
        (P, s) flash, and mixtures (where the envelope does not show the start guess single-phase) a
        bracketed search in T (Illinois false position, at most :data:`WET_ITERATIONS` flashes with the
        phase-stability test; h and s rise with T at constant P in and out of the two-phase region) to a
        residual of 1e-3 J/kg in h or 1e-6 J/(kg K) in s.
        """
        if not self.mixture or self.outside_envelope(P, T0):
            try:
                return solve_T(self, P, T0, prop, target, what).state
            except PhysicsError:
                pass
        if not self.mixture:
            st: State = self.gas.state_Ph(P, target) if prop == "h" else self.gas.state_Ps(P, target)
            return st
        return self._wet_search(P, prop, target, T0, what)

    def _wet_search(self, P: float, prop: str, target: float, T0: float, what: dict[str, float]) -> State:
        def g(T: float) -> tuple[float, State]:
            st = self.state_any(P, T)
            return float(getattr(st, prop)) - target, st

        def safe(T: float) -> tuple[float, State] | None:
            try:
                return g(T)
            except PhysicsError:
                return None

        a = safe(T0)
        if a is None:
            raise PhysicsError("eos.wet_not_computed", P=P, state=what)
        Ta, (fa, sa) = T0, a
        step = -5.0 if fa > 0 else 5.0
        Tb, fb, sb = Ta, fa, sa
        for _ in range(WET_ITERATIONS):          # bracket
            Tn = Tb + step
            r = safe(Tn)
            if r is None:
                step *= 0.5
                continue
            Ta, fa, sa = Tb, fb, sb
            Tb, (fb, sb) = Tn, r
            if fa * fb <= 0:
                break
            step *= 1.6
        else:
            raise PhysicsError("eos.wet_not_found", P=P, state=what, T=T0)
        tol = 1e-3 if prop == "h" else 1e-6      # J/kg or J/(kg K): well under 1e-5 K of temperature
        for _ in range(WET_ITERATIONS):          # Illinois false position
            if abs(Tb - Ta) < 1e-5 or abs(fb) <= tol:
                return sb
            Tc = Tb - fb * (Tb - Ta) / (fb - fa)
            fc, sc = g(Tc)
            if fc * fb < 0:
                Ta, fa, sa = Tb, fb, sb
            else:
                fa *= 0.5
            Tb, fb, sb = Tc, fc, sc
        if abs(Tb - Ta) < 1e-3:
            return sb
        raise PhysicsError("eos.wet_not_converged", P=P, state=what, n=WET_ITERATIONS)


def solve_T(eos: Eos, P: float, T0: float, prop: str, target: float, what: dict[str, float]) -> Point:
    """The state at pressure P where ``prop`` ('h', 's' or 'v') equals target, by Newton's method
    in T with the exact slope from the same flash: (∂h/∂T)_P = cp, (∂s/∂T)_P = cp/T, (∂v/∂T)_P.

    Converged when the Newton step is below 1e-7 K (the state returned is the last one flashed, so
    its residual corresponds to less than 1e-7 K)."""
    T = T0
    for _ in range(60):
        try:
            p = eos.pt(P, T)
        except PhysicsError:
            _raise_if_wet(eos, P, prop, target, what)
            raise
        st = p.state
        if prop == "h":
            r, slope = st.h - target, p.cp
        elif prop == "s":
            r, slope = st.s - target, p.cp / T
        else:
            r, slope = st.v - target, p.vT
        if slope <= 0:
            _raise_if_wet(eos, P, prop, target, what)
            raise PhysicsError("eos.no_single_phase", P=P, state=what)
        dT = -r / slope
        if abs(dT) < 1e-7:
            return p
        T = T + max(-0.3 * T, min(0.3 * T, dT))
    _raise_if_wet(eos, P, prop, target, what)
    raise PhysicsError("eos.not_converged", P=P, state=what)


def _raise_if_wet(eos: Eos, P: float, prop: str, target: float, what: dict[str, float]) -> None:
    """A pure fluid whose target lies between the saturated liquid and vapour values at P is wet."""
    sat = eos.saturation(P)
    if sat is None:
        return
    T_sat, liq, vap = sat
    if min(liq[prop], vap[prop]) <= target <= max(liq[prop], vap[prop]):
        raise TwoPhaseError(Finding("what.state", {"state": what}), P, T_sat)


def polytropic_path(eos: Eos, p1: Point, P2: float, eta_p: float, rtol: float = STEP_RTOL
                    ) -> tuple[Point, list[State], int]:
    """Integrate eq. (1) from p1 to the pressure P2 at constant polytropic efficiency eta_p.

    Returns the end point, states along the path (solution points and the Runge–Kutta stage
    states of accepted steps, start to end) and the number of accepted steps. A compressor has
    P2 > P1 (dh = v·dP/η_p), an expander P2 < P1 (dh = η_p·v·dP); eta_p = 1 is the isentrope.
    """
    s1 = p1.state
    x, X = math.log(s1.P), math.log(P2)
    span = X - x
    if span == 0.0:
        return p1, [s1], 0
    e = 1.0 / eta_p if span > 0 else eta_p
    sgn = 1.0 if span > 0 else -1.0

    side0 = eos.side(s1.P, s1.T)

    def f(xx: float, T: float) -> tuple[float, Point | None]:
        P = math.exp(xx)
        if side0 and eos.side(P, T) != side0:
            return 0.0, None      # across the saturation line: the step is rejected
        p = eos.pt(P, T)
        st = p.state
        return st.P * (st.v * (e - 1.0) + T * p.vT) / p.cp, p

    k1 = s1.P * (s1.v * (e - 1.0) + s1.T * p1.vT) / p1.cp
    tol_h = rtol * abs(e * s1.P * s1.v * span)
    # first step (Hairer, Nørsett & Wanner 1993, sec. II.4): one trial slope gives the curvature
    h0 = 0.01 * span
    kk, _ = f(x + h0, s1.T + h0 * k1)
    d2 = abs(kk - k1) / abs(h0)
    tol_T = tol_h / p1.cp
    h = sgn * min(abs(span), (tol_T / d2) ** 0.2 if d2 > 0 else abs(span))
    T = s1.T
    cp = p1.cp
    path = [s1]
    end = p1
    steps = 0
    alpha = 0.2 - 0.75 * _BETA
    r_old = 1e-4            # previous accepted error ratio (the integral part of the controller)
    rejected = False
    for _ in range(400):
        if sgn * (X - x) <= 1e-14:
            break
        if abs(h) >= abs(X - x) * (1 - 1e-12):
            h = X - x
        ks = [k1]
        pts: list[Point] = []
        for i in range(1, 7):
            y = T + h * sum(a * k for a, k in zip(_A[i], ks))
            k, p = f(x + _C[i] * h, y)
            if p is None:
                break
            ks.append(k)
            pts.append(p)
        if len(pts) < 6:
            # a stage state lies across the saturation line: halve the step until the path meets it
            if abs(h) < 1e-7 * abs(span):
                P = math.exp(x)
                raise TwoPhaseError(Finding("what.path"), P, eos.gas.dew_temperature(P) or T)
            h *= 0.5
            rejected = True
            continue
        T_new = T + h * sum(a * k for a, k in zip(_A[6], ks[:6]))
        r = abs(h * sum(a * k for a, k in zip(_E, ks))) * max(cp, pts[-1].cp) / tol_h
        if r <= 1.0:
            last = h == X - x
            x = X if last else x + h
            T = T_new
            k1 = ks[6]
            end = pts[-1]
            cp = end.cp
            steps += 1
            path += [p.state for p in pts[:4]] + [end.state]   # stages at c = 1/5, 3/10, 4/5, 8/9
            if last:
                break
            fac = _SAFETY * max(r, 1e-10) ** -alpha * r_old ** _BETA
            h *= min(1.0 if rejected else _FAC_MAX, max(_FAC_MIN, fac))
            r_old = max(r, 1e-4)
            rejected = False
        else:
            h *= max(_FAC_MIN, _SAFETY * r ** -0.2)
            rejected = True
    else:
        raise PhysicsError("path.steps_exhausted", steps=400)
    # the last stage of the last step is evaluated at exactly (ln P2, T2): the end state
    if abs(end.state.P - P2) > 1e-9 * P2:
        end = eos.pt(P2, T)
    # keep the path monotonic in pressure and free of duplicates
    clean = [path[0]]
    for st in path[1:]:
        if sgn * (st.P - clean[-1].P) > 0:
            clean.append(st)
    return end, clean, steps
