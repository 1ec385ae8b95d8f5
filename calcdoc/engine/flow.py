"""The steady-flow engine: a validated ``system: flow`` job in, results out.

The start state and its flow (mass, molar, actual or standard volume flow), then each leg from the
end of the one before: compressor and expander stages (a compressor may be staged with
intercoolers), coolers and heaters, throttles, and reversible flow processes. Every number is a
``Calc`` with a method id; see :mod:`calcdoc._flowlegs` for the legs and :mod:`calcdoc._flowpath`
for the real-gas path integration. Sign convention: shaft work and heat INTO the gas are positive.
"""
from __future__ import annotations

import dataclasses
from collections.abc import Iterator
from dataclasses import dataclass
from typing import Any

from ..errors import Finding, JobError, PhysicsError
from ..job.flowopts import direction_problem
from ..job.messages import problem
from ..job.model import Drop, Input, Job, LegOptions, LegSpec, Staging
from ..physics.calc import Calc, Term
from ..physics.closed import LegResult
from ..physics.flowlegs import Ctx, MeasuredEndError, heat_exchanger, machine, reversible, throttle
from ..physics.flowpath import Eos, TwoPhaseError
from ..physics.gas import Gas, RealGas, State
from ..physics.moist import MoistEos
from ..physics.moistlegs import moist_cooler
from ..physics.staging import stage_ratio_calc, suction_pressures
from .common import gas_findings, job_basis, make_gas, saturation_near, site_calcs, software_versions
from .diagnose import ideal_condensation_warnings, phase_warnings
from .moist import condensate_total, dry_flow_calc, moist_setup, moist_states, moist_warnings
from .recip import Plan
from .results import Results, StateRecord

__all__ = ["FlowResults", "run_flow"]

#: The note code of a shaft-power total that leaves out machines with no mechanical efficiency.
PARTIAL = "total.partial"

#: A state closer than this to its dew (saturation) temperature gets a warning [K] (common practice).
NEAR_DEW_K = 5.0


@dataclass(frozen=True)
class FlowResults(Results):
    """Results of a steady-flow job: adds the train totals (gas power, shaft power, duties)."""

    totals: tuple[Calc, ...] = ()

    def all_calcs(self) -> Iterator[Calc]:
        """Every calc of the job, the train totals last."""
        yield from super().all_calcs()
        yield from self.totals


