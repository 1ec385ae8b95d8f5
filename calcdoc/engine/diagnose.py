"""Diagnosis of bad input that only the gas model can see: unknown fluids, states outside the equation of
state, and condensation an ideal-gas model would hide.

The engine calls these when a gas or a state cannot be made, to turn a library failure into a finding that
points at the key to fix; :mod:`calcdoc.job.messages` and :mod:`calcdoc.report.words` word them. Nothing here
computes a result.
"""
from __future__ import annotations

from collections.abc import Callable, Sequence

from ..errors import Finding, PhysicsError, Problem
from ..job.messages import problem
from ..job.model import Job
from ..physics.closed import LegResult
from ..physics.fluids import closest_fluids, known_fluid
from ..physics.gas import Gas, RealGas, State

__all__ = ["Z_TOLERANCE", "fluid_problems", "ideal_condensation_warnings", "phase_warnings", "start_state_problem"]

#: Above this departure of the real fluid's compressibility factor from 1, an ideal-gas model is
#: flagged (common practice: a few percent is the usual tolerance of a sizing calculation).
Z_TOLERANCE = 0.02


def fluid_problems(job: Job) -> list[Problem]:
    """A Problem for each fluid or mixture component CoolProp does not know, at its own key."""
    spec = job.gas
    names = [("gas.fluid", spec.fluid)] if spec.fluid else [(f"gas.mixture.{c}", c) for c, _ in spec.mixture]
    out: list[Problem] = []
    for path, nm in names:
        if nm is None or known_fluid(nm):
            continue
        code = "fluid.unknown_component" if path.startswith("gas.mixture") else "fluid.unknown"
        out.append(problem(job, Finding(code, {"name": nm, "close": tuple(closest_fluids(nm))}, path)))
    return out


def start_state_problem(job: Job, gas: Gas, error: PhysicsError) -> Problem:
    """Where the start state falls outside the gas model: the temperature or pressure at fault."""
    P, T = job.start.pressure.si, job.start.temperature.si
    Tmin, Tmax, pmax = (getattr(gas, a, None) for a in ("Tmin", "Tmax", "pmax"))
    if Tmin is not None and T < Tmin * 0.999:
        return problem(job, Finding("start.below_tmin", {"T": T, "fluid": gas.name, "Tmin": Tmin}, "start.temperature"))
    if Tmax is not None and T > Tmax:
        return problem(job, Finding("start.above_tmax", {"T": T, "fluid": gas.name, "Tmax": Tmax}, "start.temperature"))
    if pmax is not None and P > pmax:
        return problem(job, Finding("start.above_pmax", {"P": P, "fluid": gas.name, "pmax": pmax}, "start.pressure"))
    return problem(job, Finding("start.not_computed", {"error": error}, "start"))


def ideal_condensation_warnings(job: Job, gas: Gas, legs: Sequence[LegResult], start: State) -> list[Finding]:
    """Warnings where an ideal-gas model of a named pure fluid passes below that fluid's dew point.

    The ideal-gas model has no liquid, so it would give numbers for a state that is really a liquid
    or a wet vapour: a silent wrong number. The fluid's own equation of state tells where it
    condenses; we warn at the first such state.
    """
    spec = job.gas
    if gas.model != "ideal" or not spec.fluid:
        return []
    try:
        real = RealGas(spec.fluid)
    except PhysicsError:  # the warning is a courtesy; an unknown fluid is reported elsewhere
        return []
    if not real.pure:
        return []
    checks = [(Finding("label.start"), [start])] + [(Finding("label.leg", {"leg": leg.name}), list(leg.path))
                                                     for leg in legs]
    for label, states in checks:
        for s in states:
            dew = real.dew_temperature(s.P)
            if dew is not None and s.T < dew:
                return [Finding("ideal.condenses", {"where": label, "P": s.P, "T": s.T, "fluid": spec.fluid,
                                                    "dew": dew})]
    return _ideal_deviation(real, spec.fluid, checks)


def _ideal_deviation(real: RealGas, fluid: str, checks: list[tuple[Finding, list[State]]]) -> list[Finding]:
    """A warning where the real fluid's Z departs from 1 by more than Z_TOLERANCE at a state of the job."""
    worst = None
    for label, states in checks:
        for s in (states[0], states[-1]):
            try:
                Z = real.state_PT(s.P, s.T).Z
            except PhysicsError:
                continue
            if worst is None or abs(Z - 1) > abs(worst[0] - 1):
                worst = (Z, label, s)
    if worst is None or abs(worst[0] - 1) <= Z_TOLERANCE:
        return []
    Z, label, s = worst
    return [Finding("ideal.z_departs", {"where": label, "fluid": fluid, "Z": Z, "P": s.P, "T": s.T,
                                        "percent": abs(Z - 1) * 100})]


def phase_warnings(dew_temperature: Callable[[float], float | None], label: Finding, states: Sequence[State],
                   near_K: float, what: str) -> list[Finding]:
    """Warnings for states in or near the two-phase region: the first state found liquid or two-phase, else the
    state nearest its saturation (``what`` = "saturation", pure fluid) or dew temperature (``what`` = "dew",
    mixture) when nearer than ``near_K``. ``dew_temperature(P)`` gives that temperature or None."""
    for s in states:
        if s.phase in ("two-phase", "liquid", "supercritical liquid"):
            dew = dew_temperature(s.P)
            return [Finding(f"phase.{what}.in", {"where": label, "phase": s.phase, "P": s.P, "T": s.T,
                                                 "dew": dew if dew is not None else float("nan"),
                                                 "known": dew is not None})]
    closest = None                      # the state nearest the dew line, not the first one near it
    for s in states:
        dew = dew_temperature(s.P)
        if dew is not None and (closest is None or s.T - dew < closest[0]):
            closest = (s.T - dew, s, dew)
    if closest is None:
        return []
    gap, s, dew = closest
    if gap <= 0:
        return [Finding(f"phase.{what}.below", {"where": label, "P": s.P, "T": s.T, "dew": dew})]
    if gap < near_K:
        return [Finding(f"phase.{what}.near", {"where": label, "gap": gap, "dew": dew, "P": s.P})]
    return []
