"""Problems of the job file that only computing shows, in words: the engine and the physics report them as
codes with values (:class:`calcdoc.errors.Finding`, :class:`calcdoc.errors.PhysicsError`); this module words
them in the job's units and locates them at the key they concern (file:line:column).

Each entry is (what was found, what would be valid), templates filled by :func:`calcdoc.units.phrase`:
``{P:Pa}`` is a pressure shown in the job's units, ``{T:K~4}`` a temperature to four figures, ``{dT:dK}`` a
temperature difference; a value that is itself a finding is worded first.
"""
from __future__ import annotations

from collections.abc import Callable, Iterable
from typing import Any

from ..errors import Finding, PhysicsError, Problem
from ..units import Units, phrase, say
from .model import Input, Job

__all__ = ["MESSAGES", "SPOKEN", "found_text", "problem", "valid_text", "worded"]

#: code → (found, valid)
MESSAGES: dict[str, tuple[str, str]] = {
    # -- the gas model (physics) ------------------------------------------------------------------------------
    "gas.k_range": ("heat capacity ratio k = {k} is outside (1, 5/3]", ""),
    "gas.unknown_fluid": ("CoolProp does not know the fluid '{fluid}' ({detail})", ""),
    "state.unphysical": ("the state with P = {P:Pa~6}, T = {T:K~6} is not physical", ""),
    "eos.range": ("the state with {state} (T = {T:K~6}, P = {P:Pa~6}) is outside the range of the equation of state "
                  "({Tmin:K~5} to {Tmax:K~5}, up to {pmax:Pa~4})", ""),
    "eos.below_triple_pressure": ("the state with {state} lies below the triple-point pressure of {fluid} ({P_tr:Pa~5}), "
                                  "where an expanding fluid would form solid; the equation of state covers gas and "
                                  "liquid only", ""),
    "eos.below_triple_temperature": ("the temperature {T:K~6} is below the triple point of {fluid} ({T_tr:K~5}); the "
                                     "equation of state covers gas and liquid only", ""),
    "eos.no_state": ("the equation of state cannot give the state with {state} ({detail})", ""),
    "eos.mixture_Pv": ("no single-phase state of this mixture has {state} (the temperature iteration did not converge; "
                       "the state may be inside the phase envelope)", ""),
    # -- closed-system legs ----------------------------------------------------------------------------------
    "path.no_target": ("no state on this path reaches the end target ({target})", ""),
    "leg.target_not_reachable": ("a {process} leg cannot reach an end {target} target (the {target} stays constant); "
                                 "give one of: {allowed}", ""),
    "leg.one_target": ("a {process} leg takes one end target; give one of: {allowed}", ""),
    "polytropic.measured_same_end": ("the measured end state has the start pressure or volume, so no polytropic "
                                     "exponent joins the two states; use an isobaric or isochoric leg", ""),
    "polytropic.n0_pressure": ("with n = 0 the pressure stays constant, so an end pressure cannot be reached", ""),
    "polytropic.n1_temperature": ("with n = 1 an ideal gas keeps its temperature, so an end temperature cannot be "
                                  "reached", ""),
    # -- steady-flow legs -------------------------------------------------------------------------------------
    "two_phase.enters": ("{what} enters the two-phase region at P = {P:Pa~6} (saturation temperature {T_sat:K~4} at "
                         "that pressure)", ""),
    "what.path": ("the path", ""),
    "what.isothermal_path": ("the isothermal path", ""),
    "what.state": ("the state with {state}", ""),
    "eos.no_single_phase": ("no single-phase state at P = {P:Pa~6} gives {state}", ""),
    "eos.not_converged": ("the state at P = {P:Pa~6} with {state} did not converge", ""),
    "eos.path_state": ("the equation of state cannot compute the state at P = {P:Pa~6}, T = {T:K~5} (two-phase or "
                       "unconverged states are not supported on this path)", ""),
    "eos.path_state_near_dew": ("the equation of state cannot compute the state at P = {P:Pa~6}, T = {T:K~5}; the dew "
                                "temperature at this pressure is {dew:K~4} (two-phase or unconverged states are not "
                                "supported on this path)", ""),
    "path.steps_exhausted": ("the polytropic path did not reach its end pressure in {steps} steps", ""),
    "machine.wet_inlet": ("the {process} inlet is {phase} (P = {P:Pa~5}, T = {T:K~4}): a gas machine stage needs gas at "
                          "its inlet, and liquid or wet compression and expansion are outside this model; raise the "
                          "inlet temperature or lower its pressure", ""),
    "measured.compressor_below_isentropic": (
        "the measured end temperature {T2:K~4} is below the isentropic end temperature T2s = {T2s:K~4} at {P2:Pa~6}: "
        "it would need an efficiency above 1",
        "a compressor's end temperature T2 must be above the isentropic T2s = {T2s:K~4}; check the measured "
        "temperature and the end pressure"),
    "measured.expander_below_isentropic": (
        "the measured end temperature {T2:K~4} is below the isentropic end temperature (T2s = {T2s:K~4} at "
        "{P2:Pa~6}, T1 = {T1:K~4}): no efficiency from 0 to 1 gives it",
        "an expander's end temperature lies in T2s ≤ T2 ≤ T1, from {T2s:K~4} to below {T1:K~4}; check the measured "
        "temperature and the end pressure"),
    "measured.expander_above_inlet": (
        "the measured end temperature {T2:K~4} is at or above the inlet temperature (T2s = {T2s:K~4} at {P2:Pa~6}, "
        "T1 = {T1:K~4}): no efficiency from 0 to 1 gives it",
        "an expander's end temperature lies in T2s ≤ T2 ≤ T1, from {T2s:K~4} to below {T1:K~4}; check the measured "
        "temperature and the end pressure"),
    "measured.eta_p_not_converged": ("the polytropic efficiency of the measured end state did not converge", ""),
    "measured.no_eta_p_compressor": ("no polytropic efficiency up to 1 reaches the end state (T = {T:K~6}): the end "
                                     "temperature is at or below the isentropic one", ""),
    "measured.no_eta_p_expander": ("no polytropic efficiency up to 1 reaches the end state (T = {T:K~6}): the end "
                                   "temperature is outside T2s ≤ T2 ≤ T1 (isentropic end to inlet)", ""),
    "staging.no_ratio": ("no stage ratio reaches the discharge pressure", ""),
    # -- problems of the job file found while computing -------------------------------------------------------
    "start.not_computed": ("the start state cannot be computed: {error}",
                           "check the start pressure and temperature against the fluid's range"),
    "start.standard_not_computed": ("the standard reference state cannot be computed: {error}",
                                    "check standard_pressure and standard_temperature"),
    "leg.two_phase": ("leg '{leg}' ({process}): {error}",
                      "this leg kind is computed for a single phase only: end it above the saturation pressure, start "
                      "it warmer, or use a throttle (which gives a two-phase outlet); an expander given an isentropic "
                      "efficiency may end two-phase"),
    "leg.measured": ("leg '{leg}': {error}", "=error"),
    "leg.flow_failed": ("leg '{leg}': {error}",
                        "check the end target, the efficiency and the gas against the start of this leg"),
    "leg.closed_failed": ("leg '{leg}': {error}", "check the end target and the process against the start of this leg"),
    "leg.overflow": ("leg '{leg}': the path P·Vⁿ = const with these values gives numbers beyond floating-point range",
                     "use a physical exponent (for a fixed volume use process: isochoric)"),
    "cylinder.no_gas": ("the cylinder of '{leg}' passes no gas: at the pressure ratio {r:.4g} the clearance gas "
                        "re-expands over the whole stroke (volumetric efficiency {eta:.4g})",
                        "give a smaller clearance, or a lower pressure ratio for this stage (more stages)"),
    "cylinder.no_balance": ("the cylinders in series from '{leg}' pass no common mass flow between their end "
                            "pressures ({error})",
                            "check the cylinder sizes against the end pressure: each cylinder must be able to pass "
                            "what the one before it delivers"),
    "cylinder.no_common_flow": ("no pressure up to {P:Pa~6} lets the cylinders pass one flow", ""),
    "cylinder.series_ratio": ("the last stage '{leg}' of a series of reciprocating stages gives a pressure ratio, but "
                              "its suction pressure is settled by the cylinders",
                              "give the end pressure of the series, for example end: {{pressure: 25 bara}}"),
    "staging.no_trial": ("no staging trial could be computed", ""),
    "staging.rest_ratio": ("the given ratios or interstage pressures reach {P:Pa~6}, which leaves the last stage "
                           "no compression up to the end pressure {P_out:Pa~6}",
                           "give ratios or interstage pressures that stay below the end pressure"),
    "drop.too_large": ("the pressure drop {entered} is larger than the inlet pressure ({P:Pa~6})",
                       "give a drop smaller than the inlet pressure"),
    "intercooler.above_discharge": ("the intercooler outlet {entered} is above the discharge temperature of stage {k} "
                                    "({T:K~4})", "give an intercooler outlet below the stage discharge temperature"),
    "staging.no_stage_count": ("no number of stages up to {max_stages} keeps every discharge at or below {entered} "
                               "({max_stages} stages give {T:K~4})",
                               "raise max_stages, lower the intercooler outlet temperature, or review the limit"),
    "start.below_tmin": ("{T:K~6} is below the lowest temperature of the equation of state for {fluid} ({Tmin:K~5})",
                         "check the start temperature and its unit; the gas would be solid or far off its model"),
    "start.above_tmax": ("{T:K~6} is above the highest temperature of the equation of state for {fluid} ({Tmax:K~5})",
                         "check the start temperature and its unit (K against degC)"),
    "start.above_pmax": ("{P:Pa~6} is above the highest pressure of the equation of state for {fluid} ({pmax:Pa~5})",
                         "check the start pressure and its unit"),
    "label.start": ("Start state", ""),
    "label.leg": ("Leg '{leg}'", ""),
    # -- limits judged against the results ------------------------------------------------------------------
    "limit.no_total": ("this job has no {title}", "name a quantity this job computes"),
    "limit.wrong_process": ("'{leg}' is a {process} leg", "{applies}; name such a leg"),
    "limit.state_lacks": ("state {label} has no {quantity}", "name another quantity"),
    # vessels that fill and empty over time (calcdoc.physics.vessel)
    "vessel.end_reached": ("leg '{leg}': the vessel is at {P:Pa} at the start of this {process} leg, already at or "
                           "past its end pressure of {P_end:Pa}",
                           "give an end pressure the {process} moves towards, or end the leg at a duration"),
    "vessel.end_unreachable": ("leg '{leg}': the end pressure of {P_end:Pa} cannot be reached: the flow stops at "
                               "{P_limit:Pa} (the back pressure of a discharge, the supply pressure of a fill)",
                               "give an end pressure short of {P_limit:Pa}, or end the leg at a duration"),
    "vessel.no_flow": ("leg '{leg}': no gas flows at the start of this {process} leg (vessel at {P:Pa}, the other "
                       "side of the orifice at {P_other:Pa})",
                       "a discharge needs a back pressure below the vessel pressure, a fill a supply pressure above it"),
    "vessel.too_long": ("leg '{leg}': the vessel has not reached {P_end:Pa} after {t:.6g} s (it is at {P:Pa}); it "
                        "approaches the back or supply pressure too slowly",
                        "give an end pressure further from the back or supply pressure, or end the leg at a duration"),
    "vessel.budget": ("leg '{leg}': the time integration needed more than {evaluations} evaluations and was "
                      "stopped", "end the leg sooner, or check the orifice size and the end target"),
    "vessel.integration": ("leg '{leg}': the time integration failed ({reason})",
                           "check the orifice size and the end target"),
    "vessel.no_wall": ("leg '{leg}': heat: wall needs the vessel's wall", "add vessel.wall"),
    "vessel.mixture": ("leg '{leg}': a vessel of the real-gas mixture {gas} cannot be computed over time (each "
                       "step needs many mixture flashes, which are slow and may not converge)",
                       "use model: ideal for the mixture (with k and molar_mass), or a pure fluid"),
    "vessel.empty": ("leg '{leg}': the vessel empties completely at t = {t:.6g} s",
                     "end the leg at a pressure above the back pressure"),
    "moist.not_air": ("{key} is given for {fluid}", "humidity applies to moist air: set gas: {{fluid: Air}} (the "
                                                    "dry air; water is tracked separately), or remove {key}"),
    "moist.closed_process": ("leg '{leg}' ({process}) on moist air in a closed system",
                             "moist air in a closed system is computed for a receiver: process: isochoric with "
                             "end: {{temperature: ...}}; other closed processes are for dry gas in this version"),
    "moist.ice": ("the end temperature {T:K~4} is below 0.01 °C with water condensing (dew point {T_dew:K~4}): "
                  "it would freeze", "give an end temperature of at least 0.01 °C; ice is outside this model"),
    "moist.receiver_pressure": ("the pressure of the receiver at its end temperature did not converge",
                                "check the end temperature against the start state"),
    "moist.saturation_range": ("the air temperature {T:K~4} is outside the saturation range of liquid water used "
                               "for moist air (0.01 °C to the critical point; below it water would freeze)",
                               "give a start temperature and dew point of at least 0.01 °C"),
    "moist.supersaturated_start": ("the start state holds more water than saturated air can at {T:K~4} and {P:Pa}",
                                   "give a humidity at or below saturation (relative humidity up to 100 %)"),
    "moist.dew_above_T": ("the dew point {T_dew:K~4} is above the start temperature {T:K~4}",
                          "give a dew point at or below the start temperature"),
    "eos.wet_not_computed": ("the state at P = {P:Pa~6} with {state} could not be computed", ""),
    "eos.wet_not_found": ("no state at P = {P:Pa~6} with {state} was found near {T:K~5}", ""),
    "eos.wet_not_converged": ("the state at P = {P:Pa~6} with {state} did not converge in {n} flashes", ""),
}

