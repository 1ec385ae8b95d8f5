"""Reciprocating compressor stages: the cylinder sets or checks the flow, and cylinders in series settle
their interstage pressures where every one passes the same mass flow.

A :class:`Plan` is made once per flow job. ``discharge`` gives the discharge pressure of a reciprocating
stage (its end pressure, or the settled interstage pressure of a series); ``attach`` adds the cylinder's
calcs and quantities to the stage's leg result (displacement, volumetric efficiency, cylinder flow and
capacity, gas rod loads, the ideal indicator diagram). Numbers and codes only; the words are the report's.
"""
from __future__ import annotations

import dataclasses
import math
from typing import Any

from ..errors import Finding, JobError, PhysicsError
from ..job.messages import problem
from ..job.model import Cylinder as CylinderSpec, Input, Job, LegSpec
from ..physics.calc import Calc, Term
from ..physics.closed import LegResult
from ..physics.cylinder import (
    SETTLE_RTOL,
    Cylinder,
    cycle,
    displacement,
    face_areas,
    isentropic_exponent,
    rod_loads,
    settle,
    volumetric_efficiency,
)
from ..physics.flowlegs import Ctx, machine
from ..physics.gas import State
from ..units import P_STD

__all__ = ["Plan", "geometry"]


def _spec(leg: LegSpec) -> CylinderSpec:
    """The cylinder block of a reciprocating leg (the job layer guarantees one)."""
    spec = leg.options.cylinder
    assert spec is not None, leg.name
    return spec


def geometry(spec: CylinderSpec) -> Cylinder:
    """The physics cylinder of a job's cylinder block (SI)."""
    return Cylinder(spec.bore.si, spec.stroke.si, spec.rod.si if spec.rod is not None else 0.0, spec.speed.si,
                    spec.clearance.si, spec.double, spec.loss.si if spec.loss is not None else 0.0, spec.count)


@dataclasses.dataclass
class _Flow:
    """One evaluation of a cylinder's flow: displacement, exponents, Z ratio, η_v and mass flow."""

    V_d: float
    n_e: float
    Z_s: float
    Z_d: float
    eta_v: float
    m: float


