"""Words of the report for what the engine found: warnings, notes of calcs and facts of legs, each a code
with its values (:class:`calcdoc.errors.Finding`), worded in the job's unit system.

Templates are filled by :func:`calcdoc.units.phrase` (``{P:Pa}``, ``{T:K~4}``, ``{dT:dK}``).
"""
from __future__ import annotations

from collections.abc import Callable

from ..errors import Finding
from ..job.messages import found_text, worded
from ..units import phrase, say as say_si

__all__ = ["EQUATIONS", "FACTS", "NOTES", "STAGING_RULES", "WARNINGS", "equation", "gas_text", "note", "say"]

#: warning code → sentence
WARNINGS: dict[str, str] = {
    "eos.beyond_paper_T": "Gas: state {state} is at T = {T:K~4}, above {Tmax:K~4}, the highest temperature for which "
                          "the reference equation of state of {fluid} ({ref}) was validated by its authors. The "
                          "library evaluates it there, but the values are extrapolated; confirm them by other means "
                          "before relying on them.",
    "eos.beyond_paper_P": "Gas: state {state} is at P = {P:Pa~5}, above {pmax:Pa~5}, the highest pressure for which the "
                          "reference equation of state of {fluid} ({ref}) was validated by its authors. The library "
                          "evaluates it there, but the values are extrapolated; confirm them by other means before "
                          "relying on them.",
    "gas.envelope_failed": "Gas: the phase envelope of the mixture could not be traced ({detail}); mixture states are "
                           "flashed without an imposed phase.",
    "throttle.two_phase_outlet": "Leg '{leg}': the outlet is two-phase at P = {P:Pa~5}, saturation temperature {T:K~4}, "
                                 "vapour quality x = {x:.4g}. Condensation: liquid leaves the throttle; check that what "
                                 "follows accepts it.",
    "ideal.condenses": "{where}: at P = {P:Pa~5} and T = {T:K~4} real {fluid} would condense (its saturation "
                       "temperature there is {dew:K~4}); the ideal-gas model has no liquid and its numbers are not valid "
                       "there. Use model: real.",
    "ideal.z_departs": "{where}: real {fluid} has a compressibility factor Z = {Z:.4g} at P = {P:Pa~5} and T = {T:K~4} "
                       "(CoolProp), so the ideal-gas model is off by about {percent:.2g} % in density there. Consider "
                       "model: real.",
    "vessel.cold_gas": ("Leg '{leg}': the gas temperature falls to {T:K~4}, below {T_limit:K~4} (common practice: "
                        "the usual default minimum design metal temperature of carbon-steel vessels). Cold blowdown "
                        "raises brittle-fracture questions: check the minimum design metal temperature of the vessel "
                        "and its connected piping under the applicable code."),
    "vessel.cold_wall": ("Leg '{leg}': the wall temperature falls to {T:K~4}, below {T_limit:K~4} (common practice: "
                         "the usual default minimum design metal temperature of carbon-steel vessels). Check the "
                         "vessel material's impact-test exemption or rating under the applicable code."),
    "mixture.envelope_fallback": (
        "Gas: the phase envelope of the mixture's Helmholtz-energy model was not traced ({outcome}; its budget is "
        "{budget:.0f} s of processor time). Fallback: {source_text}. Check the phase of every state near the dew "
        "line with a reviewed phase-equilibrium calculation."),
    "mixture.normalised": (
        "Gas: the mixture's fractions ({basis} basis) summed to {total:.6f}; they were divided by that sum so that "
        "they add up to 1."),
    "moist.wet_inlet": (
        "Leg '{leg}': the inlet air is saturated (relative humidity {phi:.3f} at {T:K~4}): droplets reach the "
        "machine. Drain and separate upstream, or warm the inlet above its dew point; wet compression and "
        "expansion are outside this calculation."),
    "moist.supersaturated": (
        "Leg '{leg}': at its end the air is wetter than saturation (relative humidity {phi:.3f} at {T:K~4}, dew "
        "point {T_dew:K~4}); water would condense here, but this leg keeps it as vapour. Check for condensate "
        "and drain it."),
    "flow.two_phase_outlet": (
        "Leg '{leg}': the outlet is two-phase at {P:Pa}, {T:K~4}; vapour fraction (mass basis) {x:.4f}. "
        "Condensation: liquid leaves this leg; check that what follows accepts it and that it is drained."),
}
for _what, _words in (("saturation", "saturation temperature"), ("dew", "dew temperature")):
    WARNINGS[f"phase.{_what}.below"] = ("{where}: the state at P = {P:Pa}, T = {T:K~4} is at or below the " + _words
                                        + " ({dew:K~4} at that pressure): liquid can form.")
    WARNINGS[f"phase.{_what}.near"] = ("{where}: the gas comes within {gap:dK~2} of its " + _words
                                       + " ({dew:K~4} at {P:Pa}); condensation is possible.")
