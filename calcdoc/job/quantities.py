"""The quantities a limit, a sweep or a solve can name: one table, shared by all three.

A quantity is a property of a state, a quantity of a leg, a ratio of a leg or a total over a train, with
the kind of its unit (a key of :data:`calcdoc.units.DIMENSIONS`) and the systems it exists in.
"""
from __future__ import annotations

from dataclasses import dataclass

from .. import units

__all__ = ["ALIASES", "PERCENT_MARGIN", "QUANTITIES", "REVERSIBLE", "SIGNED", "Quantity", "applies", "applies_text",
           "margin_example", "percent_margin", "place_text", "quantity_named", "quantity_problem", "series_name"]

BOTH = ("closed", "flow", "vessel")     # state properties and leg ratios exist in every system


@dataclass(frozen=True)
class Quantity:
    """A quantity a limit (or a sweep) can name.

    scope: ``state`` (a property of a state: at a state label, or at a leg's end state), ``record``
    (an extensive value kept beside the state: volume, volume flow), ``leg`` (a quantity of a leg),
    ``ratio`` (end over start of a leg, of the state attribute ``attr``), ``change`` (end minus start of
    a leg, of the record attribute ``attr``) or ``end`` (a state property at a leg's end only, e.g.
    discharge temperature).
    """

    name: str
    kind: str                 # key of units.DIMENSIONS
    scope: str
    attr: str
    systems: tuple[str, ...] = BOTH
    symbol: str = ""
    title: str = ""
    sign: float = 1.0             # −1: the leg quantity ``attr`` with its sign reversed (the trade's sense)
    on: tuple[str, ...] = ()      # processes where it exists by default (no ``at``); () = every leg

    @property
    def unit(self) -> str:
        """The SI unit of the quantity."""
        return units.DIMENSIONS[self.kind]

    @property
    def margin_kind(self) -> str:
        """The kind of quantity a margin on it is (a difference for temperatures and pressures)."""
        return {"temperature": "temperature_difference", "pressure": "pressure_difference"}.get(self.kind, self.kind)


def _q(name: str, kind: str, scope: str, attr: str, systems: tuple[str, ...] = BOTH, symbol: str = "", title: str = "",
       sign: float = 1.0, on: tuple[str, ...] = ()) -> Quantity:
    return Quantity(name, kind, scope, attr, systems, symbol or attr, title or name.replace("_", " "), sign, on)


