"""Moist air: dry air and water tracked separately, as an ideal mixture of the job's dry-air model and water
vapour.

The model (method ``moist.ideal_mixture``): volumes are additive at the mixture's pressure and temperature
(Lewis–Randall ideal solution, Amagat's law). The dry air is the job's gas model (CoolProp's equation of state
for Air, or the ideal gas) at the total pressure P; the water vapour is an ideal gas at its partial pressure
p_v = y_v·P, with the ideal-gas enthalpy and entropy of CoolProp's Water (IAPWS-95, Wagner & Pruß 2002). Per kg
of moist gas, with the mass fractions w_a = 1/(1 + W) and w_v = W/(1 + W):

    v = w_a·v_a(P, T) + w_v·R_v·T/P        h = w_a·h_a(P, T) + w_v·h_v°(T)
    s = w_a·s_a(P, T) + w_v·[s_v°(T, p_0) − R_v·ln(p_v/p_0)]

This is thermodynamically consistent ((∂h/∂P)_T = v − T·(∂v/∂T)_P holds term by term), so the path
integration of :mod:`calcdoc.physics.flowpath` applies unchanged. Saturation: the saturation pressure of
water over liquid p_ws(T) from CoolProp's Water, no enhancement factor:

    W = ε·p_v/(P − p_v),  ε = M_w/M_a;  W_s = ε·p_ws(T)/(P − p_ws(T));  φ = p_v/p_ws(T)

Liquid water below 0.01 °C (ice) is outside the model. The humidity ratio W is kg of water vapour per kg of
dry air throughout. SI: P, p [Pa], T [K], h [J/kg], s [J/(kg K)].

References: ASHRAE Handbook—Fundamentals (2021), ch. 1, psychrometrics as ideal-gas relations; Wagner & Pruß
(2002) for water; Lemmon et al. (2000) for air. CoolProp's humid-air functions (Herrmann, Kretzschmar & Gatley
2009, ASHRAE RP-1485) are the check of this model in the tests.
"""
from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from ..errors import PhysicsError
from .flowpath import Eos, Point
from .gas import R_U, Gas, IdealGas, RealGas, State

__all__ = ["M_A", "M_W", "Humidity", "MoistAir", "MoistEos", "T_TRIPLE", "humidity_at", "humidity_ratio",
           "liquid_state", "p_ws", "vapour_pressure", "water_dew_point", "liquid_enthalpy"]

#: Molar masses of dry air and water [kg/mol] (Lemmon et al. 2000; IAPWS-95), as CoolProp gives them.
M_A = 0.02896546
M_W = 0.018015268
EPS = M_W / M_A
R_V = R_U / M_W
#: Triple-point temperature of water [K] (IAPWS-95): below it, water condenses as ice (outside the model).
T_TRIPLE = 273.16
_RHO_IDEAL = 1e-6   # kg/m3: a density where CoolProp's Water is an ideal gas to 1e-9


class _Water:
    """CoolProp's Water, one AbstractState reused."""

    _AS: Any = None

    @classmethod
    def state(cls) -> Any:
        if cls._AS is None:
            import CoolProp

            cls._AS = CoolProp.AbstractState("HEOS", "Water")
        return cls._AS


def p_ws(T: float) -> float:
    """Saturation pressure of water over liquid at T [Pa], from the triple point to below the critical point."""
    import CoolProp.CoolProp as CP

    AS = _Water.state()
    if not T_TRIPLE <= T < AS.T_critical():
        raise PhysicsError("moist.saturation_range", T=T)
    AS.update(CP.QT_INPUTS, 0.0, T)
    return float(AS.p())


def water_dew_point(p_v: float) -> float | None:
    """Dew point [K] of water vapour at the partial pressure p_v [Pa]; None below the triple-point pressure
    (frost point, outside the model) or above the critical pressure."""
    import CoolProp.CoolProp as CP

    AS = _Water.state()
    if not AS.trivial_keyed_output(CP.iP_triple) <= p_v < AS.p_critical():
        return None
    AS.update(CP.PQ_INPUTS, p_v, 0.0)
    return float(AS.T())


def humidity_ratio(P: float, p_v: float) -> float:
    """W = ε·p_v/(P − p_v) [kg water per kg dry air]."""
    return EPS * p_v / (P - p_v)


def vapour_pressure(P: float, W: float) -> float:
    """p_v = P·W/(ε + W) [Pa]."""
    return P * W / (EPS + W)


def liquid_enthalpy(P: float, T: float) -> float:
    """Enthalpy of liquid water at (P, T) [J/kg] on CoolProp's Water reference (the vapour's too)."""
    import CoolProp.CoolProp as CP

    AS = _Water.state()
    AS.update(CP.PT_INPUTS, P, T)
    return float(AS.hmass())


def liquid_state(P: float, T: float) -> tuple[float, float, float]:
    """Liquid water at (P, T): v [m3/kg], u [J/kg], s [J/(kg K)], on CoolProp's Water reference."""
    import CoolProp.CoolProp as CP

    AS = _Water.state()
    AS.update(CP.PT_INPUTS, P, T)
    return 1.0 / float(AS.rhomass()), float(AS.umass()), float(AS.smass())


