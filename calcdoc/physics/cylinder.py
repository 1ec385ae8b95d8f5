"""The reciprocating cylinder: displacement, volumetric efficiency, gas rod loads and the ideal indicator
diagram, and the interstage pressures at which cylinders in series pass the same mass flow.

SI floats in and out: lengths [m], speed [rev/s], pressures [Pa] absolute, volumes [m³], forces [N].
Clearance and volumetric loss are fractions of the swept volume. No words: codes only.

References (as in :mod:`calcdoc.report.methods`): each relation is derived from first principles and the
derivation is stated with the method: the geometry of the swept volume; the mass of the clearance gas, which
re-expands along the polytropic relation P·V^n = const (Çengel, Boles & Kanoğlu 2019, ch. 4) before suction
begins (its volume scaled by Z_s/Z_d for a real gas, as it keeps its mass); the boundary work of the four
processes of the ideal loop; and the force balance on piston and rod.
"""
from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass
from typing import Any

from ..errors import PhysicsError
from .gas import Gas, State

__all__ = ["Cycle", "Cylinder", "cycle", "displacement", "face_areas", "indicated_work", "isentropic_exponent",
           "rod_loads", "settle", "volumetric_efficiency"]

#: Relative tolerance on the interstage pressure of the equal-flow balance (bracketed root finding).
SETTLE_RTOL = 1e-12
#: Points of the geometric grid searched for a bracket of the balance.
SETTLE_GRID = 24


@dataclass(frozen=True)
class Cylinder:
    """A compressor cylinder: bore D, stroke S, rod d [m], speed N [rev/s], clearance c and loss L
    (fractions of the swept volume), double or single (head end only) acting, and count identical cylinders."""

    D: float
    S: float
    d: float
    N: float
    c: float
    double: bool
    L: float = 0.0
    count: int = 1


def face_areas(D: float, d: float) -> tuple[float, float, float]:
    """Piston areas [m²]: head end A_he = π/4·D², crank end A_ce = π/4·(D² − d²), rod A_rod = π/4·d².

    The crank end loses the rod's cross-section. Plain geometry.
    Example: D = 0.2 m, d = 0.04 m: A_he = 0.0314159 m², A_rod = 0.00125664 m², A_ce = 0.0301593 m².
    """
    A_he = math.pi / 4.0 * D * D
    A_rod = math.pi / 4.0 * d * d
    return A_he, A_he - A_rod, A_rod


def displacement(cyl: Cylinder) -> float:
    """Piston displacement [m³/s]: the volume swept per second by every compressing end.

        single acting:  V̇_d = π/4·D²·S·N·count
        double acting:  V̇_d = π/4·(2·D² − d²)·S·N·count

    Parameters: cyl, the cylinder (D, S, d [m], N [rev/s]). Returns the displacement [m³/s].
    Notes: a single-acting cylinder compresses on its head end only; the crank end of a double-acting
    cylinder loses the rod's cross-section.
    References: geometry of the swept volume (derivation stated in the method catalogue).
    Example: D = 0.2 m, S = 0.12 m, d = 0.04 m, N = 500/60 rev/s, double: 0.06158 m³/s.
    """
    A_he, A_ce, _ = face_areas(cyl.D, cyl.d)
    area = A_he + A_ce if cyl.double else A_he
    return float(area * cyl.S * cyl.N * cyl.count)


def volumetric_efficiency(c: float, L: float, r: float, n_e: float, Z_ratio: float = 1.0) -> float:
    """Volumetric efficiency of a cylinder with clearance [-].

        η_v = 1 − L − c·((Z_s/Z_d)·r^(1/n_e) − 1)

    Parameters: c clearance (fraction of the swept volume), L loss allowance (valves, rings), r = P_d/P_s,
    n_e re-expansion exponent, Z_ratio = Z_s/Z_d (1 for an ideal gas).
    Notes: the clearance gas left at discharge pressure re-expands along P·V^n_e = const before the suction
    valve opens; only the rest of the stroke draws gas in. A value at or below zero means the cylinder
    passes no gas at this ratio.
    References: derived from the mass of the clearance gas re-expanding along P·V^n_e = const (the
    polytropic relation of Çengel, Boles & Kanoğlu 2019, ch. 4); the catalogue entry states the derivation.
    Example: c = 0.15, L = 0, r = 3, n_e = 1.3: η_v = 1 − 0.15·(3^(1/1.3) − 1) = 0.8008.
    """
    return float(1.0 - L - c * (Z_ratio * r ** (1.0 / n_e) - 1.0))