WARNINGS["cylinder.short"] = ("Leg '{leg}': the cylinders pass {mc:kg/s~5}, {pct:.1f} % of the required flow "
                              "{m:kg/s~5}: the machine is too small for the duty.")
WARNINGS["cylinder.no_reversal"] = ("Leg '{leg}': the gas rod load does not reverse during the revolution "
                                    "(compression {Fc:N~4}, tension {Ft:N~4}); without reversal the crosshead pin "
                                    "bearing is not relieved and lubricated. Check with the frame manufacturer.")
#: fact code (a plain statement about a leg) → sentence
FACTS: dict[str, str] = {
    "leg.two_phase_outlet": ("The outlet is two-phase: vapour fraction (mass basis) x = {x:.4f} at {T:K~4}, "
                              "{P:Pa}."),
    "flow.wet_expander_end": ("The outlet is two-phase: vapour fraction (mass basis) x = {x:.4f} at {T:K~4}, "
                              "{P:Pa}. The isentropic efficiency applies to enthalpy differences as usual; no "
                              "single-phase path of constant polytropic efficiency reaches a wet end, so no "
                              "polytropic head or exponent is given."),
    "cylinder.sets_flow": "The cylinders set the flow of the job: ṁ = {m:kg/s~5}, which runs through the rest of "
                          "the train.",
    "cylinder.rod_site": "Gas rod loads at the dead points from the suction and discharge pressures on the piston "
                         "faces, with the site atmosphere ({P:Pa~5}) acting on the rod outside the packing; inertia, "
                         "valve losses and pulsation are not included.",
    "cylinder.rod_standard": "Gas rod loads at the dead points from the suction and discharge pressures on the "
                             "piston faces, with the standard atmosphere at sea level ({P:Pa~5}; the job gives no "
                             "site) acting on the rod outside the packing; inertia, valve losses and pulsation are "
                             "not included.",
    "cylinder.reverses": "The gas rod load reverses every revolution: compression {Fc:N~4}, tension {Ft:N~4}.",
    "cylinder.no_reversal": "The gas rod load does not reverse: compression {Fc:N~4}, tension {Ft:N~4} (a negative "
                            "value: the rod never sees that direction of load).",
    "cylinder.n_e_default": "No re-expansion exponent is given: the gas's isentropic exponent at suction is used, "
                            "n_e = {n:.4f}.",
    "cylinder.loss_default": "No volumetric loss allowance is given: L = 0 (valve and ring leakage are commonly "
                             "allowed for with 3–5 %; common practice).",
    "cylinder.settled": "Interstage pressure settled where the cylinders in series pass the same mass flow: "
                        "{P:Pa~6} (relative tolerance {rtol:.0e}; {evaluations} cylinder-flow evaluations).",
    "closed.n_derived": "n = {n:.6g} derived from the measured end state.",
    "closed.n1_form": "Boundary work by the form that stays accurate for n near 1.",
    "closed.isothermal_real": "Real gas: heat from T·ΔS along the isotherm, work from the first law (P·V is not "
                              "constant for a real gas).",
    "flow.ideal_closed_form": "Ideal gas with constant specific heats: closed-form end temperatures.",
    "flow.real_path": "Real gas: the path of constant polytropic efficiency is integrated with the equation of state "
                      "({flashes} equation-of-state evaluations for this stage).",
    "flow.schultz": "Schultz (1962) method, as used by ASME PTC 10, from the same end states: f = {f:.5f}, "
                    "η_p = {eta:.5f}, which differs from the direct integration by {points:+.3f} points.",
    "throttle.dT": "Throttle: the temperature changes by {dT:+.4g} K (Joule–Thomson effect).",
    "throttle.two_phase": "The outlet is two-phase: vapour quality x = {x:.4f} at the saturation temperature {T:K~4}.",
    "flow.reversible": "Internally reversible steady flow: shaft work in = ∫v·dP along the path; the flow work is "
                       "−∫v·dP.",
    "vessel.integrated": ("Integrated in time with SciPy solve_ivp (DOP853) to a relative tolerance of {rtol:.0e} "
                          "and {atol:.0e} K on temperatures; {n} evaluations of the balance."),
}
#: note code of a calc (which form was used, what a value means) → text
NOTES: dict[str, str] = {
    "moist.W": "humidity ratio: kg of water vapour per kg of dry air",
    "moist.eps": "ε = M_w/M_a = 0.62198 (molar masses of water and dry air)",
    "moist.dew_point": "dew point of the inlet's water vapour at the outlet pressure",
    "moist.saturated_outlet": "the outlet is below the dew point: saturated at the outlet temperature",
    "moist.dry_flow": "flow of dry air",
    "moist.flow_basis": ("flow of dry air: the mass flow given is that of the moist gas, water vapour "
                         "included"),
    "moist.condensate": "condensate drained as liquid water",
    "moist.condensate_total": "total condensate drained by the coolers",
    "moist.no_condensate": "the outlet is above the dew point: no condensate",
    "moist.liquid": "liquid water at the outlet pressure and temperature",
    "moist.duty": "negative: heat removed; includes the latent heat of the condensate and the enthalpy it drains",
    "moist.no_boundary_work": "constant volume: no boundary work",
    "moist.duty_closed": "negative: heat removed; includes the latent heat of the water that condensed",
    "moist.q_per_inlet": "per kg of moist gas entering the leg",
    "moist.receiver_P": "the end pressure of the fixed volume, gas and condensed liquid together",
    "moist.receiver_U": "the internal energy of the gas and of the liquid water at the end, less that at the start",
    "moist.flow_basis_closed": "the mass of the moist air, water vapour included",
    "moist.site_humidity": "relative humidity of the site's air (the start state gives none)",
    "flow.vapour_fraction": "vapour fraction, mass basis: mass of vapour per mass of the two-phase mixture",
    "throttle_wet_mixture": ("T at P_2 with h_2 = h_1 (equation of state, flash with the phase-stability test): the "
                             "outlet is two-phase"),
    "end_target": "end target",
    "from_eos": "from the equation of state",
    "n_equivalent": "equivalent polytropic exponent between the end states",
    "solved_on_path": "solved on the equation of state along P·v^n = const",
    "n1_form": "form accurate for n near 1 (no cancellation)",
    "isentropic": "reversible and adiabatic: entropy constant",
    "isentropic_end": "isentropic end state",
    "polytropic_head": "polytropic head ∫v·dP along the path of constant η_p",
    "adiabatic_machine": "adiabatic machine: no heat exchanged",
    "driver_delivers": "driver delivers",
    "shaft_receives": "shaft receives",
    "measured": "measured",
    "rk_steps": "integrated in ln P with the equation of state: {steps} Runge–Kutta steps",
    "eta_p_secant": "secant iteration on η_p, each trial integrated in ln P ({steps} steps in the last)",
    "schultz_points": "percentage points: the code method (Schultz) against the direct integration",
    "heat_removed": "negative: heat removed from the gas",
    "no_shaft_work": "no shaft work",
    "throttle_h": "adiabatic, no work: enthalpy is conserved",
    "throttle_ideal": "ideal gas: enthalpy depends on temperature only, so the temperature does not change",
    "throttle_ph_flash": "T at P_2 with h_2 = h_1 (equation of state, (h, P) flash)",
    "throttle_eos": "T at P_2 with h_2 = h_1 (equation of state)",
    "throttle_wet": "saturation temperature at P_2: the outlet is two-phase",
    "quality": "vapour quality: mass fraction of vapour in the two-phase outlet",
    "isentropic_work": "= ∫v·dP at constant s",
    "stage_ratio_absolute": "equal stage ratios; each intercooler loses ΔP_ic (solved by bisection)",
    "stage_ratio_fraction": "equal stage ratios; each intercooler loses the fraction δ_ic of its inlet pressure",
    "stage_ratio": "equal stage ratios",
    "cp0_at_start": "ideal-gas heat capacity of the fluid at the start temperature",
    "std_atmosphere": "U.S. Standard Atmosphere 1976, troposphere: P_0 = 101.325 kPa, T_0 = 288.15 K, "
                      "L = −0.0065 K/m, r_0 = 6 356 766 m",
    "entered_as": "entered as {entered}",
    "start_volume_flow": "actual volume flow at the start state",
    "standard_conditions": "reference conditions stated in the job: {P}, {T}",
    "sign_reversed": "{title}: {symbol} with its sign reversed",
    "set_by_cylinder": "set by the cylinders of '{leg}' (no flow is given in the job)",
    "inlet_volume_flow": "inlet volume flow at suction conditions",
    "double_acting": "double acting: head end and crank end compress",
    "single_acting": "single acting: head end only",
    "n_e_default": "isentropic exponent of the gas at suction (no re-expansion exponent given)",
    "rod_compression": "rod in compression at the end of the head-end stroke",
    "rod_tension": "rod in tension at the end of the crank-end stroke",
    "rod_tension_single": "single acting: the crank end holds suction pressure throughout",
    "indicated_ratio": "indicated power of the ideal cycle over the gas power from the efficiency",
    "settled_pressure": "interstage pressure where the cylinders in series pass the same mass flow",
    "given_ratio": "given stage ratio",
    "given_pressure": "given interstage pressure",
    "rest_ratio": "the last stage takes the rest of the ratio",
    "total.comp_power": "total compressor gas power",
    "total.exp_power": "total expander gas power output",
    "total.cooling": "total cooling duty (heat removed from the gas)",
    "total.heating": "total heating duty (heat added to the gas)",
    "total.comp_shaft": "total compressor shaft power",
    "total.exp_shaft": "total expander shaft power output",
    "vessel.choked": "choked (sonic) at the throat at the start of the leg",
    "vessel.subsonic": "subsonic at the start of the leg (pressure ratio above the critical ratio)",
    "vessel.adiabatic": "adiabatic vessel: Q̇ = 0",
    "vessel.isothermal": "isothermal vessel: Q̇ holds the gas temperature constant",
    "vessel.wall": "heat from the wall: Q̇ = h·A·(T_w − T), m_w·c_w·dT_w/dt = −Q̇",
}
FACTS["staging.ratios"] = ("Staged into {stages} stages at the stage ratios the job gives; the last stage takes the "
                           "rest of the ratio up to the end pressure.")