_Speaker = Callable[[dict[str, Any], Units], tuple[str, str]]

#: Messages whose words depend on their values beyond filling a template: code → (values, system) → (found, valid).
SPOKEN: dict[str, Callable[[dict[str, Any], Units], tuple[str, str]]] = {}


def _spoken(code: str) -> Callable[[_Speaker], _Speaker]:
    def register(fn: _Speaker) -> _Speaker:
        SPOKEN[code] = fn
        return fn
    return register


def _names(items: Iterable[str]) -> str:
    return ", ".join(repr(n) for n in items)


_COMMON_FLUIDS = "use a CoolProp fluid name such as Nitrogen, Air, CarbonDioxide, Methane, Hydrogen"


@_spoken("fluid.unknown")
def _unknown_fluid(v: dict[str, Any], system: Units) -> tuple[str, str]:
    hint = f"did you mean {' or '.join(repr(c) for c in v['close'])}? " if v["close"] else ""
    return f"'{v['name']}' is not a fluid the equation-of-state library (CoolProp) knows", hint + _COMMON_FLUIDS


@_spoken("fluid.mixture_string")
def _mixture_string(v: dict[str, Any], system: Units) -> tuple[str, str]:
    return (f"'{v['name']}' is a mixture or library string, not a fluid name",
            "name one fluid (fluid: Nitrogen), or give the components with their mole fractions: "
            "mixture: {Nitrogen: 0.78, Oxygen: 0.21, Argon: 0.01}")