def run_flow(job: Job) -> FlowResults:
    """Compute a steady-flow job: states, legs (with staging expanded), totals and warnings."""
    gas, gas_calcs = make_gas(job)
    moist = moist_setup(job, gas)          # moist air: the legs run on the moist gas (dry air + water)
    eos = moist[0] if moist else Eos(gas) if isinstance(gas, RealGas) else None
    ctx = Ctx(moist[0].moist if moist else gas, eos, 0.0)
    warnings: list[Finding] = []
    if eos is not None:
        warnings += eos.findings          # fallbacks of the phase envelope, never silent
    warnings += gas_findings(job)         # the mixture's fractions normalised
    P1, T1 = job.start.pressure.si, job.start.temperature.si
    try:
        s1 = ctx.state(P1, T1)
    except PhysicsError as exc:
        raise JobError([problem(job, Finding("start.not_computed", {"error": exc}, "start"))]) from None
    plan = Plan(job, ctx)
    flow = _flow_calcs(job, ctx, s1, plan)
    ctx.m_dot = flow["m_dot"].value
    start_calcs = site_calcs(job) + list(gas_calcs) + (moist[1] if moist else []) + [
        Calc("v_1", s1.v, "m**3/kg", "v(P_1, T_1)", ctx.gas.eos_method)]
    if moist:
        flow["m_dot_da"] = dry_flow_calc(ctx.m_dot, moist[0].W)
    warnings += _phase_warnings(ctx, Finding("label.start"), [s1], True)
    legs: list[LegResult] = []
    staging_json = []
    s = s1
    for leg in job.legs:
        try:
            made, info = _leg(job, ctx, leg, leg.options, len(legs) + 1, s, plan)
        except TwoPhaseError as exc:
            target = (leg.end.get("pressure") or leg.end.get("pressure_ratio") or leg.end.get("temperature"))
            assert target is not None, "every flow leg has an end target"
            raise _problem_at(job, target, Finding("leg.two_phase", {"leg": leg.name, "process": leg.process,
                                                                      "error": exc})) from None
        except MeasuredEndError as exc:
            raise _problem_at(job, leg.end["temperature"], Finding("leg.measured", {"leg": leg.name, "error": exc})) from None
        except PhysicsError as exc:
            raise JobError([problem(job, Finding("leg.flow_failed", {"leg": leg.name, "error": exc},
                                                 f"{leg.path}.end"))]) from None
        if info:
            staging_json.append(info)
        for res in made:
            warnings += _phase_warnings(ctx, Finding("label.leg", {"leg": res.name}), list(res.path),
                                        res.process in ("cooler", "throttle", "expander"))
            if res.end.quality is not None:
                e = res.end
                warnings.append(Finding("flow.two_phase_outlet", {"leg": res.name, "P": e.P, "T": e.T,
                                                                  "x": e.quality}))
            legs.append(res)
            s = res.end
    warnings += plan.warnings
    states = [s1] + [leg.end for leg in legs]
    hums, flows = (moist_states(moist[0].W, flow["m_dot"].value, states, legs) if moist else
                   ([None] * len(states), [ctx.m_dot] * len(states)))
    if moist:
        warnings += moist_warnings(legs, [h for h in hums if h is not None])
    records = tuple(StateRecord(k + 1, str(k + 1), st, V_dot=m * st.v, humidity=hum)
                    for k, (st, m, hum) in enumerate(zip(states, flows, hums, strict=True)))
    warnings += ideal_condensation_warnings(job, gas, legs, s1)   # ideal model of a named fluid: Z, condensation
    totals = _totals(legs)
    cond = condensate_total(legs) if moist else None
    if cond is not None:
        totals += (cond,)
    basis = job_basis(job, gas)
    std_P, std_T = job.start.standard_pressure, job.start.standard_temperature
    basis["flow"] = {"standard": None if job.start.standard_volume_flow is None or std_P is None or std_T is None else {
        "pressure": {"value": std_P.si, "unit": "Pa"},
        "temperature": {"value": std_T.si, "unit": "K"}}}
    extra: dict[str, Any] = {"totals": {c.symbol: {"value": c.value, "unit": c.unit} for c in totals}}
    if staging_json:
        extra["staging"] = staging_json
    if plan.cylinders_json:
        extra["cylinders"] = plan.cylinders_json
    if plan.series_json:
        extra["interstage"] = plan.series_json
    if eos is not None:
        extra["eos_flashes"] = getattr(gas, "flashes", 0) + (moist[0].moist.flashes if moist else 0)
    if moist:
        basis["gas"]["moist"] = {"model": "ideal mixture of the dry-air model and water vapour",
                                 "humidity_ratio_start": moist[0].W}
    return FlowResults(job, gas, "flow", None, flow, records, tuple(legs), tuple(start_calcs), (), tuple(warnings),
                       basis, software_versions(), extra, _dome(ctx, gas, legs), totals=totals)