FACTS["staging.pressures"] = ("Staged into {stages} stages at the interstage pressures the job gives; the last stage "
                              "takes the rest of the ratio up to the end pressure.")
FACTS["staging.given"] = ("Staged into {stages} stages with equal pressure ratios (allowing for the intercooler "
                          "pressure drops), as the job asks.")

#: Equations stated in words (an implicit condition rather than a formula): code → text with {placeholders}.
EQUATIONS: dict[str, str] = {
    "~stage_ratio_absolute": "r such that r^{N}·{Pin} − {dP}·(r^({N} − 1) + … + r) = {Pout}",
    "~cycle_area": "area of the ideal P–V loop with {Ps}, {Pd}, {Vs}, {c}, {nc}, {ne} (compression, discharge, "
                   "re-expansion, suction)",
    "~settled": "P such that every cylinder of the series passes the same mass flow",
    "~v_on_path": "v such that T(P_1·(v_1/v)^n, v) = T_2",
    "~T_on_path_compressor": "T at {P2} on the path v·dP = {eta}·dh",
    "~T_on_path_expander": "T at {P2} on the path dh = {eta}·v·dP",
    "~eta_p_compressor": "η_p such that the path v·dP = η_p·dh from state {i} reaches {T2} at {P2}",
    "~eta_p_expander": "η_p such that the path dh = η_p·v·dP from state {i} reaches {T2} at {P2}",
}

