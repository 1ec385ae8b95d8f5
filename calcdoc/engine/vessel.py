"""Vessels that fill and empty over time: a rigid vessel's legs run one after another from the start state.

Each leg is integrated in time by :func:`calcdoc.physics.vessel.run_leg`; the wall temperature carries over
from one leg to the next (it starts at the gas temperature). Warnings are findings (codes with values):
a gas temperature below the common default minimum design metal temperature of carbon-steel vessels, and
states near or inside the two-phase region.
"""
from __future__ import annotations

import math

from ..errors import Finding, JobError, PhysicsError
from ..job.messages import problem
from ..job.model import Job, LegSpec
from ..physics.calc import Calc, Term
from ..physics.closed import LegResult
from ..physics.gas import Gas
from ..physics.vessel import VesselLeg, Wall, run_leg
from .closed import _phase_warnings, _start_state
from .common import job_basis, make_gas, saturation_near, site_calcs, software_versions
from .results import Results, StateRecord

__all__ = ["COLD_GAS_K", "compute_vessel"]

#: A gas temperature below this gets a brittle-fracture warning [K]: −29 °C (−20 °F), common practice as the
#: default minimum design metal temperature of carbon-steel pressure vessels; the vessel's own rating governs.
COLD_GAS_K = 244.15


def _leg_input(leg: LegSpec) -> VesselLeg:
    v = leg.vessel
    assert v is not None, "a vessel job's legs are vessel legs"
    A = math.pi * v.diameter.si ** 2 / 4.0 if v.diameter is not None else 0.0
    return VesselLeg(
        process=leg.process, heat=v.heat, A=A,
        Cd=v.discharge_coefficient.si if v.discharge_coefficient is not None else 1.0,
        P_back=v.back_pressure.si if v.back_pressure is not None else 0.0,
        P_supply=v.supply_pressure.si if v.supply_pressure is not None else 0.0,
        T_supply=v.supply_temperature.si if v.supply_temperature is not None else 0.0,
        m_dot=v.mass_flow.si if v.mass_flow is not None else 0.0,
        P_end=leg.end["pressure"].si if "pressure" in leg.end else None,
        t_end=leg.end["duration"].si if "duration" in leg.end else None)


def _wall(job: Job) -> Wall | None:
    assert job.vessel is not None
    w = job.vessel.wall
    if w is None:
        return None
    return Wall(w.mass.si, w.specific_heat.si, w.area.si, w.heat_transfer_coefficient.si)


def _where(leg: LegSpec, code: str) -> str:
    """The key a vessel leg's failure points at."""
    if code in ("vessel.end_reached", "vessel.end_unreachable", "vessel.too_long"):
        return f"{leg.path}.end.{next(iter(leg.end))}"
    if code == "vessel.no_flow":
        return f"{leg.path}.orifice.back_pressure" if leg.process == "discharge" else f"{leg.path}.supply"
    return leg.path


def compute_vessel(job: Job) -> Results:
    """Compute a vessel job's states, legs and warnings (no design checks, no sweep)."""
    gas, gas_calcs = make_gas(job)
    s1 = _start_state(job, gas)
    assert job.vessel is not None, "a vessel job has its vessel (checked when the job file is read)"
    V = job.vessel.volume.si
    m = V / s1.v
    mass = Calc("m", m, "kg", "{V} / {v1}", "state.mass",
                {"V": Term("V", V, "m**3"), "v1": Term("v_1", s1.v, "m**3/kg")})
    start_calcs = site_calcs(job) + list(gas_calcs)
    start_calcs.append(Calc("v_1", s1.v, "m**3/kg", "v(P_1, T_1)", gas.eos_method))
    for prop, unit in (("u", "J/kg"), ("h", "J/kg"), ("s", "J/(kg*K)")):
        start_calcs.append(Calc(f"{prop}_1", getattr(s1, prop), unit, f"{prop}(P_1, T_1)", gas.eos_method))
    wall = _wall(job)
    warnings: list[Finding] = _phase_warnings(gas, Finding("label.start"), [s1])
    legs: list[LegResult] = []
    records = [StateRecord(1, "1", s1)]
    s, T_wall = s1, s1.T
    for k, leg in enumerate(job.legs):
        i = k + 1
        try:
            res = run_leg(gas, leg.name, i, s, V, _leg_input(leg), wall, T_wall)
        except PhysicsError as exc:
            f = Finding(exc.code, {**exc.values, "leg": leg.name}, _where(leg, exc.code))
            raise JobError([problem(job, f)]) from None
        legs.append(res)
        warnings += _phase_warnings(gas, Finding("label.leg", {"leg": leg.name}), list(res.path))
        warnings += _cold(gas, res)
        if res.series and "T_wall" in res.series:
            T_wall = res.series["T_wall"][-1]
        s = res.end
        records.append(StateRecord(i + 1, str(i + 1), s))
    return Results(job, gas, "vessel", mass, {}, tuple(records), tuple(legs), tuple(start_calcs), (),
                   tuple(warnings), job_basis(job, gas), software_versions(),
                   extra={"vessel": {"volume": {"value": V, "unit": "m**3"}}},
                   saturation=saturation_near(gas, legs))


def _cold(gas: Gas, res: LegResult) -> list[Finding]:
    out = []
    T_min = res.quantities["T_min"].value
    if T_min < COLD_GAS_K and T_min < res.start.T:      # colder than the leg began (else warned before)
        out.append(Finding("vessel.cold_gas", {"leg": res.name, "T": T_min, "T_limit": COLD_GAS_K}))
    Tw = res.quantities.get("T_wall_min")
    if Tw is not None and Tw.value < COLD_GAS_K and res.series and Tw.value < res.series["T_wall"][0]:
        out.append(Finding("vessel.cold_wall", {"leg": res.name, "T": Tw.value, "T_limit": COLD_GAS_K}))
    return out