def _flow_calcs(job: Job, ctx: Ctx, s1: State, plan: Plan) -> dict[str, Calc]:
    st = job.start
    M = ctx.gas.M
    out: dict[str, Calc] = {}
    if plan.sets_flow:
        # the first leg's cylinder sets the flow (the job layer allows no flow only then)
        try:
            f = plan.flow(0, s1, plan.discharge(0, s1))
        except PhysicsError as exc:
            raise JobError([problem(job, Finding("leg.flow_failed", {"leg": job.legs[0].name, "error": exc},
                                                 f"{job.legs[0].path}.cylinder"))]) from None
        if f.eta_v <= 0:
            raise JobError([problem(job, Finding("cylinder.no_gas", {"leg": job.legs[0].name, "eta": f.eta_v,
                                                                    "r": plan.P_d[0] / s1.P}),
                                    at=plan.clearance(0))])
        m = f.m
        out["m_dot"] = Calc("ṁ", m, "kg/s", "{eta}·{Vd}/{v1}", "cylinder.mass_flow",
                            {"eta": Term("η_v", f.eta_v, ""), "Vd": Term("V̇_d", f.V_d, "m**3/s"),
                             "v1": Term("v_1", s1.v, "m**3/kg")}, note=Finding("set_by_cylinder", {"leg": job.legs[0].name}))
    elif st.mass_flow is not None:
        m = st.mass_flow.si
        out["m_dot"] = Calc("ṁ", m, "kg/s", "{m}", "input", {"m": Term("ṁ", m, "kg/s")})
    elif st.molar_flow is not None:
        n = st.molar_flow.si
        m = n * M
        out["m_dot"] = Calc("ṁ", m, "kg/s", "{n}·{M}", "flow.mass_flow", {"n": Term("ṅ", n, "mol/s"),
                                                                         "M": Term("M", M, "kg/mol")})
    elif st.volume_flow is not None:
        V = st.volume_flow.si
        m = V / s1.v
        out["m_dot"] = Calc("ṁ", m, "kg/s", "{V}/{v1}", "flow.mass_flow", {"V": Term("V̇_1", V, "m**3/s"),
                                                                         "v1": Term("v_1", s1.v, "m**3/kg")},
                            note="start_volume_flow")
    else:
        assert st.standard_pressure is not None and st.standard_temperature is not None \
            and st.standard_volume_flow is not None, "the job layer requires the reference conditions"
        Ps, Ts = st.standard_pressure.si, st.standard_temperature.si
        try:
            sstd = ctx.state(Ps, Ts)
        except PhysicsError as exc:
            raise JobError([problem(job, Finding("start.standard_not_computed", {"error": exc},
                                                 "start.standard_pressure"))]) from None
        out["v_std"] = Calc("v_std", sstd.v, "m**3/kg", "v(P_std, T_std)", ctx.gas.eos_method,
                            {"P": Term("P_std", Ps, "Pa"), "T": Term("T_std", Ts, "K")},
                            note=Finding("standard_conditions", {"P": st.standard_pressure.entered,
                                                                 "T": st.standard_temperature.entered}))
        V = st.standard_volume_flow.si
        m = V / sstd.v
        out["V_dot_std"] = Calc("V̇_std", V, "m**3/s", "{V}", "input", {"V": Term("V̇_std", V, "m**3/s")})
        out["m_dot"] = Calc("ṁ", m, "kg/s", "{V}/{v}", "flow.mass_flow", {"V": Term("V̇_std", V, "m**3/s"),
                                                                        "v": Term("v_std", sstd.v, "m**3/kg")})
    out["n_dot"] = Calc("ṅ", m / M, "mol/s", "{m}/{M}", "flow.mass_flow", {"m": Term("ṁ", m, "kg/s"),
                                                                          "M": Term("M", M, "kg/mol")})
    out["V_dot_1"] = Calc("V̇_1", m * s1.v, "m**3/s", "{m}·{v1}", "state.volume",
                          {"m": Term("ṁ", m, "kg/s"), "v1": Term("v_1", s1.v, "m**3/kg")},
                          note="start_volume_flow")
    return out


def _end_pressure(job: Job, leg: LegSpec, s: State) -> float:
    if "pressure" in leg.end:
        return leg.end["pressure"].si
    return s.P * leg.end["pressure_ratio"].si


def _target_inp(leg: LegSpec) -> Input | None:
    return leg.end.get("pressure") or leg.end.get("pressure_ratio")