@_spoken("fluid.unknown_component")
def _unknown_component(v: dict[str, Any], system: Units) -> tuple[str, str]:
    hint = f"did you mean {' or '.join(repr(c) for c in v['close'])}? " if v["close"] else ""
    return (f"'{v['name']}' is not a mixture component the equation-of-state library (CoolProp) knows",
            hint + _COMMON_FLUIDS)


@_spoken("gas.not_made")
def _gas_not_made(v: dict[str, Any], system: Units) -> tuple[str, str]:
    hint = f"did you mean {' or '.join(repr(c) for c in v['close'])}? " if v["close"] else ""
    return found_text(v["error"], system), hint + _COMMON_FLUIDS


@_spoken("limit.partial_total")
def _partial_total(v: dict[str, Any], system: Units) -> tuple[str, str]:
    return (f"the {v['title']} is partial (no mechanical efficiency for {', '.join(v['missing'])}, not included)",
            "give every machine a mechanical_efficiency, or limit each leg's shaft_power")


@_spoken("limit.no_leg_on")
def _no_leg_on(v: dict[str, Any], system: Units) -> tuple[str, str]:
    return (f"no leg of this job has {v['quantity']} (it applies to {' and '.join(p + ' legs' for p in v['on'])})",
            f"legs and their processes: {'; '.join(f'{n}: {p}' for n, p in v['legs'])}")