QUANTITIES: dict[str, Quantity] = {q.name: q for q in (
    _q("pressure", "pressure", "state", "P"),
    _q("temperature", "temperature", "state", "T"),
    _q("specific_volume", "specific_volume", "state", "v"),
    _q("density", "density", "state", "rho", symbol="ρ"),
    _q("internal_energy", "specific_energy", "state", "u", title="specific internal energy"),
    _q("enthalpy", "specific_energy", "state", "h", title="specific enthalpy"),
    _q("entropy", "specific_entropy", "state", "s", title="specific entropy"),
    _q("Z", "dimensionless", "state", "Z", title="compressibility factor"),
    _q("volume", "volume", "record", "V", ("closed",)),
    _q("volume_flow", "volume_flow", "record", "V_dot", ("flow",), symbol="V̇", title="actual volume flow"),
    _q("discharge_temperature", "temperature", "end", "T"),
    _q("pressure_ratio", "dimensionless", "ratio", "P", symbol="r_p"),
    _q("volume_ratio", "dimensionless", "ratio", "v", symbol="r_v"),
    _q("n", "dimensionless", "leg", "n", title="polytropic exponent"),
    _q("W_by_gas", "energy", "leg", "W_by_gas", ("closed",), symbol="W", title="work done by the gas"),
    _q("Q_to_gas", "energy", "leg", "Q_to_gas", ("closed", "vessel"), symbol="Q", title="heat added to the gas"),
    _q("work_on_gas", "energy", "leg", "W_by_gas", ("closed",), symbol="W_on", title="work done on the gas",
       sign=-1.0),
    _q("heat_from_gas", "energy", "leg", "Q_to_gas", ("closed", "vessel"), symbol="Q_out",
       title="heat removed from the gas",
       sign=-1.0),
    _q("dU", "energy", "leg", "dU", ("closed",), symbol="ΔU", title="change of internal energy"),
    _q("dH", "energy", "leg", "dH", ("closed",), symbol="ΔH", title="change of enthalpy"),
    _q("dS", "entropy", "leg", "dS", ("closed",), symbol="ΔS", title="change of entropy"),
    _q("volume_change", "volume", "change", "V", ("closed",), symbol="ΔV", title="volume change"),
    # vessels that fill and empty over time
    _q("duration", "time", "leg", "duration", ("vessel",), symbol="t"),
    _q("min_temperature", "temperature", "leg", "T_min", ("vessel",), symbol="T_min",
       title="minimum gas temperature"),
    _q("max_temperature", "temperature", "leg", "T_max", ("vessel",), symbol="T_max",
       title="maximum gas temperature"),
    _q("min_wall_temperature", "temperature", "leg", "T_wall_min", ("vessel",), symbol="T_w,min",
       title="minimum wall temperature"),
    _q("max_wall_temperature", "temperature", "leg", "T_wall_max", ("vessel",), symbol="T_w,max",
       title="maximum wall temperature"),
    _q("mass_change", "mass", "leg", "mass_change", ("vessel",), symbol="Δm", title="change of the mass in the vessel"),
    _q("work_in", "specific_energy", "leg", "work_in", ("flow",), symbol="w_in", title="specific work input"),
    _q("head", "specific_energy", "leg", "head", ("flow",)),
    _q("head_isentropic", "specific_energy", "leg", "head_isentropic", ("flow",), title="isentropic head"),
    _q("eta_p", "dimensionless", "leg", "eta_p", ("flow",), symbol="η_p", title="polytropic efficiency"),
    _q("eta_s", "dimensionless", "leg", "eta_s", ("flow",), symbol="η_s", title="isentropic efficiency"),
    _q("duty", "power", "leg", "duty", ("flow",), symbol="Q̇"),
    _q("power", "power", "leg", "power", ("flow",), symbol="P_gas", title="gas power"),
    _q("shaft_power", "power", "leg", "shaft_power", ("flow",), symbol="P_shaft", title="shaft power"),
    # the same in the trade's sense: heat removed by a cooler, heat added by a heater, power delivered
    # by an expander, each positive
    _q("cooling_duty", "power", "leg", "duty", ("flow",), symbol="Q̇_cool", title="cooling duty", sign=-1.0,
       on=("cooler",)),
    _q("heating_duty", "power", "leg", "duty", ("flow",), symbol="Q̇_heat", title="heating duty", on=("heater",)),
    _q("power_output", "power", "leg", "power", ("flow",), symbol="P_out", title="gas power output", sign=-1.0,
       on=("expander",)),
    _q("shaft_power_output", "power", "leg", "shaft_power", ("flow",), symbol="P_{shaft,out}",
       title="shaft power output", sign=-1.0, on=("expander",)),
    # reciprocating stages: the cylinder's own geometry (legs with machine: reciprocating)
    _q("displacement", "volume_flow", "leg", "displacement", ("flow",), symbol="V̇_d", title="piston displacement"),
    _q("volumetric_efficiency", "dimensionless", "leg", "volumetric_efficiency", ("flow",), symbol="η_v",
       title="volumetric efficiency"),
    _q("cylinder_flow", "mass_flow", "leg", "cylinder_flow", ("flow",), symbol="ṁ_cyl",
       title="mass flow the cylinders pass"),
    _q("capacity", "dimensionless", "leg", "capacity", ("flow",), symbol="ṁ_cyl/ṁ",
       title="cylinder capacity (cylinder flow / required flow)"),
    _q("rod_load_compression", "force", "leg", "rod_load_compression", ("flow",), symbol="F_c",
       title="gas rod load in compression"),
    _q("rod_load_tension", "force", "leg", "rod_load_tension", ("flow",), symbol="F_t",
       title="gas rod load in tension"),
    _q("indicated_power", "power", "leg", "indicated_power", ("flow",), symbol="P_ind",
       title="indicated power of the ideal cycle"),
    # train totals in the trade's sense, each positive (one driver for a staged machine, the cooling load)
    _q("total_power", "power", "total", "ΣP_comp", ("flow",), symbol="ΣP_comp", title="total compressor gas power"),
    _q("total_power_output", "power", "total", "ΣP_out", ("flow",), symbol="ΣP_out",
       title="total expander gas power output"),
    _q("total_cooling_duty", "power", "total", "ΣQ̇_cool", ("flow",), symbol="ΣQ̇_cool", title="total cooling duty"),
    _q("total_heating_duty", "power", "total", "ΣQ̇_heat", ("flow",), symbol="ΣQ̇_heat", title="total heating duty"),
    _q("total_shaft_power", "power", "total", "ΣP_shaft", ("flow",), symbol="ΣP_shaft",
       title="total compressor shaft power"),
    _q("total_shaft_power_output", "power", "total", "ΣP_{shaft,out}", ("flow",), symbol="ΣP_{shaft,out}",
       title="total expander shaft power output"),
)}