def _leg(job: Job, ctx: Ctx, leg: LegSpec, opt: LegOptions, i: int, s: State,
         plan: Plan) -> tuple[list[LegResult], dict[str, Any]]:
    proc = leg.process
    wrong_way = direction_problem(job, leg, s.P, s.T)
    if wrong_way is not None:
        raise JobError([wrong_way])
    if proc in ("cooler", "heater"):
        T2 = leg.end["temperature"].si
        P2, dcalc = _drop(job, opt.drop, i, s.P)
        return [_exchanger(ctx, leg.name, proc, i, s, P2, T2, dcalc)], {}
    if opt.machine == "reciprocating":
        k = plan.index[leg.name]
        P2 = plan.discharge(k, s)
        T2m = leg.end["temperature"].si if "temperature" in leg.end else None
        res = machine(ctx, leg.name, proc, i, s, P2, opt.eta_p.si if opt.eta_p else None,
                      opt.eta_s.si if opt.eta_s else None, opt.eta_m.si if opt.eta_m else None, T2m)
        return [plan.attach(k, res)], {}
    P2 = _end_pressure(job, leg, s)
    if proc == "throttle":
        return [throttle(ctx, leg.name, i, s, P2)], {}
    if proc in ("polytropic", "isentropic", "isothermal"):
        return [reversible(ctx, leg.name, proc, i, s, P2, leg.n.si if leg.n is not None else None)], {}
    eta_p = opt.eta_p.si if opt.eta_p else None
    eta_s = opt.eta_s.si if opt.eta_s else None
    eta_m = opt.eta_m.si if opt.eta_m else None
    if opt.staging is not None:
        return _staged(job, ctx, leg, opt.staging, i, s, P2, eta_p, eta_s, eta_m)
    T2m = leg.end["temperature"].si if "temperature" in leg.end else None
    return [machine(ctx, leg.name, proc, i, s, P2, eta_p, eta_s, eta_m, T2m)], {}


def _exchanger(ctx: Ctx, name: str, proc: str, i: int, s: State, P2: float, T2: float, dcalc: Calc | None
               ) -> LegResult:
    """A cooler or heater; of moist air, one that drains condensate below the dew point."""
    if isinstance(ctx.eos, MoistEos):
        return moist_cooler(ctx, name, proc, i, s, P2, T2, dcalc)
    return heat_exchanger(ctx, name, proc, i, s, P2, T2, dcalc)


def _drop(job: Job, drop: Drop, i: int, P1: float) -> tuple[float, Calc | None]:
    j = i + 1
    P2 = drop.outlet(P1)
    if drop.inp is None:
        return P1, None
    if P2 <= 0:
        raise _problem_at(job, drop.inp, Finding("drop.too_large", {"entered": drop.inp.entered, "P": P1}))
    if drop.fraction is not None:
        return P2, Calc(f"P_{j}", P2, "Pa", "{P1}·(1 − {d})", "flow.pressure_drop",
                        {"P1": Term(f"P_{i}", P1, "Pa"), "d": Term("δ", drop.fraction, "")})
    return P2, Calc(f"P_{j}", P2, "Pa", "{P1} − {dP}", "flow.pressure_drop",
                    {"P1": Term(f"P_{i}", P1, "Pa"), "dP": Term("ΔP", drop.absolute or 0.0, "Pa")})


def _given_discharge(job: Job, st: Staging, k: int, N: int, Ps: float, P_out: float, i: int) -> tuple[float, Calc]:
    """The discharge pressure of stage k of a staging block with given ratios or interstage pressures."""
    j = i + 1
    if k == N - 1:
        if P_out <= Ps:
            given = (st.ratios or st.pressures)[-1]
            raise _problem_at(job, given, Finding("staging.rest_ratio", {"P": Ps, "P_out": P_out}))
        return P_out, Calc("r_last", P_out / Ps, "", "{Pout}/{Ps}", "staging.given",
                           {"Pout": Term("P_out", P_out, "Pa"), "Ps": Term(f"P_{i}", Ps, "Pa")}, note="rest_ratio")
    if st.ratios:
        r = st.ratios[k].si
        return r * Ps, Calc(f"P_{j}", r * Ps, "Pa", "{r}·{Ps}", "staging.given",
                            {"r": Term(f"r_{k + 1}", r, ""), "Ps": Term(f"P_{i}", Ps, "Pa")}, note="given_ratio")
    P = st.pressures[k].si
    if P <= Ps:
        raise _problem_at(job, st.pressures[k], Finding("staging.rest_ratio", {"P": Ps, "P_out": P}))
    return P, Calc(f"P_{j}", P, "Pa", "{P}", "input", {"P": Term(f"P_{j}", P, "Pa")}, note="given_pressure")