class Plan:
    """The reciprocating stages of one flow job: discharge pressures (settled for a series) and cylinder calcs."""

    def __init__(self, job: Job, ctx: Ctx):
        self.job = job
        self.ctx = ctx
        self.index = {leg.name: k for k, leg in enumerate(job.legs)}
        self.P_d: dict[int, float] = {}
        self.series_json: list[dict[str, Any]] = []
        self.cylinders_json: list[dict[str, Any]] = []
        self.warnings: list[Finding] = []
        self.settled: dict[int, tuple[float, int]] = {}    # leg index → (settled discharge pressure, evaluations)
        self._leg_name = ""
        self.own: set[int] = set()                           # the legs whose cylinders set the job's flow
        self.sets_flow = job.start.mass_flow is None and job.start.molar_flow is None and \
            job.start.volume_flow is None and job.start.standard_volume_flow is None

    def clearance(self, k: int) -> Input:
        """The clearance input of reciprocating leg k (where a problem of its flow points)."""
        return _spec(self.job.legs[k]).clearance

    # -- the flow of one cylinder ------------------------------------------------------------------------
    def flow(self, k: int, s_in: State, P_d: float, Z_d: float | None = None) -> _Flow:
        """The mass flow of reciprocating leg k from its suction state to P_d (Z_d from a discharge computed
        for the stage's efficiency when not given; 1 for an ideal gas)."""
        leg = self.job.legs[k]
        spec = _spec(leg)
        cyl = geometry(spec)
        n_e = spec.n_e.si if spec.n_e is not None else isentropic_exponent(self.ctx.gas, s_in)
        if Z_d is None:
            Z_d = 1.0 if self.ctx.ideal else self._discharge(k, s_in, P_d).Z
        Z_s = 1.0 if self.ctx.ideal else s_in.Z
        eta_v = volumetric_efficiency(cyl.c, cyl.L, P_d / s_in.P, n_e, Z_s / Z_d)
        V_d = displacement(cyl)
        return _Flow(V_d, n_e, Z_s, Z_d, eta_v, eta_v * V_d / s_in.v)

    def _discharge(self, k: int, s_in: State, P_d: float) -> State:
        leg = self.job.legs[k]
        o = leg.options
        return machine(self.ctx, leg.name, "compressor", 1, s_in, P_d, o.eta_p.si if o.eta_p else None,
                       o.eta_s.si if o.eta_s else None, None, None).end

    # -- series and their settled pressures --------------------------------------------------------------
    def series(self, k: int) -> list[int]:
        """The reciprocating legs of the series that starts at leg k (coolers and heaters between)."""
        out = [k]
        legs = self.job.legs
        while not legs[out[-1]].end:
            nxt = next(j for j in range(out[-1] + 1, len(legs)) if legs[j].process not in ("cooler", "heater"))
            out.append(nxt)
        return out

    def discharge(self, k: int, s_in: State) -> float:
        """The discharge pressure of reciprocating leg k entered at s_in [Pa]."""
        if k in self.P_d:
            return self.P_d[k]
        members = self.series(k)
        if k == 0 and self.sets_flow:
            self.own = set(members)
        last = self.job.legs[members[-1]]
        if len(members) == 1:
            self.P_d[k] = last.end["pressure"].si if "pressure" in last.end else s_in.P * last.end["pressure_ratio"].si
            return self.P_d[k]
        if "pressure" not in last.end:
            inp = last.end["pressure_ratio"]
            raise JobError([problem(self.job, Finding("cylinder.series_ratio", {"leg": last.name}), at=inp)])
        P_out = last.end["pressure"].si
        inlets: dict[int, State] = {0: s_in}

        def flow(j: int, Ps: float, Pd: float) -> float:
            s = inlets[j] if j == 0 else self.ctx.state(Ps, inlets[j].T)
            inlets[j] = s
            return self.flow(members[j], s, Pd).m

        def suction_after(j: int, Pd: float) -> float:
            P, T = Pd, None
            for leg in self.job.legs[members[j] + 1:members[j + 1]]:
                P, T = leg.options.drop.outlet(P), leg.end["temperature"].si
            if T is None:
                T = self._discharge(members[j], inlets[j], Pd).T
            inlets[j + 1] = self.ctx.state(P, T)
            return P

        try:
            pressures, evaluations = settle(s_in.P, P_out, len(members), flow, suction_after)
        except PhysicsError as exc:
            raise JobError([problem(self.job, Finding("cylinder.no_balance", {"leg": self.job.legs[k].name,
                                                                             "error": exc}, f"{last.path}.end"))]) from None
        for j, P in zip(members, pressures, strict=True):
            self.P_d[j] = P
        for j in members[:-1]:
            self.settled[j] = (self.P_d[j], evaluations)
        self.series_json.append({"legs": [self.job.legs[j].name for j in members],
                                 "discharge_pressures": [{"value": P, "unit": "Pa"} for P in pressures],
                                 "rtol": SETTLE_RTOL, "flow_evaluations": evaluations})
        return self.P_d[k]

    # -- the calcs of a stage -------------------------------------------------------------------------------
    def attach(self, k: int, res: LegResult) -> LegResult:
        """The leg result of reciprocating leg k with its cylinder calcs, quantities and facts."""
        leg = self.job.legs[k]
        self._leg_name = leg.name
        spec = _spec(leg)
        cyl = geometry(spec)
        s1, s2 = res.start, res.end
        f = self.flow(k, s1, s2.P, Z_d=s2.Z if not self.ctx.ideal else 1.0)
        if f.eta_v <= 0:
            raise JobError([problem(self.job, Finding("cylinder.no_gas", {"leg": leg.name, "r": s2.P / s1.P,
                                                                         "eta": f.eta_v}), at=spec.clearance)])
        i, j = res.i, res.i + 1
        calcs, q, facts = _geometry_calcs(cyl, f.V_d)
        first: tuple[Calc, ...] = ()
        if k in self.settled:
            P, n_eval = self.settled[k]
            first = (Calc(f"P_{j}", P, "Pa", "~settled", "cylinder.settle", note="settled_pressure"),)
            facts.append(Finding("cylinder.settled", {"P": P, "rtol": SETTLE_RTOL, "evaluations": n_eval}))
        calcs += _eta_v_calcs(self.ctx, spec, cyl, f, s1, s2, i, j, facts)
        V_in, m_cyl = f.eta_v * f.V_d, f.m
        calcs.append(Calc("V̇_in", V_in, "m**3/s", "{eta}·{Vd}", "cylinder.volumetric_efficiency",
                          {"eta": Term("η_v", f.eta_v, ""), "Vd": Term("V̇_d", f.V_d, "m**3/s")}, note="inlet_volume_flow"))
        M = Calc("ṁ_cyl", m_cyl, "kg/s", "{V}/{v}", "cylinder.mass_flow",
                 {"V": Term("V̇_in", V_in, "m**3/s"), "v": Term(f"v_{i}", s1.v, "m**3/kg")})
        calcs.append(M)
        q["volumetric_efficiency"] = next(c for c in calcs if c.symbol == "η_v")
        q["cylinder_flow"] = M
        if k not in self.own:
            cap = m_cyl / self.ctx.m_dot
            C = Calc("ṁ_cyl/ṁ", cap, "", "{mc}/{m}", "cylinder.capacity",
                     {"mc": Term("ṁ_cyl", m_cyl, "kg/s"), "m": Term("ṁ", self.ctx.m_dot, "kg/s")})
            calcs.append(C)
            q["capacity"] = C
            if cap < 1.0:
                self.warnings.append(Finding("cylinder.short", {"leg": leg.name, "mc": m_cyl, "m": self.ctx.m_dot,
                                                                "pct": 100.0 * cap}))
        elif k == 0:
            facts.append(Finding("cylinder.sets_flow", {"m": m_cyl}))
        calcs += self._rods(cyl, s1.P, s2.P, i, j, q, facts)
        n_c = q_n.value if (q_n := res.quantities.get("n")) is not None else \
            math.log(s2.P / s1.P) / math.log(s1.v / s2.v)
        calcs += self._indicated(cyl, res, n_c, f.n_e, q)
        self.cylinders_json.append(self._json(leg, cyl, f, q, res, n_c))
        return dataclasses.replace(res, calcs=first + res.calcs + tuple(calcs), quantities={**res.quantities, **q},
                                   facts=res.facts + tuple(facts))

    def _rods(self, cyl: Cylinder, Ps: float, Pd: float, i: int, j: int, q: dict[str, Calc], facts: list[Finding]) -> list[Calc]:
        site = self.job.site.P_atm
        P_rod = site if site is not None else P_STD
        A_he, A_ce, A_rod = face_areas(cyl.D, cyl.d)
        F_c, F_t = rod_loads(cyl.D, cyl.d, Ps, Pd, P_rod, cyl.double)
        t = {"Pd": Term(f"P_{j}", Pd, "Pa"), "Ps": Term(f"P_{i}", Ps, "Pa"), "Ahe": Term("A_he", A_he, "m**2"),
             "Ace": Term("A_ce", A_ce, "m**2"), "Pa": Term("P_atm", P_rod, "Pa"), "Ar": Term("A_rod", A_rod, "m**2")}
        C = Calc("F_c", F_c, "N", "{Pd}·{Ahe} − {Ps}·{Ace} − {Pa}·{Ar}", "cylinder.rod_load", t, note="rod_compression")
        T = Calc("F_t", F_t, "N", ("{Pd}" if cyl.double else "{Ps}") + "·{Ace} − {Ps}·{Ahe} + {Pa}·{Ar}",
                 "cylinder.rod_load", t, note="rod_tension" if cyl.double else "rod_tension_single")
        q["rod_load_compression"], q["rod_load_tension"] = C, T
        facts.append(Finding("cylinder.rod_site" if site is not None else "cylinder.rod_standard", {"P": P_rod}))
        reverses = F_c > 0 and F_t > 0
        facts.append(Finding("cylinder.reverses" if reverses else "cylinder.no_reversal", {"Fc": F_c, "Ft": F_t}))
        if not reverses:
            self.warnings.append(Finding("cylinder.no_reversal", {"leg": self._leg_name, "Fc": F_c, "Ft": F_t}))
        return [C, T]

    def _indicated(self, cyl: Cylinder, res: LegResult, n_c: float, n_e: float, q: dict[str, Calc]) -> list[Calc]:
        s1, s2 = res.start, res.end
        A_he, A_ce, _ = face_areas(cyl.D, cyl.d)
        ends = [("he", A_he)] + ([("ce", A_ce)] if cyl.double else [])
        out: list[Calc] = []
        W_sum = 0.0
        for tag, A in ends:
            V_s = A * cyl.S
            cy = cycle(s1.P, s2.P, V_s, cyl.c, n_c, n_e)
            W_sum += cy.W
            out.append(Calc(f"W_cyc,{tag}", cy.W, "J", "~cycle_area", "cylinder.indicator",
                            {"Ps": Term(f"P_{res.i}", s1.P, "Pa"), "Pd": Term(f"P_{res.i + 1}", s2.P, "Pa"),
                             "Vs": Term(f"V_s,{tag}", V_s, "m**3"), "c": Term("c", cyl.c, ""),
                             "nc": Term("n_c", n_c, ""), "ne": Term("n_e", n_e, "")}))
        Pi = W_sum * cyl.N * cyl.count
        ins = {"N": Term("N", cyl.N, "1/s"), "z": Term("z", float(cyl.count), "")}
        ins.update({f"W{k}": Term(c.symbol, c.value, "J") for k, c in enumerate(out)})
        eq = "(" + " + ".join(f"{{W{k}}}" for k in range(len(out))) + ")·{N}·{z}"
        P_ind = Calc("P_ind", Pi, "W", eq, "cylinder.indicator", ins)
        out.append(P_ind)
        q["indicated_power"] = P_ind
        gas = res.quantities.get("power")
        if gas is not None and gas.value > 0:
            out.append(Calc("P_ind/P_gas", Pi / gas.value, "", "{Pi}/{Pg}", "cylinder.indicator",
                            {"Pi": Term("P_ind", Pi, "W"), "Pg": Term("P_gas", gas.value, "W")}, note="indicated_ratio"))
        return out

    def _json(self, leg: LegSpec, cyl: Cylinder, f: _Flow, q: dict[str, Calc], res: LegResult,
              n_c: float) -> dict[str, Any]:
        """The cylinder's entry in the results file (geometry, exponents, reversal, indicator diagram)."""
        A_he, _, _ = face_areas(cyl.D, cyl.d)
        cy = cycle(res.start.P, res.end.P, A_he * cyl.S, cyl.c, n_c, f.n_e)
        return {"leg": leg.name, "action": "double" if cyl.double else "single", "cylinders": cyl.count,
                "bore": {"value": cyl.D, "unit": "m"}, "stroke": {"value": cyl.S, "unit": "m"},
                "rod": {"value": cyl.d, "unit": "m"}, "speed": {"value": cyl.N, "unit": "1/s"},
                "clearance": cyl.c, "volumetric_loss": cyl.L, "re_expansion_exponent": f.n_e,
                "compression_exponent": n_c,
                "re_expansion_exponent_given": _spec(leg).n_e is not None,
                "Z_ratio": f.Z_s / f.Z_d,
                "rod_load_reverses": q["rod_load_compression"].value > 0 and q["rod_load_tension"].value > 0,
                "indicator_head_end": {p: {"V": {"value": list(V), "unit": "m**3"}, "P": {"value": list(P), "unit": "Pa"}}
                                       for p, V, P in cy.processes},
                "swept_volume_head_end": {"value": A_he * cyl.S, "unit": "m**3"}}


