"""Moist air in a closed system: a receiver (constant volume) cooled or warmed to a temperature, with the
condensate that forms below the dew point. Other closed processes on moist air are refused (exit 2)."""
from __future__ import annotations

from ..errors import Finding, JobError, PhysicsError
from ..job.messages import problem
from ..job.model import Job
from ..physics.calc import Calc, Term
from ..physics.closed import LegResult
from ..physics.gas import Gas
from ..physics.moist import MoistEos, humidity_at
from ..physics.moistclosed import receiver_leg
from .common import gas_findings, job_basis, site_calcs, software_versions
from .moist import moist_warnings
from .results import Results, StateRecord

__all__ = ["compute_closed_moist"]


def compute_closed_moist(job: Job, gas: Gas, gas_calcs: list[Calc], meos: MoistEos, hum_calcs: list[Calc]
                         ) -> Results:
    P1, T1 = job.start.pressure.si, job.start.temperature.si
    s1 = meos.pt(P1, T1).state
    start = site_calcs(job) + list(gas_calcs) + list(hum_calcs)
    start.append(Calc("v_1", s1.v, "m**3/kg", "v(P_1, T_1, W_1)", "moist.ideal_mixture"))
    if job.start.mass is not None:
        m = job.start.mass.si
        mass = Calc("m", m, "kg", "{m}", "input", {"m": Term("m", m, "kg")}, note="moist.flow_basis_closed")
        V = m * s1.v
    else:
        assert job.start.volume is not None
        V = job.start.volume.si
        m = V / s1.v
        mass = Calc("m", m, "kg", "{V1} / {v1}", "state.mass",
                    {"V1": Term("V_1", V, "m**3"), "v1": Term("v_1", s1.v, "m**3/kg")}, note="moist.flow_basis_closed")
    W1 = meos.W
    warnings = gas_findings(job)
    legs: list[LegResult] = []
    records = [StateRecord(1, "1", s1, V=V, humidity=humidity_at(P1, T1, W1))]
    s, eos, W = s1, meos, W1
    for k, leg in enumerate(job.legs):
        i = k + 1
        if leg.process != "isochoric" or list(leg.end) != ["temperature"]:
            raise JobError([problem(job, Finding("moist.closed_process", {"leg": leg.name, "process": leg.process},
                                                 leg.path))])
        try:
            res, eos, m_c = receiver_leg(eos, leg.name, i, s, m, V, leg.end["temperature"].si)
        except PhysicsError as exc:
            raise JobError([problem(job, Finding(exc.code, dict(exc.values), f"{leg.path}.end.temperature"))]) from None
        legs.append(res)
        m -= m_c
        s, W = res.end, eos.W
        records.append(StateRecord(i + 1, str(i + 1), s, V=V, humidity=humidity_at(s.P, s.T, W)))
    warnings += moist_warnings(legs, [r.humidity for r in records])
    basis = job_basis(job, gas)
    basis["gas"]["moist"] = {"model": "ideal mixture of the dry-air model and water vapour", "humidity_ratio_start": W1}
    return Results(job, eos.gas, "closed", mass, {}, tuple(records), tuple(legs), tuple(start), (), tuple(warnings),
                   basis, software_versions())