def _train(job: Job, ctx: Ctx, leg: LegSpec, st: Staging, N: int, i: int, s: State, P_out: float, eta_p: float | None,
           eta_s: float | None, eta_m: float | None,
           etas: tuple[float, ...] = ()) -> list[LegResult]:
    d = st.drop
    given = bool(st.ratios or st.pressures)
    rcalc = stage_ratio_calc(s.P, P_out, N, d.fraction, d.absolute)
    Ps = suction_pressures(s.P, rcalc.value, N, d.fraction, d.absolute)
    out: list[LegResult] = []
    for k in range(N):
        first: tuple[Calc, ...] = ()
        if given:
            Pd, pc = _given_discharge(job, st, k, N, s.P, P_out, i)
            first = (pc,)
        else:
            Pd = rcalc.value * Ps[k] if k < N - 1 else P_out
            first = (rcalc,) if k == 0 else ()
        if etas:
            eta_p, eta_s = (etas[k], None) if eta_p is not None else (None, etas[k])
        res = machine(ctx, f"{leg.name}, stage {k + 1}" if N > 1 else leg.name, "compressor", i, s, Pd,
                      eta_p, eta_s, eta_m, None)
        if first:
            res = _with(res, calcs=first + res.calcs)
        out.append(res)
        s, i = res.end, i + 1
        if k < N - 1:
            if st.T_cool.si > s.T:
                raise _problem_at(job, st.T_cool, Finding("intercooler.above_discharge",
                                                          {"entered": st.T_cool.entered, "k": k + 1, "T": s.T}))
            P2, dc = _drop(job, d, i, s.P)
            hx = _exchanger(ctx, f"{leg.name}, intercooler {k + 1}", "cooler", i, s, P2, st.T_cool.si, dc)
            out.append(hx)
            s, i = hx.end, i + 1
    return out


def _staged(job: Job, ctx: Ctx, leg: LegSpec, st: Staging, i: int, s: State, P_out: float, eta_p: float | None,
            eta_s: float | None, eta_m: float | None) -> tuple[list[LegResult], dict[str, Any]]:
    etas = tuple(e.si for e in leg.options.eta_stages)
    if st.fixed is not None:
        N = st.fixed
        legs = _train(job, ctx, leg, st, N, i, s, P_out, eta_p, eta_s, eta_m, etas)
        rule = "ratios" if st.ratios else "pressures" if st.pressures else "given"
        why = Finding(f"staging.{rule}" if rule != "given" else "staging.given", {"stages": N})
        info = {"leg": leg.name, "stages": N, "rule": rule}
    else:
        assert st.T_max is not None, "a staging block gives the stages or the discharge-temperature limit"
        limit = st.T_max.si
        tried: list[tuple[int, float | None]] = []
        legs = []
        last_error: PhysicsError | None = None
        for N in range(1, st.max_stages + 1):
            try:
                legs = _train(job, ctx, leg, st, N, i, s, P_out, eta_p, eta_s, eta_m)
            except PhysicsError as exc:
                # a trial whose discharge leaves the range of the equation of state is rejected, not an abort
                tried.append((N, None))
                last_error = exc
                legs = []
                continue
            Tmax = max(r.end.T for r in legs if r.process == "compressor")
            tried.append((N, Tmax))
            if Tmax <= limit:
                break
        else:
            hot = [T for _, T in tried if T is not None]
            if not hot:
                raise last_error if last_error is not None else PhysicsError("staging.no_trial")
            raise _problem_at(job, st.T_max, Finding("staging.no_stage_count", {
                "max_stages": st.max_stages, "entered": st.T_max.entered, "T": hot[-1] if hot else limit}))
        N = tried[-1][0]
        why = Finding("staging.fewest", {"limit": limit, "entered": st.T_max.entered, "stages": N,
                                         "trials": tuple(tried)})
        info = {"leg": leg.name, "stages": N, "rule": "fewest",
                "limit": {"value": limit, "unit": "K"},
                "trials": [{"stages": n, "max_discharge_temperature": {"value": T, "unit": "K"}} if T is not None
                           else {"stages": n, "max_discharge_temperature": None, "rejected": "eos_range"}
                           for n, T in tried]}
    if st.ratios or st.pressures:
        info["stage_ratios"] = [r.end.P / r.start.P for r in legs if r.process == "compressor"]
    r = next((c for c in legs[0].calcs if c.symbol == "r_stage"), None)
    if r is not None:
        info["stage_ratio"] = r.value
    legs[0] = _with(legs[0], facts=(why,) + legs[0].facts)
    return legs, info