def _geometry_calcs(cyl: Cylinder, V_d: float) -> tuple[list[Calc], dict[str, Calc], list[Finding]]:
    A_he, A_ce, A_rod = face_areas(cyl.D, cyl.d)
    D, d = Term("D", cyl.D, "m"), Term("d", cyl.d, "m")
    calcs = [Calc("A_he", A_he, "m**2", "π/4·{D}²", "cylinder.displacement", {"D": D})]
    calcs.append(Calc("A_rod", A_rod, "m**2", "π/4·{d}²", "cylinder.displacement", {"d": d}))
    calcs.append(Calc("A_ce", A_ce, "m**2", "{Ahe} − {Ar}", "cylinder.displacement",
                      {"Ahe": Term("A_he", A_he, "m**2"), "Ar": Term("A_rod", A_rod, "m**2")}))
    ins = {"S": Term("S", cyl.S, "m"), "N": Term("N", cyl.N, "1/s"), "z": Term("z", float(cyl.count), ""),
           "Ahe": Term("A_he", A_he, "m**2"), "Ace": Term("A_ce", A_ce, "m**2")}
    eq = "({Ahe} + {Ace})·{S}·{N}·{z}" if cyl.double else "{Ahe}·{S}·{N}·{z}"
    if not cyl.double:
        ins.pop("Ace")
    V = Calc("V̇_d", V_d, "m**3/s", eq, "cylinder.displacement", ins, note="double_acting" if cyl.double else "single_acting")
    calcs.append(V)
    return calcs, {"displacement": V}, []