#: Other spellings engineers write, mapped to the names above.
ALIASES = {
    "P": "pressure", "T": "temperature", "v": "specific_volume", "rho": "density", "u": "internal_energy",
    "h": "enthalpy", "s": "entropy", "compressibility": "Z", "V": "volume", "V_dot": "volume_flow",
    "work_by_gas": "W_by_gas", "heat_to_gas": "Q_to_gas", "polytropic_exponent": "n",
    "polytropic_efficiency": "eta_p", "isentropic_efficiency": "eta_s", "dV": "volume_change", "time": "duration",
    "T_min": "min_temperature", "T_max": "max_temperature",
}


#: Flow processes that exchange heat and work along a reversible path: a quantity in the trade's sense
#: (cooling_duty, power_output) also applies there when a limit names the leg.
REVERSIBLE = ("polytropic", "isentropic", "isothermal")


def applies(q: Quantity, process: str) -> bool:
    """Whether a leg of this process can carry the quantity (only restricted for the trade's quantities)."""
    return not q.on or process in q.on or process in REVERSIBLE


def applies_text(q: Quantity) -> str:
    """Where a trade quantity applies, for a message."""
    return f"{q.name} applies to {' and '.join(p + ' legs' for p in q.on)} (and reversible flow legs)"


#: Signed quantities (work and heat INTO the gas positive, closed-system work BY the gas positive) and
#: the quantity in the trade's sense to name when a limit meets a negative value.
SIGNED = {
    "duty": "cooling_duty", "power": "power_output", "shaft_power": "shaft_power_output",
    "W_by_gas": "work_on_gas", "Q_to_gas": "heat_from_gas", "work_on_gas": "W_by_gas", "heat_from_gas": "Q_to_gas",
    "cooling_duty": "heating_duty", "heating_duty": "cooling_duty", "power_output": "power",
    "shaft_power_output": "shaft_power",
}


def quantity_named(name: str) -> Quantity | None:
    """The quantity a name or one of its aliases stands for, or None."""
    return QUANTITIES.get(ALIASES.get(name, name))


def quantity_problem(q: Quantity | None, name: str, system: str) -> tuple[str, str] | None:
    """Why a quantity name cannot be used in a job of this system, or None."""
    if q is None:
        import difflib  # only when a name is not known: the suggestion

        close = difflib.get_close_matches(name, list(QUANTITIES) + list(ALIASES), n=1, cutoff=0.6)
        hint = f"did you mean '{close[0]}'? " if close else ""
        return (f"'{name}' is not a quantity calcdoc knows",
                f"{hint}valid for a {system} system: {', '.join(n for n, x in QUANTITIES.items() if system in x.systems)}")
    if system not in q.systems:
        words = {"flow": "steady-flow", "closed": "closed-system", "vessel": "vessel"}
        other = " and ".join(words[x] for x in q.systems)
        this = {"flow": "steady-flow", "closed": "closed", "vessel": "vessel"}[system]
        return (f"{q.name} is a {other} quantity, and this job is a {this} system",
                f"valid for a {system} system: {', '.join(n for n, x in QUANTITIES.items() if system in x.systems)}")
    return None


def place_text(kind: str, leg: str = "", label: str = "", count: int = 0) -> str:
    """The name of a place a quantity is taken at, as checks and sweeps label it: ``state 2``,
    ``Stage 1 (end, state 2)``, ``train``, ``state 3, governing of 4``."""
    if kind == "state":
        return f"state {label}"
    if kind == "leg_end":
        return f"{leg} (end, state {label})"
    if kind == "train":
        return "train"
    if kind == "governing":
        return f"{leg}, governing of {count}"
    return leg


def series_name(title: str, place: str) -> str:
    """The name of a followed result of a sweep."""
    return f"{title} at {place}"


# -- percent margins ---------------------------------------------------------------------------
#: Which quantities a limit may give a percent margin on, and why. A percent is a fraction of a value
#: measured from a true zero; it is allowed where the quantity has one and the trade states margins that
#: way, refused where the zero is arbitrary (°C, enthalpy) or the trade means something else.
#: (kind, reason): kind "percent" allowed, "gauge" allowed as a percent of the gauge pressure only,
#: "refused" not allowed (the reason says what to give instead).
_POWER = ("percent", "a power or duty has a true zero (no energy flow); driver and cooler ratings are stated "
                     "with a percent margin over it (common practice)")
_HEAD = ("percent", "a head or specific work has a true zero (no work per unit mass); head margins are stated in "
                    "percent (common practice)")