def rod_loads(D: float, d: float, P_s: float, P_d: float, P_rod: float, double: bool) -> tuple[float, float]:
    """Gas rod loads [N] from the pressures on the piston faces: (compression, tension).

        double acting:  F_c = P_d·A_he − P_s·A_ce − P_rod·A_rod
                        F_t = P_d·A_ce − P_s·A_he + P_rod·A_rod
        single acting (crank end at suction pressure throughout):
                        F_c = P_d·A_he − P_s·A_ce − P_rod·A_rod
                        F_t = P_s·A_ce − P_s·A_he + P_rod·A_rod

    Parameters: bore D, rod d [m]; suction and discharge P_s, P_d [Pa abs]; P_rod the pressure on the rod
    where it leaves the cylinder through the packing [Pa abs] (the atmosphere; 0 leaves it out).
    Returns both loads, positive when the rod is in compression (F_c) or in tension (F_t); a negative
    value means the rod never sees that direction of load.
    Notes: a free-body balance of piston and rod at the dead points of each stroke (no inertia, valve losses
    or pulsation): compression at the end of the head-end stroke, tension at the end of the crank-end stroke.
    The load reverses every revolution when both are positive.
    References: force balance on piston and rod (derivation stated in the method catalogue).
    Example: D = 0.2 m, d = 0.04 m, P_s = 3 bar, P_d = 9 bar, P_rod = 1.01325 bar:
    F_c = 900000·0.0314159 − 300000·0.0301593 − 101325·0.00125664 = 19 099 N.
    """
    A_he, A_ce, A_rod = face_areas(D, d)
    F_c = P_d * A_he - P_s * A_ce - P_rod * A_rod
    F_t = (P_d if double else P_s) * A_ce - P_s * A_he + P_rod * A_rod
    return F_c, F_t


@dataclass(frozen=True)
class Cycle:
    """The ideal indicator diagram of one compressing end for one revolution.

    ``processes``: (code, volumes [m³], pressures [Pa]) for compression, discharge, re-expansion, suction,
    in that order; ``W`` the work done on the gas per revolution [J] (the enclosed area); ``V`` the four
    corner volumes (V_1 bottom dead centre, V_2 discharge valve opens, V_3 = clearance, V_4 suction opens).
    """

    processes: tuple[tuple[str, tuple[float, ...], tuple[float, ...]], ...]
    W: float
    V: tuple[float, float, float, float]


def indicated_work(P_s: float, P_d: float, V_s: float, c: float, n_c: float, n_e: float) -> float:
    """Work done on the gas in one revolution of the ideal cycle [J]: the area of the P–V loop.

        V_1 = V_s·(1 + c),  V_2 = V_1·(P_s/P_d)^(1/n_c),  V_3 = c·V_s,  V_4 = V_3·(P_d/P_s)^(1/n_e)
        W = (P_d·V_2 − P_s·V_1)/(n_c − 1) + P_d·(V_2 − V_3) − (P_d·V_3 − P_s·V_4)/(n_e − 1) − P_s·(V_1 − V_4)

    Parameters: suction and discharge pressures [Pa], swept volume V_s [m³], clearance c, compression and
    re-expansion exponents n_c, n_e (each ≠ 1; the n → 1 limits are taken as P·V·ln ratio).
    Notes: compression along P·V^n_c = const, discharge at P_d, re-expansion of the clearance gas along
    P·V^n_e = const, suction at P_s; no valve losses. With n_c = n_e = n this is the familiar
    n/(n − 1)·P_s·(V_1 − V_4)·(r^((n−1)/n) − 1).
    References: Çengel, Boles & Kanoğlu (2019), ch. 4 (polytropic boundary work); the four processes of the
    loop are stated in the method catalogue.
    Example: P_s = 1 bar, P_d = 3 bar, V_s = 1 L, c = 0, n_c = 1.4: W = 3.5·100 J·(3^(0.4/1.4) − 1) = 128.2 J.
    """
    V1, V2, V3, V4 = _corners(P_s, P_d, V_s, c, n_c, n_e)
    return _poly(P_s, V1, P_d, V2, n_c) + P_d * (V2 - V3) + _poly(P_d, V3, P_s, V4, n_e) - P_s * (V1 - V4)


def _poly(Pa: float, Va: float, Pb: float, Vb: float, n: float) -> float:
    """Work done on the gas from a to b along P·V^n = const, −∫P·dV [J] (negative for an expansion)."""
    if abs(n - 1.0) < 1e-9:
        return Pa * Va * math.log(Va / Vb) if Vb > 0 and Va > 0 else 0.0
    return (Pb * Vb - Pa * Va) / (n - 1.0)


def _corners(P_s: float, P_d: float, V_s: float, c: float, n_c: float, n_e: float) -> tuple[float, ...]:
    V1 = V_s * (1.0 + c)
    V2 = V1 * (P_s / P_d) ** (1.0 / n_c)
    V3 = c * V_s
    V4 = min(V3 * (P_d / P_s) ** (1.0 / n_e), V1)
    return V1, max(V2, V3), V3, V4