def _eta_v_calcs(ctx: Ctx, spec: CylinderSpec, cyl: Cylinder, f: _Flow, s1: State, s2: State, i: int, j: int,
                 facts: list[Finding]) -> list[Calc]:
    out = []
    if spec.n_e is not None:
        out.append(Calc("n_e", f.n_e, "", "{n}", "input", {"n": Term("n_e", f.n_e, "")}))
    else:
        out.append(Calc("n_e", f.n_e, "", f"−(v/P)·(∂P/∂v)_s at state {i}", "cylinder.isentropic_exponent",
                        note="n_e_default"))
        facts.append(Finding("cylinder.n_e_default", {"n": f.n_e}))
    if spec.loss is None:
        facts.append(Finding("cylinder.loss_default"))
    r = s2.P / s1.P
    if not ctx.ideal:
        out.append(Calc("Z_s/Z_d", f.Z_s / f.Z_d, "", "{Zs}/{Zd}", "cylinder.volumetric_efficiency",
                        {"Zs": Term(f"Z_{i}", f.Z_s, ""), "Zd": Term(f"Z_{j}", f.Z_d, "")}))
    ins = {"L": Term("L", cyl.L, ""), "c": Term("c", cyl.c, ""), "r": Term("r", r, ""), "ne": Term("n_e", f.n_e, "")}
    if ctx.ideal:
        eq = "1 − {L} − {c}·({r}^(1/{ne}) − 1)"
    else:
        eq = "1 − {L} − {c}·({Zr}·{r}^(1/{ne}) − 1)"
        ins["Zr"] = Term("Z_s/Z_d", f.Z_s / f.Z_d, "")
    out.append(Calc("η_v", f.eta_v, "", eq, "cylinder.volumetric_efficiency", ins))
    return out