@_spoken("limit.no_leg")
def _no_leg(v: dict[str, Any], system: Units) -> tuple[str, str]:
    legs = "; ".join(f"{n}: {', '.join(q) or 'none'}" for n, q in v["legs"]) or "no legs"
    return f"no leg of this job has {v['quantity']}", f"legs and their quantities: {legs}"


@_spoken("limit.leg_lacks")
def _leg_lacks(v: dict[str, Any], system: Units) -> tuple[str, str]:
    return (f"leg '{v['leg']}' ({v['process']}) has no {v['quantity']}",
            f"its quantities are: {', '.join(v['quantities']) or 'none'}; name a leg that has {v['quantity']}")


@_spoken("limit.leg_quantity_at_state")
def _leg_quantity_at_state(v: dict[str, Any], system: Units) -> tuple[str, str]:
    return (f"{v['quantity']} is a quantity of a leg, but '{v['label']}' is a state label",
            f"name a leg: {_names(v['legs'])}")


@_spoken("limit.no_place")
def _no_place(v: dict[str, Any], system: Units) -> tuple[str, str]:
    return (f"this job has no leg or state named '{v['name']}' that has {v['quantity']}",
            f"legs: {_names(v['legs'])}; states: {', '.join(v['states'])}")


@_spoken("limit.negative")
def _negative(v: dict[str, Any], system: Units) -> tuple[str, str]:
    conv = ("work done BY the gas and heat added TO the gas are positive" if v["closed"] else
            "shaft work and heat INTO the gas are positive")
    entered = f" {v['bound']} {v['entered']}" if v["bound"] else ""
    found = (f"the limit '{v['limit']}' ({v['quantity']}{entered}) meets a negative value at {v['where']} "
             f"({v['value']:.6g} {v['unit']}): it is negative by the sign convention ({conv}), so a limit on it "
             "does not mean what it says")
    valid = (f"use quantity: {v['instead']} ({v['instead_title']}, positive there)" if v["instead"] else
             "name a quantity that is positive at every place the limit applies to")
    if v["everywhere"] and v["instead"]:
        valid += ", or name with 'at' the places where the value is positive"
    return found, valid

