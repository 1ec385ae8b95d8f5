"""The gas interface: a state from two independent properties, with an ideal and a real implementation.

Everything here is SI: P [Pa], T [K], v [m3/kg], u and h [J/kg], s [J/(kg K)].
The real gas uses CoolProp's low-level ``AbstractState`` (one per gas, reused for every flash);
the ideal gas has constant specific heats.
"""
from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from ..errors import PhysicsError

__all__ = ["R_U", "State", "Gas", "IdealGas", "RealGas"]

#: Molar gas constant [J/(mol K)], exact (CODATA 2018).
R_U = 8.314462618

#: Reference state of the ideal-gas model: h = 0 and s = 0 at 298.15 K and 101 325 Pa.
T_REF = 298.15
P_REF = 101325.0


@dataclass(frozen=True)
class State:
    """A thermodynamic state of the gas (specific properties, SI)."""

    P: float
    T: float
    v: float
    u: float
    h: float
    s: float
    Z: float
    phase: str
    quality: float | None = None   # vapour mass fraction in the two-phase region
    rho_liquid: float | None = None   # density of the liquid phase of a two-phase state [kg/m3]
    rho_vapour: float | None = None   # density of the vapour phase of a two-phase state [kg/m3]

    @property
    def rho(self) -> float:
        """Density [kg/m3]."""
        return 1.0 / self.v


class Gas:
    """A gas model. Implementations give states from each pair of independent properties."""

    model: str = ""
    name: str = ""
    M: float = 0.0           # molar mass [kg/mol]
    eos_refs: tuple[str, ...] = ()
    eos_method: str = ""

    def state_PT(self, P: float, T: float) -> State:
        """The state at pressure P [Pa] and temperature T [K]."""
        raise NotImplementedError

    def state_Pv(self, P: float, v: float) -> State:
        """The state at pressure P [Pa] and specific volume v [m3/kg]."""
        raise NotImplementedError

    def state_Tv(self, T: float, v: float) -> State:
        """The state at temperature T [K] and specific volume v [m3/kg]."""
        raise NotImplementedError

    def state_Ps(self, P: float, s: float) -> State:
        """The state at pressure P [Pa] and specific entropy s [J/(kg K)]."""
        raise NotImplementedError

    def state_vs(self, v: float, s: float) -> State:
        """The state at specific volume v [m3/kg] and specific entropy s [J/(kg K)]."""
        raise NotImplementedError

    def state_Ph(self, P: float, h: float) -> State:
        """The state at pressure P [Pa] and specific enthalpy h [J/kg]."""
        raise NotImplementedError

    def saturation_curve(self, n: int = 60) -> list[tuple[float, float, float, float, float]] | None:
        """Points (T, P, v, s, h) of the saturated liquid and vapour lines, or None if not applicable."""
        return None

    def dew_temperature(self, P: float) -> float | None:
        """Dew (saturation) temperature at P, or None above the critical pressure or for an ideal gas."""
        return None


class IdealGas(Gas):
    """Ideal gas with constant specific heats.

    P·v = R·T;  h = cp·(T − T_ref);  u = h − R·T;  s = cp·ln(T/T_ref) − R·ln(P/P_ref), with
    T_ref = 298.15 K and P_ref = 101 325 Pa. Only differences of u, h, s are meaningful.

    References: Çengel & Boles (2019), ch. 4 and 7.
    """

    model = "ideal"
    eos_method = "eos.ideal"

    def __init__(self, name: str, k: float, M: float):
        # 5/3 with room for rounding: a monatomic fluid's k from its equation of state lands a few parts
        # in 1e7 above 5/3 when the EOS and calcdoc differ in the last digits of the gas constant
        if not (1.0 < k <= 5.0 / 3.0 * (1.0 + 1e-6)):
            raise PhysicsError("gas.k_range", k=k)
        self.name = name
        self.k = k
        self.M = M
        self.R = R_U / M
        self.cp = k * self.R / (k - 1.0)
        self.cv = self.R / (k - 1.0)

    def _make(self, P: float, T: float) -> State:
        if not (P > 0 and T > 0 and math.isfinite(P) and math.isfinite(T)):
            raise PhysicsError("state.unphysical", P=P, T=T)
        h = self.cp * (T - T_REF)
        v = self.R * T / P
        return State(P, T, v, h - P * v, h, self.cp * math.log(T / T_REF) - self.R * math.log(P / P_REF), 1.0,
                     "gas (ideal)")

    def state_PT(self, P: float, T: float) -> State:
        """The state at (P, T): v = R·T/P."""
        return self._make(P, T)

    def state_Pv(self, P: float, v: float) -> State:
        """The state at (P, v): T = P·v/R."""
        return self._make(P, P * v / self.R)

    def state_Tv(self, T: float, v: float) -> State:
        """The state at (T, v): P = R·T/v."""
        return self._make(self.R * T / v, T)

    def state_Ps(self, P: float, s: float) -> State:
        """The state at (P, s): T = T_ref·exp((s + R·ln(P/P_ref))/cp)."""
        return self._make(P, T_REF * math.exp((s + self.R * math.log(P / P_REF)) / self.cp))

    def state_vs(self, v: float, s: float) -> State:
        """The state at (v, s): T from s = cv·ln(T/T_ref) − R·ln(R·T_ref/(v·P_ref))."""
        T = T_REF * math.exp((s + self.R * math.log(self.R * T_REF / (v * P_REF))) / self.cv)
        return self._make(self.R * T / v, T)

    def state_Ph(self, P: float, h: float) -> State:
        """The state at (P, h): T = T_ref + h/cp."""
        return self._make(P, T_REF + h / self.cp)