def cycle(P_s: float, P_d: float, V_s: float, c: float, n_c: float, n_e: float, points: int = 40) -> Cycle:
    """The ideal indicator diagram as points of its four processes, and its enclosed area (see
    :func:`indicated_work`; same references)."""
    V1, V2, V3, V4 = _corners(P_s, P_d, V_s, c, n_c, n_e)

    def curve(Va: float, Pa: float, Vb: float, n: float) -> tuple[tuple[float, ...], tuple[float, ...]]:
        Vs = tuple(Va + (Vb - Va) * k / points for k in range(points + 1))
        return Vs, tuple(Pa * (Va / V) ** n for V in Vs)

    comp = curve(V1, P_s, V2, n_c)
    reexp = curve(V3, P_d, V4, n_e) if V3 > 0 else ((0.0, V4), (P_d, P_s))
    procs = (("compression", *comp), ("discharge", (V2, V3), (P_d, P_d)), ("re_expansion", *reexp),
             ("suction", (V4, V1), (P_s, P_s)))
    return Cycle(procs, indicated_work(P_s, P_d, V_s, c, n_c, n_e), (V1, V2, V3, V4))


def isentropic_exponent(gas: Gas, s: State, dlnP: float = 1e-4) -> float:
    """The isentropic volume exponent at a state, k_v = −(v/P)·(∂P/∂v)_s, by a central difference of two
    isentropic flashes at P·(1 ± ε) [-]. For an ideal gas it equals cp/cv = k.

    References: Çengel, Boles & Kanoğlu (2019), ch. 7 (isentropic relations: P·v^k = const for an ideal gas);
    for a real gas the exponent is the local slope of ln P against ln v at constant entropy.
    """
    a = gas.state_Ps(s.P * math.exp(-dlnP), s.s)
    b = gas.state_Ps(s.P * math.exp(dlnP), s.s)
    return 2.0 * dlnP / math.log(a.v / b.v)


def settle(P_in: float, P_out: float, n: int, flow: Callable[[int, float, float], float],
           suction_after: Callable[[int, float], float]) -> tuple[list[float], int]:
    """Discharge pressures of n cylinders in series that pass the same mass flow, the first drawing at
    P_in and the last discharging at P_out [Pa]; returns (discharge pressures, evaluations of ``flow``).

    ``flow(k, P_s, P_d)`` is the mass flow of stage k [kg/s]; ``suction_after(k, P_d)`` the suction
    pressure of stage k + 1 after the interstage equipment (cooler pressure drop).
    Method: shooting on the first interstage pressure x: stage 1 passes m(x); each middle stage's discharge
    is solved so that it passes m too; the residual is the last stage's flow at P_out less m. Each root is
    bracketed on a geometric grid of SETTLE_GRID points and refined by Brent's method (scipy.optimize.brentq)
    to a relative tolerance SETTLE_RTOL, at most 200 iterations.
    References: Brent, R. P. (1973), Algorithms for Minimization without Derivatives, ch. 4, as implemented
    in SciPy (Virtanen et al. 2020).
    """
    from scipy.optimize import brentq

    count = [0]

    def m_of(k: int, Ps: float, Pd: float) -> float:
        count[0] += 1
        return flow(k, Ps, Pd)

    if n == 1:
        return [P_out], 0

    def chain(x: float) -> tuple[float, list[float]]:
        pd = [x]
        m = m_of(0, P_in, x)
        Ps = suction_after(0, x)
        for k in range(1, n - 1):
            if Ps >= P_out:
                raise PhysicsError("cylinder.no_common_flow", P=Ps)
            y = _root(_gap(m_of, m, k, Ps), Ps, P_out, brentq)
            pd.append(y)
            Ps = suction_after(k, y)
        if Ps >= P_out:
            return math.inf, pd
        return m_of(n - 1, Ps, P_out) - m, pd

    x = _root(lambda x: chain(x)[0], P_in, P_out, brentq)
    return chain(x)[1] + [P_out], count[0]


def _gap(m_of: Callable[[int, float, float], float], m: float, k: int, Ps: float) -> Callable[[float], float]:
    """The shortfall of stage k's flow from m at a discharge pressure, for the root finder."""
    return lambda P: m - m_of(k, Ps, P)


def _root(g: Callable[[float], float], lo: float, hi: float, brentq: Callable[..., Any]) -> float:
    """A root of g between lo and hi (both ends open): a bracket on a geometric grid, then Brent's method.
    No change of sign on the grid is a PhysicsError (the cylinders cannot pass one flow between these ends)."""
    xs: list[float] = [lo * (hi / lo) ** ((k + 0.5) / SETTLE_GRID) for k in range(SETTLE_GRID)]
    prev: tuple[float, float] | None = None
    for x in xs:
        try:
            gx = g(x)
        except PhysicsError:
            continue
        if gx == 0.0:
            return x
        if prev is not None and (gx > 0) != (prev[1] > 0) and math.isfinite(gx) and math.isfinite(prev[1]):
            root: float = brentq(g, prev[0], x, rtol=SETTLE_RTOL, xtol=1e-9 * lo, maxiter=200)
            return root
        prev = (x, gx)
    if prev is None:
        raise PhysicsError("cylinder.no_common_flow", P=hi)
    raise PhysicsError("cylinder.no_common_flow", P=prev[0])