#: The rules by which a compressor leg was staged (results file ``staging[].rule``).
STAGING_RULES = {"given": "given number of stages", "ratios": "given stage ratios (the last stage takes the rest)",
                 "pressures": "given interstage pressures (the last stage takes the rest)", "fewest": "fewest stages under the discharge-temperature limit"}


def equation(text: str) -> str:
    """A calc's equation: a formula as it is, or the words of an equation code."""
    return EQUATIONS.get(text, text)


#: Words that depend on their values beyond filling a template: code → (values, system) → text.
SPOKEN: dict[str, Callable[[dict, str], str]] = {}


def _spoken(code: str):
    def register(fn):
        SPOKEN[code] = fn
        return fn
    return register


SPOKEN["phase.saturation.in"] = lambda v, system: _phase_in_text(v, system, "saturation temperature")
SPOKEN["phase.dew.in"] = lambda v, system: _phase_in_text(v, system, "dew temperature")


def _phase_in_text(v: dict, system: str, what: str) -> str:
    extra = f"; the {what} at {say_si(v['P'], 'Pa', system)} is {say_si(v['dew'], 'K', system, 4)}" if v["known"] else ""
    return (f"{found_text(v['where'], system)}: the gas is {v['phase']} at P = {say_si(v['P'], 'Pa', system)}, "
            f"T = {say_si(v['T'], 'K', system, 4)}{extra}. Condensation: results along this path assume phase "
            "equilibrium; check that liquid is acceptable and that the properties used apply.")