_PHASES = {
    "iphase_liquid": "liquid", "iphase_gas": "gas", "iphase_twophase": "two-phase",
    # CoolProp's "supercritical gas" (above the critical temperature, below the critical pressure) is a gas
    "iphase_supercritical": "supercritical", "iphase_supercritical_gas": "gas",
    "iphase_supercritical_liquid": "supercritical liquid", "iphase_critical_point": "critical point",
}


class RealGas(Gas):
    """Real gas from the fluid's Helmholtz-energy equation of state through CoolProp.

    One ``AbstractState`` is created per gas and reused for every flash (CoolProp's low-level
    interface; Bell et al. 2014). Pure fluids by CoolProp name; mixtures by mole fraction.
    """

    model = "real"
    eos_method = "eos.real"

    def __init__(self, fluid: str | None = None, mixture: tuple[tuple[str, float], ...] = ()):
        import CoolProp
        import CoolProp.CoolProp as CP

        self._CP = CP
        comps = [fluid] if fluid else [c for c, _ in mixture]
        try:
            self.AS = CoolProp.AbstractState("HEOS", "&".join(comps))
            if mixture:
                self.AS.set_mole_fractions([x for _, x in mixture])
        except ValueError as exc:
            raise PhysicsError("gas.unknown_fluid", fluid="&".join(comps), detail=_short(exc)) from None
        self.mixture = tuple(mixture)
        self.name = fluid if fluid else " + ".join(f"{x:.4g} {c}" for c, x in mixture)
        self.M = self.AS.molar_mass()
        refs = [CP.get_BibTeXKey(c, "EOS") for c in comps]
        if mixture:
            # CoolProp's HEOS mixtures use the GERG-2008 mixing rules and departure functions
            refs.append("Kunz-JCED-2012")
        self.eos_refs = tuple(dict.fromkeys(refs))
        self.Tmin = self.AS.Tmin()
        self.Tmax = self.AS.Tmax()
        self.pmax = self.AS.pmax()
        self.pure = not mixture
        # mixtures: CoolProp's critical-point search takes seconds and may find several points; the
        # flow engine uses the phase envelope instead
        self.Tc = self.AS.T_critical() if self.pure else math.nan
        self.Pc = self.AS.p_critical() if self.pure else math.nan
        self.flashes = 0

    def _update(self, pair: Any, a: float, b: float, what: dict[str, float]) -> State:
        AS = self.AS
        self.flashes += 1
        try:
            AS.update(pair, a, b)
        except ValueError as exc:
            raise self._why_not(pair, a, b, what, exc) from None
        # after a P-T flash CoolProp's p() can differ from the pressure asked for by ~1e-9 (found by the
        # verification cases): keep the state the user gave
        P, T = (a, b) if pair == self._CP.PT_INPUTS else (AS.p(), AS.T())
        if not (self.Tmin * 0.999 <= T <= self.Tmax) or P > self.pmax or P <= 0:
            raise PhysicsError("eos.range", state=what, T=T, P=P, Tmin=self.Tmin, Tmax=self.Tmax, pmax=self.pmax)
        phase = _PHASES.get(getattr(AS.phase(), "name", str(AS.phase())).split(".")[-1], "unknown")
        Q = AS.Q()
        quality = Q if 0.0 <= Q <= 1.0 else None
        if quality is not None:
            # a two-phase state has no single compressibility factor; its phases have their own densities
            return State(P, T, 1.0 / AS.rhomass(), AS.umass(), AS.hmass(), AS.smass(), math.nan, "two-phase",
                         quality, AS.saturated_liquid_keyed_output(self._CP.iDmass),
                         AS.saturated_vapor_keyed_output(self._CP.iDmass))
        return State(P, T, 1.0 / AS.rhomass(), AS.umass(), AS.hmass(), AS.smass(), AS.compressibility_factor(),
                     phase, quality)

    def _why_not(self, pair: Any, a: float, b: float, what: dict[str, float], exc: Exception) -> PhysicsError:
        """The reason a flash failed, where we can tell (below the triple point: solid)."""
        CP = self._CP
        if self.pure:
            P = {CP.PSmass_INPUTS: a, CP.HmassP_INPUTS: b, CP.PT_INPUTS: a, CP.PQ_INPUTS: a}.get(pair)
            T = b if pair == CP.PT_INPUTS else None
            P_tr: float | None
            T_tr: float | None
            try:
                P_tr, T_tr = self.AS.trivial_keyed_output(CP.iP_triple), self.AS.Ttriple()
            except ValueError:
                P_tr = T_tr = None
            if P is not None and P_tr and P < P_tr and pair in (CP.PSmass_INPUTS, CP.HmassP_INPUTS):
                return PhysicsError("eos.below_triple_pressure", state=what, fluid=self.name, P_tr=P_tr)
            if T is not None and T_tr and T < T_tr:
                return PhysicsError("eos.below_triple_temperature", T=T, fluid=self.name, T_tr=T_tr)
        return PhysicsError("eos.no_state", state=what, detail=_short(exc))

    def state_PT(self, P: float, T: float) -> State:
        """The state at (P, T): a PT flash."""
        return self._update(self._CP.PT_INPUTS, P, T, {"P": P, "T": T})

    def state_Pv(self, P: float, v: float) -> State:
        """The state at (P, v): a (density, pressure) flash; mixtures by Newton's method in T."""
        if self.pure:
            return self._update(self._CP.DmassP_INPUTS, 1.0 / v, P, {"P": P, "v": v})
        return self.state_Tv(self._T_of_Pv(P, v), v)

    def _T_of_Pv(self, P: float, v: float) -> float:
        """Mixtures: CoolProp has no (density, pressure) flash for them, so T is found by Newton's method on
        P(ρ, T) = P with (density, temperature) flashes and the exact slope (∂P/∂T) at constant ρ."""
        CP, AS = self._CP, self.AS
        rho = 1.0 / v
        T = max(P * v * self.M / R_U, self.Tmin)          # ideal-gas start
        for _ in range(60):
            self.flashes += 1
            try:
                AS.update(CP.DmassT_INPUTS, rho, T)
                f = AS.p() - P
                dfdT = AS.first_partial_deriv(CP.iP, CP.iT, CP.iDmass)
            except ValueError as exc:
                raise PhysicsError("eos.no_state", state={"P": P, "v": v}, detail=_short(exc)) from None
            if dfdT <= 0:
                break
            step = f / dfdT
            T = min(max(T - step, 0.5 * T), 2.0 * T)
            if abs(step) < 1e-11 * T:
                return T
        raise PhysicsError("eos.mixture_Pv", state={"P": P, "v": v})

    def state_Tv(self, T: float, v: float) -> State:
        """The state at (T, v): a (density, temperature) flash."""
        return self._update(self._CP.DmassT_INPUTS, 1.0 / v, T, {"T": T, "v": v})

    def state_Ps(self, P: float, s: float) -> State:
        """The state at (P, s): a (pressure, entropy) flash."""
        return self._update(self._CP.PSmass_INPUTS, P, s, {"P": P, "s": s})

    def state_vs(self, v: float, s: float) -> State:
        """The state at (v, s): a (density, entropy) flash."""
        return self._update(self._CP.DmassSmass_INPUTS, 1.0 / v, s, {"v": v, "s": s})

    def state_Ph(self, P: float, h: float) -> State:
        """The state at (P, h): an (enthalpy, pressure) flash."""
        return self._update(self._CP.HmassP_INPUTS, h, P, {"P": P, "h": h})

    def cp0_at(self, T: float) -> float:
        """Ideal-gas isobaric heat capacity at T [J/(kg K)]."""
        AS = self.AS
        AS.update(self._CP.DmassT_INPUTS, 1e-6, T)
        return float(AS.cp0mass())

    def dew_temperature(self, P: float) -> float | None:
        """Saturation temperature of a pure fluid at P [K]; None for a mixture or at or above the critical pressure."""
        if not self.pure or P >= self.Pc:
            return None
        try:
            self.AS.update(self._CP.PQ_INPUTS, P, 1.0)
            return float(self.AS.T())
        except ValueError:
            return None

    def saturation_curve(self, n: int = 60) -> list[tuple[float, float, float, float, float]] | None:
        """Points (T, P, v, s) of the saturated liquid and vapour lines of a pure fluid (None for a mixture)."""
        if not self.pure:
            return None
        CP = self._CP
        AS = self.AS
        Tt = max(AS.Ttriple(), self.Tmin)
        pts_l, pts_v = [], []
        for i in range(n):
            # cluster points near the critical point, where the dome turns
            x = i / (n - 1)
            T = Tt + (self.Tc - Tt) * (1 - (1 - x) ** 2) * 0.9999
            try:
                AS.update(CP.QT_INPUTS, 0.0, T)
                pts_l.append((T, AS.p(), 1.0 / AS.rhomass(), AS.smass(), AS.hmass()))
                AS.update(CP.QT_INPUTS, 1.0, T)
                pts_v.append((T, AS.p(), 1.0 / AS.rhomass(), AS.smass(), AS.hmass()))
            except ValueError:
                continue
        return pts_l + pts_v[::-1]


def _short(exc: Exception) -> str:
    text = str(exc).strip().splitlines()[0] if str(exc).strip() else type(exc).__name__
    return text[:200]