@dataclass(frozen=True)
class Humidity:
    """The water in a moist-gas state: humidity ratio W [kg/kg dry air], vapour partial pressure [Pa], dew point
    [K] (None below the triple point), relative humidity φ [-] (None above the critical temperature of water)."""

    W: float
    p_v: float
    T_dew: float | None
    phi: float | None


def humidity_at(P: float, T: float, W: float) -> Humidity:
    pv = vapour_pressure(P, W)
    try:
        phi = pv / p_ws(T)
    except PhysicsError:
        phi = None
    return Humidity(W, pv, water_dew_point(pv) if pv > 0 else None, phi)


def _vapour(T: float, p_v: float) -> tuple[float, float, float]:
    """Ideal-gas water vapour at T and p_v: h [J/kg], s [J/(kg K)], cp [J/(kg K)]."""
    import CoolProp.CoolProp as CP

    AS = _Water.state()
    AS.update(CP.DmassT_INPUTS, _RHO_IDEAL, T)
    h, s0, cp = float(AS.hmass()), float(AS.smass()), float(AS.cp0mass())
    rho_v = p_v / (R_V * T)
    return h, s0 - R_V * math.log(rho_v / _RHO_IDEAL), cp


class MoistAir(Gas):
    """The moist gas of a humidity ratio W as a gas model (states from (P, T) and the path integration)."""

    model = "moist"
    eos_method = "moist.ideal_mixture"

    def __init__(self, dry: Gas, W: float):
        self.dry = dry
        self.W = W
        self.w_a, self.w_v = 1.0 / (1.0 + W), W / (1.0 + W)
        n_a, n_v = 1.0 / dry.M, W / M_W            # mol per kg of dry air
        self.y_v = n_v / (n_a + n_v)
        self.M = (1.0 + W) / (n_a + n_v)
        self.name = f"moist {dry.name}"
        self.eos_refs = tuple(dict.fromkeys(tuple(dry.eos_refs) + ("Wagner-JPCRD-2002",)))
        self.pure = False
        self.flashes = 0
        self.Tmin = max(getattr(dry, "Tmin", 0.0), T_TRIPLE - 100.0)
        self.Tmax = getattr(dry, "Tmax", 2000.0)
        self.pmax = getattr(dry, "pmax", 1e9)

    def describe(self) -> str:
        return str(self.dry.describe())  # type: ignore[attr-defined]  # every gas model describes itself

    def dew_temperature(self, P: float) -> float | None:
        return water_dew_point(self.y_v * P) if self.W > 0 else None


class MoistEos(Eos):
    """(P, T) states of moist air with cp and (∂v/∂T)_P for the path integration; the water stays vapour here
    (condensation is the business of the cooler, :func:`calcdoc.physics.moistlegs.moist_cooler`)."""

    def __init__(self, dry: Gas, W: float, dry_eos: Eos | None):
        self.dry, self.dry_eos = dry, dry_eos
        self.moist = MoistAir(dry, W)
        self.gas = self.moist  # type: ignore[assignment]  # the moist gas stands where Eos keeps its RealGas
        self.W = W
        self.mixture = True
        self.envelope = []
        self.envelope_source = ""
        self.envelope_curve = ()
        self.margin = 0.0
        self.findings = []
        self._recent = {}

    def with_W(self, W: float) -> MoistEos:
        """The same dry air carrying another humidity ratio (after condensate is drained)."""
        return MoistEos(self.dry, W, self.dry_eos)

    def dew_temperature(self, P: float) -> float | None:
        return self.moist.dew_temperature(P)

    def outside_envelope(self, P: float, T: float) -> bool:
        return True

    def side(self, P: float, T: float) -> int:
        return 0

    def saturation(self, P: float) -> None:
        return None

    def state_any(self, P: float, T: float) -> State:
        return self.pt(P, T).state

    def _pt(self, P: float, T: float) -> Point:
        g = self.moist
        if self.dry_eos is not None:
            a = self.dry_eos.pt(P, T)
            sa, cpa, vTa = a.state, a.cp, a.vT
        else:
            dry = self.dry
            assert isinstance(dry, IdealGas)
            sa = dry.state_PT(P, T)
            cpa, vTa = dry.cp, dry.R / P
        g.flashes += 1
        pv = g.y_v * P
        if g.W > 0:
            hv, sv, cpv = _vapour(T, pv)
        else:
            hv = sv = cpv = 0.0
        wa, wv = g.w_a, g.w_v
        v = wa * sa.v + wv * R_V * T / P
        h = wa * sa.h + wv * hv
        st = State(P, T, v, h - P * v, h, wa * sa.s + wv * sv, P * v * g.M / (R_U * T), "gas")
        return Point(st, wa * cpa + wv * cpv, wa * vTa + wv * R_V / P)


def moist_eos(dry: Gas, W: float) -> MoistEos:
    """The moist-air states for a dry-air model (real: its own counted flashes; ideal: closed forms)."""
    if isinstance(dry, RealGas):
        return MoistEos(dry, W, Eos(dry))
    if isinstance(dry, IdealGas):
        return MoistEos(dry, W, None)
    raise PhysicsError("moist.dry_model")