def _with(res: LegResult, **kw: Any) -> LegResult:
    return dataclasses.replace(res, **kw)


def _totals(legs: list[LegResult]) -> tuple[Calc, ...]:
    """Train totals in the trade's sense, each positive: the gas power of the compressions (legs with
    work into the gas), the gas power output of the expansions, the heat removed (cooling duty) and
    the heat added (heating duty), and the shaft power of the compressors (and of the expanders)
    where mechanical efficiencies are given; a shaft total that leaves a machine out says so."""
    out = []

    def pick(key: str, positive: bool) -> list[tuple[LegResult, Calc]]:
        return [(leg, leg.quantities[key]) for leg in legs if key in leg.quantities
                and (leg.quantities[key].value > 0 if positive else leg.quantities[key].value < 0)]

    def total(sym: str, note: str | Finding, items: list[tuple[LegResult, Calc]], negate: bool) -> None:
        if not items:
            return
        names = {f"x{k}": Term(f"{c.symbol} ({leg.name})", c.value, c.unit) for k, (leg, c) in enumerate(items)}
        eq = " + ".join("{" + k + "}" for k in names)
        if negate:
            eq = f"−({eq})" if len(names) > 1 else f"−{eq}"
        value = sum(c.value for _, c in items)
        out.append(Calc(sym, -value if negate else value, "W", eq, "flow.total", names, note=note))

    comp, exp = pick("power", True), pick("power", False)
    total("ΣP_comp", "total.comp_power", comp, False)
    total("ΣP_out", "total.exp_power", exp, True)
    total("ΣQ̇_cool", "total.cooling", pick("duty", False), True)
    total("ΣQ̇_heat", "total.heating", pick("duty", True), False)
    for group, sym, what, negate in ((comp, "ΣP_shaft", "total.comp_shaft", False),
                                     (exp, "ΣP_{shaft,out}", "total.exp_shaft", True)):
        shaft = [(leg, leg.quantities["shaft_power"]) for leg, _ in group if "shaft_power" in leg.quantities]
        missing = [leg.name for leg, _ in group if "shaft_power" not in leg.quantities]
        note: str | Finding = what
        if shaft and missing:
            note = Finding(PARTIAL, {"total": what, "missing": tuple(missing)})
        total(sym, note, shaft, negate)
    return tuple(out)


def _dome(ctx: Ctx, gas: Gas, legs: list[LegResult]) -> tuple[tuple[float, float, float, float, float], ...] | None:
    """For the charts: the saturation dome of a pure fluid near the paths, or the phase envelope of a mixture
    (where it was traced with the mixture's own model) when a state lies inside it."""
    eos = ctx.eos
    if isinstance(eos, Eos) and eos.mixture and eos.envelope_curve:
        if any(st.quality is not None for leg in legs for st in leg.path):
            return tuple(eos.envelope_curve)
        return None
    return saturation_near(gas, legs)


def _phase_warnings(ctx: Ctx, label: Finding, states: list[State], check_all: bool) -> list[Finding]:
    """Warnings for states in or near the two-phase region: pure fluids against the saturation
    temperature, mixtures against the dew temperature of the phase envelope."""
    eos = ctx.eos
    if eos is None or isinstance(eos, MoistEos):   # moist air: its own warnings (engine.moist)
        return []
    liquid = [s for s in states if s.phase in ("two-phase", "liquid", "supercritical liquid")]
    pick = liquid or (states if (eos.mixture or check_all) else [states[0], states[-1]])
    return phase_warnings(eos.dew_temperature, label, pick, NEAR_DEW_K, "dew")


def _problem_at(job: Job, inp: Input, f: Finding) -> JobError:
    """A JobError at an input's line and column."""
    return JobError([problem(job, f, at=inp)])