#: The unit of each property a state is given by, for "the state with P = …, T = …".
_STATE_UNITS = {"P": "Pa", "T": "K", "v": "m**3/kg", "s": "J/(kg*K)", "h": "J/kg", "u": "J/kg", "rho": "kg/m**3"}


def found_text(f: Finding | PhysicsError, system: Units = "SI") -> str:
    """What a finding (or a physics error) says, in the unit system."""
    if isinstance(f, PhysicsError):
        f = f.finding
    if f.code in SPOKEN:
        return SPOKEN[f.code](f.values, system)[0]
    found, _ = MESSAGES.get(f.code, (f.code, ""))
    return phrase(found, worded(f.values, system), system)


def valid_text(f: Finding | PhysicsError, system: Units = "SI") -> str:
    """What would be valid instead, in the unit system (``"=error"``: what is valid for the nested error)."""
    if isinstance(f, PhysicsError):
        f = f.finding
    if f.code in SPOKEN:
        return SPOKEN[f.code](f.values, system)[1]
    _, valid = MESSAGES.get(f.code, ("", ""))
    if valid == "=error":
        return valid_text(f.values["error"], system)
    return phrase(valid, worded(f.values, system), system)


def worded(values: dict[str, Any], system: Units) -> dict[str, Any]:
    """The values of a finding ready for a template: nested findings and states put in words."""
    return {k: _value(v, system) for k, v in values.items()}


def _value(v: Any, system: Units) -> Any:
    if isinstance(v, (Finding, PhysicsError)):
        return found_text(v, system)
    if isinstance(v, dict):   # the properties a state is given by: "P = 101.3 kPa, T = 25 °C"
        return ", ".join(f"{k} = {say(x, _STATE_UNITS.get(k, ''), system, 6)}" for k, x in v.items())
    return v


def problem(job: Job, f: Finding, at: Input | None = None, where: tuple[int, int] | None = None) -> Problem:
    """A finding as a problem of the job file, at the key it concerns (or at the input ``at``, or at the line and
    column ``where``)."""
    if at is not None:
        return Problem(job.name, at.line, at.col, at.path, found_text(f, job.units), valid_text(f, job.units))
    line, col = where if where is not None else job.locate(f.path)
    return Problem(job.name, line, col, f.path, found_text(f, job.units), valid_text(f, job.units))
