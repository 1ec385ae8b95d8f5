"""Moist air in a steady-flow job: the humidity of the start state (or of the site), the moist-gas model the
legs run on, the humidity of every state, and the warnings a checker must see (a wet machine inlet, water kept
as vapour past saturation)."""
from __future__ import annotations

import dataclasses

from ..errors import Finding, JobError, PhysicsError
from ..job.messages import problem
from ..job.model import Input, Job
from ..physics.calc import Calc, Term
from ..physics.closed import LegResult
from ..physics.gas import Gas, IdealGas, RealGas, State
from ..physics.moist import Humidity, MoistEos, humidity_at, moist_eos
from ..physics.moistlegs import start_humidity

__all__ = ["condensate_total", "dry_flow_calc", "humidity_input", "moist_setup", "moist_states", "moist_warnings", "WET_INLET_PHI"]

#: A machine inlet at or above this relative humidity is saturated: droplets reach the machine (common practice).
WET_INLET_PHI = 0.999


def humidity_input(job: Job) -> tuple[str, Input] | None:
    """The humidity the job gives: the start state's, else the site's relative humidity."""
    h = job.start.humidity
    if h is None and job.site.relative_humidity is not None:
        return "relative_humidity", job.site.relative_humidity
    return h


def moist_setup(job: Job, gas: Gas) -> tuple[MoistEos, list[Calc]] | None:
    """The moist-gas model of the job's dry air and the calcs of the start humidity; None for a dry job."""
    given = humidity_input(job)
    if given is None:
        return None
    kind, inp = given
    from_site = inp is job.site.relative_humidity
    if from_site and (job.gas.fluid != "Air" or job.system != "flow"):
        return None          # the site's humidity applies to steady-flow jobs on moist air only
    if job.gas.fluid != "Air" or not isinstance(gas, (RealGas, IdealGas)):
        raise JobError([problem(job, Finding("moist.not_air", {"key": kind, "fluid": job.gas.fluid or "a mixture"},
                                             inp.path))])
    P1, T1 = job.start.pressure.si, job.start.temperature.si
    try:
        W, calcs = start_humidity(kind, inp.si, P1, T1)
    except PhysicsError as exc:
        raise JobError([problem(job, Finding(exc.code, dict(exc.values), inp.path))]) from None
    if from_site:
        calcs[0] = dataclasses.replace(calcs[0], note="moist.site_humidity")
    return moist_eos(gas, W), calcs


def dry_flow_calc(m_dot: float, W: float) -> Calc:
    """The flow of dry air in the given flow of moist gas."""
    return Calc("ṁ_{da}", m_dot / (1.0 + W), "kg/s", "{m}/(1 + {W})", "moist.condensate",
                {"m": Term("ṁ", m_dot, "kg/s"), "W": Term("W_1", W, "")}, note="moist.flow_basis")


def moist_states(W1: float, m1: float, states: list[State], legs: list[LegResult]
                 ) -> tuple[list[Humidity], list[float]]:
    """The humidity and the moist-gas mass flow of every state: a condensing cooler changes both."""
    hums = [humidity_at(states[0].P, states[0].T, W1)]
    flows = [m1]
    W, m = W1, m1
    for leg in legs:
        q = leg.quantities
        if "humidity_ratio_out" in q:
            W = q["humidity_ratio_out"].value
            m -= q["condensate"].value
        hums.append(humidity_at(leg.end.P, leg.end.T, W))
        flows.append(m)
    return hums, flows


def moist_warnings(legs: list[LegResult], hums: list[Humidity]) -> list[Finding]:
    """A saturated or wet compressor or expander inlet (droplets), and a leg end wetter than saturation where no
    condensate is drained (the water is kept as vapour there)."""
    out = []
    for k, leg in enumerate(legs):
        h_in, h_out = hums[k], hums[k + 1]
        if leg.process in ("compressor", "expander") and h_in.phi is not None and h_in.phi >= WET_INLET_PHI:
            out.append(Finding("moist.wet_inlet", {"leg": leg.name, "phi": h_in.phi, "T": leg.start.T}))
        if "humidity_ratio_out" not in leg.quantities and h_out.phi is not None and h_out.phi > 1.0 + 1e-9:
            out.append(Finding("moist.supersaturated", {"leg": leg.name, "phi": h_out.phi, "T": leg.end.T,
                                                        "T_dew": h_out.T_dew or 0.0}))
    return out


def condensate_total(legs: list[LegResult]) -> Calc | None:
    """The condensate drained by all the coolers of the train [kg/s]."""
    items = [(leg, leg.quantities["condensate"]) for leg in legs if "condensate" in leg.quantities]
    if not items:
        return None
    names = {f"x{k}": Term(f"m\u0307_c ({leg.name})", c.value, "kg/s") for k, (leg, c) in enumerate(items)}
    return Calc("Σm\u0307_c", sum(c.value for _, c in items), "kg/s", " + ".join("{" + k + "}" for k in names),
                "moist.condensate", names, note="moist.condensate_total")
