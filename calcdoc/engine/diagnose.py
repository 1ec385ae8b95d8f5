"""Diagnosis of bad input that only the gas model can see: unknown fluids, states outside the
equation of state, and condensation an ideal-gas model would hide.

The engine calls these when a gas or a state cannot be made, to turn a library message into a
Problem that points at the key to fix, in the trade's words. Nothing here computes a result.
"""
from __future__ import annotations

from ..errors import PhysicsError, Problem
from ..physics.fluids import COMMON_FLUIDS, closest_fluids, known_fluid
from ..physics.gas import RealGas
from ..units import say

__all__ = ["fluid_problems", "start_state_problem", "ideal_condensation_warnings", "phase_warnings"]

def fluid_problems(job) -> list[Problem]:
    """A Problem for each fluid or mixture component CoolProp does not know, at its own key."""
    spec = job.gas
    names = [("gas.fluid", spec.fluid)] if spec.fluid else [(f"gas.mixture.{c}", c) for c, _ in spec.mixture]
    out: list[Problem] = []
    for path, nm in names:
        if known_fluid(nm):
            continue
        close = closest_fluids(nm)
        hint = f"did you mean {' or '.join(repr(c) for c in close)}? " if close else ""
        what = "mixture component" if path.startswith("gas.mixture") else "fluid"
        out.append(job.problem(path, f"'{nm}' is not a {what} the equation-of-state library (CoolProp) knows",
                               hint + COMMON_FLUIDS))
    return out


def start_state_problem(job, gas, message: str) -> Problem:
    """Where the start state falls outside the gas model: the temperature or pressure at fault."""
    P, T = job.start.pressure.si, job.start.temperature.si
    Tmin, Tmax, pmax = (getattr(gas, a, None) for a in ("Tmin", "Tmax", "pmax"))
    if Tmin is not None and T < Tmin * 0.999:
        return job.problem("start.temperature", f"{T:.6g} K ({T - 273.15:.6g} °C) is below the lowest temperature of "
                           f"the equation of state for {gas.name} ({Tmin:.5g} K)",
                           "check the start temperature and its unit; the gas would be solid or far off its model")
    if Tmax is not None and T > Tmax:
        return job.problem("start.temperature", f"{T:.6g} K ({T - 273.15:.6g} °C) is above the highest temperature "
                           f"of the equation of state for {gas.name} ({Tmax:.5g} K)",
                           "check the start temperature and its unit (K against degC)")
    if pmax is not None and P > pmax:
        return job.problem("start.pressure", f"{P / 1e5:.6g} bar absolute is above the highest pressure of the "
                           f"equation of state for {gas.name} ({pmax / 1e5:.5g} bar)",
                           "check the start pressure and its unit")
    return job.problem("start", f"the start state cannot be computed: {message}",
                       "check the start pressure and temperature against the fluid's range")


def ideal_condensation_warnings(job, gas, legs, start) -> list[str]:
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
    checks = [("Start state", [start])] + [(f"Leg '{leg.name}'", list(leg.path)) for leg in legs]
    for label, states in checks:
        for s in states:
            dew = real.dew_temperature(s.P)
            if dew is not None and s.T < dew:
                return [f"{label}: at P = {s.P / 1e3:.5g} kPa and T = {s.T - 273.15:.4g} °C real {spec.fluid} would "
                        f"condense (its saturation temperature there is {dew - 273.15:.4g} °C); the ideal-gas model "
                        "has no liquid and its numbers are not valid there. Use model: real."]
    return _ideal_deviation(real, spec.fluid, checks)


#: Above this departure of the real fluid's compressibility factor from 1, an ideal-gas model is
#: flagged (common practice: a few percent is the usual tolerance of a sizing calculation).
Z_TOLERANCE = 0.02


def _ideal_deviation(real, fluid: str, checks) -> list[str]:
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
    return [f"{label}: real {fluid} has a compressibility factor Z = {Z:.4g} at P = {s.P / 1e3:.5g} kPa and "
            f"T = {s.T - 273.15:.4g} °C (CoolProp), so the ideal-gas model is off by about {abs(Z - 1) * 100:.2g} % "
            "in density there. Consider model: real."]


def phase_warnings(dew_temperature, label: str, states, system: str, near_K: float, what: str) -> list[str]:
    """Warnings for states in or near the two-phase region, in the job's units: the first state found liquid or
    two-phase, else the state nearest its ``what`` ("saturation temperature" of a pure fluid, "dew temperature"
    of a mixture) when nearer than ``near_K``. ``dew_temperature(P)`` gives that temperature or None."""
    for s in states:
        if s.phase in ("two-phase", "liquid", "supercritical liquid"):
            dew = dew_temperature(s.P)
            extra = f"; the {what} at {say(s.P, 'Pa', system)} is {say(dew, 'K', system, 4)}" if dew else ""
            return [f"{label}: the gas is {s.phase} at P = {say(s.P, 'Pa', system)}, T = {say(s.T, 'K', system, 4)}"
                    f"{extra}. Condensation: results along this path assume phase equilibrium; check that liquid is "
                    "acceptable and that the properties used apply."]
    closest = None                      # the state nearest the dew line, not the first one near it
    for s in states:
        dew = dew_temperature(s.P)
        if dew is not None and (closest is None or s.T - dew < closest[0]):
            closest = (s.T - dew, s, dew)
    if closest is None:
        return []
    gap, s, dew = closest
    if gap <= 0:
        return [f"{label}: the state at P = {say(s.P, 'Pa', system)}, T = {say(s.T, 'K', system, 4)} is at or below "
                f"the {what} ({say(dew, 'K', system, 4)} at that pressure): liquid can form."]
    if gap < near_K:
        return [f"{label}: the gas comes within {say(gap, 'K', system, 2, difference=True)} of its {what} "
                f"({say(dew, 'K', system, 4)} at {say(s.P, 'Pa', system)}); condensation is possible."]
    return []