@_spoken("pressure.unmarked")
def _unmarked(v: dict, system: str) -> str:
    listed = ", ".join(f"{path} = {entered} (line {line})" for path, entered, line in v["inputs"])
    return (f"Pressures written in psi or kgf/cm2 without a gauge or absolute marker are taken as absolute: {listed}. "
            "If a gauge pressure is meant, write psig (with the site atmosphere); write psia to make it explicit.")


@_spoken("staging.fewest")
def _fewest(v: dict, system: str) -> str:
    steps = "; ".join(f"{n} stage{'s' if n > 1 else ''}: " + (
        "rejected, a discharge state lies outside the range of the equation of state" if T is None else
        f"highest discharge {say_si(T, 'K', system, 4)} ({'within' if T <= v['limit'] else 'above'} the limit)")
        for n, T in v["trials"])
    return (f"Fewest stages that keep every discharge temperature at or below {v['entered']}: {v['stages']}. "
            f"Trials with equal stage ratios: {steps}.")


@_spoken("total.partial")
def _partial(v: dict, system: str) -> str:
    return (f"{NOTES[v['total']]} — partial: no mechanical efficiency for {', '.join(v['missing'])}, not included")

#: how each envelope fallback is named in a warning
_ENVELOPE_SOURCES = {
    "pr": ("the envelope of the Peng–Robinson cubic equation of state was traced instead and used only to tell "
           "where a state is single-phase, with {margin:.0f} K of room on the gas side; states closer to its dew "
           "line were flashed with the phase-stability test of the Helmholtz-energy model; no envelope is drawn on "
           "the charts"),
    "none": ("no envelope could be traced (the Peng–Robinson one failed too); every state was flashed with the "
             "phase-stability test of the Helmholtz-energy model and no envelope is drawn"),
}


def say(item: Finding | str, system: str = "SI") -> str:
    """A warning or a fact in words (text passes through as it is)."""
    if isinstance(item, str):
        return item
    if item.code in SPOKEN:
        return SPOKEN[item.code](item.values, system)
    template = WARNINGS.get(item.code) or FACTS.get(item.code)
    if template is None:
        return found_text(item, system)
    values = worded(item.values, system)
    if item.code == "mixture.envelope_fallback":
        values["source_text"] = _ENVELOPE_SOURCES[values["source"]].format(margin=values.get("margin", 0.0))
    return phrase(template, values, system)


def gas_text(gas) -> str:
    """The gas model in words: "Nitrogen, real gas (Helmholtz equation of state, CoolProp HEOS)"."""
    if gas.model == "ideal":
        return f"{gas.name} as an ideal gas, k = {gas.k:.5g}, M = {phrase('{M:kg/mol~5}', {'M': gas.M})}"
    return f"{gas.name}, real gas (Helmholtz equation of state, CoolProp HEOS)"


def note(item: Finding | str, system: str = "SI") -> str:
    """The text of a calc's note: a code of :data:`NOTES` (or a finding with values), or text as it is."""
    if isinstance(item, Finding):
        if item.code in SPOKEN:
            return SPOKEN[item.code](item.values, system)
        return phrase(NOTES.get(item.code, item.code), worded(item.values, system), system)
    return NOTES.get(item, item)