_WORK = ("percent", "work and heat of a leg have a true zero (none exchanged); a percent of them is meaningful "
                    "(common practice)")
_FLOW = ("percent", "a flow has a true zero (no flow); flow margins are stated in percent (common practice)")
_REF_ZERO = ("refused", "its zero is the reference state of the equation of state, chosen by convention: a percent "
                        "of it means nothing")
_NUMBER = ("refused", "a percent of a ratio, exponent or efficiency is easily read as percentage points; give the "
                      "margin as a plain number")
_TEMPERATURE = ("refused", "a temperature in °C or °F has no true zero, and a percent of the absolute temperature is "
                           "not how the trade states a temperature margin (common practice)")
PERCENT_MARGIN: dict[str, tuple[str, str]] = {
    "pressure": ("gauge", "the trade states a pressure margin as a percent of the gauge pressure, whose zero is the "
                          "atmosphere (common practice); a percent of an absolute pressure is not what is meant"),
    "temperature": _TEMPERATURE,
    "discharge_temperature": _TEMPERATURE,
    "specific_volume": ("refused", "the trade states no percent margin on a specific volume; give it in units"),
    "density": ("refused", "the trade states no percent margin on a density; give it in units"),
    "internal_energy": _REF_ZERO, "enthalpy": _REF_ZERO, "entropy": _REF_ZERO,
    "Z": _NUMBER, "pressure_ratio": _NUMBER, "volume_ratio": _NUMBER, "n": _NUMBER, "eta_p": _NUMBER,
    "eta_s": _NUMBER,
    "volume": ("refused", "the trade states no percent margin on the volume of a fixed mass; give it in units"),
    "volume_flow": _FLOW,
    "W_by_gas": _WORK, "Q_to_gas": _WORK, "work_on_gas": _WORK, "heat_from_gas": _WORK,
    "dU": ("refused", "the trade states no percent margin on a change of internal energy; give it in units"),
    "dH": ("refused", "the trade states no percent margin on a change of enthalpy; give it in units"),
    "dS": ("refused", "the trade states no percent margin on a change of entropy; give it in units"),
    "work_in": _HEAD, "head": _HEAD, "head_isentropic": _HEAD,
    "duty": _POWER, "power": _POWER, "shaft_power": _POWER, "cooling_duty": _POWER, "heating_duty": _POWER,
    "power_output": _POWER, "shaft_power_output": _POWER, "total_power": _POWER, "total_power_output": _POWER,
    "total_cooling_duty": _POWER, "total_heating_duty": _POWER, "total_shaft_power": _POWER,
    "total_shaft_power_output": _POWER,
    # vessel legs
    "duration": ("percent", "a duration has a true zero (no time); a margin on a fill or blowdown time is stated in "
                            "percent (common practice)"),
    "mass_change": ("refused", "the trade states no percent margin on a change of mass; give it in units"),
    "volume_change": ("refused", "the trade states no percent margin on a change of volume; give it in units"),
    "max_temperature": _TEMPERATURE, "min_temperature": _TEMPERATURE,
    "max_wall_temperature": _TEMPERATURE, "min_wall_temperature": _TEMPERATURE,
    # reciprocating cylinders
    "displacement": _FLOW, "cylinder_flow": _FLOW, "indicated_power": _POWER,
    "volumetric_efficiency": _NUMBER, "capacity": _NUMBER,
    "rod_load_compression": ("percent", "a rod load has a true zero (no force); frame ratings are compared with the "
                                        "gas load with a percent margin (common practice)"),
    "rod_load_tension": ("percent", "a rod load has a true zero (no force); frame ratings are compared with the gas "
                                    "load with a percent margin (common practice)"),
}

_MARGIN_EXAMPLE = {"temperature": "10 K", "pressure": "0.5 bar", "dimensionless": "0.02", "specific_energy": "5 kJ/kg",
                   "specific_volume": "0.01 m3/kg", "density": "1 kg/m3", "volume": "0.01 m3", "energy": "1 kJ",
                   "entropy": "0.1 kJ/K", "specific_entropy": "0.01 kJ/(kg*K)", "power": "50 kW",
                   "volume_flow": "10 m3/h", "time": "10 s", "mass": "0.1 kg"}


def percent_margin(q: Quantity) -> tuple[str, str]:
    """Whether a limit on ``q`` may give its margin in percent: ("percent" | "gauge" | "refused", reason)."""
    return PERCENT_MARGIN[q.name]


def margin_example(q: Quantity) -> str:
    """An absolute margin of the quantity's kind, for a message (``10 K``, ``0.5 bar``)."""
    return _MARGIN_EXAMPLE.get(q.kind, "a value in the quantity's units")
