"""Closed systems: a fixed mass of gas through its legs, from the start state (mass or volume given)."""
from __future__ import annotations

from ..errors import Finding, JobError, PhysicsError
from ..job.messages import problem
from ..job.model import Job, LegSpec
from ..physics.calc import Calc, Term
from ..physics.closed import LegResult, Target, closed_leg
from ..physics.gas import Gas, State
from .common import gas_findings, job_basis, make_gas, saturation_near, site_calcs, software_versions
from .diagnose import ideal_condensation_warnings, phase_warnings, start_state_problem
from .moist import moist_setup
from .moistclosed import compute_closed_moist
from .results import Results, StateRecord

__all__ = ["NEAR_SATURATION_K", "compute_closed"]

#: A state closer than this to its saturation temperature gets a warning [K] (common practice).
NEAR_SATURATION_K = 5.0


def _start_state(job: Job, gas: Gas) -> State:
    P, T = job.start.pressure.si, job.start.temperature.si
    try:
        return gas.state_PT(P, T)
    except PhysicsError as exc:
        raise JobError([start_state_problem(job, gas, exc)]) from None


def _targets(job: Job, leg: LegSpec, s1: State, m: float) -> list[Target]:
    out = []
    for key, inp in leg.end.items():
        if key == "pressure":
            out.append(Target("P", inp.si))
        elif key == "pressure_ratio":
            out.append(Target("P", s1.P * inp.si))
        elif key == "temperature":
            out.append(Target("T", inp.si))
        elif key == "volume":
            out.append(Target("v", inp.si / m))
        elif key == "volume_ratio":
            out.append(Target("v", s1.v * inp.si))
    return out


def _phase_warnings(gas: Gas, label: Finding, states: list[State]) -> list[Finding]:
    """Warnings for states in or near the two-phase region (pure fluids: saturation temperature)."""
    return phase_warnings(gas.dew_temperature, label, states, NEAR_SATURATION_K, "saturation")


def compute_closed(job: Job) -> Results:
    """Compute a closed-system job's states, legs and warnings (no design checks, no sweep)."""
    gas, gas_calcs = make_gas(job)
    moist = moist_setup(job, gas)
    if moist:                    # moist air: a receiver at constant volume, with its condensate
        return compute_closed_moist(job, gas, gas_calcs, *moist)
    s1 = _start_state(job, gas)
    start_calcs = site_calcs(job) + list(gas_calcs)
    if job.start.mass is not None:
        m = job.start.mass.si
        mass = Calc("m", m, "kg", "{m}", "input", {"m": Term("m", m, "kg")})
    else:
        assert job.start.volume is not None, "the job layer requires the mass or the volume of a closed system"
        V1 = job.start.volume.si
        m = V1 / s1.v
        mass = Calc("m", m, "kg", "{V1} / {v1}", "state.mass",
                    {"V1": Term("V_1", V1, "m**3"), "v1": Term("v_1", s1.v, "m**3/kg")})
    start_calcs.append(Calc("v_1", s1.v, "m**3/kg", "v(P_1, T_1)", gas.eos_method))
    if job.start.mass is not None:
        start_calcs.append(Calc("V_1", m * s1.v, "m**3", "{m}·{v}", "state.volume",
                                {"m": Term("m", m, "kg"), "v": Term("v_1", s1.v, "m**3/kg")}))
    for prop, unit in (("u", "J/kg"), ("h", "J/kg"), ("s", "J/(kg*K)")):
        start_calcs.append(Calc(f"{prop}_1", getattr(s1, prop), unit, f"{prop}(P_1, T_1)", gas.eos_method))
    warnings: list[Finding] = gas_findings(job)
    legs: list[LegResult] = []
    records = [StateRecord(1, "1", s1, V=m * s1.v)]
    warnings += _phase_warnings(gas, Finding("label.start"), [s1])
    s = s1
    for k, leg in enumerate(job.legs):
        i = k + 1
        try:
            res = closed_leg(gas, leg.name, leg.process, i, s, m, _targets(job, leg, s, m),
                             leg.n.si if leg.n is not None else None)
        except PhysicsError as exc:
            where = f"{leg.path}.end" + (f".{next(iter(leg.end))}" if len(leg.end) == 1 else "")
            raise JobError([problem(job, Finding("leg.closed_failed", {"leg": leg.name, "error": exc}, where))]) from None
        except OverflowError:
            # an exponent or ratio so extreme that the path's numbers leave floating point
            raise JobError([problem(job, Finding("leg.overflow", {"leg": leg.name},
                                                 leg.path + (".n" if leg.n is not None else ".end")))]) from None
        legs.append(res)
        warnings += _phase_warnings(gas, Finding("label.leg", {"leg": leg.name}), list(res.path))
        s = res.end
        records.append(StateRecord(i + 1, str(i + 1), s, V=m * s.v))
    warnings += ideal_condensation_warnings(job, gas, legs, s1)
    basis = job_basis(job, gas)
    return Results(job, gas, "closed", mass, {}, tuple(records), tuple(legs), tuple(start_calcs), (),
                   tuple(warnings), basis, software_versions(), saturation=saturation_near(gas, legs))
